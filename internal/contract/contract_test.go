package contract_test

import (
	"bytes"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/internal/contract"
)

// server is the service over the demo catalog, every exchange checked by v;
// the results go to *seen.
func server(t *testing.T, v *contract.Validator, seen *[]contract.Result) http.Handler {
	t.Helper()
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	return v.Handler(s.Handler(), nil, func(r contract.Result) { *seen = append(*seen, r) })
}

func answer(status int, contentType, body string, header map[string]string) (http.Header, []byte) {
	h := http.Header{}
	h.Set("Content-Type", contentType)
	h.Set("X-Request-ID", "r-1")
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("Cache-Control", "no-store")
	for k, v := range header {
		if v == "" {
			h.Del(k)
		} else {
			h.Set(k, v)
		}
	}
	return h, []byte(body)
}

// TestResponseMismatches checks that answers the document does not describe are
// refused, each for its reason, and that the ones it describes pass.
func TestResponseMismatches(t *testing.T) {
	v, err := contract.New()
	require.NoError(t, err)
	health := `{"status":"ok"}`
	problem404 := `{"type":"/problems/not-found","title":"Not found","status":404,"detail":"no route GET /nowhere","instance":"/nowhere","request_id":"r-1"}`
	cases := []struct {
		name, method, path string
		status             int
		contentType, body  string
		header             map[string]string
		wantErr            string // "" when the answer matches
	}{
		{"healthz", "GET", "/healthz", 200, "application/json; charset=utf-8", health, map[string]string{"ETag": `W/"1"`}, ""},
		{"healthz without ETag", "GET", "/healthz", 200, "application/json; charset=utf-8", health, nil, "ETag"},
		{"healthz without request id", "GET", "/healthz", 200, "application/json; charset=utf-8", health, map[string]string{"ETag": `W/"1"`, "X-Request-ID": ""}, "X-Request-ID"},
		{"healthz with a number for status", "GET", "/healthz", 200, "application/json", `{"status":5}`, map[string]string{"ETag": `W/"1"`}, "status"},
		{"healthz without status", "GET", "/healthz", 200, "application/json", `{}`, map[string]string{"ETag": `W/"1"`}, "status"},
		{"an undocumented status", "GET", "/healthz", 418, "application/json", health, nil, "status is not supported"},
		{"an empty 200", "POST", "/v1/plans", 200, "application/json", ``, nil, "body"},
		{"a problem as plain JSON", "GET", "/v1/plans/p-1", 404, "application/json", problem404, nil, "application/json"},
		{"a problem of the wrong kind", "GET", "/v1/plans/p-1", 404, "application/problem+json",
			strings.Replace(problem404, "not-found", "conflict", 1), nil, "value is not one of the allowed values"},
		{"unknown path 404", "GET", "/nowhere", 404, "application/problem+json", problem404, nil, ""},
		{"unknown path 200", "GET", "/nowhere", 200, "application/json", health, nil, "want the not-found problem"},
		{"503 without Retry-After", "GET", "/readyz", 503, "application/problem+json",
			`{"type":"/problems/unavailable","title":"Service unavailable","status":503}`, nil, "Retry-After"},
		{"503 with Retry-After", "GET", "/readyz", 503, "application/problem+json",
			`{"type":"/problems/unavailable","title":"Service unavailable","status":503}`, map[string]string{"Retry-After": "5"}, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := httptest.NewRequest(tc.method, tc.path, nil)
			h, body := answer(tc.status, tc.contentType, tc.body, tc.header)
			err := v.Response(r, tc.status, h, body)
			if tc.wantErr == "" {
				assert.NoError(t, err)
				return
			}
			require.Error(t, err)
			assert.Contains(t, err.Error(), tc.wantErr)
		})
	}
}

// TestTheServiceMatches sends the service answers the document's union and
// nullable types must describe: a water plan (mismatch.mach_difference null),
// a load check of one balance (an object) and of all (a list), a facility
// whose medium is a name and one whose medium is a custom gas.
func TestTheServiceMatches(t *testing.T) {
	v, err := contract.New()
	require.NoError(t, err)
	var seen []contract.Result
	h := server(t, v, &seen)
	water, err := os.ReadFile(filepath.Join("..", "..", "examples", "quill-u5-wtn-04.json"))
	require.NoError(t, err)
	loads := `{"facility_id":"tsw-1","article":{"reference_length":2.4,"reference_area":36.5,"span":16.4,"frontal_area":4.4,"wetted_area":228,
		"aero":{"lift_slope":4.9,"cl_max":1.25,"cd_min":0.022}},"test":{"mach":0.78,"stagnation_pressure":150000,"stagnation_temperature":300},
		"model":{"scale":"1:24"},"alpha":{"from":0,"to":4,"step":2}%s}`
	gas := `{"facility":{"id":"g-1","medium":{"gas":{"molar_mass":0.04,"gamma":1.66,"viscosity_reference":2.2e-5,
		"temperature_reference":273,"sutherland_constant":140}},"test_section":{"width":1,"height":1,"length":2,"walls":"closed"},
		"mach":{"min":0.1,"max":0.9},"stagnation_pressure":{"min":1e5,"max":3e5},"stagnation_temperature":{"min":280,"max":320}},
		"mach":0.5,"stagnation_pressure":"2 bar","stagnation_temperature":"15 degC"}`
	for _, rq := range []struct{ method, path, body string }{
		{"POST", "/v1/plans", string(water)},
		{"POST", "/v1/loads", strings.Replace(loads, "%s", `,"installation":{"balance_id":"int-b1"}`, 1)},
		{"POST", "/v1/loads", strings.Replace(loads, "%s", "", 1)},
		{"GET", "/v1/facilities/tsw-1", ""},
		{"POST", "/v1/conditions", gas},
	} {
		var body io.Reader
		if rq.body != "" {
			body = strings.NewReader(rq.body)
		}
		r := httptest.NewRequest(rq.method, rq.path, body)
		r.Header.Set("Content-Type", "application/json")
		rec := httptest.NewRecorder()
		h.ServeHTTP(rec, r)
		require.Equal(t, http.StatusOK, rec.Code, "%s %s: %s", rq.method, rq.path, rec.Body)
		switch rq.path {
		case "/v1/plans":
			assert.Contains(t, rec.Body.String(), `"mach_difference":null`, "water")
		case "/v1/facilities/tsw-1":
			assert.Contains(t, rec.Body.String(), `"medium":"air"`)
		}
	}
	require.Len(t, seen, 5)
	for _, r := range seen {
		assert.NoError(t, r.Err, "%s %s", r.Method, r.Path)
	}
}

// TestExampleRequests checks every example request (examples/*.json and
// docs/requests/*.json: a campaign-*.json is a POST /v1/campaigns body, the
// others POST /v1/plans bodies) against the document, and the service's answer
// to it.
func TestExampleRequests(t *testing.T) {
	v, err := contract.New()
	require.NoError(t, err)
	var files []string
	for _, pattern := range []string{"examples/*.json", "docs/requests/*.json"} {
		m, err := filepath.Glob(filepath.Join("..", "..", pattern))
		require.NoError(t, err)
		files = append(files, m...)
	}
	require.GreaterOrEqual(t, len(files), 10, "example requests found")
	var seen []contract.Result
	h := server(t, v, &seen)
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			b, err := os.ReadFile(f)
			require.NoError(t, err)
			path := "/v1/plans"
			if strings.HasPrefix(filepath.Base(f), "campaign-") {
				path = "/v1/campaigns"
			}
			r := httptest.NewRequest(http.MethodPost, path, bytes.NewReader(b))
			r.Header.Set("Content-Type", "application/json")
			require.NoError(t, v.Request(r, b), "the request")
			seen = seen[:0]
			rec := httptest.NewRecorder()
			h.ServeHTTP(rec, r)
			require.Contains(t, []int{http.StatusOK, http.StatusCreated}, rec.Code, "%s", rec.Body)
			require.Len(t, seen, 1)
			assert.NoError(t, seen[0].Err, "the answer")
		})
	}
}

// TestRequestMismatches checks that requests the document refuses are refused
// for the documented reason: a number out of its range, a unit string where a
// plain number is wanted, a missing required field.
func TestRequestMismatches(t *testing.T) {
	v, err := contract.New()
	require.NoError(t, err)
	ok := `{"facility_id":"tsw-1","flight":{"altitude":"12000 m","mach":0.78},"article":{"reference_length":2.4,"reference_area":36.5,
		"span":16.4,"frontal_area":4.4,"wetted_area":228,"aero":{"lift_slope":4.9,"cl_max":1.25,"cd_min":0.022}}}`
	cases := []struct{ name, body, wantErr string }{
		{"valid", ok, ""},
		{"reference_area 1e-310 m²", strings.Replace(ok, "36.5", "1e-310", 1), "number must be at least 1e-06"},
		{"Mach as a unit string", strings.Replace(ok, "0.78", `"0.78 m/s"`, 1), "mach"},
		{"no article", `{"facility_id":"tsw-1","flight":{"mach":0.78}}`, `property "article" is missing`},
		{"a scale as a ratio", strings.Replace(ok, `"article"`, `"model":{"scale":"1:16"},"article"`, 1), ""},
		{"a scale of 1e308", strings.Replace(ok, `"article"`, `"model":{"scale":1e308},"article"`, 1), "number must be at most 100"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := httptest.NewRequest(http.MethodPost, "/v1/plans", strings.NewReader(tc.body))
			r.Header.Set("Content-Type", "application/json")
			err := v.Request(r, []byte(tc.body))
			if tc.wantErr == "" {
				assert.NoError(t, err)
				return
			}
			require.Error(t, err)
			assert.Contains(t, err.Error(), tc.wantErr)
		})
	}
}
