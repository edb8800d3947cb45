package similarity_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// depressurised returns the demo water tunnel wtn-04 run at a stagnation pressure
// of 12 kPa with its water allowed from 10 °C to 60 °C: at its top speed, 3.5 m/s,
// the test-section static pressure (12 kPa − ½ρV², about 5.9 kPa) meets the
// IAPWS-IF97 vapour pressure near 36 °C, and the stagnation pressure meets it near
// 49 °C (boiling).
func depressurised(t *testing.T) *facilities.Facility {
	f := planDemo(t, "wtn-04")
	f.StagnationPressure = facilities.Range{Min: 12000, Max: 12000}
	f.StagnationTemperature = facilities.Range{Min: 283.15, Max: 333.15}
	return f
}

// waterLimitPlan plans the Quill U5 at 30 m/s at 1000 m (a Reynolds number the
// tunnel cannot reach: the plan wants the fastest, warmest water) at a fixed scale.
func waterLimitPlan(t *testing.T, f *facilities.Facility, allowed bool) *similarity.Result {
	fs := planFlight(t, &quillU5, 1000, 0, 30)
	scale := 0.05
	r, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &quillU5, Facility: f,
		Model: similarity.Model{Scale: &scale}, CavitationAllowed: allowed}, nil)
	require.NoError(t, err)
	return r
}

// TestPlanWaterAvoidsCavitation: warmer water is less viscous, so a Reynolds-hungry
// plan warms it, until the static pressure reaches the vapour pressure (IAPWS-IF97,
// facilities.WaterVapourPressure): there it stops, on the named limit cavitation,
// with no violation. Allowed to cavitate, it warms on to the boiling limit.
func TestPlanWaterAvoidsCavitation(t *testing.T) {
	t.Parallel()
	f := depressurised(t)
	r := waterLimitPlan(t, f, false)
	st := r.Test.State
	assert.Empty(t, f.Violations(st))
	assert.True(t, planBound(r, facilities.ConstraintCavitation), "binding %v", r.Binding)
	assert.InDelta(t, 0, f.CavitationMargin(st), 1e-7)
	assert.InDelta(t, f.Speed.Max, st.Speed, 1e-9)
	assert.InDelta(t, 309, st.StagnationTemperature, 1.5, "near 36 °C")
	// The binding gain of the cavitation limit: a 1 % lower margin allowed buys a
	// little Reynolds number (warmer water).
	for _, b := range r.Binding {
		if b.Constraint == facilities.ConstraintCavitation {
			assert.Greater(t, b.ReynoldsGainPerPercent, 0.0)
		}
	}

	allowed := waterLimitPlan(t, f, true)
	sa := allowed.Test.State
	assert.Less(t, f.CavitationMargin(sa), 0.0, "the allowed plan cavitates")
	assert.Greater(t, sa.StagnationTemperature, st.StagnationTemperature)
	assert.Greater(t, allowed.Test.Reynolds, r.Test.Reynolds)
	assert.False(t, planBound(allowed, facilities.ConstraintCavitation))
	assert.True(t, planBound(allowed, facilities.ConstraintBoiling), "binding %v", allowed.Binding)
}

// TestPlanWaterAvoidsBoiling: with cavitation allowed, the stagnation pressure's
// boiling point (12 kPa: about 49.4 °C by IAPWS-IF97) caps the water temperature,
// a named binding limit; the plan breaks only the cavitation limit it was allowed.
func TestPlanWaterAvoidsBoiling(t *testing.T) {
	t.Parallel()
	f := depressurised(t)
	r := waterLimitPlan(t, f, true)
	st := r.Test.State
	assert.InDelta(t, 0, f.BoilingMargin(st), 1e-7)
	assert.InDelta(t, 322.5, st.StagnationTemperature, 0.5, "about 49.4 °C")
	for _, v := range f.Violations(st) {
		assert.Equal(t, facilities.ConstraintCavitation, v.Constraint)
	}
	// With the facility's own ceiling below the boiling point, nothing binds but it.
	f.StagnationTemperature.Max = 318.15
	r = waterLimitPlan(t, f, true)
	assert.True(t, planBound(r, facilities.ConstraintTempMax), "binding %v", r.Binding)
	assert.False(t, planBound(r, facilities.ConstraintBoiling))
}
