package facilities

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
)

// satTemperatureBisection is the plain bisection satTemperature replays: every
// step evaluates the line.
func satTemperatureBisection(line func(float64) float64, p, lo, hi float64) float64 {
	lp := math.Log(p)
	for range 200 {
		mid := 0.5 * (lo + hi)
		if math.Log(line(mid)) < lp {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return 0.5 * (lo + hi)
}

// TestSatTemperatureBisection: the bisection that skips the steps outside its
// certified bracket gives the plain bisection's temperature to the bit on air's
// dew line and on a Lee–Kesler line (nitrogen's critical constants), at
// pressures over ten decades up to the top of each line, and at pressures the
// line reaches only at its ends.
func TestSatTemperatureBisection(t *testing.T) {
	t.Parallel()
	air := func(t float64) float64 { v, _ := AirDewPressure(t); return v }
	lk := func(t float64) float64 {
		return LeeKeslerVapourPressure(t, NitrogenCriticalTemperature, NitrogenCriticalPressure, NitrogenAcentricFactor)
	}
	lines := []struct {
		name       string
		line       func(float64) float64
		lo, hi, pc float64
	}{
		{"air", air, 1, airDewTj, airDewPj},
		{"Lee–Kesler", lk, 1e-3 * NitrogenCriticalTemperature, NitrogenCriticalTemperature, NitrogenCriticalPressure},
	}
	for _, l := range lines {
		ps := []float64{l.line(l.hi), l.line(0.5 * (l.lo + l.hi)), 0.999999 * l.pc}
		for p := 1e-3; p < l.pc; p *= 1.13 {
			ps = append(ps, p)
			a, b := satBracket(l.line, math.Log(p), l.lo, l.hi)
			assert.False(t, math.IsInf(a, 0) || math.IsInf(b, 0), "%s at %g Pa: a certified bracket", l.name, p)
		}
		for _, p := range ps {
			assert.Equal(t, satTemperatureBisection(l.line, p, l.lo, l.hi), satTemperature(l.line, p, l.lo, l.hi), "%s at %g Pa", l.name, p)
		}
	}
}

func TestCondensationNear(t *testing.T) {
	t.Parallel()
	// CondensationNear agrees with CondensationMargin within tol of 0, on states
	// drawn at random and on states set on the saturation line (free stream or
	// local expansion), for air, a custom gas with a critical point, one
	// without, and nitrogen.
	tc, pc := 190.6, 4.6e6
	media := []Medium{
		{Kind: MediumAir},
		{Kind: MediumGas, Gas: &GasProperties{MolarMass: 0.016, Gamma: 1.31, ViscosityReference: 1.1e-5, TemperatureReference: 273, SutherlandConstant: 164, CriticalTemperature: &tc, CriticalPressure: &pc}},
		{Kind: MediumGas, Gas: &GasProperties{MolarMass: 0.016, Gamma: 1.31, ViscosityReference: 1.1e-5, TemperatureReference: 273, SutherlandConstant: 164}},
		{Kind: MediumNitrogen},
	}
	const tol = 1e-7
	rng := rand.New(rand.NewPCG(5, 9))
	near := 0
	for _, m := range media {
		f := &Facility{ID: "t", Medium: m}
		for i := range 4000 {
			p0 := math.Exp(math.Log(2e3) + rng.Float64()*math.Log(2e3))
			t0 := 60 + 400*rng.Float64()
			st := State{StagnationPressure: p0, StagnationTemperature: t0,
				Static: Static{Temperature: t0 * (0.3 + 0.7*rng.Float64()), Pressure: p0 * (0.05 + 0.95*rng.Float64())}}
			if td, ok := m.dewTemperature(st.Static.Pressure); ok && i%2 == 0 {
				// On the line within a few tol, or just outside.
				st.Static.Temperature = td * (1 + (rng.Float64()-0.5)*6*tol)
				if i%4 == 0 {
					st.StagnationTemperature = st.Static.Temperature * (1 + 0.2*rng.Float64())
				}
			}
			want := f.CondensationMargin(st)
			wantNear := !math.IsInf(want, 1) && math.Abs(want) <= tol
			got, gotNear := f.CondensationNear(st, tol)
			if assert.Equal(t, wantNear, gotNear, "%v state %+v: margin %v", m.Kind, st, want) && gotNear {
				assert.Equal(t, want, got, "%v state %+v", m.Kind, st)
				near++
			}
		}
	}
	assert.Greater(t, near, 100, "states on the line")
}
