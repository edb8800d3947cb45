package api

import (
	"context"
	"net/http"
	"time"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/internal/app"
)

// postPlan answers POST /v1/plans.
//
//	@Summary		Plan a scale-model test
//	@Description	Chooses the model scale and the test Mach number (speed in water, m/s), stagnation pressure (Pa) and stagnation temperature (K) that best match the flight's Reynolds and Mach numbers within the facility's limits and the balance's rated loads. The answer gives the flight (speeds m/s, dynamic pressure Pa, Reynolds number on the full-scale reference length), the model (scale, lengths m, areas m², blockage fraction), the test state, the mismatch (Re_test/Re_flight, M_test − M_flight), every binding limit with the Reynolds gain in per cent for one more per cent of it, wall corrections, balance loads over the α sweep (N, N·m, at the balance moment centre, weight included when model_mass is given), the Reynolds effect on skin-friction drag (drag counts), a schedule (hours), warnings and cautions. The same request gets the same id and, when a store is configured, byte-identical answers; GET /v1/plans/{id} returns it later. Inputs are SI numbers or strings with units; a scale may be "1:16".
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		schema.PlanRequest	true	"flight, article, facility or facility_id, model, installation, alpha (degrees), objective"
//	@Success		200		{object}	schema.PlanResponse
//	@Failure		400		{object}	schema.Problem	"bad input: every bad field named by its JSON path"
//	@Failure		404		{object}	schema.Problem	"facility_id names no facility"
//	@Failure		413		{object}	schema.Problem	"body too large"
//	@Failure		422		{object}	schema.Problem	"no plan satisfies the hard limits; limits names those that conflict"
//	@Router			/v1/plans [post]
func (s *Server) postPlan(c *gin.Context) {
	p := s.planner()
	ctx := c.Request.Context()
	if a, ok := p.Catalog.(planAnnouncer); ok {
		var done func()
		ctx, done = a.ExpectPlan(ctx)
		defer done()
	}
	var req schema.PlanRequest
	if !s.decodeBody(c, &req) {
		return
	}
	body, err := s.timedPlan(ctx, p, &req)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answerBytes(c, http.StatusOK, "application/json; charset=utf-8", body)
}

// planAnnouncer is a catalog whose group commits gather more plans when told
// that one is on its way (ExpectPlan of the SQLite and PostgreSQL stores): postPlan announces its plan
// before decoding the request, so that concurrent requests share one commit.
type planAnnouncer interface {
	ExpectPlan(ctx context.Context) (context.Context, func())
}

// timedPlan plans req, stores it, and records the planner's time in the metrics.
func (s *Server) timedPlan(ctx context.Context, p *app.Planner, req *schema.PlanRequest) ([]byte, error) {
	t := time.Now()
	body, err := p.PlanJSON(ctx, req)
	s.observePlanner(time.Since(t))
	return body, err
}
