package api

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strconv"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/check"
)

// problemKind is one row of the table in schema.Problem's doc comment.
type problemKind struct {
	status int
	slug   string
	title  string
}

var (
	kindInvalid              = problemKind{http.StatusBadRequest, "invalid-input", "Invalid input"}
	kindUnauthorized         = problemKind{http.StatusUnauthorized, "unauthorized", "Authentication required"}
	kindForbidden            = problemKind{http.StatusForbidden, "forbidden", "Forbidden"}
	kindNotFound             = problemKind{http.StatusNotFound, "not-found", "Not found"}
	kindMethodNotAllowed     = problemKind{http.StatusMethodNotAllowed, "method-not-allowed", "Method not allowed"}
	kindNotAcceptable        = problemKind{http.StatusNotAcceptable, "not-acceptable", "Not acceptable"}
	kindConflict             = problemKind{http.StatusConflict, "conflict", "Conflict"}
	kindRequestTimeout       = problemKind{http.StatusRequestTimeout, "request-timeout", "Request timeout"}
	kindPreconditionFailed   = problemKind{http.StatusPreconditionFailed, "precondition-failed", "Precondition failed"}
	kindUnsupportedMedia     = problemKind{http.StatusUnsupportedMediaType, "unsupported-media-type", "Unsupported media type"}
	kindBodyTooLarge         = problemKind{http.StatusRequestEntityTooLarge, "body-too-large", "Request body too large"}
	kindUnprocessable        = problemKind{http.StatusUnprocessableEntity, "unprocessable", "No feasible plan"}
	kindPreconditionRequired = problemKind{http.StatusPreconditionRequired, "precondition-required", "Precondition required"}
	kindInternal             = problemKind{http.StatusInternalServerError, "internal", "Internal error"}
	kindUnavailable          = problemKind{http.StatusServiceUnavailable, "unavailable", "Service unavailable"}
	kindInsufficientStorage  = problemKind{http.StatusInsufficientStorage, "insufficient-storage", "Insufficient storage"}
)

// problemKinds lists every kind, by status.
var problemKinds = []problemKind{
	kindInvalid, kindUnauthorized, kindForbidden, kindNotFound, kindMethodNotAllowed,
	kindNotAcceptable, kindRequestTimeout, kindConflict, kindPreconditionFailed,
	kindBodyTooLarge, kindUnsupportedMedia, kindUnprocessable, kindPreconditionRequired,
	kindInternal, kindUnavailable, kindInsufficientStorage,
}

// ProblemKind is one kind of problem the service answers: its HTTP status, its
// type URI ("/problems/invalid-input") and its fixed title.
type ProblemKind struct {
	Status int
	Type   string
	Title  string
}

// ProblemKinds returns every kind of problem the service answers, ordered by
// status (the table in schema.Problem's doc comment). The OpenAPI 3 generator
// (docs/openapi3gen) documents each.
func ProblemKinds() []ProblemKind {
	out := make([]ProblemKind, len(problemKinds))
	for i, k := range problemKinds {
		out[i] = ProblemKind{Status: k.status, Type: "/problems/" + k.slug, Title: k.title}
	}
	return out
}

// codeKinds maps each domain error code to its problem kind: the one place where
// codes become statuses.
var codeKinds = map[check.Code]problemKind{
	check.CodeInvalid:              kindInvalid,
	check.CodeNotFound:             kindNotFound,
	check.CodeConflict:             kindConflict,
	check.CodeUnprocessable:        kindUnprocessable,
	check.CodeUnauthorized:         kindUnauthorized,
	check.CodeForbidden:            kindForbidden,
	check.CodePreconditionFailed:   kindPreconditionFailed,
	check.CodePreconditionRequired: kindPreconditionRequired,
}

func (k problemKind) problem(c *gin.Context, detail string) schema.Problem {
	return schema.Problem{
		Type:      "/problems/" + k.slug,
		Title:     k.title,
		Status:    k.status,
		Detail:    detail,
		Instance:  c.Request.URL.Path,
		RequestID: RequestID(c.Request.Context()),
	}
}

// kindOf maps err to its problem kind, the one place where errors become
// statuses:
//
//	*check.Error                      by its Code (table in schema.Problem's comment)
//	atmosphere.ErrRange                    400
//	*http.MaxBytesError                    413
//	notAcceptableError                     406
//	*clientFault                           400, 408 or 415
//	facilities.ErrStorageFull              507 (and /readyz unready)
//	facilities.ErrUnavailable              503 with Retry-After
//	context.DeadlineExceeded               503
//	anything else                          500 "internal error", logged in full
//
// A store's error is classified first (classify).
func kindOf(err error) problemKind {
	var de *check.Error
	var mbe *http.MaxBytesError
	var nae notAcceptableError
	var cf *clientFault
	switch {
	case errors.As(err, &de):
		if k, ok := codeKinds[de.Code]; ok {
			return k
		}
	case errors.As(err, &nae):
		return kindNotAcceptable
	case errors.Is(err, atmosphere.ErrRange):
		return kindInvalid
	case errors.As(err, &mbe):
		return kindBodyTooLarge
	case errors.As(err, &cf):
		return cf.kind
	case errors.Is(err, facilities.ErrStorageFull):
		return kindInsufficientStorage
	case errors.Is(err, facilities.ErrUnavailable), errors.Is(err, context.DeadlineExceeded):
		return kindUnavailable
	}
	return kindInternal
}

// classify marks a store's errors that mean it does not answer or is full
// (facilities.ErrorClassifier), when the catalog can tell.
func (s *Server) classify(err error) error {
	if cl, ok := s.cfg.Catalog.(facilities.ErrorClassifier); ok && err != nil {
		return cl.ClassifyError(err)
	}
	return err
}

// problem maps err to the problem the client sees (kindOf), with its detail.
// Handlers that embed a problem in a larger answer (the plan batch) call it
// directly; the others call fail.
func (s *Server) problem(c *gin.Context, err error) schema.Problem {
	err = s.classify(err)
	k := kindOf(err)
	var de *check.Error
	var mbe *http.MaxBytesError
	var cf *clientFault
	switch {
	case k == kindInternal:
		s.logger(c).Error("internal error", "error", err.Error())
		return kindInternal.problem(c, "internal error")
	case errors.As(err, &de):
		detail := de.Message
		if detail == "" && len(de.Fields) == 0 {
			detail = de.Error()
		}
		if detail == "" {
			detail = check.InvalidCount(len(de.Fields))
		}
		p := k.problem(c, detail)
		p.Errors = de.Fields
		p.Limits = de.Limits
		return p
	case errors.As(err, &mbe):
		return k.problem(c, fmt.Sprintf("the request body is larger than %d bytes", mbe.Limit))
	case errors.As(err, &cf):
		s.metrics.clientFaults.WithLabelValues(cf.metric).Inc()
		return k.problem(c, cf.msg)
	case k == kindInsufficientStorage:
		s.storeFull()
		s.logger(c).Warn("store full", "error", err.Error())
		return k.problem(c, "the store has no space left: changes and new plans cannot be stored until space is freed; reads still work")
	case errors.Is(err, facilities.ErrUnavailable):
		s.logger(c).Warn("store unavailable", "error", err.Error())
		return k.problem(c, fmt.Sprintf("the store does not answer; try again in %d s", RetryAfterSeconds))
	case errors.Is(err, context.DeadlineExceeded):
		s.logger(c).Warn("request ran out of time", "error", err.Error())
		return k.problem(c, "the request ran out of time; try again")
	}
	return k.problem(c, err.Error())
}

// fail answers the request with the problem for err and stops the handler chain.
// A client that has gone (errClientGone, or the request's context cancelled) gets
// no answer: the request is logged and counted with StatusClientClosed.
func (s *Server) fail(c *gin.Context, err error) {
	if errors.Is(err, errClientGone) || errors.Is(err, context.Canceled) && c.Request.Context().Err() != nil {
		s.metrics.clientFaults.WithLabelValues("client_gone").Inc()
		c.AbortWithStatus(StatusClientClosed)
		return
	}
	s.writeProblem(c, s.problem(c, err))
}

// writeProblem writes p as application/problem+json and stops the handler chain.
func (s *Server) writeProblem(c *gin.Context, p schema.Problem) {
	switch p.Status {
	case http.StatusUnauthorized:
		c.Header("WWW-Authenticate", `Bearer realm="scalematch"`)
	case http.StatusServiceUnavailable:
		c.Header("Retry-After", strconv.Itoa(RetryAfterSeconds))
	}
	truncateProblem(&p)
	c.Header("Cache-Control", cacheNever)
	c.Header("ETag", "")
	c.Abort()
	c.Render(p.Status, problemRender{p})
}

// noRoute answers paths that no route serves.
func (s *Server) noRoute(c *gin.Context) {
	s.writeProblem(c, kindNotFound.problem(c, fmt.Sprintf("no route %s %s", c.Request.Method, c.Request.URL.Path)))
}

// noMethod answers a known path asked with a method it does not serve.
func (s *Server) noMethod(c *gin.Context) {
	s.writeProblem(c, kindMethodNotAllowed.problem(c, fmt.Sprintf("%s is not served on %s", c.Request.Method, c.Request.URL.Path)))
}

// onlyPost answers a route that exists for POST only, asked with another method.
func (s *Server) onlyPost(c *gin.Context) {
	c.Header("Allow", http.MethodPost)
	s.noMethod(c)
}

// problemRender writes a Problem as application/problem+json.
type problemRender struct{ p schema.Problem }

func (r problemRender) Render(w http.ResponseWriter) error {
	r.WriteContentType(w)
	return json.NewEncoder(w).Encode(r.p)
}

func (r problemRender) WriteContentType(w http.ResponseWriter) {
	w.Header().Set("Content-Type", schema.ContentTypeProblem)
}
