package api

import (
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/internal/app"
)

// registerPlanning registers the planning endpoints on the /v1 group: atmosphere,
// conditions, plans, the plan batch, loads, groups, campaigns, the facility envelope charts and
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
	v1.POST("/campaigns", s.postCampaign)
	v1.GET("/campaigns", s.listCampaigns)
	v1.GET("/campaigns/:id", s.getCampaign)
	v1.DELETE("/campaigns/:id", s.deleteCampaign)
	v1.GET("/facilities/:id/envelope.svg", s.getEnvelope)
	v1.GET("/facilities/:id/envelope.png", s.getEnvelope)
	v1.GET("/facilities/:id/envelope.pdf", s.getEnvelope)
	v1.GET("/plans/:id/charts/:chart", s.getPlanChart)
}

// planner returns the composition over the configured catalog. The read-only demo
// catalog is passed as nil, so the composition uses its decoded-once demo table.
func (s *Server) planner() *app.Planner {
	if s.plans == nil {
		return &app.Planner{}
	}
	return s.plans
}

// postLoads answers POST /v1/loads.
//
//	@Summary		Balance loads at given test conditions
//	@Description	The balance loads over the α sweep (forces in N, moments in N·m, at the balance moment centre, body axes, wall corrections and the model's weight included) for a model of the given scale at the given test settings (mach or speed m/s, stagnation pressure Pa, stagnation temperature K), with each point's utilisation of the balance's ratings and, in max_safe_dynamic_pressure (Pa), the dynamic pressure at which the worst point reaches the allowed load (rating ÷ safety factor) by this steady, static estimate: not a safe limit, the safety factor is the only margin left for the estimate's error. The model's weight is left out when model_mass is not given, which makes the check unconservative (a caution says so). loads is one object when installation.balance_id names a balance and a list, one per balance of the facility, when it does not. No optimisation.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		schema.LoadsRequest	true	"article, facility or facility_id, model.scale, installation, alpha (degrees), test settings"
//	@Success		200		{object}	schema.LoadsResponse
//	@Failure		400		{object}	schema.Problem	"bad input: every bad field named by its JSON path"
//	@Failure		404		{object}	schema.Problem	"facility_id names no facility"
//	@Failure		413		{object}	schema.Problem	"body too large"
//	@Router			/v1/loads [post]
func (s *Server) postLoads(c *gin.Context) {
	var req schema.LoadsRequest
	if !s.decodeBody(c, &req) {
		return
	}
	resp, err := s.planner().Loads(c.Request.Context(), &req)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, resp)
}

// postConditions answers POST /v1/conditions.
//
//	@Summary		Test-section state at given settings
//	@Description	The state of a facility's test section at a Mach number (or a speed in m/s), a stagnation pressure in Pa and a stagnation temperature in K: static temperature K, pressure Pa, density kg/m³, viscosity Pa·s, speed of sound m/s, compressibility factor; dynamic pressure Pa; Reynolds number per metre 1/m; and every facility limit the settings break (an empty list when none). Numbers are SI or strings with units ("2.2 bar", "40 degC", "250 kt"). A stagnation value may be left out when the facility fixes it.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		schema.ConditionsRequest	true	"facility or facility_id; mach or speed (m/s); stagnation_pressure (Pa); stagnation_temperature (K)"
//	@Success		200		{object}	schema.ConditionsResponse
//	@Failure		400		{object}	schema.Problem	"bad input: every bad field named by its JSON path"
//	@Failure		404		{object}	schema.Problem	"facility_id names no facility"
//	@Failure		413		{object}	schema.Problem	"body too large"
//	@Router			/v1/conditions [post]
func (s *Server) postConditions(c *gin.Context) {
	var req schema.ConditionsRequest
	if !s.decodeBody(c, &req) {
		return
	}
	resp, err := s.planner().Conditions(c.Request.Context(), &req)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, resp)
}

// postGroups answers POST /v1/groups.
//
//	@Summary		Dimensionless groups (Buckingham Π)
//	@Description	The rank of the variables' dimension matrix and the n − rank independent dimensionless groups (Buckingham 1914), each with its exponents as small integers or exact fractions ("1/2") and its usual name when recognised. Each variable gives a unit ("N", "kg/m^3", "Pa*s") or a dimension over M L T Θ ("M L^-1 T^-1"). repeating optionally names the repeating variables.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		schema.GroupsRequest	true	"variables with unit or dimensions; optional repeating"
//	@Success		200		{object}	schema.GroupsResponse
//	@Failure		400		{object}	schema.Problem	"bad input: every bad field named by its JSON path"
//	@Router			/v1/groups [post]
func (s *Server) postGroups(c *gin.Context) {
	var req schema.GroupsRequest
	if !s.decodeBody(c, &req) {
		return
	}
	resp, err := app.Groups(&req)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, resp)
}
