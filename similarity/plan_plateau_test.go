package similarity_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// TestFroudePlateauLowestSpeed is the Quill U5 at 30 m/s at 45 km in wtn-04
// (the scale range of examples/quill-u5-wtn-04.json, up to 1:12) with the
// weights reynolds 1, froude 1. Both numbers can be met exactly: at speed V the
// scale s = (V/V_f)² matches the Froude number, and the Reynolds number
//
//	Re = V·s·l·ρ/μ = V³·l·ρ/(V_f²·μ)
//
// (an identity of the definitions Fr = V/√(g·l), Re = ρ·V·l/μ) is the flight's
// where V³ = Re_f·V_f²·ν(T)/l, at one speed for each water temperature T in the
// facility's range: a plateau of exact plans, the weighted sum 0 across it. The
// tie rule (docs/planner.md, Objectives) takes the lowest dynamic pressure,
// q = ½·ρ·V²: the warmest water (lowest ν, so lowest V, and lightest),
// 303.15 K, the top of wtn-04's T0 range, at the lowest speed that meets both
// numbers there. The test checks that the plan meets both numbers within
// 1e-9, breaks no limit, sits at that speed, temperature and scale, and that
// no plan of the plateau (21 temperatures across the range, each at the speed
// that meets both there) has a lower q.
func TestFroudePlateauLowestSpeed(t *testing.T) {
	t.Parallel()
	art := quillU5
	fs := planFlight(t, &art, 45000, 0, 30)
	f := planDemo(t, "wtn-04")
	p := &similarity.Problem{Flight: fs, Article: &art, Facility: f,
		Model:     similarity.Model{ScaleMax: fp(1.0 / 12)},
		Objective: similarity.Objective{Weights: map[string]float64{"reynolds": 1, "froude": 1}}}
	r, err := similarity.Plan(p, nil)
	require.NoError(t, err)
	sc := &scenario{name: "quill-u5-45km", p: *p}
	checkLimits(t, sc, r)
	assert.InDelta(t, 1, r.Mismatch.ReynoldsRatio, 1e-9, "Re test / Re flight")
	assert.InDelta(t, 1, r.Mismatch.FroudeRatio, 1e-9, "Fr test / Fr flight")
	// The rule puts it on the warmest water: T0 max binds, with no gain (the
	// flight's Reynolds number is met).
	require.Len(t, r.Binding, 1, "binding limits")
	assert.Equal(t, facilities.ConstraintTempMax, r.Binding[0].Constraint)
	assert.Zero(t, r.Binding[0].ReynoldsGainPerPercent, "Reynolds gain, %/%")

	// The plateau's plan at temperature T: the speed that meets both numbers
	// there, its scale and q (the identities above).
	l, vf, ref := art.ReferenceLength, fs.Speed(), fs.Reynolds
	plateau := func(T float64) (v, s, q float64) {
		rho := facilities.WaterDensity(T)
		nu := facilities.WaterViscosity(T, rho) / rho
		v = math.Cbrt(ref * vf * vf * nu / l)
		return v, (v / vf) * (v / vf), 0.5 * rho * v * v
	}
	tMin, tMax := f.StagnationTemperature.Min, f.StagnationTemperature.Max
	v, s, q := plateau(tMax)
	// The speed is bisected to 1e-9 of the speed range (3.5 m/s).
	assert.InEpsilon(t, v, r.Test.Speed, 1e-8, "speed, m/s: the lowest that meets both numbers")
	assert.InEpsilon(t, s, r.Model.Scale, 2e-8, "scale: (V/V_f)²")
	assert.InDelta(t, tMax, r.Test.StagnationTemperature, 1e-9*tMax, "T0, K: the warmest water")
	assert.InEpsilon(t, q, r.Test.DynamicPressure, 2e-8, "q, Pa")
	for i := 0; i <= 20; i++ {
		T := tMin + (tMax-tMin)*float64(i)/20
		vT, sT, qT := plateau(T)
		if sT < 1e-3 || sT > 1.0/12 {
			continue // outside the scale range
		}
		st, err := f.State(facilities.Setting{Speed: vT, StagnationPressure: f.StagnationPressure.Max, StagnationTemperature: T})
		require.NoError(t, err)
		if len(f.Violations(st)) > 0 {
			continue
		}
		assert.GreaterOrEqual(t, qT, r.Test.DynamicPressure*(1-2e-8), "q, Pa, of the plateau's plan at %.2f K (%.6g m/s)", T, vT)
	}
	// The nested searches over speed and scale ran across the plateau before
	// (22 247 states with the balance of the example, docs/performance.md).
	assert.Less(t, r.Stats.Evaluations, 1500, "state evaluations")
	assert.Zero(t, r.Stats.RefineEvaluations, "refinement evaluations: nothing to refine when every target is met")
	t.Logf("V %.9g m/s, scale %.9g, T0 %.6g K, q %.6g Pa; %d state evaluations", r.Test.Speed, r.Model.Scale,
		r.Test.StagnationTemperature, r.Test.DynamicPressure, r.Stats.Evaluations)
}
