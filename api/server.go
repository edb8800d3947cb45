package api

import (
	"context"
	"errors"
	"log/slog"
	"net"
	"net/http"
	"sync/atomic"
	"time"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"

	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/jobs"
)

// @title						scalematch
// @version					1
// @description				Plans scale-model tests in wind and water tunnels: model scale and test conditions that best match a flight's Reynolds and Mach numbers within a facility's limits, the remaining mismatch, the Reynolds effect on drag and the balance loads over the angle-of-attack sweep.
// @description				Every number is SI (m, m², kg, s, K, Pa, N, N·m, kg/m³, Pa·s, m/s); angles are degrees. Any dimensional input may instead be a string with a unit ("35000 ft", "2.5 bar", "15 degC"); a model scale may be a ratio ("1:16").
// @description				Errors are RFC 9457 problem details (application/problem+json) whose "type" is a relative URI /problems/{kind}, one kind per status: invalid-input 400, unauthorized 401 (WWW-Authenticate: Bearer), forbidden 403, not-found 404, method-not-allowed 405, not-acceptable 406 (a chart's Accept), request-timeout 408 (a body that did not arrive in time), conflict 409, precondition-failed 412, body-too-large 413 (bodies are limited to 1 MiB), unsupported-media-type 415 (a body that is not JSON), unprocessable 422 (with "limits"), precondition-required 428, internal 500, unavailable 503 (Retry-After), insufficient-storage 507. Every problem carries the request_id also sent as the X-Request-ID header. A JSON null in a request is the same as leaving the field out.
// @description				/openapi3.json is the OpenAPI 3 form of this document, with required and nullable fields, ranges, unions and every problem; this Swagger 2.0 form at /openapi.json is for older tooling.
// @description				All loads and limits are estimates only: the facility's approved limits, procedures and licensed engineering judgement govern.
// @BasePath					/
// @accept						json
// @produce					json
// @securityDefinitions.apikey	WriteToken
// @in							header
// @name						Authorization
// @description				"Bearer <token>": a write token configured in SCALEMATCH_WRITE_TOKENS; needed only to change the catalog.

// BodyLimit is the largest request body the service reads, in bytes (1 MiB); a
// larger body is answered with 413.
const BodyLimit = 1 << 20

// Config is what the service needs from its caller; main builds it.
type Config struct {
	// Catalog is the facility catalog and plan store; nil: facilities.DemoCatalog,
	// the embedded demo facilities read-only, with no plans kept.
	Catalog facilities.Catalog
	// WriteTokens maps each bearer token allowed to change the catalog to the name
	// recorded in the audit trail. Empty: every catalog change is refused (403).
	WriteTokens map[string]facilities.Actor
	// Registry receives the service's metrics; nil: a new registry of its own, served
	// at /metrics.
	Registry *prometheus.Registry
	// Logger receives one JSON line per request; nil: slog.Default().
	Logger *slog.Logger
	// WriteScopes limits write tokens to the facility ids that match a pattern
	// (path.Match syntax: "tsw-*"); a token not listed may change any facility.
	WriteScopes map[string]string
	// DrainDelay is how long a shutdown reports the service unready (/readyz 503,
	// Connection: close) while it still serves, so that a load balancer stops
	// sending new requests, before it stops accepting connections. 0: none.
	DrainDelay time.Duration
	// MetricsElsewhere leaves /metrics off the API's router: the caller serves
	// MetricsHandler on an address of its own.
	MetricsElsewhere bool
	// FacilityRecheck is how long the planner uses a cached catalog facility before
	// it asks the catalog whether its version is still current: a change made
	// through another replica is planned with after at most this long (a change
	// through this service at once), and every plan records the facility version it
	// used. 0: app.DefaultFacilityRecheck; negative: ask on every plan.
	FacilityRecheck time.Duration
	// ReadyTimeout bounds the store's answer to /readyz: a store that has not
	// answered its ping within it is reported unready (503). 0: DefaultReadyTimeout.
	ReadyTimeout time.Duration
	// Jobs configures the background worker of large campaigns (a store that
	// keeps jobs is needed: SQLite or PostgreSQL).
	Jobs JobsConfig
}

// Server is the HTTP service. Build it with New; it is safe for concurrent use.
type Server struct {
	cfg     Config
	engine  *gin.Engine
	log     *slog.Logger
	metrics *metrics
	// plans is the composition over cfg.Catalog, with the caches of decoded
	// facility versions and stored plan bodies it keeps between requests; nil for
	// the read-only demo catalog (planner).
	plans *app.Planner
	// store remembers a full disk, for /readyz (faults.go).
	store storeState
	// draining is set when a shutdown has begun.
	draining atomic.Bool
	// handler is engine, or engine wrapped by wrapForTest.
	handler http.Handler
	// jobs is the store's job queue (nil without a store); worker runs its jobs
	// here (nil when JobsConfig.Off).
	jobs   jobs.Store
	worker *jobs.Worker
}

// wrapForTest, when set, wraps every Server's handler. Only the package's tests
// set it (contract_internal_test.go): they check every answer against the
// OpenAPI 3 document. It is nil in the service.
var wrapForTest func(http.Handler) http.Handler

// New builds the service: the gin router in release mode with the request-id,
// logging, metrics, panic-recovery and body-limit middleware, the operations
// endpoints (/healthz, /readyz, /metrics, /openapi.json, /docs/) and the /v1 routes.
// It fails only when the metrics cannot be registered on cfg.Registry.
func New(cfg Config) (*Server, error) {
	if cfg.Logger == nil {
		cfg.Logger = slog.Default()
	}
	if cfg.Registry == nil {
		cfg.Registry = prometheus.NewRegistry()
	}
	if cfg.ReadyTimeout <= 0 {
		cfg.ReadyTimeout = DefaultReadyTimeout
	}
	if cfg.Catalog == nil {
		cfg.Catalog = facilities.DemoCatalog{}
	}
	m, err := newMetrics(cfg.Registry)
	if err != nil {
		return nil, err
	}
	gin.SetMode(gin.ReleaseMode)
	e := gin.New()
	e.HandleMethodNotAllowed = true
	e.RedirectTrailingSlash = false
	e.RedirectFixedPath = false
	e.ContextWithFallback = true
	s := &Server{cfg: cfg, engine: e, log: cfg.Logger, metrics: m}
	if _, demo := cfg.Catalog.(facilities.DemoCatalog); !demo {
		s.plans = app.NewPlanner(cfg.Catalog, cfg.FacilityRecheck)
	}
	s.setUpJobs()
	e.Use(s.requestID, s.observe, s.recoverPanic, s.requireBody, s.headers, s.limitBody)
	e.NoRoute(s.noRoute)
	e.NoMethod(s.noMethod)
	s.registerOperations()
	s.registerDocs()
	s.routes()
	s.handler = e
	if wrapForTest != nil {
		s.handler = wrapForTest(e)
	}
	return s, nil
}

// Handler returns the service as an http.Handler.
func (s *Server) Handler() http.Handler { return s.handler }

// routes registers every route. Each group of endpoints lives in its own file:
// planning.go (atmosphere, conditions, plans, batch, loads, groups, envelope) and
// catalog.go (facility catalog, versions, stored plans).
func (s *Server) routes() {
	v1 := s.engine.Group("/v1")
	s.registerPlanning(v1)
	s.registerCatalog(v1)
}

// Server limits. The write timeout bounds the slowest plan batch; the idle timeout
// closes kept-alive connections nobody uses.
const (
	readHeaderTimeout = 5 * time.Second
	readTimeout       = 30 * time.Second
	writeTimeout      = 120 * time.Second
	idleTimeout       = 120 * time.Second
	maxHeaderBytes    = 64 << 10
	// ShutdownGrace is how long a shutdown waits for in-flight requests to finish
	// before it closes their connections.
	ShutdownGrace = 30 * time.Second
)

// ListenAndServe listens on the TCP address addr and serves until ctx is done,
// then drains in-flight requests (for at most ShutdownGrace) and returns. It does
// not close cfg.Catalog: the caller that opened the store closes it afterwards.
func (s *Server) ListenAndServe(ctx context.Context, addr string) error {
	var lc net.ListenConfig
	ln, err := lc.Listen(ctx, "tcp", addr)
	if err != nil {
		return err
	}
	return s.Serve(ctx, ln)
}

// Serve serves on ln until ctx is done, then shuts down gracefully as
// ListenAndServe does. It closes ln.
func (s *Server) Serve(ctx context.Context, ln net.Listener) error {
	hs := &http.Server{
		Handler:           s.handler,
		ReadHeaderTimeout: readHeaderTimeout,
		ReadTimeout:       readTimeout,
		WriteTimeout:      writeTimeout,
		IdleTimeout:       idleTimeout,
		MaxHeaderBytes:    maxHeaderBytes,
		ErrorLog:          slog.NewLogLogger(s.log.Handler(), slog.LevelWarn),
		BaseContext:       func(net.Listener) context.Context { return context.WithoutCancel(ctx) },
	}
	served := make(chan error, 1)
	go func() { served <- hs.Serve(ln) }()
	// The worker stops with the service: it releases the jobs it holds, so that
	// another replica (or this one after its restart) takes them at once.
	jctx, stopJobs := context.WithCancel(context.WithoutCancel(ctx))
	jobsDone := make(chan struct{})
	go func() { s.RunJobs(jctx); close(jobsDone) }()
	defer func() { stopJobs(); <-jobsDone }()
	s.log.Info("listening", "addr", ln.Addr().String())
	select {
	case err := <-served:
		return err
	case <-ctx.Done():
	}
	// Unready first: /readyz answers 503 and every answer asks to close its
	// connection, so that a load balancer sends no new request here; then stop
	// accepting, and finish the requests in flight.
	s.draining.Store(true)
	if s.cfg.DrainDelay > 0 {
		s.log.Info("shutting down: unready, still serving", "drain", s.cfg.DrainDelay.String())
		time.Sleep(s.cfg.DrainDelay)
	}
	s.log.Info("shutting down: draining in-flight requests", "grace", ShutdownGrace.String())
	sctx, cancel := context.WithTimeout(context.Background(), ShutdownGrace)
	defer cancel()
	err := hs.Shutdown(sctx)
	if serr := <-served; serr != nil && !errors.Is(serr, http.ErrServerClosed) {
		err = errors.Join(err, serr)
	}
	if err != nil {
		hs.Close()
		return err
	}
	s.log.Info("stopped")
	return nil
}
