package api_test

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
	"time"

	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

// fakeCatalog answers Ping with err after delay; its other methods are not used by
// these tests (the embedded nil interface would panic if they were).
type fakeCatalog struct {
	facilities.Catalog
	err   error
	delay time.Duration
}

func (f fakeCatalog) Ping(ctx context.Context) error {
	select {
	case <-time.After(f.delay):
		return f.err
	case <-ctx.Done():
		return ctx.Err()
	}
}

type testServer struct {
	*httptest.Server
	log *testfixture.LogBuffer
}

func newTestServer(t *testing.T, cat facilities.Catalog) testServer {
	t.Helper()
	logs := &testfixture.LogBuffer{}
	s, err := api.New(api.Config{
		Catalog:  cat,
		Registry: prometheus.NewRegistry(),
		Logger:   slog.New(slog.NewJSONHandler(logs, nil)),
	})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	return testServer{ts, logs}
}

// do sends the request and answers the response's status and header (its body
// already read, and closed) and the body.
func (ts testServer) do(t *testing.T, method, path string, body io.Reader, header map[string]string) (*http.Response, []byte) {
	t.Helper()
	var b []byte
	if body != nil {
		var err error
		b, err = io.ReadAll(body)
		require.NoError(t, err)
	}
	r := testfixture.Do(t, ts.Client(), method, ts.URL+path, header, b)
	return &http.Response{StatusCode: r.Status, Header: r.Header}, r.Body
}

func decodeProblem(t *testing.T, resp *http.Response, body []byte) schema.Problem {
	t.Helper()
	assert.Equal(t, schema.ContentTypeProblem, resp.Header.Get("Content-Type"), "Content-Type")
	var p schema.Problem
	require.NoError(t, json.Unmarshal(body, &p), "problem body %s", body)
	assert.Equal(t, resp.StatusCode, p.Status, "problem status against the response's")
	assert.NotEmpty(t, p.RequestID, "problem request_id")
	assert.Equal(t, resp.Header.Get(api.HeaderRequestID), p.RequestID, "problem request_id against the header")
	return p
}

func TestHealthz(t *testing.T) {
	ts := newTestServer(t, nil)
	resp, body := ts.do(t, "GET", "/healthz", nil, nil)
	assert.Equal(t, 200, resp.StatusCode, "GET /healthz: status")
	assert.Equal(t, `{"status":"ok"}`, strings.TrimSpace(string(body)), "GET /healthz: body as written")
}

// hangingCatalog is a store whose ping never answers: it reports the deadline
// the probe gave it and then waits for the probe to give up.
type hangingCatalog struct {
	facilities.Catalog
	deadline chan time.Duration
}

func (h hangingCatalog) Ping(ctx context.Context) error {
	d, ok := ctx.Deadline()
	if !ok {
		h.deadline <- -1
	} else {
		h.deadline <- time.Until(d)
	}
	<-ctx.Done()
	return ctx.Err()
}

func TestReadyz(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		cat    facilities.Catalog
		status int
		body   string // the JSON body for 200, a fragment of the detail otherwise
	}{
		{"store up", fakeCatalog{}, 200, `{"status":"ready","store":"ok"}`},
		{"store down", fakeCatalog{err: errors.New("connection refused")}, 503, "does not answer"},
		// No store configured: the embedded demo catalog serves, read-only.
		{"no store", nil, 200, `{"status":"ready","store":"ok"}`},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			ts := newTestServer(t, tc.cat)
			resp, body := ts.do(t, "GET", "/readyz", nil, nil)
			require.Equal(t, tc.status, resp.StatusCode, "body %s", body)
			if tc.status == 200 {
				assert.Equal(t, tc.body, strings.TrimSpace(string(body)))
				return
			}
			p := decodeProblem(t, resp, body)
			assert.Equal(t, "/problems/unavailable", p.Type)
			assert.Contains(t, p.Detail, tc.body)
			assert.NotContains(t, string(body), "connection refused", "the store's error leaks to the client")
		})
	}
}

// TestReadyzStoreHangs: a store that never answers its ping is given the
// configured deadline, and when it passes the probe answers 503 naming it. The
// test waits on the store's ping, not on a clock.
func TestReadyzStoreHangs(t *testing.T) {
	t.Parallel()
	const timeout = 50 * time.Millisecond
	cat := hangingCatalog{deadline: make(chan time.Duration, 1)}
	s, err := api.New(api.Config{Catalog: cat, Registry: prometheus.NewRegistry(),
		Logger: slog.New(slog.NewJSONHandler(io.Discard, nil)), ReadyTimeout: timeout})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	resp, err := ts.Client().Get(ts.URL + "/readyz")
	require.NoError(t, err)
	defer resp.Body.Close()
	body, err := io.ReadAll(resp.Body)
	require.NoError(t, err)
	given := <-cat.deadline
	assert.Greater(t, given, time.Duration(0), "the ping had no deadline")
	assert.LessOrEqual(t, given, timeout)
	require.Equal(t, http.StatusServiceUnavailable, resp.StatusCode, "body %s", body)
	p := decodeProblem(t, resp, body)
	assert.Equal(t, "/problems/unavailable", p.Type)
	assert.Contains(t, p.Detail, "did not answer within "+timeout.String())
}

func TestRequestID(t *testing.T) {
	tests := []struct {
		name     string
		incoming string
		echoed   bool
	}{
		{"sane id echoed", "run-42.a_b:c", true},
		{"none: generated", "", false},
		{"too long: replaced", strings.Repeat("a", 65), false},
		{"space: replaced", "abc def", false},
		{"non-ASCII: replaced", "r\u00e9sum\u00e9", false},
		{"log injection: replaced", `x","status":200`, false},
	}
	ts := newTestServer(t, nil)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			h := map[string]string{}
			if tc.incoming != "" {
				h[api.HeaderRequestID] = tc.incoming
			}
			resp, _ := ts.do(t, "GET", "/healthz", nil, h)
			got := resp.Header.Get(api.HeaderRequestID)
			if tc.echoed {
				assert.Equal(t, tc.incoming, got, "request id: the incoming one")
			} else {
				assert.NotEqual(t, tc.incoming, got, "request id: a new one")
				assert.Len(t, got, 32, "request id: 32 hex digits")
			}
			assert.Contains(t, ts.log.String(), `"request_id":"`+got+`"`, "no log line carries request id %q", got)
		})
	}
}

func TestRequestLog(t *testing.T) {
	ts := newTestServer(t, nil)
	ts.do(t, "GET", "/healthz", nil, map[string]string{api.HeaderRequestID: "log-check"})
	var line map[string]any
	for l := range strings.SplitSeq(strings.TrimSpace(ts.log.String()), "\n") {
		if strings.Contains(l, `"log-check"`) {
			require.NoError(t, json.Unmarshal([]byte(l), &line), "log line %s", l)
		}
	}
	want := map[string]any{"msg": "request", "method": "GET", "route": "/healthz", "status": 200.0, "request_id": "log-check"}
	for k, v := range want {
		assert.Equal(t, v, line[k], "log %s (line %v)", k, line)
	}
	assert.IsType(t, 0.0, line["duration_ms"], "log line's duration_ms: %v", line)
}

func TestUnknownRoutes(t *testing.T) {
	tests := []struct {
		name, method, path string
		status             int
		typ                string
		allow              string
	}{
		{"unknown path", "GET", "/v1/nowhere", 404, "/problems/not-found", ""},
		{"root", "GET", "/", 404, "/problems/not-found", ""},
		{"trailing slash is not redirected", "GET", "/healthz/", 404, "/problems/not-found", ""},
		{"wrong method", "DELETE", "/healthz", 405, "/problems/method-not-allowed", "GET"},
	}
	ts := newTestServer(t, nil)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			resp, body := ts.do(t, tc.method, tc.path, nil, nil)
			require.Equal(t, tc.status, resp.StatusCode, "status: %s", body)
			p := decodeProblem(t, resp, body)
			assert.Equal(t, tc.typ, p.Type, "problem type")
			assert.Equal(t, tc.path, p.Instance, "problem instance")
			if tc.allow != "" {
				assert.Contains(t, resp.Header.Get("Allow"), tc.allow, "Allow")
			}
		})
	}
}

func TestBodyLimitDeclared(t *testing.T) {
	ts := newTestServer(t, nil)
	big := bytes.NewReader(make([]byte, api.BodyLimit+1))
	resp, body := ts.do(t, "POST", "/v1/plans", big, map[string]string{"Content-Type": "application/json"})
	require.Equal(t, http.StatusRequestEntityTooLarge, resp.StatusCode, "status: %s", body)
	p := decodeProblem(t, resp, body)
	assert.Equal(t, "/problems/body-too-large", p.Type, "problem type")
}

func TestMetrics(t *testing.T) {
	ts := newTestServer(t, nil)
	ts.do(t, "GET", "/healthz", nil, nil)
	ts.do(t, "GET", "/healthz", nil, nil)
	ts.do(t, "GET", "/no/such/thing", nil, nil)
	resp, body := ts.do(t, "GET", "/metrics", nil, nil)
	require.Equal(t, 200, resp.StatusCode, "GET /metrics")
	text := string(body)
	for _, want := range []string{
		`scalematch_http_requests_total{method="GET",route="/healthz",status="200"} 2`,
		`scalematch_http_requests_total{method="GET",route="unmatched",status="404"} 1`,
		`scalematch_http_request_duration_seconds_count{method="GET",route="/healthz",status="200"} 2`,
		`scalematch_http_request_duration_seconds_bucket{method="GET",route="/healthz",status="200",le="+Inf"} 2`,
		"# TYPE scalematch_planner_duration_seconds histogram",
		"scalematch_http_requests_in_flight 1",
		"go_goroutines",
	} {
		assert.Contains(t, text, want, "metrics")
	}
	assert.NotContains(t, text, "/no/such/thing", "an unmatched path became a label value")
}

func TestTwoServersShareARegistry(t *testing.T) {
	reg := prometheus.NewRegistry()
	for i := range 2 {
		_, err := api.New(api.Config{Registry: reg})
		require.NoError(t, err, "server %d", i)
	}
}

func TestOpenAPI(t *testing.T) {
	ts := newTestServer(t, nil)
	resp, body := ts.do(t, "GET", "/openapi.json", nil, nil)
	require.Equal(t, 200, resp.StatusCode, "GET /openapi.json")
	var doc struct {
		Swagger string                    `json:"swagger"`
		Paths   map[string]map[string]any `json:"paths"`
	}
	require.NoError(t, json.Unmarshal(body, &doc))
	for _, p := range []string{"/healthz", "/readyz", "/metrics", "/openapi.json", "/openapi3.json"} {
		assert.Contains(t, doc.Paths[p], "get", "document lacks GET %s", p)
	}
	resp, body = ts.do(t, "GET", "/openapi3.json", nil, nil)
	require.Equal(t, 200, resp.StatusCode, "GET /openapi3.json")
	var doc3 struct {
		OpenAPI string                    `json:"openapi"`
		Paths   map[string]map[string]any `json:"paths"`
	}
	require.NoError(t, json.Unmarshal(body, &doc3))
	assert.Equal(t, "3.0.3", doc3.OpenAPI, "OpenAPI 3 document: version")
	assert.Len(t, doc3.Paths, len(doc.Paths), "OpenAPI 3 document: paths, those of the Swagger 2.0 one")
	resp, body = ts.do(t, "GET", "/docs/", nil, nil)
	require.Equal(t, 200, resp.StatusCode, "GET /docs/")
	require.True(t, strings.HasPrefix(resp.Header.Get("Content-Type"), "text/html"), "GET /docs/: Content-Type %q", resp.Header.Get("Content-Type"))
	page := string(body)
	assert.Contains(t, page, `fetch("/openapi3.json")`, "the page does not read /openapi3.json")
	assert.NotContains(t, page, "https://", "the page refers to something outside the binary")
	assert.NotContains(t, page, "http://", "the page refers to something outside the binary")
}

func TestHeadProbes(t *testing.T) {
	ts := newTestServer(t, fakeCatalog{})
	for _, path := range []string{"/healthz", "/readyz"} {
		resp, body := ts.do(t, "HEAD", path, nil, nil)
		assert.Equal(t, 200, resp.StatusCode, "HEAD %s: status", path)
		assert.Empty(t, body, "HEAD %s: body", path)
	}
}
