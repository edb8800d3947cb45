package api_test

import (
	"encoding/json"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/contract"
	"scalematch/internal/testfixture"
)

// The fuzz targets post arbitrary bodies to one endpoint each through the whole
// handler stack. Whatever the body, the answer is never a 5xx (a panic would be
// recovered as a 500) nor an empty 200, always one valid JSON value, a result
// (200) or a problem (application/problem+json, 4xx) whose status matches the
// response's, and it matches the OpenAPI 3 document (internal/contract). The seeds
// are valid requests and the finite numbers that once made the physics overflow
// (a 500, or a 200 with an empty body); FuzzPlanEndpoint's corpus under
// testdata/fuzz holds more (every demo medium, unit strings, broken JSON, huge
// numbers and NaN-like strings). CI runs each target for 30 s (.ci/run).

// seedEdit sets the number at a dotted path of a seed request.
type seedEdit struct {
	path  string
	value any
}

// addSeeds adds base with each edit made, one seed an edit.
func addSeeds(f *testing.F, base string, edits []seedEdit) {
	f.Helper()
	for _, e := range edits {
		f.Add(seed(f, base, e.path, e.value))
	}
}

// FuzzPlanEndpoint fuzzes POST /v1/plans.
func FuzzPlanEndpoint(f *testing.F) {
	f.Add([]byte(testfixture.J16Plan))
	addSeeds(f, testfixture.J16Plan, []seedEdit{
		{"article.reference_area", 1e-310},
		{"article.form_factor", 1e308},
		{"model.scale", 1e308},
		{"flight.altitude", -1e308},
	})
	// An inline facility (tsw-1's record) with one number at an overflowing extreme.
	inline := inlineFacility(f, testfixture.J16Plan)
	addSeeds(f, inline, []seedEdit{
		{"facility.stagnation_pressure.min", 5e-324},
		{"facility.stagnation_temperature.min", 1e-300},
		{"facility.operations.seconds_per_point", 1e308},
		{"facility.max_dynamic_pressure", 1e-310},
		{"facility.test_section.width", 1e308},
	})
	fuzzEndpoint(f, "/v1/plans")
}

// FuzzLoadsEndpoint fuzzes POST /v1/loads.
func FuzzLoadsEndpoint(f *testing.F) {
	f.Add([]byte(testfixture.J16Loads))
	addSeeds(f, testfixture.J16Loads, []seedEdit{
		{"test.stagnation_pressure", 1e308},
		{"test.stagnation_temperature", 1e-300},
		{"test.speed", 1e308},
		{"article.reference_area", 1e-310},
		{"installation.model_mass", 1e308},
	})
	inline := inlineFacility(f, testfixture.J16Loads)
	addSeeds(f, inline, []seedEdit{
		{"facility.balances.0.limits.normal", 1e-310},
		{"facility.balances.0.limits.pitching_moment", 1e-310},
		{"facility.balances.0.safety_factor", 1e308},
	})
	fuzzEndpoint(f, "/v1/loads")
}

// FuzzConditionsEndpoint fuzzes POST /v1/conditions.
func FuzzConditionsEndpoint(f *testing.F) {
	const base = `{"facility_id": "tsw-1", "mach": 0.8, "stagnation_pressure": "1.5 bar", "stagnation_temperature": 310}`
	f.Add([]byte(base))
	addSeeds(f, base, []seedEdit{
		{"stagnation_temperature", 1e308},
		{"stagnation_temperature", 5e-324},
		{"stagnation_pressure", 1e308},
		{"mach", 1e308},
	})
	fuzzEndpoint(f, "/v1/conditions")
}

// fuzzEndpoint posts each fuzz input to path and checks the answer.
func fuzzEndpoint(f *testing.F, path string) {
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		f.Fatal(err)
	}
	v, err := contract.New()
	if err != nil {
		f.Fatal(err)
	}
	h := s.Unvalidated()
	f.Fuzz(func(t *testing.T, body []byte) {
		rec := httptest.NewRecorder()
		req := httptest.NewRequest(http.MethodPost, path, strings.NewReader(string(body)))
		req.Header.Set("Content-Type", "application/json")
		h.ServeHTTP(rec, req)
		require.Less(t, rec.Code, 500, "status for %q: %s", body, rec.Body)
		require.True(t, json.Valid(rec.Body.Bytes()), "status %d: the answer is not JSON: %q", rec.Code, rec.Body)
		require.NoError(t, v.Response(req, rec.Code, rec.Header(), rec.Body.Bytes()), "for %q", body)
		if rec.Code == http.StatusOK {
			return
		}
		require.Equal(t, schema.ContentTypeProblem, rec.Header().Get("Content-Type"), "status %d", rec.Code)
		var p schema.Problem
		require.NoError(t, json.Unmarshal(rec.Body.Bytes(), &p), "status %d: not a problem: %s", rec.Code, rec.Body)
		require.Equal(t, rec.Code, p.Status, "the problem's status: %s", rec.Body)
		require.NotEmpty(t, p.Type, "the problem's type: %s", rec.Body)
	})
}

// seed returns the JSON request base with the value at the dotted path
// ("facility.balances.0.limits.normal") set to value.
func seed(f *testing.F, base, path string, value any) []byte {
	f.Helper()
	var doc any
	if err := json.Unmarshal([]byte(base), &doc); err != nil {
		f.Fatal(err)
	}
	keys := strings.Split(path, ".")
	node := doc
	for i, k := range keys {
		last := i == len(keys)-1
		switch n := node.(type) {
		case map[string]any:
			if last {
				n[k] = value
				break
			}
			if n[k] == nil {
				n[k] = map[string]any{}
			}
			node = n[k]
		case []any:
			j, err := strconv.Atoi(k)
			if err != nil || j >= len(n) {
				f.Fatalf("seed %s: no element %s", path, k)
			}
			if last {
				n[j] = value
				break
			}
			node = n[j]
		default:
			f.Fatalf("seed %s: %s is not inside an object or a list", path, k)
		}
	}
	b, err := json.Marshal(doc)
	if err != nil {
		f.Fatal(err)
	}
	return b
}

// inlineFacility returns the request base with its facility_id replaced by the
// demo record of that facility, inline.
func inlineFacility(f *testing.F, base string) string {
	f.Helper()
	var req map[string]any
	if err := json.Unmarshal([]byte(base), &req); err != nil {
		f.Fatal(err)
	}
	id, _ := req["facility_id"].(string)
	fac, ok := facilities.DemoFacility(id)
	if !ok {
		f.Fatalf("no demo facility %q", id)
	}
	fb, err := json.Marshal(fac)
	if err != nil {
		f.Fatal(err)
	}
	var fm any
	if err := json.Unmarshal(fb, &fm); err != nil {
		f.Fatal(err)
	}
	delete(req, "facility_id")
	req["facility"] = fm
	b, err := json.Marshal(req)
	if err != nil {
		f.Fatal(err)
	}
	return string(b)
}
