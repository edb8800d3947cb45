package similarity_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// machExact is a Mach tolerance of 0: the plan runs at the flight's Mach number.
var machExact = 0.0

// planAtFlightMach plans a 1:50 Orrin J16 flying at mach at 11 000 m in f, Mach
// number first (exactly, machExact), then Reynolds number.
func planAtFlightMach(t *testing.T, f *facilities.Facility, mach float64) *similarity.Result {
	t.Helper()
	fs := planFlight(t, &orrinJ16, 11000, mach, 0)
	scale := 0.02
	r, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: f,
		Model:     similarity.Model{Scale: &scale},
		Objective: similarity.Objective{Priority: []string{similarity.GroupMach, similarity.GroupReynolds}, MachTolerance: &machExact}}, nil)
	require.NoError(t, err)
	return r
}

// TestPlanNitrogenWarmingUnderCeiling: with the real-gas speed of sound, nitrogen's
// q at a fixed Mach number and p0 falls slightly as the gas cools (q/p0 at M 0.8 and
// 130 kPa: 0.2764 at T0 300 K against 0.2754 at 100 K, from facilities.State), so
// the coldest setting is also the one under a q ceiling. A ceiling between the two
// (0.1 % above q at the T0 floor and p0 min) leaves the flight's Mach number usable
// at the floor; a Reynolds-hungry Mach-first plan runs there on the ceiling, and no
// setting at that Mach number has a higher Re/m (checked on a grid of p0 and T0).
func TestPlanNitrogenWarmingUnderCeiling(t *testing.T) {
	t.Parallel()
	f := planDemo(t, "cn2-05")
	const mach = 0.8
	pa := f.StagnationPressure.Min
	tFloor, _, err := similarity.LowestStagnationTemperature(f, mach, pa)
	require.NoError(t, err)
	cold, err := f.State(facilities.Setting{Mach: mach, StagnationPressure: pa, StagnationTemperature: tFloor})
	require.NoError(t, err)
	warm, err := f.State(facilities.Setting{Mach: mach, StagnationPressure: pa, StagnationTemperature: f.StagnationTemperature.Max})
	require.NoError(t, err)
	require.Less(t, cold.DynamicPressure*1.001, warm.DynamicPressure, "q falls as nitrogen cools at fixed M and p0")
	qmax := cold.DynamicPressure * 1.001
	f.MaxDynamicPressure = &qmax

	r := planAtFlightMach(t, f, mach)
	st := r.Test.State
	assert.InDelta(t, mach, st.Mach, 1e-12)
	assert.Empty(t, f.Violations(st))
	assert.True(t, planBound(r, facilities.ConstraintDynamic), "binding %v", r.Binding)
	assert.InDelta(t, tFloor, st.StagnationTemperature, 1e-6*tFloor, "the plan runs at the T0 floor")
	// No setting on a grid of the usable range beats it.
	for p0 := pa; p0 <= f.StagnationPressure.Max; p0 += 5000 {
		for t0 := f.StagnationTemperature.Min; t0 <= f.StagnationTemperature.Max; t0 += 2 {
			g, err := f.State(facilities.Setting{Mach: mach, StagnationPressure: p0, StagnationTemperature: t0})
			if err != nil || len(f.Violations(g)) > 0 {
				continue
			}
			assert.LessOrEqual(t, g.ReynoldsPerMeter, st.ReynoldsPerMeter*(1+1e-9), "p0 %g Pa, T0 %g K", p0, t0)
		}
	}
}

// TestPlanNitrogenSpeedRange: in nitrogen the speed at a fixed Mach number falls as
// p0 rises (the real-gas speed of sound; V/√T0 at M 0.6 and 100 K: 11.6 m/s/√K at
// 130 kPa, about 3 % less at 390 kPa), so a facility's lowest speed sets a T0 floor
// that rises with p0. A Reynolds-hungry plan at the facility's top pressure then sits
// on the lowest speed, exactly: no speed_min violation, speed_min binding, and T0 the
// lowest LowestStagnationTemperature gives there (naming speed_min).
func TestPlanNitrogenSpeedRange(t *testing.T) {
	t.Parallel()
	f := planDemo(t, "cn2-05")
	f.MaxDynamicPressure = nil
	f.Speed = &facilities.Range{Min: 140, Max: 250}
	const mach = 0.6
	r := planAtFlightMach(t, f, mach)
	st := r.Test.State
	assert.Empty(t, f.Violations(st))
	assert.InDelta(t, f.StagnationPressure.Max, st.StagnationPressure, 1e-9*st.StagnationPressure)
	assert.InDelta(t, f.Speed.Min, st.Speed, 1e-6*f.Speed.Min)
	assert.True(t, planBound(r, facilities.ConstraintSpeedMin), "binding %v", r.Binding)
	t0, lim, err := similarity.LowestStagnationTemperature(f, mach, st.StagnationPressure)
	require.NoError(t, err)
	assert.Equal(t, facilities.ConstraintSpeedMin, lim)
	assert.InDelta(t, t0, st.StagnationTemperature, 1e-6*t0)
	// At p0 min the same speed needs a colder T0: the floor rises with p0.
	tLow, _, err := similarity.LowestStagnationTemperature(f, mach, f.StagnationPressure.Min)
	require.NoError(t, err)
	assert.Less(t, tLow, t0-1)
}
