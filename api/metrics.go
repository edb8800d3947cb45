package api

import (
	"errors"
	"strconv"
	"time"

	"github.com/prometheus/client_golang/prometheus"
	"github.com/prometheus/client_golang/prometheus/collectors"
)

// metrics are the service's Prometheus collectors, all registered on Config.Registry.
//
//	scalematch_http_requests_total{method,route,status}            counter
//	scalematch_http_request_duration_seconds{method,route,status}  histogram, s
//	scalematch_http_requests_in_flight                             gauge
//	scalematch_planner_duration_seconds                            histogram, s
//	scalematch_http_client_faults_total{kind}                      counter
//
// A client fault (kind short_body, malformed_body, body_timeout, client_gone) is
// a request that failed by the client's doing: answered 400 or 408, or not at all
// (status 499 in the request counter), and never counted among the 5xx.
//
// route is the route template ("/v1/facilities/:id"), or "unmatched".
type metrics struct {
	requests *prometheus.CounterVec
	duration *prometheus.HistogramVec
	inFlight prometheus.Gauge
	planner  prometheus.Histogram
	// clientFaults counts the client faults by kind.
	clientFaults *prometheus.CounterVec
}

func newMetrics(reg *prometheus.Registry) (*metrics, error) {
	m := &metrics{
		requests: prometheus.NewCounterVec(prometheus.CounterOpts{
			Name: "scalematch_http_requests_total",
			Help: "HTTP requests served, by method, route template and status.",
		}, []string{"method", "route", "status"}),
		duration: prometheus.NewHistogramVec(prometheus.HistogramOpts{
			Name:    "scalematch_http_request_duration_seconds",
			Help:    "Time from the request's arrival to its response, in seconds, by method, route template and status.",
			Buckets: []float64{0.0005, 0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10},
		}, []string{"method", "route", "status"}),
		inFlight: prometheus.NewGauge(prometheus.GaugeOpts{
			Name: "scalematch_http_requests_in_flight",
			Help: "HTTP requests being served now.",
		}),
		planner: prometheus.NewHistogram(prometheus.HistogramOpts{
			Name:    "scalematch_planner_duration_seconds",
			Help:    "Time the planner takes to optimise one plan, in seconds.",
			Buckets: []float64{0.0001, 0.00025, 0.0005, 0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1},
		}),
		clientFaults: prometheus.NewCounterVec(prometheus.CounterOpts{
			Name: "scalematch_http_client_faults_total",
			Help: "Requests that failed by the client's doing (short_body, malformed_body, body_timeout, client_gone), counted apart from the service's 5xx faults.",
		}, []string{"kind"}),
	}
	var err error
	m.requests, err = register(reg, m.requests)
	if err != nil {
		return nil, err
	}
	if m.duration, err = register(reg, m.duration); err != nil {
		return nil, err
	}
	if m.inFlight, err = register(reg, m.inFlight); err != nil {
		return nil, err
	}
	if m.planner, err = register(reg, m.planner); err != nil {
		return nil, err
	}
	if m.clientFaults, err = register(reg, m.clientFaults); err != nil {
		return nil, err
	}
	// The Go runtime and process collectors; a registry that has them already keeps
	// its own.
	if _, err := register(reg, collectors.NewGoCollector()); err != nil {
		return nil, err
	}
	if _, err := register(reg, collectors.NewProcessCollector(collectors.ProcessCollectorOpts{})); err != nil {
		return nil, err
	}
	return m, nil
}

// register registers c on reg, or returns the equal collector reg already has (a
// second Server on one registry shares the first one's series).
func register[C prometheus.Collector](reg *prometheus.Registry, c C) (C, error) {
	err := reg.Register(c)
	if err == nil {
		return c, nil
	}
	var are prometheus.AlreadyRegisteredError
	if errors.As(err, &are) {
		if existing, ok := are.ExistingCollector.(C); ok {
			return existing, nil
		}
	}
	return c, err
}

func (m *metrics) observeRequest(method, route string, status int, d time.Duration) {
	code := strconv.Itoa(status)
	m.requests.WithLabelValues(method, route, code).Inc()
	m.duration.WithLabelValues(method, route, code).Observe(d.Seconds())
}

// observePlanner records the time one plan's optimisation took; planning handlers
// call it once per plan (a batch once per request in it).
func (s *Server) observePlanner(d time.Duration) {
	s.metrics.planner.Observe(d.Seconds())
}
