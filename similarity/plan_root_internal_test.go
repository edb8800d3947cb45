package similarity

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestRootHiSmooth: rootHiSmooth keeps rootHi's contract on smooth monotone
// functions of either direction (a point on the usable side, g ≥ 0, with the
// other side within 1e-13 relative of it, or the usable end when g does not
// change sign), with no more evaluations than rootHi's Illinois rule, and
// fewer on one shaped like q along the T0 floor (nearly proportional to p0).
func TestRootHiSmooth(t *testing.T) {
	t.Parallel()
	var sv solver
	cases := []struct {
		name       string
		g          func(float64) float64
		lo, hi     float64
		increasing bool
	}{
		{"nearly linear, falling (a q ceiling)", func(p float64) float64 { return 7e4 - 0.28*p*(1+0.02*math.Sqrt(p/1.3e5)) }, 1.3e5, 3.9e5, false},
		{"nearly linear, rising", func(p float64) float64 { return 0.28*p*(1+1e-3*math.Log(p)) - 5e4 }, 1.3e5, 3.9e5, true},
		{"curved", func(x float64) float64 { return math.Exp(x) - 3 }, 0, 5, true},
		{"steep end", func(x float64) float64 { return math.Pow(x, 9) - 0.2 }, 0.1, 1, true},
		{"usable throughout", func(x float64) float64 { return x }, 1, 2, true},
		{"usable nowhere", func(x float64) float64 { return -x }, 1, 2, true},
	}
	for _, c := range cases {
		count := func(n *int) func(float64) float64 {
			return func(x float64) float64 { *n++; return c.g(x) }
		}
		var nSmooth, nIllinois int
		x := sv.rootHiSmooth(count(&nSmooth), c.lo, c.hi, c.increasing)
		xi := sv.rootHi(count(&nIllinois), c.lo, c.hi, c.increasing)
		g0, g1 := c.g(c.lo), c.g(c.hi)
		if !c.increasing {
			g0, g1 = g1, g0
		}
		switch {
		case g0 >= 0 || g1 < 0:
			assert.Equal(t, xi, x, c.name)
			continue
		}
		assert.GreaterOrEqual(t, c.g(x), 0.0, c.name)
		step := 1e-13 * math.Abs(x)
		if !c.increasing {
			step = -step
		}
		assert.Less(t, c.g(x-step), 0.0, "%s: the crossing lies within 1e-13 relative", c.name)
		assert.InEpsilon(t, xi, x, 2e-13, c.name)
		assert.LessOrEqual(t, nSmooth, nIllinois, "%s: evaluations", c.name)
		if c.name == cases[0].name {
			assert.Less(t, nSmooth, nIllinois, "%s: evaluations", c.name)
		}
		t.Logf("%s: %d evaluations (Illinois %d)", c.name, nSmooth, nIllinois)
	}
}

// TestQcurveKeptAtPa: a nitrogen set-up keeps q at p0 min on the T0 floor
// (machSetup.qa), and qcurve returns it there: the same value, bit for bit,
// as the state it stands for, at Mach numbers across cn2-05's range.
func TestQcurveKeptAtPa(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	sv := &solver{f: &f, loadScale: 1, qmax: math.Inf(1), remax: math.Inf(1),
		cond: newCondLineCache(), memo: &stateMemos{}}
	kept := 0
	for m := 0.2; m <= 0.92; m += 0.045 {
		c := sv.prepareNitrogen(m)
		if !c.qaOK {
			continue
		}
		kept++
		computed := c
		computed.qaOK = false
		assert.Equal(t, sv.qcurve(&computed, c.pa), sv.qcurve(&c, c.pa), "Mach %g", m)
	}
	assert.Positive(t, kept, "set-ups that keep q at p0 min")
}

// cn2Solvers returns cn2-05's q ceiling in Pa and a maker of bare solvers in
// it (no load limit, no Re/m cap; with the stagnation states' cache where
// stags), for the tests of the q ceiling's steps.
func cn2Solvers(t *testing.T, stags bool) (float64, func() *solver) {
	f, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	return *f.MaxDynamicPressure, func() *solver {
		sv := &solver{f: &f, loadScale: 1, qmax: math.Inf(1), remax: math.Inf(1),
			cond: newCondLineCache(), memo: &stateMemos{}}
		if stags {
			sv.stags = &stagnations{}
		}
		return sv
	}
}

// TestCeilingJoint: on cn2-05's q ceiling (70 kPa) across its Mach range, the
// joint Newton step in (p0, T0) (ceilingJoint) finds the p0 that the root in
// p0 along the condensation line (rootHiSmooth, as before it) finds, within
// 1e-13 relative, on the usable side (q ≤ the ceiling at the T0 floor there),
// and its T0 is the line's at that p0 within 1e-13.
func TestCeilingJoint(t *testing.T) {
	t.Parallel()
	qc, newSv := cn2Solvers(t, false)
	joint, root := newSv(), newSv()
	used := 0
	for m := 0.6; m <= 0.92; m += 0.016 {
		c := joint.prepareNitrogen(m)
		require.True(t, c.ok, "Mach %g", m)
		qTop := joint.qcurve(&c, c.pTop)
		if !(qTop > qc) {
			continue
		}
		p, ok := joint.ceilingJoint(&c, qc, joint.qcurve(&c, c.pa), qTop)
		require.True(t, ok, "Mach %g", m)
		used++
		cr := root.prepareNitrogen(m)
		want := root.rootHiSmooth(func(p float64) float64 { return qc - root.qcurve(&cr, p) }, cr.pa, cr.pTop, false)
		assert.InEpsilon(t, want, p, 1e-13, "Mach %g", m)
		assert.LessOrEqual(t, joint.qcurve(&c, p), qc, "Mach %g", m)
		assert.InEpsilon(t, root.tfloor(&cr, p), joint.tfloor(&c, p), 1e-13, "Mach %g", m)
	}
	assert.Greater(t, used, 10)
}

// TestSolveRWarmNearLowest: in nitrogen, a target Re/m a rounding above the
// lowest (at p0 min and T0 max) gives T0 max without a root (solveR), and the
// root that rootHi finds there (the Illinois rule, run to its end) lies within
// 1e-13 relative of it; any other target below the set-up's Re/m at p0 min on
// the floor is a root found by secant steps with Re/m there at most the
// target, within 1e-13 relative of rootHi's.
func TestSolveRWarmNearLowest(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	sv := &solver{f: &f, loadScale: 1, qmax: math.Inf(1), remax: math.Inf(1),
		cond: newCondLineCache(), memo: &stateMemos{}, stags: &stagnations{}}
	for _, m := range []float64{0.3, 0.6, 0.78, 0.92} {
		c := sv.prepareNitrogen(m)
		require.True(t, c.ok && c.rloOK, "Mach %g", m)
		rAt := func(x float64) float64 {
			st, err := sv.state(m, c.pa, x)
			require.NoError(t, err)
			return st.ReynoldsPerMeter
		}
		for _, r := range []float64{c.rlo * (1 + 5e-15), c.rlo * 1.2, 0.5 * (c.rlo + c.ra)} {
			p0, t0 := sv.solveR(&c, sv.top(&c), r)
			assert.Equal(t, c.pa, p0)
			want := sv.rootHi(func(x float64) float64 { return r - rAt(x) }, sv.tfloor(&c, c.pa), c.tb, true)
			assert.InEpsilon(t, want, t0, 1e-13, "Mach %g, Re/m %g", m, r)
			assert.LessOrEqual(t, rAt(t0), r, "Mach %g, Re/m %g", m, r)
			if r < c.rlo*(1+1e-14) {
				assert.Equal(t, c.tb, t0, "Mach %g", m)
			}
		}
	}
}

// TestUsableRootPower: usableRootPower, the secant in (ln T0, ln Re/m) that
// solveR takes for nitrogen's Re/m along T0 at one p0, keeps rootHi's
// contract (a point on the usable side, g ≥ 0, the crossing within 1e-13
// relative below it) and finds the root usableRootUpHi's secant in (T0, g)
// finds, within 2e-13 relative, over random Mach numbers, stagnation
// pressures and targets in cn2-05 (the states are facilities.Facility.State's),
// with fewer states in all: the reason it is there.
func TestUsableRootPower(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	rng := rand.New(rand.NewPCG(17, 45))
	var nPower, nSecant, cases int
	for range 300 {
		m := 0.2 + 0.7*rng.Float64()
		p0 := f.StagnationPressure.Min + rng.Float64()*(f.StagnationPressure.Max-f.StagnationPressure.Min)
		lo, hi := 120+20*rng.Float64(), f.StagnationTemperature.Max
		reAt := func(t0 float64) float64 {
			st, err := f.State(facilities.Setting{Mach: m, StagnationPressure: p0, StagnationTemperature: t0})
			if err != nil {
				return 0
			}
			return st.ReynoldsPerMeter
		}
		ra, rb := reAt(lo), reAt(hi)
		if !(ra > rb && rb > 0) {
			continue
		}
		// Targets across the range, most of them near its warm end, where
		// the planner's roots lie (a model shrunk to meet the flight's Re).
		r := rb * math.Pow(ra/rb, math.Pow(rng.Float64(), 3))
		g := func(n *int) func(float64) float64 {
			return func(t0 float64) float64 { *n++; return r - reAt(t0) }
		}
		x := usableRootPower(g(&nPower), lo, hi, r, rb)
		xs := usableRootUpHi(g(&nSecant), lo, hi, r-rb, true)
		cases++
		require.GreaterOrEqual(t, r-reAt(x), 0.0, "usable side, M %v p0 %v r %v", m, p0, r)
		if x > lo {
			assert.Less(t, r-reAt(x-1e-13*x), 0.0, "the crossing within 1e-13 below, M %v p0 %v r %v", m, p0, r)
		}
		assert.InEpsilon(t, xs, x, 2e-13, "M %v p0 %v r %v", m, p0, r)
	}
	require.Greater(t, cases, 250)
	t.Logf("%d roots: %d states (secant in T0: %d)", cases, nPower, nSecant)
	assert.Less(t, float64(nPower), 0.85*float64(nSecant), "states")
}
