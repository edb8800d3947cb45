package api

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"time"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus/promhttp"
)

// DefaultReadyTimeout bounds the store's answer to the readiness probe when
// Config.ReadyTimeout is 0.
const DefaultReadyTimeout = 2 * time.Second

// Health is the answer of GET /healthz and GET /readyz.
type Health struct {
	// Status is "ok" (/healthz) or "ready" (/readyz).
	Status string `json:"status" example:"ok"`
	// Store is "ok" when the catalog store answered; only on /readyz.
	Store string `json:"store,omitempty" example:"ok"`
}

func (s *Server) registerOperations() {
	s.engine.GET("/healthz", s.healthz)
	s.engine.GET("/readyz", s.readyz)
	// Load balancers often probe with HEAD: same status, no body.
	s.engine.HEAD("/healthz", s.healthz)
	s.engine.HEAD("/readyz", s.readyz)
	if !s.cfg.MetricsElsewhere {
		s.engine.GET("/metrics", gin.WrapH(s.MetricsHandler()))
	}
}

// MetricsHandler serves the registry's metrics: at /metrics on the API's own
// address, or where the caller mounts it when Config.MetricsElsewhere.
//
//	@Summary		Metrics
//	@Description	Prometheus text format: request counts and latency by route template and status, requests in flight, planner time, Go runtime and process figures.
//	@Tags			operations
//	@Produce		plain
//	@Success		200	{string}	string	"Prometheus text exposition format"
//	@Router			/metrics [get]
func (s *Server) MetricsHandler() http.Handler {
	return promhttp.HandlerFor(s.cfg.Registry, promhttp.HandlerOpts{ErrorLog: promLogger{s}})
}

// healthz says the process serves.
//
//	@Summary		Liveness
//	@Description	200 whenever the process serves requests; it does not touch the store.
//	@Tags			operations
//	@Produce		json
//	@Success		200	{object}	Health
//	@Router			/healthz [get]
//	@Router			/healthz [head]
func (s *Server) healthz(c *gin.Context) {
	s.answer(c, http.StatusOK, Health{Status: "ok"})
}

// readyz says whether the store answers.
//
//	@Summary		Readiness
//	@Description	200 when the catalog store answers a ping within 2 s, 503 otherwise; 503 too for 30 s after the store said its disk was full (a 507), unless a write succeeds first, and while the service drains before it stops.
//	@Tags			operations
//	@Produce		json
//	@Success		200	{object}	Health
//	@Failure		503	{object}	schema.Problem
//	@Router			/readyz [get]
//	@Router			/readyz [head]
func (s *Server) readyz(c *gin.Context) {
	ctx, cancel := context.WithTimeout(c.Request.Context(), s.cfg.ReadyTimeout)
	defer cancel()
	if s.draining.Load() {
		s.writeProblem(c, kindUnavailable.problem(c, "the service is shutting down"))
		return
	}
	if s.storeIsFull() {
		s.logger(c).Warn("not ready: the store is full")
		s.writeProblem(c, kindUnavailable.problem(c, "the store has no space left: new plans and catalog changes fail (507) until space is freed"))
		return
	}
	if err := s.cfg.Catalog.Ping(ctx); err != nil {
		detail := "the store does not answer"
		if errors.Is(err, context.DeadlineExceeded) {
			detail = "the store did not answer within " + s.cfg.ReadyTimeout.String()
		}
		s.logger(c).Warn("store not ready", "error", err.Error())
		s.writeProblem(c, kindUnavailable.problem(c, detail))
		return
	}
	s.answer(c, http.StatusOK, Health{Status: "ready", Store: "ok"})
}

// promLogger passes promhttp's errors to the service's log.
type promLogger struct{ s *Server }

func (l promLogger) Println(v ...any) {
	l.s.log.Error("metrics", "error", fmt.Sprint(v...))
}
