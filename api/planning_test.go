package api_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/loads"
	"scalematch/internal/testfixture"
)

func newServer(t testing.TB) *httptest.Server {
	t.Helper()
	s, err := api.New(api.Config{Logger: testfixture.Quiet()})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	return ts
}

func post(t testing.TB, ts *httptest.Server, path, body string) (int, []byte) {
	t.Helper()
	r := testfixture.Do(t, nil, http.MethodPost, ts.URL+path, nil, []byte(body))
	return r.Status, r.Body
}

// problem is the part of a problem response the tests read.
type problem struct {
	Type   string `json:"type"`
	Status int    `json:"status"`
	Errors []struct {
		Field string `json:"field"`
	} `json:"errors"`
	Limits []string `json:"limits"`
}

func fields(p problem) []string {
	var out []string
	for _, e := range p.Errors {
		out = append(out, e.Field)
	}
	return out
}

func TestPlanErrors(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name   string
		body   string
		status int
		fields []string // every one must be named
		limits []string
	}{
		{"many bad fields at once",
			strings.Replace(strings.Replace(strings.Replace(testfixture.J16Plan, `"mach": 0.78`, `"mach": -1`, 1),
				`"span": 16.4`, `"span": "19 kg"`, 1), `"step": 1`, `"step": 0`, 1),
			400, []string{"article.span"}, nil},
		{"validation after decoding lists every field",
			strings.Replace(strings.Replace(testfixture.J16Plan, `"mach": 0.78`, `"mach": -1`, 1), `"step": 1`, `"step": 0`, 1),
			400, []string{"flight.mach", "alpha.step"}, nil},
		{"unknown field", strings.Replace(testfixture.J16Plan, `"facility_id"`, `"facilty_id"`, 1), 400, []string{"facilty_id"}, nil},
		{"unknown friction settings", strings.Replace(testfixture.J16Plan, `"span": 16.4`, `"span": 16.4, "friction_line": "schoenherr", "full_scale_boundary_layer": "laminar"`, 1),
			400, []string{"article.friction_line", "article.full_scale_boundary_layer"}, nil},
		{"unknown facility", strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"no-such"`, 1), 404, nil, nil},
		{"condensation peak Mach below 0.1", strings.Replace(testfixture.J16Plan, `"facility_id"`, `"condensation_peak_mach": 0.05, "facility_id"`, 1),
			400, []string{"condensation_peak_mach"}, nil},
		{"condensation peak Mach above 5", strings.Replace(testfixture.J16Plan, `"facility_id"`, `"condensation_peak_mach": 6, "facility_id"`, 1),
			400, []string{"condensation_peak_mach"}, nil},
		{"cavitation_allowed not a boolean", strings.Replace(testfixture.J16Plan, `"facility_id"`, `"cavitation_allowed": "yes", "facility_id"`, 1),
			400, []string{"cavitation_allowed"}, nil},
		{"unknown balance", strings.Replace(testfixture.J16Plan, `"int-b1"`, `"int-zz"`, 1), 400, []string{"installation.balance_id"}, nil},
		{"infeasible: the model cannot fit", strings.Replace(testfixture.J16Plan, `"scale_min": 0.01, "scale_max": 0.5`, `"scale": 0.5`, 1), 422, nil, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, b := post(t, ts, "/v1/plans", tc.body)
			require.Equal(t, tc.status, code, "status: %s", b)
			var p problem
			require.NoError(t, json.Unmarshal(b, &p))
			got := fields(p)
			for _, f := range tc.fields {
				assert.Contains(t, got, f, "fields named")
			}
			if tc.status == 422 {
				assert.NotEmpty(t, p.Limits, "422 without limits: %s", b)
			}
		})
	}
}

func TestPlanRepeatable(t *testing.T) {
	ts := newServer(t)
	c1, b1 := post(t, ts, "/v1/plans", testfixture.J16Plan)
	// The same request written differently (unit strings, key order) is the same plan.
	alt := strings.Replace(testfixture.J16Plan, `"reference_length": 2.4`, `"reference_length": "240 cm"`, 1)
	c2, b2 := post(t, ts, "/v1/plans", alt)
	require.Equal(t, 200, c1, "status: %s", b1)
	require.Equal(t, 200, c2, "status: %s", b2)
	assert.Equal(t, string(b1), string(b2), "the same plan answered differently")
}

func TestPlanTooLarge(t *testing.T) {
	ts := newServer(t)
	code, _ := post(t, ts, "/v1/plans", `{"flight": "`+strings.Repeat("x", api.BodyLimit)+`"}`)
	assert.Equal(t, http.StatusRequestEntityTooLarge, code, "status")
}

func TestBatch(t *testing.T) {
	ts := newServer(t)
	bad := strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"no-such"`, 1)
	code, b := post(t, ts, "/v1/plans/batch", `{"requests": [`+testfixture.J16Plan+`,`+bad+`,`+testfixture.J16Plan+`,{"flight": 3}]}`)
	require.Equal(t, 200, code, "status: %s", b)
	var out struct {
		Results []struct {
			Plan  json.RawMessage `json:"plan"`
			Error *problem        `json:"error"`
		} `json:"results"`
	}
	require.NoError(t, json.Unmarshal(b, &out))
	want := []int{200, 404, 200, 400}
	require.Len(t, out.Results, len(want), "results")
	_, single := post(t, ts, "/v1/plans", testfixture.J16Plan)
	for i, r := range out.Results {
		if want[i] == 200 {
			if assert.NotNil(t, r.Plan, "result %d: want a plan", i) && assert.Nil(t, r.Error, "result %d: want a plan", i) {
				assert.Equal(t, string(single), string(r.Plan), "result %d against the single plan", i)
			}
		} else if assert.NotNil(t, r.Error, "result %d: want a problem", i) {
			assert.Equal(t, want[i], r.Error.Status, "result %d: problem's status", i)
		}
	}
	code, b = post(t, ts, "/v1/plans/batch", `{"requests": [`+strings.Repeat(`{},`, schema.MaxBatch)+`{}]}`)
	var p problem
	require.NoError(t, json.Unmarshal(b, &p))
	assert.Equal(t, 400, code, "oversized batch: status")
	assert.Contains(t, fields(p), "requests", "oversized batch: fields")
}

// j16Loads is testfixture.J16Loads with BALANCE where a balance_id may go.
var j16Loads = strings.Replace(testfixture.J16Loads, `{"model_mass": 20}`, `{BALANCE "model_mass": 20}`, 1)

func TestLoadsObjectOrList(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name    string
		balance string
		list    int // 0: one object
	}{
		{"named balance gives an object", `"balance_id": "int-b2",`, 0},
		{"no balance gives a list over the facility's balances", ``, 2},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, b := post(t, ts, "/v1/loads", strings.Replace(j16Loads, "BALANCE", tc.balance, 1))
			require.Equal(t, 200, code, "status: %s", b)
			var out struct {
				Loads json.RawMessage `json:"loads"`
			}
			require.NoError(t, json.Unmarshal(b, &out))
			if tc.list == 0 {
				var one map[string]any
				require.NoError(t, json.Unmarshal(out.Loads, &one), "want one object, got %s", out.Loads)
				assert.Equal(t, "int-b2", one["balance_id"], "balance of the one object")
				return
			}
			var list []map[string]any
			require.NoError(t, json.Unmarshal(out.Loads, &list), "want a list, got %s", out.Loads)
			assert.Len(t, list, tc.list, "reports")
		})
	}
}

func TestConditions(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name       string
		body       string
		status     int
		violations []string
	}{
		{"within limits", `{"facility_id": "tsw-1", "mach": 0.8, "stagnation_pressure": 150000, "stagnation_temperature": 310}`, 200, []string{}},
		{"above q", `{"facility_id": "tsw-1", "mach": 1.1, "stagnation_pressure": "2.2 bar", "stagnation_temperature": 310}`, 200, []string{"max_dynamic_pressure"}},
		{"fixed pressure may be left out", `{"facility_id": "lsw-2", "speed": "100 kt", "stagnation_temperature": 293}`, 200, []string{}},
		// Mach 0 is the tunnel at rest (q = 0): a valid state, below tsw-1's Mach range.
		{"at rest", `{"facility_id": "tsw-1", "mach": 0, "stagnation_pressure": 150000, "stagnation_temperature": 310}`, 200, []string{"mach_min"}},
		{"water at rest", `{"facility_id": "wtn-04", "speed": 0, "stagnation_pressure": 150000, "stagnation_temperature": 290}`, 200, []string{"speed_min"}},
		{"negative Mach", `{"facility_id": "tsw-1", "mach": -0.1, "stagnation_pressure": 150000, "stagnation_temperature": 310}`, 400, nil},
		{"Mach above 5", `{"facility_id": "tsw-1", "mach": 5.5, "stagnation_pressure": 150000, "stagnation_temperature": 310}`, 400, nil},
		{"missing settings", `{"facility_id": "tsw-1"}`, 400, nil},
		{"unknown facility", `{"facility_id": "xx-9", "mach": 0.5, "stagnation_pressure": 1e5, "stagnation_temperature": 300}`, 404, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, b := post(t, ts, "/v1/conditions", tc.body)
			require.Equal(t, tc.status, code, "status: %s", b)
			if code != 200 {
				return
			}
			var out struct {
				Violations []struct {
					Constraint string `json:"constraint"`
				} `json:"violations"`
			}
			assert.Contains(t, string(b), `"violations":[`, "violations is not a list")
			require.NoError(t, json.Unmarshal(b, &out))
			var got []string
			for _, v := range out.Violations {
				got = append(got, v.Constraint)
			}
			for _, w := range tc.violations {
				assert.Contains(t, got, w, "violations")
			}
		})
	}
}

func TestGroups(t *testing.T) {
	ts := newServer(t)
	// The textbook case of physics.md §5 (Buckingham 1914): R(ρ, V, L, μ) has rank 3 and
	// two groups, R·ρ^-1·V^-2·L^-2 and μ·ρ^-1·V^-1·L^-1.
	code, b := post(t, ts, "/v1/groups", `{"variables": [{"name": "R", "unit": "N"}, {"name": "rho", "unit": "kg/m^3"},
		{"name": "V", "unit": "m/s"}, {"name": "L", "unit": "m"}, {"name": "mu", "dimensions": "M L^-1 T^-1"}],
		"repeating": ["rho", "V", "L"]}`)
	require.Equal(t, 200, code, "status: %s", b)
	var out struct {
		Rank   int `json:"rank"`
		Groups []struct {
			Exponents map[string]any `json:"exponents"`
		} `json:"groups"`
	}
	require.NoError(t, json.Unmarshal(b, &out))
	require.Equal(t, 3, out.Rank, "rank: %s", b)
	require.Len(t, out.Groups, 2, "groups: %s", b)
	e := out.Groups[0].Exponents
	for name, want := range map[string]float64{"R": 1, "rho": -1, "V": -2, "L": -2} {
		assert.Equal(t, want, e[name], "first group %v: exponent of %s", e, name)
	}
	code, _ = post(t, ts, "/v1/groups", `{"variables": [{"name": "x", "unit": "furlongs^"}]}`)
	assert.Equal(t, 400, code, "bad unit: status")
}

func TestAtmosphere(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name   string
		query  string
		status int
		temp   float64 // K
	}{
		// U.S. Standard Atmosphere 1976 table (physics.md §1, from memory).
		{"sea level", "altitude=0", 200, 288.15},
		{"isothermal layer in feet", "altitude=50000+ft", 200, 216.65},
		{"hot day", "altitude=0&delta_isa=15", 200, 303.15},
		{"pressure altitude", "pressure_altitude=11000", 200, 216.65},
		{"missing", "", 400, 0},
		{"too high", "altitude=90000", 400, 0},
		{"wrong unit", "altitude=3+bar", 400, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, err := http.Get(ts.URL + "/v1/atmosphere?" + tc.query)
			require.NoError(t, err)
			defer resp.Body.Close()
			require.Equal(t, tc.status, resp.StatusCode, "status")
			if tc.status != 200 {
				return
			}
			var st struct {
				Temperature float64 `json:"temperature"`
			}
			require.NoError(t, json.NewDecoder(resp.Body).Decode(&st))
			assert.InDelta(t, tc.temp, st.Temperature, 1e-3, "temperature, K (U.S. Standard Atmosphere 1976 table, from memory)")
		})
	}
}

func TestEnvelope(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name, path, ctype, prefix string
		status                    int
	}{
		{"svg", "/v1/facilities/tsw-1/envelope.svg?reference_length=0.0847&flight_mach=0.8&flight_reynolds=1.24e7", "image/svg+xml", "<?xml", 200},
		{"png", "/v1/facilities/cn2-05/envelope.png?reference_length=0.05", "image/png", "\x89PNG", 200},
		{"water", "/v1/facilities/wtn-04/envelope.svg?reference_length=0.1", "image/svg+xml", "<?xml", 200},
		{"pdf", "/v1/facilities/lsw-2/envelope.pdf?reference_length=0.3", "application/pdf", "%PDF-", 200},
		{"missing length", "/v1/facilities/tsw-1/envelope.svg", "", "", 400},
		{"unknown facility", "/v1/facilities/nope/envelope.png?reference_length=1", "", "", 404},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, err := http.Get(ts.URL + tc.path)
			require.NoError(t, err)
			defer resp.Body.Close()
			b, err := io.ReadAll(resp.Body)
			require.NoError(t, err)
			require.Equal(t, tc.status, resp.StatusCode, "status: %s", b)
			if tc.status != 200 {
				return
			}
			assert.Equal(t, tc.ctype, resp.Header.Get("Content-Type"), "content type")
			assert.True(t, bytes.HasPrefix(b, []byte(tc.prefix)), "body starts %q, want %q", b[:min(8, len(b))], tc.prefix)
			// Every chart says it is an estimate and what it leaves out.
			assert.Equal(t, app.EnvelopeCaution, resp.Header.Get(api.HeaderCaution))
			assert.Contains(t, app.EnvelopeCaution, "leaves out the model-size limits (span, blockage) and the balance load limits")
			if tc.ctype == "image/svg+xml" {
				// The footer is drawn as text, wrapped over lines.
				assert.Contains(t, string(b), "Estimate only: the envelope is the Reynolds number within the facility")
				assert.Contains(t, string(b), "Reynolds number within the flow limits of")
				assert.NotContains(t, string(b), "Reynolds number reachable")
			}
		})
	}
}

// TestPlanMatchedAndCautions checks that a plan answer decides each matched group
// (mach_matched, reynolds_matched, the tolerance used) and carries the static-load
// caution with its balance loads.
func TestPlanMatchedAndCautions(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name string
		body string
	}{
		{"default tolerance", testfixture.J16Plan},
		{"tolerance 0.01", strings.Replace(testfixture.J16Plan, `"facility_id"`, `"objective": {"mach_tolerance": 0.01}, "facility_id"`, 1)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, b := post(t, ts, "/v1/plans", c.body)
			require.Equal(t, http.StatusOK, code, "%s", b)
			var p struct {
				Mismatch struct {
					ReynoldsRatio   float64  `json:"reynolds_ratio"`
					MachDifference  *float64 `json:"mach_difference"`
					ReynoldsMatched *bool    `json:"reynolds_matched"`
					MachMatched     *bool    `json:"mach_matched"`
					MachTolerance   float64  `json:"mach_tolerance"`
				} `json:"mismatch"`
				Cautions []string `json:"cautions"`
			}
			require.NoError(t, json.Unmarshal(b, &p))
			m := p.Mismatch
			require.NotNil(t, m.MachMatched, "mach_matched present in a gas facility")
			require.NotNil(t, m.ReynoldsMatched, "reynolds_matched present")
			require.NotNil(t, m.MachDifference)
			assert.Greater(t, m.MachTolerance, 0.0)
			assert.Equal(t, *m.MachDifference <= m.MachTolerance*(1+1e-9) && *m.MachDifference >= -m.MachTolerance*(1+1e-9), *m.MachMatched)
			assert.Equal(t, m.ReynoldsRatio >= 0.999 && m.ReynoldsRatio <= 1.001, *m.ReynoldsMatched)
			assert.Contains(t, p.Cautions, loads.CautionStaticLoads)
			assert.Equal(t, facilities.CautionEstimate, p.Cautions[0])
		})
	}
}

// TestLoadsAtRest: Mach 0 is the tunnel at rest, q = 0 Pa: the loads answer 200
// and the balance carries the weight alone (no NaN or infinity from q = 0).
func TestLoadsAtRest(t *testing.T) {
	ts := newServer(t)
	body := strings.Replace(strings.Replace(j16Loads, "BALANCE", `"balance_id": "int-b2",`, 1), `"mach": 0.78`, `"mach": 0`, 1)
	code, b := post(t, ts, "/v1/loads", body)
	require.Equal(t, 200, code, "%s", b)
	var out struct {
		Test struct {
			DynamicPressure float64 `json:"dynamic_pressure"`
		} `json:"test"`
	}
	require.NoError(t, json.Unmarshal(b, &out))
	assert.Zero(t, out.Test.DynamicPressure, "q at rest, Pa: %s", b)
}

// TestBatchNDJSON asks for a batch as NDJSON: one line per request, in order,
// each line exactly the item the JSON answer holds; longer than the planner's
// window of held answers, so that the later items are planned after the first
// ones were sent; and an empty batch is an empty 200 answer, as {"results":[]}
// is in JSON.
func TestBatchNDJSON(t *testing.T) {
	ts := newServer(t)
	n := app.BatchWindow() + 5
	reqs := make([]string, n)
	for i := range reqs {
		reqs[i] = strings.Replace(testfixture.J16Plan, `"mach": 0.78`, fmt.Sprintf(`"mach": %.3f`, 0.6+0.005*float64(i)), 1)
	}
	reqs[3] = strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"no-such"`, 1)
	body := `{"requests": [` + strings.Join(reqs, ",") + `]}`
	batch := func(accept string) (string, []byte) {
		code, ct, b := postAccept(t, ts.URL+"/v1/plans/batch", accept, body)
		require.Equal(t, http.StatusOK, code, "%s", b)
		return ct, b
	}
	ct, nd := batch("application/json;q=0.5, application/x-ndjson")
	assert.Equal(t, "application/x-ndjson", ct)
	_, js := batch("")
	var whole struct {
		Results []json.RawMessage `json:"results"`
	}
	require.NoError(t, json.Unmarshal(js, &whole))
	lines := strings.Split(strings.TrimSuffix(string(nd), "\n"), "\n")
	require.Len(t, lines, n)
	require.Len(t, whole.Results, n)
	// Problems differ only in their request ids.
	requestID := regexp.MustCompile(`"request_id":"[0-9a-f]+"`)
	for i, line := range lines {
		assert.Equal(t, requestID.ReplaceAllString(string(whole.Results[i]), ""), requestID.ReplaceAllString(line, ""), "item %d", i)
		assert.Equal(t, i == 3, strings.HasPrefix(line, `{"error":`), "item %d", i)
	}

	req, err := http.NewRequest(http.MethodPost, ts.URL+"/v1/plans/batch", strings.NewReader(`{"requests": []}`))
	require.NoError(t, err)
	req.Header.Set("Content-Type", "application/json")
	req.Header.Set("Accept", "application/x-ndjson")
	resp, err := http.DefaultClient.Do(req)
	require.NoError(t, err)
	b, _ := io.ReadAll(resp.Body)
	resp.Body.Close()
	assert.Equal(t, http.StatusOK, resp.StatusCode)
	assert.Empty(t, b)
	code, b := post(t, ts, "/v1/plans/batch", `{"requests": []}`)
	assert.Equal(t, http.StatusOK, code)
	assert.JSONEq(t, `{"results":[]}`, string(b))
}
