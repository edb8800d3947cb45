package api_test

import (
	"encoding/json"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"scalematch/api"
	"scalematch/api/schema"
)

// FuzzPlanEndpoint posts arbitrary bodies to POST /v1/plans through the whole
// handler stack. Whatever the body, the answer is never a 5xx (a panic would be
// recovered as a 500), always one valid JSON value, a plan (200) or a problem
// (application/problem+json, 4xx) whose status matches the response's. The seed
// corpus under testdata/fuzz/FuzzPlanEndpoint holds valid plans in every demo
// medium, unit strings, broken JSON, huge numbers and NaN-like strings.
func FuzzPlanEndpoint(f *testing.F) {
	f.Add([]byte(j16Plan))
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		f.Fatal(err)
	}
	h := s.Handler()
	f.Fuzz(func(t *testing.T, body []byte) {
		rec := httptest.NewRecorder()
		req := httptest.NewRequest(http.MethodPost, "/v1/plans", strings.NewReader(string(body)))
		req.Header.Set("Content-Type", "application/json")
		h.ServeHTTP(rec, req)
		if rec.Code >= 500 {
			t.Fatalf("status %d for %q: %s", rec.Code, body, rec.Body)
		}
		if !json.Valid(rec.Body.Bytes()) {
			t.Fatalf("status %d: the answer is not JSON: %q", rec.Code, rec.Body)
		}
		if rec.Code == http.StatusOK {
			return
		}
		if ct := rec.Header().Get("Content-Type"); ct != schema.ContentTypeProblem {
			t.Fatalf("status %d with Content-Type %q", rec.Code, ct)
		}
		var p schema.Problem
		if err := json.Unmarshal(rec.Body.Bytes(), &p); err != nil || p.Status != rec.Code || p.Type == "" {
			t.Fatalf("status %d: not a problem: %s (%v)", rec.Code, rec.Body, err)
		}
	})
}
