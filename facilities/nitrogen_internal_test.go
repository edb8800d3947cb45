package facilities

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestPRLog: prLog meets ln[(1 + (1+√2)x)/(1 + (1−√2)x)], taken as the
// difference of two log1p (accurate for small x), within 2e-15 relative over x =
// bρ from 1e-8 to 0.1, across the switch from the series to the logarithm (the
// worst, 1.3e-15, is the logarithm's, just past the switch; below it the
// logarithm of the ratio itself misses by up to 1e-8).
func TestPRLog(t *testing.T) {
	t.Parallel()
	for x := 1e-8; x < 0.1; x *= 1.05 {
		want := math.Log1p((1+math.Sqrt2)*x) - math.Log1p((1-math.Sqrt2)*x)
		assert.InEpsilon(t, want, prLog(x), 2e-15, "x %g", x)
	}
}

// expandBefore is the expansion from (p0 in Pa, t0 in K) to Mach number mach,
// or to speed in m/s when speed > 0, as it was computed before the start's own
// logarithm and exponential (startLog1p, startExp) and the Peng–Robinson
// density by Newton's method (largestCubicRootFrom): the density from
// Cardano's formula (largestCubicRoot) and the start from math.Log and
// math.Exp (regression reference: the code of commit 241732b, copied).
func expandBefore(t0, p0, mach, speed float64) (rho0, T, rho float64, n n2Props, ok bool) {
	tr, pr := t0/NitrogenCriticalTemperature, p0/NitrogenCriticalPressure
	om := NitrogenAcentricFactor
	kappa := 0.37464 + om*(1.54226-0.26992*om)
	s := 1 + kappa*(1-math.Sqrt(tr))
	a := prOmegaA * s * s * pr / (tr * tr)
	b := prOmegaB * pr / tr
	z := largestCubicRoot(-(1 - b), a-b*(3*b+2), -b*(a-b-b*b))
	rho0 = p0 / (z * nitrogenPR.r * t0)
	n0 := nitrogenAt(t0, rho0)
	g := NitrogenGamma
	if speed > 0 {
		den := g*nitrogenPR.r*t0 - 0.5*(g-1)*speed*speed
		if !(den > 0) {
			return rho0, 0, 0, n2Props{}, false
		}
		mach = speed / math.Sqrt(den)
	}
	k := rho0 * n0.a2 / n0.p
	gr := n0.pT / (rho0 * n0.cv)
	m2 := mach * mach
	if speed > 0 {
		m2 = speed * speed / (n0.a2 - 0.5*(k-1)*speed*speed)
	}
	if k > 1 && gr > 0 && m2 > 0 && !math.IsInf(m2, 0) {
		lx := -math.Log(1+0.5*(k-1)*m2) / (k - 1)
		nn := rho0 / n0.a2 * (n0.a2Rho + n0.a2T*gr*t0/rho0)
		lt := lx
		if nn > 0 {
			lt = -math.Log(1+0.5*nn*m2) / nn
		}
		T, rho = t0*math.Exp(gr*lt), rho0*math.Exp(lx)
	} else {
		tr := 1 + 0.5*(g-1)*mach*mach
		T, rho = t0/tr, rho0*math.Pow(tr, -1/(g-1))
	}
	T, rho, n, ok = nitrogenNewton(n0, mach, speed, T, rho)
	return rho0, T, rho, n, ok
}

// TestExpansionStartBound: the stagnation density and every expanded state
// (T, ρ, p, a²) agree with those computed before the start's own logarithm
// and exponential and the density by Newton's method (expandBefore, the
// regression reference) within 1e-14 relative, over 1–4.5 bar, 80–310 K and
// Mach 0.05–1.6 (and speeds of 20–300 m/s): the states move by the
// isentrope's resolution (a few 1e-15), not by the start. Where one fails to
// expand, so does the other.
func TestExpansionStartBound(t *testing.T) {
	t.Parallel()
	rel := func(a, b float64) float64 { return math.Abs(a-b) / math.Abs(b) }
	var worstRho0, worst float64
	count := 0
	for p0 := 1e5; p0 <= 4.5e5; p0 += 0.25e5 {
		for t0 := 80.0; t0 <= 310; t0 += 2.5 {
			g := NitrogenStagnation(p0, t0)
			for i := 1; i <= 32+15; i++ {
				mach, speed := 0.05*float64(i), 0.0
				if i > 32 {
					mach, speed = 0, 20*float64(i-32)
				}
				rho0, tb, rb, nb, okb := expandBefore(t0, p0, mach, speed)
				worstRho0 = math.Max(worstRho0, rel(g.rho0, rho0))
				T, rho, n, ok := nitrogenExpand(g.T0, g.rho0, g.n0, mach, speed)
				require.Equal(t, okb, ok, "p0 %g t0 %g mach %g speed %g", p0, t0, mach, speed)
				if !ok {
					continue
				}
				count++
				for _, d := range [...]float64{rel(T, tb), rel(rho, rb), rel(n.p, nb.p), rel(n.a2, nb.a2)} {
					worst = math.Max(worst, d)
				}
			}
		}
	}
	t.Logf("%d expansions: stagnation density within %.2g, states within %.2g relative", count, worstRho0, worst)
	assert.Less(t, worstRho0, 1e-15)
	assert.Less(t, worst, 1e-14)
	assert.Greater(t, count, 40000)
}

// TestStartFunctions: startLog1p and startExp meet math.Log1p and math.Exp
// within 1e-8 and 3e-8 relative over their series' ranges, and are those
// functions outside them.
func TestStartFunctions(t *testing.T) {
	t.Parallel()
	for y := 0.0; y <= 0.5; y += 0.001 {
		assert.InDelta(t, math.Log1p(y), startLog1p(y), 1e-8*math.Log1p(y)+1e-300, "y %g", y)
	}
	for x := -1.6; x <= 0; x += 0.001 {
		assert.InEpsilon(t, math.Exp(x), startExp(x), 3e-8, "x %g", x)
	}
	assert.Equal(t, math.Log(1+0.7), startLog1p(0.7))
	assert.Equal(t, math.Exp(-2.0), startExp(-2))
}

// TestPengRobinsonZNewton: Z by Newton's method from the second-virial
// estimate (or Cardano's formula where that does not reach the largest root)
// meets Cardano's largest root within 1e-15 relative over 65–320 K and
// 0.2–6 bar, the two-phase dome of the equation included, where the vapour
// root is the one returned.
func TestPengRobinsonZNewton(t *testing.T) {
	t.Parallel()
	om := NitrogenAcentricFactor
	kappa := 0.37464 + om*(1.54226-0.26992*om)
	newton := 0
	for T := 65.0; T < 320; T += 0.37 {
		for p := 2e4; p < 6e5; p *= 1.031 {
			tr, pr := T/NitrogenCriticalTemperature, p/NitrogenCriticalPressure
			s := 1 + kappa*(1-math.Sqrt(tr))
			a := prOmegaA * s * s * pr / (tr * tr)
			b := prOmegaB * pr / tr
			c2, c1, c0 := -(1 - b), a-b*(3*b+2), -b*(a-b-b*b)
			want := largestCubicRoot(c2, c1, c0)
			if _, ok := largestCubicRootFrom(c2, c1, c0, 1+b-a); ok {
				newton++
			}
			got := PengRobinsonZ(T, p, NitrogenCriticalTemperature, NitrogenCriticalPressure, om)
			require.InEpsilon(t, want, got, 1e-15, "T %g p %g", T, p)
		}
	}
	assert.Greater(t, newton, 70000)
}

// nitrogenBenchStates are 64 stagnation states over 1.5–4 bar and 95–300 K,
// the range of the demo nitrogen tunnel's plans, for the benchmarks below.
func nitrogenBenchStates() []Stagnation {
	var gs []Stagnation
	for i := range 8 {
		for j := range 8 {
			gs = append(gs, NitrogenStagnation(1.5e5+float64(i)*0.35e5, 95+float64(j)*29))
		}
	}
	return gs
}

// BenchmarkNitrogenAt measures one real-gas property evaluation (nitrogenAt)
// at the 64 stagnation states in turn, 0.8 of their density.
func BenchmarkNitrogenAt(b *testing.B) {
	gs := nitrogenBenchStates()
	var sink float64
	i := 0
	for b.Loop() {
		g := &gs[i&63]
		sink += nitrogenAt(g.T0, 0.8*g.rho0).a2
		i++
	}
	_ = sink
}

// BenchmarkNitrogenStagnation measures one stagnation state (the
// Peng–Robinson density and nitrogenAt) at the 64 states in turn.
func BenchmarkNitrogenStagnation(b *testing.B) {
	gs := nitrogenBenchStates()
	var sink float64
	i := 0
	for b.Loop() {
		g := &gs[i&63]
		sink += NitrogenStagnation(g.P0, g.T0).rho0
		i++
	}
	_ = sink
}

// BenchmarkNitrogenExpand measures one expansion from its own start
// (nitrogenExpand) from the 64 stagnation states in turn to Mach 0.3–1.0.
func BenchmarkNitrogenExpand(b *testing.B) {
	gs := nitrogenBenchStates()
	var sink float64
	i := 0
	for b.Loop() {
		g := &gs[i&63]
		T, _, _, _ := nitrogenExpand(g.T0, g.rho0, g.n0, 0.3+0.1*float64(i&7), 0)
		sink += T
		i++
	}
	_ = sink
}
