package api_test

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"sort"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

// extremeValues are finite numbers at the edges of float64: the largest, the
// smallest normal and subnormal, and their negatives, with two merely large ones.
var extremeValues = []float64{1e308, -1e308, 1e-300, 1e-310, 5e-324, -1e-310, 1e30, 1e-30, 0}

// extremeBodies returns, by path, a valid request with every optional number
// given, on the demo facility id given inline.
func extremeBodies(t *testing.T, id string) map[string]string {
	t.Helper()
	var fac facilities.Facility
	for _, f := range facilities.Demo() {
		if f.ID == id {
			fac = f
		}
	}
	require.NotEmpty(t, fac.ID, id)
	fb, err := json.Marshal(fac)
	require.NoError(t, err)
	article := `{"reference_length": 2.4, "reference_area": 36.5, "span": 16.4, "length": 19.6,
    "frontal_area": 4.4, "wetted_area": 228, "form_factor": 1.1,
    "aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25, "cd_min": 0.022,
      "cl_at_cd_min": 0.14, "induced_drag_factor": 0.057, "cm_zero": 0.03, "cm_slope": -1.05}}`
	inst := `{"model_mass": 20, "balance_offset": {"x": 0.01, "z": -0.01}, "cg_offset": {"x": 0.02, "z": 0.01}}`
	test := `"mach": 0.5, "stagnation_pressure": 150000, "stagnation_temperature": 310`
	model := `{"scale_min": 0.01, "scale_max": 0.5}`
	flight, objective := `{"altitude": 12000, "delta_isa": 5, "mach": 0.78}`, `{"weights": {"reynolds": 1, "mach": 2}}`
	if fac.Medium.IsLiquid() {
		// The Quill U5 of examples/quill-u5-wtn-04.json.
		test = `"speed": 8, "stagnation_pressure": 150000, "stagnation_temperature": 300`
		model = `{"scale_min": 0.02, "scale_max": 0.083}`
		flight, objective = `{"altitude": 1000, "delta_isa": 5, "true_airspeed": 30}`, `{"weights": {"reynolds": 1}}`
		article = `{"reference_length": 0.41, "reference_area": 1.4, "span": 3.45, "length": 2.05,
    "frontal_area": 0.10, "wetted_area": 3.9, "form_factor": 1.1,
    "aero": {"lift_slope": 4.95, "zero_lift_alpha": -2.8, "cl_max": 1.35, "cd_min": 0.031,
      "cl_at_cd_min": 0.28, "induced_drag_factor": 0.047, "cm_zero": 0.06, "cm_slope": -0.65}}`
		inst = `{"model_mass": 0.4, "balance_offset": {"x": 0.01, "z": -0.01}, "cg_offset": {"x": 0.02, "z": 0.01}}`
	}
	return map[string]string{
		"/v1/plans": `{"flight": ` + flight + `, "article": ` + article +
			`, "facility": ` + string(fb) + `, "model": ` + model + `, "installation": ` + inst +
			`, "alpha": {"from": -4, "to": 16, "step": 2}, "beta": {"from": -2, "to": 2, "step": 2},
			"objective": ` + objective + `}`,
		"/v1/loads": `{"flight": {"pressure_altitude": 9000, "true_airspeed": 200}, "article": ` + article +
			`, "facility": ` + string(fb) + `, "model": {"scale": 0.03}, "installation": ` + inst +
			`, "alpha": {"from": -4, "to": 16, "step": 2}, "test": {` + test + `}}`,
		"/v1/conditions": `{"facility": ` + string(fb) + `, ` + test + `}`,
	}
}

// numberPaths lists the JSON paths of every number in v ("facility.balances[0].safety_factor").
func numberPaths(v any, path string, out *[]string) {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			p := k
			if path != "" {
				p = path + "." + k
			}
			numberPaths(e, p, out)
		}
	case []any:
		for i, e := range x {
			numberPaths(e, fmt.Sprintf("%s[%d]", path, i), out)
		}
	case float64:
		*out = append(*out, path)
	}
}

// setNumber sets the number at path in v.
func setNumber(v any, path string, val float64) {
	keys := strings.FieldsFunc(strings.ReplaceAll(path, "[", ".["), func(r rune) bool { return r == '.' })
	for i, k := range keys {
		last := i == len(keys)-1
		if strings.HasPrefix(k, "[") {
			n, _ := strconv.Atoi(strings.Trim(k, "[]"))
			a := v.([]any)
			if last {
				a[n] = val
				return
			}
			v = a[n]
			continue
		}
		m := v.(map[string]any)
		if last {
			m[k] = val
			return
		}
		v = m[k]
	}
}

// TestExtremeInputs sets every number of a full request, one at a time, to each of
// extremeValues, on /v1/plans, /v1/loads and /v1/conditions with each demo
// facility inline: the answer is a 200 with a JSON body, a 400 naming a field, or a
// 422 naming a limit or a field; never a 5xx, never a 200 without a body.
func TestExtremeInputs(t *testing.T) {
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	h := s.Handler()
	ids := []string{"tsw-1", "lsw-2", "plp-3", "cn2-05", "wtn-04"}
	if testing.Short() {
		ids = ids[:2]
	}
	for _, id := range ids {
		for path, body := range extremeBodies(t, id) {
			t.Run(id+path, func(t *testing.T) {
				var base any
				require.NoError(t, json.Unmarshal([]byte(body), &base))
				var paths []string
				numberPaths(base, "", &paths)
				sort.Strings(paths)
				rec := httptest.NewRecorder()
				h.ServeHTTP(rec, jsonRequest(path, body))
				require.Equal(t, http.StatusOK, rec.Code, "the base request: %s", rec.Body)
				for _, field := range paths {
					for _, v := range extremeValues {
						var req any
						require.NoError(t, json.Unmarshal([]byte(body), &req))
						setNumber(req, field, v)
						b, err := json.Marshal(req)
						require.NoError(t, err)
						rec := httptest.NewRecorder()
						h.ServeHTTP(rec, jsonRequest(path, string(b)))
						checkNeverBroken(t, fmt.Sprintf("%s=%g", field, v), rec)
					}
				}
			})
		}
	}
}

func jsonRequest(path, body string) *http.Request {
	r := httptest.NewRequest(http.MethodPost, path, strings.NewReader(body))
	r.Header.Set("Content-Type", "application/json")
	return r
}

// checkNeverBroken fails unless rec is a 200 with a JSON object, a 400 naming a
// field, a 404 or a 422 that names a limit or a field.
func checkNeverBroken(t *testing.T, what string, rec *httptest.ResponseRecorder) {
	t.Helper()
	switch rec.Code {
	case http.StatusOK:
		var out map[string]any
		if assert.NoError(t, json.Unmarshal(rec.Body.Bytes(), &out), "%s: 200 without a JSON body (%d bytes)", what, rec.Body.Len()) {
			assert.NotEmpty(t, out, "%s: 200 with an empty JSON body", what)
		}
	case http.StatusBadRequest, http.StatusUnprocessableEntity:
		var p schema.Problem
		if !assert.NoError(t, json.Unmarshal(rec.Body.Bytes(), &p), "%s: %d without a problem: %s", what, rec.Code, rec.Body) {
			return
		}
		assert.False(t, len(p.Errors) == 0 && len(p.Limits) == 0, "%s: %d names no field or limit: %s", what, rec.Code, rec.Body)
	case http.StatusNotFound:
	default:
		assert.Fail(t, "unexpected status", "%s: status %d: %.300s", what, rec.Code, rec.Body)
	}
}

// TestOverflowReproducers are the finite inputs that made the service answer 500
// or an empty 200: each is now a 400 naming the field.
func TestOverflowReproducers(t *testing.T) {
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	h := s.Handler()
	bodies := extremeBodies(t, "tsw-1")
	cases := []struct {
		path, field string
		value       float64
	}{
		{"/v1/plans", "article.reference_area", 1e-310},
		{"/v1/plans", "article.form_factor", 1e308},
		{"/v1/plans", "facility.stagnation_pressure.min", 5e-324},
		{"/v1/plans", "facility.stagnation_temperature.min", 1e-300},
		{"/v1/plans", "facility.operations.seconds_per_point", 1e308},
		{"/v1/loads", "test.stagnation_pressure", 1e308},
		{"/v1/loads", "facility.balances[0].limits.normal", 1e-310},
		{"/v1/loads", "installation.model_mass", 1e308},
		{"/v1/loads", "article.reference_length", 1e308},
		{"/v1/loads", "flight.true_airspeed", 1e-310},
		{"/v1/loads", "test.stagnation_temperature", 1e-300},
		{"/v1/conditions", "stagnation_temperature", 1e308},
		{"/v1/conditions", "stagnation_pressure", 1e308},
		{"/v1/conditions", "facility.test_section.width", 5e-324},
	}
	for _, tc := range cases {
		t.Run(fmt.Sprintf("%s %s=%g", tc.path, tc.field, tc.value), func(t *testing.T) {
			var req any
			require.NoError(t, json.Unmarshal([]byte(bodies[tc.path]), &req))
			setNumber(req, tc.field, tc.value)
			b, err := json.Marshal(req)
			require.NoError(t, err)
			rec := httptest.NewRecorder()
			h.ServeHTTP(rec, jsonRequest(tc.path, string(b)))
			require.Equal(t, http.StatusBadRequest, rec.Code, "%s", rec.Body)
			var p schema.Problem
			require.NoError(t, json.Unmarshal(rec.Body.Bytes(), &p))
			var named []string
			for _, e := range p.Errors {
				named = append(named, e.Field)
			}
			assert.Contains(t, named, tc.field)
		})
	}
}

// poisonedCatalog is the demo catalog with a tsw-1 record stored before its
// fields had ranges: 1e308 s per point.
type poisonedCatalog struct{ facilities.DemoCatalog }

func (poisonedCatalog) Facility(_ context.Context, id string) (facilities.Facility, error) {
	f, ok := facilities.DemoFacility(id)
	if !ok {
		return f, facilities.FacilityNotFound(id)
	}
	ops := *f.Operations
	ops.SecondsPerPoint = 1e308
	f.Operations = &ops
	f.Version = 3
	return f, nil
}

// TestStoredRecordOutOfRange: a stored facility whose values left their ranges
// made every plan against it a 500; it is a 422 naming the record's field.
func TestStoredRecordOutOfRange(t *testing.T) {
	s, err := api.New(api.Config{Catalog: poisonedCatalog{}, Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	for _, path := range []string{"/v1/plans", "/v1/loads"} {
		t.Run(path, func(t *testing.T) {
			body := testfixture.J16Plan
			if path == "/v1/loads" {
				body = strings.Replace(j16Loads, "BALANCE", "", 1)
			}
			rec := httptest.NewRecorder()
			s.Handler().ServeHTTP(rec, jsonRequest(path, body))
			require.Equal(t, http.StatusUnprocessableEntity, rec.Code, "%s", rec.Body)
			var p schema.Problem
			require.NoError(t, json.Unmarshal(rec.Body.Bytes(), &p))
			require.NotEmpty(t, p.Errors)
			assert.Equal(t, "facility.operations.seconds_per_point", p.Errors[0].Field)
		})
	}
}
