package similarity_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// TestSearchPlateauLowestQ is the Pellin P3 at 50 m/s at sea level (a low-level
// point invented for this test; its cruise Reynolds number is out of plp-3's reach)
// in plp-3 at the span limit (0.8 of the width), where the facility meets the
// flight's Reynolds number over a band of Mach numbers: on that plateau every plan
// matches and the lowest q wins, which is at the plateau's lower end, the Mach
// number where Re/m at the highest p0 and the lowest T0 just reaches the target.
// The structured search alone (no refinement) must find that end for the weighted
// objective (reynolds alone) and for the priority ["reynolds"]. With a tolerance
// on the first level of the key, the search once crept past the end through a
// chain of "ties" and settled at a higher Mach number and q.
func TestSearchPlateauLowestQ(t *testing.T) {
	t.Parallel()
	f := planDemo(t, "plp-3")
	fs := planFlight(t, &pellinP3, 0, 0, 50)
	s := 0.8 * f.TestSection.Width / pellinP3.Span
	want := plateauEnd(t, f, fs, s)
	objectives := []struct {
		name string
		obj  similarity.Objective
	}{
		{"weights reynolds", similarity.Objective{Weights: map[string]float64{"reynolds": 1}}},
		{"priority reynolds", similarity.Objective{Priority: []string{"reynolds"}}},
	}
	for _, o := range objectives {
		t.Run(o.name, func(t *testing.T) {
			t.Parallel()
			p := &similarity.Problem{Flight: fs, Article: &pellinP3, Facility: f, Objective: o.obj}
			r, err := similarity.PlanSearch(p, false)
			require.NoError(t, err)
			// The golden-section search stops within 1e-9 of the Mach range's
			// scale; q and Re/m follow the Mach number.
			checkPlateauEnd(t, f, r, want, s, plateauTolerances{scale: 1e-12, mach: 1e-8, p0: 1e-8, t0: 1e-12, q: 2e-8, reynolds: 1e-9})
			t.Logf("plateau's low-q end: M %.4g at q %.4g Pa", r.Test.Mach, r.Test.DynamicPressure)
		})
	}
}

// plateauEnd is the state at the lower end of the Pellin P3's Reynolds plateau
// in f at scale s: the Mach number (bisected to 1e-14) where Re/m at the highest
// p0 and the lowest T0 just reaches the flight's Reynolds number over s·l.
func plateauEnd(t *testing.T, f *facilities.Facility, fs similarity.FlightState, s float64) facilities.State {
	t.Helper()
	target := fs.Reynolds / (s * pellinP3.ReferenceLength)
	p0, t0 := f.StagnationPressure.Max, f.StagnationTemperature.Min
	state := func(m float64) facilities.State {
		st, err := f.State(facilities.Setting{Mach: m, StagnationPressure: p0, StagnationTemperature: t0})
		require.NoError(t, err)
		return st
	}
	lo, hi := f.Mach.Min, f.Mach.Max
	for hi-lo > 1e-14 {
		if m := (lo + hi) / 2; state(m).ReynoldsPerMeter < target {
			lo = m
		} else {
			hi = m
		}
	}
	return state(hi)
}

// plateauTolerances are the relative tolerances of a plan at the plateau's end.
type plateauTolerances struct{ scale, mach, p0, t0, q, reynolds float64 }

// checkPlateauEnd checks that r sits at the plateau's lower end (the state want,
// from plateauEnd) at scale s: that end's Mach number and q, f's highest p0 and
// lowest T0, and the flight's Reynolds number.
func checkPlateauEnd(t *testing.T, f *facilities.Facility, r *similarity.Result, want facilities.State, s float64, tol plateauTolerances) {
	t.Helper()
	assert.InEpsilon(t, s, r.Model.Scale, tol.scale, "scale: the span limit")
	assert.InEpsilon(t, want.Mach, r.Test.Mach, tol.mach, "Mach number at the plateau's end")
	assert.InEpsilon(t, f.StagnationPressure.Max, r.Test.StagnationPressure, tol.p0, "stagnation pressure, Pa: the highest")
	assert.InEpsilon(t, f.StagnationTemperature.Min, r.Test.StagnationTemperature, tol.t0, "stagnation temperature, K: the lowest")
	assert.InEpsilon(t, want.DynamicPressure, r.Test.DynamicPressure, tol.q, "dynamic pressure, Pa, at the plateau's end")
	assert.InEpsilon(t, 1, r.Mismatch.ReynoldsRatio, tol.reynolds, "Reynolds ratio: the flight's met")
}
