package api_test

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"net/http/httptest"
	"slices"
	"strconv"
	"strings"
	"testing"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/loads"

	"github.com/stretchr/testify/require"
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
	if err := dec.Decode(&v); err != nil {
		t.Fatalf("answer is not JSON: %v: %s", err, body)
	}
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
	if len(r.Points) != len(alphas) {
		t.Fatalf("balance %s: %d load points, want %d", r.BalanceID, len(r.Points), len(alphas))
	}
	// Safety factors of the demo balances (docs/demo-world.md).
	wantSF := map[string]float64{"hyd-m": 2.0}[r.BalanceID]
	if wantSF == 0 {
		wantSF = 1.5
	}
	if r.SafetyFactor != wantSF || math.Abs(r.AllowedUtilization-1/wantSF) > 1e-12 {
		t.Errorf("balance %s: safety factor %g, allowed %g; want %g (docs/demo-world.md)", r.BalanceID, r.SafetyFactor, r.AllowedUtilization, wantSF)
	}
	worst := 0.0
	for i, p := range r.Points {
		if math.Abs(p.Alpha-alphas[i]) > 1e-9 {
			t.Errorf("balance %s: point %d at α %g°, want %g°", r.BalanceID, i, p.Alpha, alphas[i])
		}
		if !(p.Utilization >= 0) || p.Limiting == "" {
			t.Errorf("balance %s α %g°: utilisation %g on %q", r.BalanceID, p.Alpha, p.Utilization, p.Limiting)
		}
		if within && p.Utilization > r.AllowedUtilization*(1+1e-9) {
			t.Errorf("balance %s α %g°: utilisation %.9g above the allowed %.9g (%s)", r.BalanceID, p.Alpha, p.Utilization, r.AllowedUtilization, p.Limiting)
		}
		worst = math.Max(worst, p.Utilization)
	}
	if math.Abs(worst-r.MaxUtilization) > 1e-12*worst || r.Limiting.Component == "" {
		t.Errorf("balance %s: max utilisation %g on %q, the points' largest is %g", r.BalanceID, r.MaxUtilization, r.Limiting.Component, worst)
	}
	if r.WithinLimits != within {
		t.Errorf("balance %s: within limits %v, want %v", r.BalanceID, r.WithinLimits, within)
	}
	if math.Abs(r.DynamicPressure-q) > 1e-9*q {
		t.Errorf("balance %s: checked at q %g Pa, the test is at %g Pa", r.BalanceID, r.DynamicPressure, q)
	}
	// Loads are affine in q, so a check within its limits at q has its largest safe
	// q at or above q, and one beyond them below it.
	if ms := float64(r.MaxSafeDynamicPressure); math.IsInf(ms, 0) || math.IsNaN(ms) || (within && ms < q*(1-1e-9)) || (!within && ms > q*(1+1e-9)) {
		t.Errorf("balance %s: max safe dynamic pressure %g Pa against the test's %g Pa (within limits %v)", r.BalanceID, ms, q, within)
	}
	if !r.WeightIncluded {
		t.Errorf("balance %s: the model's weight is left out though model_mass is given", r.BalanceID)
	}
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
				if p := matrixFinite(t, body); p != "" {
					t.Fatalf("non-finite number at %s: %s", p, body)
				}
				if matrixInfeasible[name] {
					checkMatrixProblem(t, code, ctype, body)
					return
				}
				if code != http.StatusOK {
					t.Fatalf("status %d, want a plan: %s", code, body)
				}
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
	if code != http.StatusUnprocessableEntity {
		t.Fatalf("status %d, want 422: %s", code, body)
	}
	if !strings.HasPrefix(ctype, "application/problem+json") {
		t.Errorf("content type %q, want application/problem+json", ctype)
	}
	var p schema.Problem
	require.NoError(t, json.Unmarshal(body, &p))
	if p.Status != 422 || len(p.Limits) == 0 || p.Detail == "" {
		t.Errorf("422 problem without status, detail or limits: %s", body)
	}
}

// checkMatrixPlan checks one plan answer and returns it decoded.
func checkMatrixPlan(t *testing.T, f matrixFacility, body []byte) *schema.PlanResponse {
	t.Helper()
	var raw map[string]json.RawMessage
	require.NoError(t, json.Unmarshal(body, &raw))
	for _, k := range []string{"id", "flight", "model", "test", "mismatch", "binding", "corrections", "loads",
		"reynolds_effects", "schedule", "warnings", "cautions"} {
		if v, ok := raw[k]; !ok || string(v) == "null" {
			t.Errorf("plan has no %q", k)
		}
	}
	var plan schema.PlanResponse
	require.NoError(t, json.Unmarshal(body, &plan))
	if plan.Loads == nil || plan.ReynoldsEffects == nil || plan.Schedule == nil {
		t.Fatalf("plan lacks loads, Reynolds effects or schedule: %s", body)
	}
	checkMatrixReport(t, plan.Loads, plan.Test.DynamicPressure, true)
	if plan.Loads.MaxUtilization > plan.Loads.AllowedUtilization*(1+1e-9) {
		t.Errorf("plan loads balance %s to %.9g of its rating, above the %.9g allowed", plan.Loads.BalanceID, plan.Loads.MaxUtilization, plan.Loads.AllowedUtilization)
	}
	// The reads of the plan that must stay physical: a positive scale, test
	// Reynolds number and dynamic pressure; a q_c/q of at least 1 (blockage only
	// speeds the flow up, physics.md §7) or exactly 1 where no correction applies.
	if !(plan.Model.Scale > 0) || !(plan.Test.Reynolds > 0) || !(plan.Test.DynamicPressure > 0) {
		t.Errorf("scale %g, test Re %g, q %g Pa", plan.Model.Scale, plan.Test.Reynolds, plan.Test.DynamicPressure)
	}
	fac, ok := facilities.DemoFacility(f.id)
	if !ok {
		t.Fatalf("no demo facility %s", f.id)
	}
	if lim := *fac.MaxSpanFraction * fac.TestSection.Width; plan.Model.Span > lim*(1+1e-9) {
		t.Errorf("model span %g m above the %g m the section allows", plan.Model.Span, lim)
	}
	if plan.Model.Blockage > *fac.MaxBlockage*(1+1e-9) {
		t.Errorf("blockage %g above the %g allowed", plan.Model.Blockage, *fac.MaxBlockage)
	}
	if c := plan.Corrections; c.Walls == "" || c.DynamicPressureFactor < 1 {
		t.Errorf("corrections %+v", c)
	}
	// 21 α points at one condition (no β sweep): the schedule counts them and takes
	// some time.
	if plan.Schedule.Points != 21 || !(plan.Schedule.Hours > 0) {
		t.Errorf("schedule %+v, want 21 points and hours > 0", plan.Schedule)
	}
	if !hasCaution(plan.Cautions, matrixEstimatesCaution) {
		t.Errorf("cautions %q lack the estimates caution", plan.Cautions)
	}
	if plan.Warnings == nil {
		t.Errorf("warnings is null, want a list")
	}
	if f.water != (plan.Mismatch.MachDifference == nil) {
		t.Errorf("mach difference %v in a water facility %v", plan.Mismatch.MachDifference, f.water)
	}
	if re := plan.ReynoldsEffects; !(re.SkinFrictionFlight > 0 && re.SkinFrictionTest > 0) ||
		!(re.NaturalTransitionFraction >= 0 && re.NaturalTransitionFraction <= 1) {
		t.Errorf("Reynolds effects %+v", re)
	}
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
		if r == nil || r.BalanceID != plan.Loads.BalanceID {
			t.Fatalf("loads %+v, want balance %s", r, plan.Loads.BalanceID)
		}
		// The same model at the same state: the same test q (1e-9) and the same
		// loads, point by point, as the plan's (1e-9 relative to the point's largest).
		if math.Abs(out.Test.DynamicPressure-plan.Test.DynamicPressure) > 1e-9*plan.Test.DynamicPressure {
			t.Errorf("q %g Pa, the plan's %g Pa", out.Test.DynamicPressure, plan.Test.DynamicPressure)
		}
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
				if math.Abs(got[k]-want[k]) > 1e-9*scale+1e-12 {
					t.Errorf("α %g° component %d: %.12g, the plan's %.12g", p.Alpha, k, got[k], want[k])
				}
			}
		}
		if len(out.Violations) != 0 {
			t.Errorf("the plan's own state breaks facility limits: %+v", out.Violations)
		}
		if !hasCaution(out.Cautions, matrixEstimatesCaution) {
			t.Errorf("cautions %q lack the estimates caution", out.Cautions)
		}
	})
	t.Run("loads_all", func(t *testing.T) {
		out := matrixLoads(t, ts, body(""), "[")
		if len(out.Loads.All) != f.balances {
			t.Fatalf("%d reports, want one per balance of %s (%d)", len(out.Loads.All), f.id, f.balances)
		}
		found := false
		for i := range out.Loads.All {
			r := &out.Loads.All[i]
			checkMatrixReport(t, r, out.Test.DynamicPressure, r.MaxUtilization <= r.AllowedUtilization*(1+1e-12))
			if r.BalanceID == plan.Loads.BalanceID {
				found = true
				if !r.WithinLimits || math.Abs(r.MaxUtilization-plan.Loads.MaxUtilization) > 1e-9*plan.Loads.MaxUtilization {
					t.Errorf("balance %s in the list: %.9g (within %v), the plan's %.9g", r.BalanceID, r.MaxUtilization, r.WithinLimits, plan.Loads.MaxUtilization)
				}
			}
		}
		if !found {
			t.Errorf("the list has no report of the plan's balance %s", plan.Loads.BalanceID)
		}
		if !hasCaution(out.Cautions, matrixEstimatesCaution) {
			t.Errorf("cautions %q lack the estimates caution", out.Cautions)
		}
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
			if !ok {
				t.Fatalf("no demo facility %s", f.id)
			}
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
					if p := matrixFinite(t, body); p != "" {
						t.Fatalf("non-finite number at %s: %s", p, body)
					}
					checkMatrixProblem(t, code, ctype, body)
					var p schema.Problem
					require.NoError(t, json.Unmarshal(body, &p))
					if !slices.Contains(p.Limits, tc.limit) {
						t.Errorf("limits %q do not name %s: %s", p.Limits, tc.limit, p.Detail)
					}
				})
			}
		}
	}
}
