package api

import (
	"context"
	"errors"
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
	return s.planner().Loads(ctx, req)
}

// StoredPlan is GET /v1/plans/{id} without HTTP: the stored answer and the
// facility version it used (app.StoredPlan).
func (s *Server) StoredPlan(ctx context.Context, id string) (*schema.PlanResponse, *facilities.Facility, error) {
	return app.StoredPlan(ctx, s.cfg.Catalog, id)
}

// Facilities lists the catalog's current facilities, as GET /v1/facilities.
func (s *Server) Facilities(ctx context.Context) ([]facilities.Facility, error) {
	return s.cfg.Catalog.Facilities(ctx)
}

// Facility returns a facility's current version, as GET /v1/facilities/{id}.
func (s *Server) Facility(ctx context.Context, id string) (facilities.Facility, error) {
	return s.cfg.Catalog.Facility(ctx, id)
}

// Versions returns a facility's history, as GET /v1/facilities/{id}/versions.
func (s *Server) Versions(ctx context.Context, id string) ([]facilities.Change, error) {
	return s.cfg.Catalog.Versions(ctx, id)
}

// StatusOf returns the HTTP status the service answers err with (the table in
// schema.Problem's doc comment), for callers that write their own body, such as the
// HTML pages: 500 for an error that is no domain error.
func StatusOf(err error) int {
	var de *facilities.Error
	var nae notAcceptableError
	switch {
	case err == nil:
		return http.StatusOK
	case errors.As(err, &de):
		if k, ok := codeKinds[de.Code]; ok {
			return k.status
		}
	case errors.As(err, &nae):
		return kindNotAcceptable.status
	}
	return kindInternal.status
}
