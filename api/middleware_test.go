package api

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"scalematch/internal/check"
	"strings"
	"sync"
	"testing"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/atmosphere"
	"scalematch/facilities"
)

type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

// newInternal returns a server with extra test routes under /test and its log.
func newInternal(t *testing.T) (*Server, *httptest.Server, *syncBuffer) {
	t.Helper()
	logs := &syncBuffer{}
	s, err := New(Config{Registry: prometheus.NewRegistry(), Logger: slog.New(slog.NewJSONHandler(logs, nil))})
	require.NoError(t, err)
	g := s.engine.Group("/test")
	g.GET("/panic", func(c *gin.Context) { panic("wing spar snapped") })
	g.GET("/error/:kind", func(c *gin.Context) {
		switch c.Param("kind") {
		case "plain":
			s.fail(c, errors.New("sql: connection reset by peer"))
		case "notfound":
			s.fail(c, fmt.Errorf("load: %w", &check.Error{Code: check.CodeNotFound, Message: `facility "zz-9" not found`}))
		default:
			c.JSON(http.StatusTeapot, gin.H{"ok": true})
		}
	})
	g.POST("/decode", func(c *gin.Context) {
		var v struct {
			Altitude float64 `json:"altitude" unit:"m"`
		}
		if !s.decodeBody(c, &v) {
			return
		}
		c.JSON(http.StatusOK, v)
	})
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	return s, ts, logs
}

func get(t *testing.T, ts *httptest.Server, method, path string, body io.Reader) (*http.Response, schema.Problem) {
	t.Helper()
	req, _ := http.NewRequest(method, ts.URL+path, body)
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	req.Header.Set(HeaderRequestID, "req-"+strings.ReplaceAll(strings.Trim(path, "/"), "/", "-"))
	resp, err := ts.Client().Do(req)
	require.NoError(t, err)
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	var p schema.Problem
	if resp.Header.Get("Content-Type") == schema.ContentTypeProblem {
		if err := json.Unmarshal(b, &p); err != nil {
			t.Fatalf("%s: %v", b, err)
		}
	}
	return resp, p
}

func TestPanicBecomes500(t *testing.T) {
	_, ts, logs := newInternal(t)
	resp, p := get(t, ts, "GET", "/test/panic", nil)
	if resp.StatusCode != 500 || p.Status != 500 || p.Type != "/problems/internal" {
		t.Fatalf("status %d, problem %+v; want a 500 problem", resp.StatusCode, p)
	}
	if p.RequestID != "req-test-panic" || resp.Header.Get(HeaderRequestID) != "req-test-panic" {
		t.Errorf("request id: problem %q, header %q", p.RequestID, resp.Header.Get(HeaderRequestID))
	}
	if p.Detail != "internal error" || strings.Contains(p.Detail, "spar") {
		t.Errorf("detail %q leaks the panic", p.Detail)
	}
	var panicLine, requestLine map[string]any
	for _, l := range strings.Split(strings.TrimSpace(logs.String()), "\n") {
		var m map[string]any
		if err := json.Unmarshal([]byte(l), &m); err != nil {
			t.Fatalf("log line %s: %v", l, err)
		}
		switch m["msg"] {
		case "panic":
			panicLine = m
		case "request":
			requestLine = m
		}
	}
	if panicLine == nil || panicLine["panic"] != "wing spar snapped" || panicLine["request_id"] != "req-test-panic" {
		t.Errorf("panic log line %v", panicLine)
	}
	if st, _ := panicLine["stack"].(string); !strings.Contains(st, "middleware_test.go") {
		t.Errorf("panic log has no stack through the handler: %.200s", st)
	}
	if requestLine == nil || requestLine["status"] != 500.0 || requestLine["level"] != "ERROR" {
		t.Errorf("request log line %v, want status 500 at ERROR", requestLine)
	}
	// The server lives on.
	if resp, _ := get(t, ts, "GET", "/healthz", nil); resp.StatusCode != 200 {
		t.Errorf("after the panic /healthz answers %d", resp.StatusCode)
	}
}

func TestOrdinaryErrorsPassThrough(t *testing.T) {
	_, ts, logs := newInternal(t)
	tests := []struct {
		path   string
		status int
		typ    string
		detail string
	}{
		{"/test/error/notfound", 404, "/problems/not-found", `facility "zz-9" not found`},
		{"/test/error/plain", 500, "/problems/internal", "internal error"},
		{"/test/error/teapot", 418, "", ""},
	}
	for _, tc := range tests {
		t.Run(tc.path, func(t *testing.T) {
			resp, p := get(t, ts, "GET", tc.path, nil)
			if resp.StatusCode != tc.status || p.Type != tc.typ || p.Detail != tc.detail {
				t.Errorf("got %d %+v, want %d %s %q", resp.StatusCode, p, tc.status, tc.typ, tc.detail)
			}
		})
	}
	log := logs.String()
	if !strings.Contains(log, "sql: connection reset by peer") {
		t.Error("the internal error is not logged in full")
	}
	if strings.Contains(log, `"msg":"panic"`) {
		t.Error("an ordinary error was logged as a panic")
	}
}

func TestProblemMapping(t *testing.T) {
	s, err := New(Config{Registry: prometheus.NewRegistry(), Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	de := func(code check.Code) error {
		return fmt.Errorf("wrapped: %w", &check.Error{Code: code, Message: string(code)})
	}
	tests := []struct {
		name   string
		err    error
		status int
		slug   string
	}{
		{"invalid", de(check.CodeInvalid), 400, "invalid-input"},
		{"not found", de(check.CodeNotFound), 404, "not-found"},
		{"conflict", de(check.CodeConflict), 409, "conflict"},
		{"unprocessable", de(check.CodeUnprocessable), 422, "unprocessable"},
		{"unauthorized", de(check.CodeUnauthorized), 401, "unauthorized"},
		{"forbidden", de(check.CodeForbidden), 403, "forbidden"},
		{"precondition failed", de(check.CodePreconditionFailed), 412, "precondition-failed"},
		{"precondition required", de(check.CodePreconditionRequired), 428, "precondition-required"},
		{"unknown code", de("mystery"), 500, "internal"},
		{"atmosphere range", fmt.Errorf("flight: %w", &atmosphere.RangeError{Quantity: "altitude", Value: 90000, Min: -5000, Max: 86000, Unit: "m"}), 400, "invalid-input"},
		{"body too large", &http.MaxBytesError{Limit: BodyLimit}, 413, "body-too-large"},
		{"plain", errors.New("boom"), 500, "internal"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			w := httptest.NewRecorder()
			c, _ := gin.CreateTestContext(w)
			c.Request = httptest.NewRequest("GET", "/v1/x", nil)
			s.fail(c, tc.err)
			if w.Code != tc.status {
				t.Errorf("status %d, want %d", w.Code, tc.status)
			}
			var p schema.Problem
			require.NoError(t, json.Unmarshal(w.Body.Bytes(), &p))
			if p.Type != "/problems/"+tc.slug || p.Status != tc.status || p.Title == "" {
				t.Errorf("problem %+v, want /problems/%s", p, tc.slug)
			}
			if got := w.Header().Get("WWW-Authenticate"); (tc.status == 401) != strings.HasPrefix(got, "Bearer") {
				t.Errorf("WWW-Authenticate %q for status %d", got, tc.status)
			}
		})
	}
}

func TestUnprocessableCarriesLimits(t *testing.T) {
	s, _ := New(Config{Registry: prometheus.NewRegistry(), Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	w := httptest.NewRecorder()
	c, _ := gin.CreateTestContext(w)
	c.Request = httptest.NewRequest("POST", "/v1/plans", nil)
	s.fail(c, &check.Error{Code: check.CodeUnprocessable, Message: "no model fits",
		Limits: []string{facilities.ConstraintSpan, facilities.ConstraintScaleMin}})
	want := `"limits":["max_span_fraction","scale_min"]`
	if w.Code != 422 || !strings.Contains(w.Body.String(), want) {
		t.Errorf("%d %s, want 422 with %s", w.Code, w.Body.String(), want)
	}
}

func TestDecodeBody(t *testing.T) {
	_, ts, _ := newInternal(t)
	tests := []struct {
		name   string
		body   io.Reader
		status int
		field  string
	}{
		{"unit string", strings.NewReader(`{"altitude":"1 km"}`), 200, ""},
		{"bad unit", strings.NewReader(`{"altitude":"1 kg"}`), 400, "altitude"},
		{"empty", strings.NewReader(""), 400, ""},
		// A reader of unknown length: the limit trips while reading, not on Content-Length.
		{"streamed body over the limit", io.MultiReader(strings.NewReader(`{"altitude":"`), bytes.NewReader(bytes.Repeat([]byte("9"), BodyLimit)), strings.NewReader(` m"}`)), 413, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			resp, p := get(t, ts, "POST", "/test/decode", tc.body)
			if resp.StatusCode != tc.status {
				t.Fatalf("status %d, want %d (%+v)", resp.StatusCode, tc.status, p)
			}
			if tc.status == 400 && (len(p.Errors) != 1 || p.Errors[0].Field != tc.field) {
				t.Errorf("errors %+v, want one at %q", p.Errors, tc.field)
			}
		})
	}
}
