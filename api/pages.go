package api

import (
	"context"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
)

// Handle serves h for method and path (gin syntax, e.g. "/plans/:id") behind the
// service's middleware (request id, logging, metrics, panic recovery, body
// limit). The HTML pages (internal/pages) are mounted this way, so that they
// share the JSON endpoints' handling and need no router of their own.
func (s *Server) Handle(method, path string, h http.Handler) {
	s.engine.Handle(method, path, gin.WrapH(h))
}

// Loads is POST /v1/loads without HTTP: the same composition over the service's
// catalog.
func (s *Server) Loads(ctx context.Context, req *schema.LoadsRequest) (*schema.LoadsResponse, error) {
	out, err := s.planner().Loads(ctx, req)
	return out, s.classify(err)
}

// StoredPlan is GET /v1/plans/{id} without HTTP: the stored answer and the
// facility version it used (app.StoredPlan).
func (s *Server) StoredPlan(ctx context.Context, id string) (*schema.PlanResponse, *facilities.Facility, error) {
	p, f, err := app.StoredPlan(ctx, s.cfg.Catalog, id)
	return p, f, s.classify(err)
}

// Facilities lists the catalog's current facilities, as GET /v1/facilities.
func (s *Server) Facilities(ctx context.Context) ([]facilities.Facility, error) {
	fs, err := s.cfg.Catalog.Facilities(ctx)
	return fs, s.classify(err)
}

// Facility returns a facility's current version, as GET /v1/facilities/{id}.
func (s *Server) Facility(ctx context.Context, id string) (facilities.Facility, error) {
	f, err := s.cfg.Catalog.Facility(ctx, id)
	return f, s.classify(err)
}

// Versions returns a facility's history, as GET /v1/facilities/{id}/versions.
func (s *Server) Versions(ctx context.Context, id string) ([]facilities.Change, error) {
	v, err := s.cfg.Catalog.Versions(ctx, id)
	return v, s.classify(err)
}

// StatusOf returns the HTTP status the service answers err with (kindOf: the
// table in schema.Problem's doc comment), for callers that write their own
// body, such as the HTML pages: 503 for a store that does not answer (send
// Retry-After: RetryAfterSeconds), 507 for a full one, 500 for an error that is
// no fault of the client or the store. The errors of the Server's methods
// (Loads, StoredPlan, Facilities, Facility, Versions) are classified already.
func StatusOf(err error) int {
	if err == nil {
		return http.StatusOK
	}
	return kindOf(err).status
}
