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
	"sync"
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

// lockedBuffer is a log sink that concurrent requests may share.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

type testServer struct {
	*httptest.Server
	log *lockedBuffer
}

func newTestServer(t *testing.T, cat facilities.Catalog) testServer {
	t.Helper()
	logs := &lockedBuffer{}
	s, err := api.New(api.Config{
		Catalog:  cat,
		Registry: prometheus.NewRegistry(),
		Logger:   slog.New(slog.NewJSONHandler(logs, nil)),
	})
	if err != nil {
		t.Fatal(err)
	}
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
	if ct := resp.Header.Get("Content-Type"); ct != schema.ContentTypeProblem {
		t.Errorf("Content-Type %q, want %q", ct, schema.ContentTypeProblem)
	}
	var p schema.Problem
	if err := json.Unmarshal(body, &p); err != nil {
		t.Fatalf("problem body %s: %v", body, err)
	}
	if p.Status != resp.StatusCode {
		t.Errorf("problem status %d, response status %d", p.Status, resp.StatusCode)
	}
	if p.RequestID == "" || p.RequestID != resp.Header.Get(api.HeaderRequestID) {
		t.Errorf("problem request_id %q, header %q", p.RequestID, resp.Header.Get(api.HeaderRequestID))
	}
	return p
}

func TestHealthz(t *testing.T) {
	ts := newTestServer(t, nil)
	resp, body := ts.do(t, "GET", "/healthz", nil, nil)
	if resp.StatusCode != 200 || strings.TrimSpace(string(body)) != `{"status":"ok"}` {
		t.Errorf("GET /healthz: %d %s", resp.StatusCode, body)
	}
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
			if tc.echoed && got != tc.incoming {
				t.Errorf("got %q, want the incoming %q", got, tc.incoming)
			}
			if !tc.echoed && (got == tc.incoming || len(got) != 32) {
				t.Errorf("got %q, want a new 32-hex-digit id", got)
			}
			if !strings.Contains(ts.log.String(), `"request_id":"`+got+`"`) {
				t.Errorf("no log line carries request id %q", got)
			}
		})
	}
}

func TestRequestLog(t *testing.T) {
	ts := newTestServer(t, nil)
	ts.do(t, "GET", "/healthz", nil, map[string]string{api.HeaderRequestID: "log-check"})
	var line map[string]any
	for l := range strings.SplitSeq(strings.TrimSpace(ts.log.String()), "\n") {
		if strings.Contains(l, `"log-check"`) {
			if err := json.Unmarshal([]byte(l), &line); err != nil {
				t.Fatalf("log line %s: %v", l, err)
			}
		}
	}
	want := map[string]any{"msg": "request", "method": "GET", "route": "/healthz", "status": 200.0, "request_id": "log-check"}
	for k, v := range want {
		if line[k] != v {
			t.Errorf("log %s = %v, want %v (line %v)", k, line[k], v, line)
		}
	}
	if _, ok := line["duration_ms"].(float64); !ok {
		t.Errorf("log line has no duration_ms: %v", line)
	}
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
			if resp.StatusCode != tc.status {
				t.Fatalf("status %d, want %d: %s", resp.StatusCode, tc.status, body)
			}
			p := decodeProblem(t, resp, body)
			if p.Type != tc.typ || p.Instance != tc.path {
				t.Errorf("problem %+v, want type %s instance %s", p, tc.typ, tc.path)
			}
			if got := resp.Header.Get("Allow"); tc.allow != "" && !strings.Contains(got, tc.allow) {
				t.Errorf("Allow %q, want it to name %s", got, tc.allow)
			}
		})
	}
}

func TestBodyLimitDeclared(t *testing.T) {
	ts := newTestServer(t, nil)
	big := bytes.NewReader(make([]byte, api.BodyLimit+1))
	resp, body := ts.do(t, "POST", "/v1/plans", big, map[string]string{"Content-Type": "application/json"})
	if resp.StatusCode != http.StatusRequestEntityTooLarge {
		t.Fatalf("status %d, want 413: %s", resp.StatusCode, body)
	}
	p := decodeProblem(t, resp, body)
	if p.Type != "/problems/body-too-large" {
		t.Errorf("type %q", p.Type)
	}
}

func TestMetrics(t *testing.T) {
	ts := newTestServer(t, nil)
	ts.do(t, "GET", "/healthz", nil, nil)
	ts.do(t, "GET", "/healthz", nil, nil)
	ts.do(t, "GET", "/no/such/thing", nil, nil)
	resp, body := ts.do(t, "GET", "/metrics", nil, nil)
	if resp.StatusCode != 200 {
		t.Fatalf("GET /metrics: %d", resp.StatusCode)
	}
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
		if !strings.Contains(text, want) {
			t.Errorf("metrics lack %q", want)
		}
	}
	if strings.Contains(text, "/no/such/thing") {
		t.Error("an unmatched path became a label value")
	}
}

func TestTwoServersShareARegistry(t *testing.T) {
	reg := prometheus.NewRegistry()
	for i := range 2 {
		if _, err := api.New(api.Config{Registry: reg}); err != nil {
			t.Fatalf("server %d: %v", i, err)
		}
	}
}

func TestOpenAPI(t *testing.T) {
	ts := newTestServer(t, nil)
	resp, body := ts.do(t, "GET", "/openapi.json", nil, nil)
	if resp.StatusCode != 200 {
		t.Fatalf("GET /openapi.json: %d", resp.StatusCode)
	}
	var doc struct {
		Swagger string                    `json:"swagger"`
		Paths   map[string]map[string]any `json:"paths"`
	}
	if err := json.Unmarshal(body, &doc); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{"/healthz", "/readyz", "/metrics", "/openapi.json", "/openapi3.json"} {
		if _, ok := doc.Paths[p]["get"]; !ok {
			t.Errorf("document lacks GET %s", p)
		}
	}
	resp, body = ts.do(t, "GET", "/openapi3.json", nil, nil)
	if resp.StatusCode != 200 {
		t.Fatalf("GET /openapi3.json: %d", resp.StatusCode)
	}
	var doc3 struct {
		OpenAPI string                    `json:"openapi"`
		Paths   map[string]map[string]any `json:"paths"`
	}
	if err := json.Unmarshal(body, &doc3); err != nil {
		t.Fatal(err)
	}
	if doc3.OpenAPI != "3.0.3" || len(doc3.Paths) != len(doc.Paths) {
		t.Errorf("OpenAPI 3 document: version %q, %d paths; want 3.0.3 and the %d of the Swagger 2.0 one", doc3.OpenAPI, len(doc3.Paths), len(doc.Paths))
	}
	resp, body = ts.do(t, "GET", "/docs/", nil, nil)
	if resp.StatusCode != 200 || !strings.HasPrefix(resp.Header.Get("Content-Type"), "text/html") {
		t.Fatalf("GET /docs/: %d %s", resp.StatusCode, resp.Header.Get("Content-Type"))
	}
	page := string(body)
	if !strings.Contains(page, `fetch("/openapi3.json")`) {
		t.Error("the page does not read /openapi3.json")
	}
	if strings.Contains(page, "https://") || strings.Contains(page, "http://") {
		t.Error("the page refers to something outside the binary")
	}
}

func TestHeadProbes(t *testing.T) {
	ts := newTestServer(t, fakeCatalog{})
	for _, path := range []string{"/healthz", "/readyz"} {
		resp, body := ts.do(t, "HEAD", path, nil, nil)
		if resp.StatusCode != 200 || len(body) != 0 {
			t.Errorf("HEAD %s: %d with %d body bytes, want 200 and none", path, resp.StatusCode, len(body))
		}
	}
}
