package api

import (
	"github.com/gin-gonic/gin"

	"scalematch/facilities"
)

// registerPlanning registers the planning endpoints on the /v1 group: atmosphere,
// conditions, plans, the plan batch, loads, groups, the facility envelope charts and
// the charts of a stored plan (charts.go).
func (s *Server) registerPlanning(v1 *gin.RouterGroup) {
	v1.GET("/atmosphere", s.getAtmosphere)
	v1.POST("/conditions", s.postConditions)
	v1.POST("/plans", s.postPlan)
	v1.POST("/plans/batch", s.postPlanBatch)
	// /v1/plans/:id would take "batch" for a plan id: the batch is POST only.
	v1.GET("/plans/batch", s.onlyPost)
	v1.POST("/loads", s.postLoads)
	v1.POST("/groups", s.postGroups)
	v1.GET("/facilities/:id/envelope.svg", s.getEnvelope)
	v1.GET("/facilities/:id/envelope.png", s.getEnvelope)
	v1.GET("/facilities/:id/envelope.pdf", s.getEnvelope)
	v1.GET("/plans/:id/charts/:chart", s.getPlanChart)
}

// planner returns the composition over the configured catalog. The read-only demo
// catalog is passed as nil, so the composition uses its decoded-once demo table.
func (s *Server) planner() *Planner {
	if _, demo := s.cfg.Catalog.(facilities.DemoCatalog); demo {
		return &Planner{}
	}
	return &Planner{Catalog: s.cfg.Catalog, cache: s.facilities, stored: s.plans}
}
