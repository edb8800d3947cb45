package facilities

import (
	"math"
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
