package api_test

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"net/http/httptest"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

// saveCatalog is the demo catalog whose SavePlan the test controls.
type saveCatalog struct {
	facilities.DemoCatalog
	save func(ctx context.Context) error
}

func (c saveCatalog) SavePlan(ctx context.Context, p facilities.PlanRecord) (facilities.PlanRecord, error) {
	if err := c.save(ctx); err != nil {
		return facilities.PlanRecord{}, err
	}
	return p, nil
}

// faultServer starts a service over cat with a short body read timeout and
// returns it, its log and its registry.
func faultServer(t *testing.T, cat facilities.Catalog) (*httptest.Server, *testfixture.LogBuffer, *prometheus.Registry) {
	t.Helper()
	logs := &testfixture.LogBuffer{}
	reg := prometheus.NewRegistry()
	s, err := api.New(api.Config{Catalog: cat, Registry: reg, Logger: slog.New(slog.NewJSONHandler(logs, nil))})
	require.NoError(t, err)
	ts := httptest.NewUnstartedServer(s.Handler())
	ts.Config.ReadTimeout = 300 * time.Millisecond
	ts.Start()
	t.Cleanup(ts.Close)
	return ts, logs, reg
}

// rawStatus sends head and body on a new connection, half-closes it when
// closeWrite, and returns the answer's status (0 when the server sent none).
func rawStatus(t *testing.T, addr, head, body string, closeWrite bool) int {
	t.Helper()
	conn, err := net.Dial("tcp", addr)
	require.NoError(t, err)
	defer conn.Close()
	_, err = io.WriteString(conn, head+"\r\n"+body)
	require.NoError(t, err)
	if closeWrite {
		require.NoError(t, conn.(*net.TCPConn).CloseWrite())
	}
	conn.SetReadDeadline(time.Now().Add(5 * time.Second))
	resp, err := http.ReadResponse(bufio.NewReader(conn), nil)
	if err != nil {
		return 0
	}
	resp.Body.Close()
	return resp.StatusCode
}

// counter returns the value of a counter series from the registry, 0 when absent.
func counter(t *testing.T, reg *prometheus.Registry, name string, labels map[string]string) float64 {
	t.Helper()
	mfs, err := reg.Gather()
	require.NoError(t, err)
	total := 0.0
	for _, mf := range mfs {
		if mf.GetName() != name {
			continue
		}
	metric:
		for _, m := range mf.GetMetric() {
			for _, lp := range m.GetLabel() {
				if want, ok := labels[lp.GetName()]; ok && want != lp.GetValue() {
					continue metric
				}
			}
			total += m.GetCounter().GetValue()
		}
	}
	return total
}

// TestClientFaults: a body shorter than its Content-Length, a malformed chunk and
// a body that stops arriving answered 500 and logged ERROR; they are 400, 400 and
// 408, logged below ERROR and counted as client faults, with no 5xx.
func TestClientFaults(t *testing.T) {
	ts, logs, reg := faultServer(t, nil)
	addr := ts.Listener.Addr().String()
	cases := []struct {
		name       string
		head, body string
		closeWrite bool
		status     int
		kind       string
	}{
		{"body shorter than its Content-Length",
			"POST /v1/conditions HTTP/1.1\r\nHost: x\r\nContent-Type: application/json\r\nContent-Length: 100\r\n", `{"facility_id": "tsw-1"`, true,
			http.StatusBadRequest, "short_body"},
		{"malformed chunk",
			"POST /v1/conditions HTTP/1.1\r\nHost: x\r\nContent-Type: application/json\r\nTransfer-Encoding: chunked\r\n", "zz\r\n{}\r\n0\r\n\r\n", false,
			http.StatusBadRequest, "malformed_body"},
		{"body that stops arriving",
			"POST /v1/conditions HTTP/1.1\r\nHost: x\r\nContent-Type: application/json\r\nContent-Length: 100\r\n", `{"facility_id"`, false,
			http.StatusRequestTimeout, "body_timeout"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			assert.Equal(t, tc.status, rawStatus(t, addr, tc.head, tc.body, tc.closeWrite))
			assert.Equal(t, 1.0, counter(t, reg, "scalematch_http_client_faults_total", map[string]string{"kind": tc.kind}))
		})
	}
	for _, code := range []string{"500", "503"} {
		assert.Zero(t, counter(t, reg, "scalematch_http_requests_total", map[string]string{"status": code}), "status %s", code)
	}
	assert.NotContains(t, logs.String(), `"level":"ERROR"`)
}

// TestClientGone: a client that goes away while its plan is being stored gets no
// answer; the request is logged at INFO with status 499 and counted as a client
// fault, not a 500.
func TestClientGone(t *testing.T) {
	started := make(chan struct{}, 1)
	cat := saveCatalog{save: func(ctx context.Context) error {
		started <- struct{}{}
		<-ctx.Done()
		return fmt.Errorf("saving plan: %w", ctx.Err())
	}}
	ts, logs, reg := faultServer(t, cat)
	ctx, cancel := context.WithCancel(context.Background())
	go func() { <-started; cancel() }()
	req, err := http.NewRequestWithContext(ctx, http.MethodPost, ts.URL+"/v1/plans", strings.NewReader(testfixture.J16Plan))
	require.NoError(t, err)
	req.Header.Set("Content-Type", "application/json")
	_, err = ts.Client().Do(req)
	require.ErrorIs(t, err, context.Canceled)
	require.Eventually(t, func() bool {
		return counter(t, reg, "scalematch_http_client_faults_total", map[string]string{"kind": "client_gone"}) == 1
	}, 5*time.Second, 10*time.Millisecond)
	require.Eventually(t, func() bool { return strings.Contains(logs.String(), `"status":499`) }, 5*time.Second, 10*time.Millisecond)
	assert.Zero(t, counter(t, reg, "scalematch_http_requests_total", map[string]string{"status": "500"}))
	assert.NotContains(t, logs.String(), `"level":"ERROR"`)
}

// TestStoreFaultStatuses: an unavailable store is a 503 with Retry-After, not a
// 500; a full disk is a 507 that makes /readyz unready until a write succeeds.
func TestStoreFaultStatuses(t *testing.T) {
	var mode atomic.Value
	mode.Store("ok")
	cat := saveCatalog{save: func(context.Context) error {
		switch mode.Load() {
		case "down":
			return facilities.Classify(errors.New("dial tcp 127.0.0.1:5432: connect: connection refused"), facilities.ErrUnavailable)
		case "full":
			return facilities.Classify(errors.New("database or disk is full (13)"), facilities.ErrStorageFull)
		}
		return nil
	}}
	ts, logs, _ := faultServer(t, cat)
	plan := func(alpha int) *http.Response {
		body := strings.Replace(testfixture.J16Plan, `"to": 16`, fmt.Sprintf(`"to": %d`, alpha), 1)
		resp, err := http.Post(ts.URL+"/v1/plans", "application/json", strings.NewReader(body))
		require.NoError(t, err)
		io.Copy(io.Discard, resp.Body)
		resp.Body.Close()
		return resp
	}
	ready := func() int {
		resp, err := http.Get(ts.URL + "/readyz")
		require.NoError(t, err)
		resp.Body.Close()
		return resp.StatusCode
	}
	mode.Store("down")
	resp := plan(10)
	assert.Equal(t, http.StatusServiceUnavailable, resp.StatusCode)
	assert.Equal(t, "5", resp.Header.Get("Retry-After"))

	mode.Store("full")
	assert.Equal(t, http.StatusInsufficientStorage, plan(11).StatusCode)
	assert.Equal(t, http.StatusServiceUnavailable, ready(), "a full disk leaves the service ready")

	mode.Store("ok")
	assert.Equal(t, http.StatusOK, plan(12).StatusCode)
	assert.Equal(t, http.StatusOK, ready(), "a write succeeded: ready again")
	assert.NotContains(t, logs.String(), `"level":"ERROR"`)
}
