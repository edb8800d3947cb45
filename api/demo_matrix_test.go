package api_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"net/http/httptest"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/loads"
)

// matrixAircraft is one aircraft of the demo world (docs/demo-world.md, "Aircraft"),
// with its geometry, aerodynamic estimate and cruise exactly as listed there.
type matrixAircraft struct {
	name    string
	article string // the plan request's "article" object
	flight  string // the plan request's "flight" object: the listed cruise
}

// matrixAircrafts are the four demo aircraft. Geometry in m and m², lift and moment
// slopes per radian, zero-lift α in degrees (docs/demo-world.md).
var matrixAircrafts = []matrixAircraft{
	{"Velmar T64",
		`{"reference_length": 2.10, "reference_area": 46.5, "span": 23.4, "length": 23.9, "frontal_area": 7.6, "wetted_area": 305,
		  "aero": {"lift_slope": 5.3, "zero_lift_alpha": -2.2, "cl_max": 1.45, "cd_min": 0.027, "cl_at_cd_min": 0.18,
		           "induced_drag_factor": 0.042, "cm_zero": 0.05, "cm_slope": -0.85}}`,
		`{"altitude": 6100, "mach": 0.47}`},
	{"Orrin J16",
		`{"reference_length": 2.4, "reference_area": 36.5, "span": 16.4, "length": 19.6, "frontal_area": 4.4, "wetted_area": 228,
		  "aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25, "cd_min": 0.022, "cl_at_cd_min": 0.14,
		           "induced_drag_factor": 0.057, "cm_zero": 0.03, "cm_slope": -1.05}}`,
		`{"altitude": 12000, "mach": 0.78}`},
	{"Pellin P3",
		`{"reference_length": 1.42, "reference_area": 13.4, "span": 9.6, "length": 7.9, "frontal_area": 1.7, "wetted_area": 45,
		  "aero": {"lift_slope": 5.1, "zero_lift_alpha": -2.4, "cl_max": 1.55, "cd_min": 0.029, "cl_at_cd_min": 0.12,
		           "induced_drag_factor": 0.052, "cm_zero": 0.04, "cm_slope": -0.75}}`,
		`{"altitude": 2100, "true_airspeed": 68}`},
	{"Quill U5",
		`{"reference_length": 0.41, "reference_area": 1.4, "span": 3.45, "length": 2.05, "frontal_area": 0.10, "wetted_area": 3.9,
		  "aero": {"lift_slope": 4.95, "zero_lift_alpha": -2.8, "cl_max": 1.35, "cd_min": 0.031, "cl_at_cd_min": 0.28,
		           "induced_drag_factor": 0.047, "cm_zero": 0.06, "cm_slope": -0.65}}`,
		`{"altitude": 1000, "true_airspeed": 30}`},
}

// matrixFacility is one demo facility of the matrix with the mass of the model
// planned in it: the same physical model mass whatever scale the planner picks
// (loads.Installation). The masses are hand estimates of a metric model
// sized for each section, well inside each balance's normal rating on their own:
// 40 kg is 392 N against ext-6c's 5600 N and int-a's 2400 N allowed; 2 kg in
// water is 19.6 N against hyd-s's 120 N allowed and 10 kg is 98 N against hyd-m's
// 1300 N (normal ratings over their safety factors, 1.5 and for hyd-m 2.0,
// docs/demo-world.md).
type matrixFacility struct {
	id       string
	mass     float64 // kg
	balances int     // number of balances the facility lists (docs/demo-world.md)
	water    bool
}

var matrixFacilities = []matrixFacility{
	{"lsw-2", 40, 2, false},
	{"plp-3", 60, 1, false},
	{"tsw-1", 20, 2, false},
	{"cn2-05", 8, 1, false},
	{"wtn-04", 2, 1, true},
	{"cvt-07", 10, 1, true},
}

// matrixInfeasible lists the combinations expected to answer 422. None: the
// request leaves the scale free (model {}), down to the planner's 1:1000, and
// every demo aircraft fits every section at a small enough scale. The largest
// span, the Velmar T64's 23.4 m, needs a scale of at most 0.8 × 0.45 m / 23.4 m
// = 0.0154 in wtn-04 and 0.65 × 0.56 m / 23.4 m = 0.0156 in cn2-05 (span rules of
// docs/demo-world.md), both far above 1:1000; at such scales the aerodynamic loads are
// small and each model's weight alone (the masses above) stays under every
// rating over its safety factor, so some q > 0 is always safe on the balance.
var matrixInfeasible = map[string]bool{}

// matrixServer is the service over the embedded demo catalog.
func matrixServer(t *testing.T) *httptest.Server {
	t.Helper()
	return newServer(t)
}

// matrixPost posts body to path and returns the status, content type and body.
func matrixPost(t *testing.T, ts *httptest.Server, path, body string) (int, string, []byte) {
	t.Helper()
	return postAccept(t, ts.URL+path, "", body)
}

// matrixFinite walks a JSON document and returns the path of the first number
// that is not a finite float64, or of a string spelling NaN or infinity; "" when
// every number is finite.
func matrixFinite(t *testing.T, body []byte) string {
	t.Helper()
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.UseNumber()
	var v any
	require.NoError(t, dec.Decode(&v), "answer is not JSON: %s", body)
	var walk func(v any, path string) string
	walk = func(v any, path string) string {
		switch x := v.(type) {
		case json.Number:
			f, err := strconv.ParseFloat(string(x), 64)
			if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
				return path
			}
		case string:
			switch strings.ToLower(strings.TrimLeft(x, "+-")) {
			case "nan", "inf", "infinity":
				return path
			}
		case []any:
			for i, e := range x {
				if p := walk(e, fmt.Sprintf("%s[%d]", path, i)); p != "" {
					return p
				}
			}
		case map[string]any:
			for k, e := range x {
				if p := walk(e, path+"."+k); p != "" {
					return p
				}
			}
		}
		return ""
	}
	return walk(v, "$")
}

// matrixAlphas are the 21 angles of the sweep −4° to 16° by 1°, in degrees.
func matrixAlphas() []float64 {
	out := make([]float64, 21)
	for i := range out {
		out[i] = -4 + float64(i)
	}
	return out
}

// matrixPlanBody is the plan request of one aircraft in one facility: cruise,
// any scale, the planner's choice of balance, the default objective.
func matrixPlanBody(a matrixAircraft, f matrixFacility) string {
	return fmt.Sprintf(`{"flight": %s, "article": %s, "facility_id": %q, "model": {},
  "installation": {"model_mass": %g}, "alpha": {"from": -4, "to": 16, "step": 1}}`, a.flight, a.article, f.id, f.mass)
}

// checkMatrixReport checks one balance's load report over the 21-point sweep: every
// point present at its α, each at or under 1/safety factor (1e-9 relative) when
// within is set, the worst point and the safe dynamic pressure consistent.
func checkMatrixReport(t *testing.T, r *loads.Report, q float64, within bool) {
	t.Helper()
	alphas := matrixAlphas()
	require.Len(t, r.Points, len(alphas), "balance %s: load points", r.BalanceID)
	// Safety factors of the demo balances (docs/demo-world.md).
	wantSF := map[string]float64{"hyd-m": 2.0}[r.BalanceID]
	if wantSF == 0 {
		wantSF = 1.5
	}
	assert.Equal(t, wantSF, r.SafetyFactor, "balance %s: safety factor (docs/demo-world.md)", r.BalanceID)
	assert.InDelta(t, 1/wantSF, r.AllowedUtilization, 1e-12, "balance %s: allowed utilisation, 1/safety factor (docs/demo-world.md)", r.BalanceID)
	worst := 0.0
	for i, p := range r.Points {
		assert.InDelta(t, alphas[i], p.Alpha, 1e-9, "balance %s: point %d: α, °", r.BalanceID, i)
		assert.GreaterOrEqual(t, p.Utilization, 0.0, "balance %s α %g°: utilisation", r.BalanceID, p.Alpha)
		assert.NotEmpty(t, p.Limiting, "balance %s α %g°: limiting component", r.BalanceID, p.Alpha)
		if within {
			assert.LessOrEqual(t, p.Utilization, r.AllowedUtilization*(1+1e-9), "balance %s α %g°: utilisation on %s against the allowed", r.BalanceID, p.Alpha, p.Limiting)
		}
		worst = math.Max(worst, p.Utilization)
	}
	assert.InDelta(t, worst, r.MaxUtilization, 1e-12*worst, "balance %s: max utilisation against the points' largest", r.BalanceID)
	assert.NotEmpty(t, r.Limiting.Component, "balance %s: limiting component", r.BalanceID)
	assert.Equal(t, within, r.WithinLimits, "balance %s: within limits", r.BalanceID)
	assert.InDelta(t, q, r.DynamicPressure, 1e-9*q, "balance %s: q checked at, Pa, against the test's", r.BalanceID)
	// Loads are affine in q, so a check within its limits at q has its largest safe
	// q at or above q, and one beyond them below it.
	ms := float64(r.MaxSafeDynamicPressure)
	assert.False(t, math.IsInf(ms, 0) || math.IsNaN(ms), "balance %s: max safe dynamic pressure %g Pa is not finite", r.BalanceID, ms)
	if within {
		assert.GreaterOrEqual(t, ms, q*(1-1e-9), "balance %s within limits: max safe dynamic pressure, Pa, against the test's", r.BalanceID)
	} else {
		assert.LessOrEqual(t, ms, q*(1+1e-9), "balance %s beyond limits: max safe dynamic pressure, Pa, against the test's", r.BalanceID)
	}
	assert.True(t, r.WeightIncluded, "balance %s: the model's weight is left out though model_mass is given", r.BalanceID)
}

// matrixEstimatesCaution is a phrase of the standing caution every load answer
// carries (facilities.Cautions): the loads are engineering estimates.
const matrixEstimatesCaution = "engineering estimates"

func hasCaution(cs []string, phrase string) bool {
	for _, c := range cs {
		if strings.Contains(c, phrase) {
			return true
		}
	}
	return false
}

// TestDemoMatrix plans every demo aircraft in every demo facility through the HTTP
// handler and checks each answer: a plan whose loads, corrections, Reynolds effects,
// schedule, warnings and cautions are all present and finite, with every load point
// at or under 1/safety factor; or a 422 naming the conflicting limits where one is
// expected. Then it asks POST /v1/loads at each plan's test state, with the plan's
// balance named (one object, equal to the plan's loads) and without (a list, one
// report per balance of the facility).
func TestDemoMatrix(t *testing.T) {
	ts := matrixServer(t)
	for _, a := range matrixAircrafts {
		for _, f := range matrixFacilities {
			name := a.name + " in " + f.id
			t.Run(strings.ReplaceAll(name, " ", "_"), func(t *testing.T) {
				code, ctype, body := matrixPost(t, ts, "/v1/plans", matrixPlanBody(a, f))
				require.Empty(t, matrixFinite(t, body), "non-finite number in %s", body)
				if matrixInfeasible[name] {
					checkMatrixProblem(t, code, ctype, body)
					return
				}
				require.Equal(t, http.StatusOK, code, "status, want a plan: %s", body)
				plan := checkMatrixPlan(t, f, body)
				var binds []string
				for _, b := range plan.Binding {
					binds = append(binds, b.Constraint)
				}
				t.Logf("scale 1:%.4g, M %.4g, q %.4g Pa, Re ratio %.4g; balance %s at %.4g (%s at α %g°); binding %v",
					1/plan.Model.Scale, plan.Test.Mach, plan.Test.DynamicPressure, plan.Mismatch.ReynoldsRatio,
					plan.Loads.BalanceID, plan.Loads.MaxUtilization, plan.Loads.Limiting.Component, plan.Loads.Limiting.Alpha, binds)
				checkMatrixLoads(t, ts, a, f, plan)
			})
		}
	}
}

// checkMatrixProblem checks a 422 answer: an RFC 9457 problem naming the limits.
func checkMatrixProblem(t *testing.T, code int, ctype string, body []byte) {
	t.Helper()
	require.Equal(t, http.StatusUnprocessableEntity, code, "status: %s", body)
	assert.True(t, strings.HasPrefix(ctype, "application/problem+json"), "content type %q, want application/problem+json", ctype)
	var p schema.Problem
	require.NoError(t, json.Unmarshal(body, &p))
	assert.Equal(t, 422, p.Status, "problem's status: %s", body)
	assert.NotEmpty(t, p.Limits, "problem's limits: %s", body)
	assert.NotEmpty(t, p.Detail, "problem's detail: %s", body)
}

// checkMatrixPlan checks one plan answer and returns it decoded.
func checkMatrixPlan(t *testing.T, f matrixFacility, body []byte) *schema.PlanResponse {
	t.Helper()
	var raw map[string]json.RawMessage
	require.NoError(t, json.Unmarshal(body, &raw))
	for _, k := range []string{"id", "flight", "model", "test", "mismatch", "binding", "corrections", "loads",
		"reynolds_effects", "schedule", "warnings", "cautions"} {
		if assert.Contains(t, raw, k, "plan") {
			assert.NotEqual(t, "null", string(raw[k]), "plan's %q", k)
		}
	}
	var plan schema.PlanResponse
	require.NoError(t, json.Unmarshal(body, &plan))
	require.NotNil(t, plan.Loads, "plan's loads: %s", body)
	require.NotNil(t, plan.ReynoldsEffects, "plan's Reynolds effects: %s", body)
	require.NotNil(t, plan.Schedule, "plan's schedule: %s", body)
	checkMatrixReport(t, plan.Loads, plan.Test.DynamicPressure, true)
	assert.LessOrEqual(t, plan.Loads.MaxUtilization, plan.Loads.AllowedUtilization*(1+1e-9), "plan's utilisation of balance %s against the allowed", plan.Loads.BalanceID)
	// The reads of the plan that must stay physical: a positive scale, test
	// Reynolds number and dynamic pressure; a q_c/q of at least 1 (blockage only
	// speeds the flow up, physics.md §7) or exactly 1 where no correction applies.
	assert.Greater(t, plan.Model.Scale, 0.0, "scale")
	assert.Greater(t, plan.Test.Reynolds, 0.0, "test Reynolds number")
	assert.Greater(t, plan.Test.DynamicPressure, 0.0, "test q, Pa")
	fac, ok := facilities.DemoFacility(f.id)
	require.True(t, ok, "no demo facility %s", f.id)
	lim := *fac.MaxSpanFraction * fac.TestSection.Width
	assert.LessOrEqual(t, plan.Model.Span, lim*(1+1e-9), "model span, m, against the %g m the section allows", lim)
	assert.LessOrEqual(t, plan.Model.Blockage, *fac.MaxBlockage*(1+1e-9), "blockage against the allowed")
	assert.NotEmpty(t, plan.Corrections.Walls, "corrections %+v: walls", plan.Corrections)
	assert.GreaterOrEqual(t, plan.Corrections.DynamicPressureFactor, 1.0, "corrections %+v: q_c/q", plan.Corrections)
	// 21 α points at one condition (no β sweep): the schedule counts them and takes
	// some time.
	assert.Equal(t, 21, plan.Schedule.Points, "schedule's points")
	assert.Greater(t, plan.Schedule.Hours, 0.0, "schedule's hours")
	assert.True(t, hasCaution(plan.Cautions, matrixEstimatesCaution), "cautions %q lack the estimates caution", plan.Cautions)
	assert.NotNil(t, plan.Warnings, "warnings is null, want a list")
	assert.Equal(t, f.water, plan.Mismatch.MachDifference == nil, "Mach difference %v is left out exactly in water", plan.Mismatch.MachDifference)
	re := plan.ReynoldsEffects
	assert.Greater(t, re.SkinFrictionFlight, 0.0, "Reynolds effects: flight skin friction")
	assert.Greater(t, re.SkinFrictionTest, 0.0, "Reynolds effects: test skin friction")
	assert.GreaterOrEqual(t, re.NaturalTransitionFraction, 0.0, "Reynolds effects: natural transition fraction")
	assert.LessOrEqual(t, re.NaturalTransitionFraction, 1.0, "Reynolds effects: natural transition fraction")
	return &plan
}

// checkMatrixLoads asks POST /v1/loads at the plan's scale and test state, with the
// plan's balance named and with none.
func checkMatrixLoads(t *testing.T, ts *httptest.Server, a matrixAircraft, f matrixFacility, plan *schema.PlanResponse) {
	t.Helper()
	speed := fmt.Sprintf(`"mach": %s`, strconv.FormatFloat(plan.Test.Mach, 'g', -1, 64))
	if f.water {
		speed = fmt.Sprintf(`"speed": %s`, strconv.FormatFloat(plan.Test.Speed, 'g', -1, 64))
	}
	body := func(balance string) string {
		return fmt.Sprintf(`{"article": %s, "facility_id": %q, "model": {"scale": %s},
  "installation": {%s"model_mass": %g}, "alpha": {"from": -4, "to": 16, "step": 1},
  "test": {%s, "stagnation_pressure": %s, "stagnation_temperature": %s}}`,
			a.article, f.id, strconv.FormatFloat(plan.Model.Scale, 'g', -1, 64), balance, f.mass, speed,
			strconv.FormatFloat(plan.Test.StagnationPressure, 'g', -1, 64),
			strconv.FormatFloat(plan.Test.StagnationTemperature, 'g', -1, 64))
	}
	t.Run("loads_named", func(t *testing.T) {
		out := matrixLoads(t, ts, body(fmt.Sprintf(`"balance_id": %q, `, plan.Loads.BalanceID)), "{")
		r := out.Loads.One
		require.NotNil(t, r, "loads of the named balance")
		require.Equal(t, plan.Loads.BalanceID, r.BalanceID, "balance")
		// The same model at the same state: the same test q (1e-9) and the same
		// loads, point by point, as the plan's (1e-9 relative to the point's largest).
		assert.InDelta(t, plan.Test.DynamicPressure, out.Test.DynamicPressure, 1e-9*plan.Test.DynamicPressure, "q, Pa, against the plan's")
		checkMatrixReport(t, r, out.Test.DynamicPressure, true)
		for i, p := range r.Points {
			w := plan.Loads.Points[i]
			got := []float64{p.Normal, p.Axial, p.Side, p.PitchingMoment, p.RollingMoment, p.YawingMoment, p.Utilization}
			want := []float64{w.Normal, w.Axial, w.Side, w.PitchingMoment, w.RollingMoment, w.YawingMoment, w.Utilization}
			scale := 0.0
			for _, v := range want {
				scale = math.Max(scale, math.Abs(v))
			}
			for k := range got {
				assert.InDelta(t, want[k], got[k], 1e-9*scale+1e-12, "α %g° component %d against the plan's", p.Alpha, k)
			}
		}
		assert.Empty(t, out.Violations, "the plan's own state breaks facility limits")
		assert.True(t, hasCaution(out.Cautions, matrixEstimatesCaution), "cautions %q lack the estimates caution", out.Cautions)
	})
	t.Run("loads_all", func(t *testing.T) {
		out := matrixLoads(t, ts, body(""), "[")
		require.Len(t, out.Loads.All, f.balances, "reports, one per balance of %s", f.id)
		found := false
		for i := range out.Loads.All {
			r := &out.Loads.All[i]
			checkMatrixReport(t, r, out.Test.DynamicPressure, r.MaxUtilization <= r.AllowedUtilization*(1+1e-12))
			if r.BalanceID == plan.Loads.BalanceID {
				found = true
				assert.True(t, r.WithinLimits, "balance %s in the list: within limits", r.BalanceID)
				assert.InDelta(t, plan.Loads.MaxUtilization, r.MaxUtilization, 1e-9*plan.Loads.MaxUtilization, "balance %s in the list: max utilisation against the plan's", r.BalanceID)
			}
		}
		assert.True(t, found, "the list has no report of the plan's balance %s", plan.Loads.BalanceID)
		assert.True(t, hasCaution(out.Cautions, matrixEstimatesCaution), "cautions %q lack the estimates caution", out.Cautions)
	})
}

// matrixLoads posts a load check and returns its answer, which must be a 200
// with finite numbers whose "loads" is one report ("{", a balance named) or a
// list of them ("[", every balance).
func matrixLoads(t *testing.T, ts *httptest.Server, body, open string) schema.LoadsResponse {
	t.Helper()
	code, _, b := matrixPost(t, ts, "/v1/loads", body)
	require.Empty(t, matrixFinite(t, b), "non-finite number in %s", b)
	require.Equal(t, http.StatusOK, code, "%s", b)
	var raw struct {
		Loads json.RawMessage `json:"loads"`
	}
	require.NoError(t, json.Unmarshal(b, &raw))
	require.True(t, bytes.HasPrefix(bytes.TrimSpace(raw.Loads), []byte(open)), "loads does not open with %s: %s", open, raw.Loads)
	var out schema.LoadsResponse
	require.NoError(t, json.Unmarshal(b, &out))
	return out
}

// TestDemoMatrixInfeasible asks every demo aircraft in every demo facility for two
// plans no facility can give, and checks that each is a 422 problem naming the
// limits that conflict: a fixed model scale 2 % above the largest the test section
// takes (the span rule or the blockage rule, whichever is tighter: docs/demo-world.md),
// and a model so heavy that its weight alone, at α = 0, is 10 % above the normal
// rating over the safety factor of the facility's strongest balance.
func TestDemoMatrixInfeasible(t *testing.T) {
	ts := matrixServer(t)
	const g0 = 9.80665 // m/s², standard gravity (U.S. Standard Atmosphere, 1976)
	for _, a := range matrixAircrafts {
		var art struct {
			Span        float64 `json:"span"`
			FrontalArea float64 `json:"frontal_area"`
		}
		require.NoError(t, json.Unmarshal([]byte(a.article), &art))
		for _, f := range matrixFacilities {
			fac, ok := facilities.DemoFacility(f.id)
			require.True(t, ok, "no demo facility %s", f.id)
			sSpan := *fac.MaxSpanFraction * fac.TestSection.Width / art.Span
			sBlock := math.Sqrt(*fac.MaxBlockage * fac.TestSection.CrossSection() / art.FrontalArea)
			geom, limit := sSpan, facilities.ConstraintSpan
			if sBlock < sSpan {
				geom, limit = sBlock, facilities.ConstraintBlockage
			}
			heavy := 0.0
			for _, b := range fac.Balances {
				heavy = math.Max(heavy, 1.1**b.Limits.Normal/(b.SafetyFactor*g0))
			}
			cases := []struct {
				name, body, limit string
			}{
				{"too_large", strings.Replace(matrixPlanBody(a, f), `"model": {}`,
					fmt.Sprintf(`"model": {"scale": %s}`, strconv.FormatFloat(1.02*geom, 'g', -1, 64)), 1), limit},
				{"too_heavy", strings.Replace(matrixPlanBody(a, f), fmt.Sprintf(`"model_mass": %g`, f.mass),
					fmt.Sprintf(`"model_mass": %s`, strconv.FormatFloat(heavy, 'g', -1, 64)), 1), facilities.ConstraintBalance},
			}
			for _, tc := range cases {
				t.Run(strings.ReplaceAll(a.name, " ", "_")+"_in_"+f.id+"/"+tc.name, func(t *testing.T) {
					code, ctype, body := matrixPost(t, ts, "/v1/plans", tc.body)
					require.Empty(t, matrixFinite(t, body), "non-finite number in %s", body)
					checkMatrixProblem(t, code, ctype, body)
					var p schema.Problem
					require.NoError(t, json.Unmarshal(body, &p))
					assert.Contains(t, p.Limits, tc.limit, "limits named: %s", p.Detail)
				})
			}
		}
	}
}
