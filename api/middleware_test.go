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
	"strings"
	"testing"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/testfixture"
)

// newInternal returns a server with extra test routes under /test and its log.
func newInternal(t *testing.T) (*Server, *httptest.Server, *testfixture.LogBuffer) {
	t.Helper()
	logs := &testfixture.LogBuffer{}
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
		require.NoError(t, json.Unmarshal(b, &p), "%s", b)
	}
	return resp, p
}

func TestPanicBecomes500(t *testing.T) {
	_, ts, logs := newInternal(t)
	resp, p := get(t, ts, "GET", "/test/panic", nil)
	require.Equal(t, http.StatusInternalServerError, resp.StatusCode)
	require.Equal(t, http.StatusInternalServerError, p.Status, "the problem's status")
	require.Equal(t, "/problems/internal", p.Type)
	assert.Equal(t, "req-test-panic", p.RequestID, "the problem's request id")
	assert.Equal(t, "req-test-panic", resp.Header.Get(HeaderRequestID), "the request id header")
	assert.Equal(t, "internal error", p.Detail, "the detail does not leak the panic")
	var panicLine, requestLine map[string]any
	for _, l := range strings.Split(strings.TrimSpace(logs.String()), "\n") {
		var m map[string]any
		require.NoError(t, json.Unmarshal([]byte(l), &m), "log line %s", l)
		switch m["msg"] {
		case "panic":
			panicLine = m
		case "request":
			requestLine = m
		}
	}
	if assert.NotNil(t, panicLine, "panic log line") {
		assert.Equal(t, "wing spar snapped", panicLine["panic"], "panic log line")
		assert.Equal(t, "req-test-panic", panicLine["request_id"], "panic log line")
		st, _ := panicLine["stack"].(string)
		assert.Contains(t, st, "middleware_test.go", "the panic log's stack runs through the handler")
	}
	if assert.NotNil(t, requestLine, "request log line") {
		assert.Equal(t, 500.0, requestLine["status"], "request log line")
		assert.Equal(t, "ERROR", requestLine["level"], "request log line")
	}
	// The server lives on.
	resp, _ = get(t, ts, "GET", "/healthz", nil)
	assert.Equal(t, http.StatusOK, resp.StatusCode, "/healthz after the panic")
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
			assert.Equal(t, tc.status, resp.StatusCode)
			assert.Equal(t, tc.typ, p.Type)
			assert.Equal(t, tc.detail, p.Detail)
		})
	}
	log := logs.String()
	assert.Contains(t, log, "sql: connection reset by peer", "the internal error is logged in full")
	assert.NotContains(t, log, `"msg":"panic"`, "an ordinary error logged as a panic")
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
			assert.Equal(t, tc.status, w.Code)
			var p schema.Problem
			require.NoError(t, json.Unmarshal(w.Body.Bytes(), &p))
			assert.Equal(t, "/problems/"+tc.slug, p.Type)
			assert.Equal(t, tc.status, p.Status, "the problem's status")
			assert.NotEmpty(t, p.Title)
			got := w.Header().Get("WWW-Authenticate")
			assert.Equal(t, tc.status == 401, strings.HasPrefix(got, "Bearer"), "WWW-Authenticate %q for status %d: a Bearer challenge exactly on 401", got, tc.status)
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
	assert.Equal(t, http.StatusUnprocessableEntity, w.Code)
	assert.Contains(t, w.Body.String(), `"limits":["max_span_fraction","scale_min"]`)
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
			require.Equal(t, tc.status, resp.StatusCode, "%+v", p)
			if tc.status == 400 && assert.Len(t, p.Errors, 1, "%+v", p.Errors) {
				assert.Equal(t, tc.field, p.Errors[0].Field)
			}
		})
	}
}
