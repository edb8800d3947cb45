package similarity

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// tradeSolver returns a solver of the trade curve of a 1 m model in f (as
// Envelope's) with a nitrogen plan's memory: set-ups, condensation line,
// state memos and stagnation states kept.
func tradeSolver(t *testing.T, f *facilities.Facility) *solver {
	t.Helper()
	sv := &solver{f: f, L: 1, loadScale: 1, art: &Article{ReferenceLength: 1}, qmax: math.Inf(1), remax: math.Inf(1),
		cond: newCondLineCache(), setups: new(setupCache), memo: &stateMemos{}, stags: &stagnations{}}
	if f.MaxDynamicPressure != nil {
		sv.qmax = *f.MaxDynamicPressure
	}
	require.NoError(t, sv.setURange())
	return sv
}

// forTradeCases runs one case of the trade curve's tests for each q ceiling
// in Pa, condensation margin (0 or 2 %) and stagnation pressure range (the
// facility's own and a narrower one) of cn2-05, on a copy of the facility
// with that ceiling and range.
func forTradeCases(t *testing.T, run func(f *facilities.Facility, qmax, cond float64, pr facilities.Range)) {
	t.Helper()
	base, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	for _, qmax := range []float64{30e3, 50e3, 70e3, 90e3, 120e3} {
		for _, cond := range []float64{0, 0.02} {
			for _, pr := range []facilities.Range{base.StagnationPressure, {Min: 110e3, Max: 450e3}} {
				f := base
				f.MaxDynamicPressure = &qmax
				f.StagnationPressure = pr
				run(&f, qmax, cond, pr)
			}
		}
	}
}

// requireSameTrade holds the trade curve got to want: the same limit and
// Mach number at each point, Reynolds number (and per metre), stagnation
// pressure and temperature, dynamic pressure and speed within 2e-13 relative
// (the roots' 1e-13), and each point's setting usable by the facility's own
// check (no violations where no condensation margin is asked) and under the
// q ceiling qmax.
func requireSameTrade(t *testing.T, f *facilities.Facility, want, got []TradePoint, qmax, cond float64, pr facilities.Range) {
	t.Helper()
	requireSameTradeWithin(t, f, want, got, qmax, cond, pr, 2e-13)
}

// requireSameTradeWithin is requireSameTrade with the figures within bound
// relative; it returns the largest relative difference found.
func requireSameTradeWithin(t *testing.T, f *facilities.Facility, want, got []TradePoint, qmax, cond float64, pr facilities.Range, bound float64) (worst float64) {
	t.Helper()
	require.Len(t, got, len(want))
	for i, w := range want {
		g := got[i]
		require.Equal(t, w.Limit, g.Limit, "q max %g, cond %g, p0 %v, point %d", qmax, cond, pr, i)
		require.Equal(t, w.Mach, g.Mach, "q max %g, cond %g, p0 %v, point %d", qmax, cond, pr, i)
		for _, v := range [][2]float64{{w.Reynolds, g.Reynolds}, {w.ReynoldsPerMeter, g.ReynoldsPerMeter},
			{w.StagnationPressure, g.StagnationPressure}, {w.StagnationTemperature, g.StagnationTemperature},
			{w.DynamicPressure, g.DynamicPressure}, {w.Speed, g.Speed}} {
			if v[0] != v[1] {
				worst = math.Max(worst, math.Abs(v[1]-v[0])/math.Abs(v[0]))
				assert.InEpsilon(t, v[0], v[1], bound, "q max %g, cond %g, p0 %v, point %d", qmax, cond, pr, i)
			}
		}
		if g.Reynolds == 0 {
			continue
		}
		st, err := f.State(facilities.Setting{Mach: g.Mach, StagnationPressure: g.StagnationPressure, StagnationTemperature: g.StagnationTemperature})
		require.NoError(t, err)
		if cond == 0 {
			assert.Empty(t, f.Violations(st), "q max %g, p0 %v, point %d", qmax, pr, i)
		}
		assert.LessOrEqual(t, st.DynamicPressure, qmax, "q max %g, cond %g, p0 %v, point %d", qmax, cond, pr, i)
	}
	return worst
}

// TestQAlongFloorRises: in cn2-05 (the condensation line as its T0 floor),
// q on the floor rises with p0 at every Mach number of its range, the
// property topPartial relies on to know q at p0 min under the ceiling
// without its state (checked on a grid of 40 p0 at 19 Mach numbers; from
// facilities.State: q ≈ p0·q/p0, the last nearly flat along the floor).
func TestQAlongFloorRises(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	f.MaxDynamicPressure = nil
	for m := 0.2; m <= 0.92+1e-9; m += 0.04 {
		floor := 0.0
		prev := 0.0
		for i := range 40 {
			p0 := f.StagnationPressure.Min + (f.StagnationPressure.Max-f.StagnationPressure.Min)*float64(i)/39
			t0, _, err := LowestStagnationTemperature(&f, m, p0)
			require.NoError(t, err, "Mach %g, p0 %g Pa", m, p0)
			require.GreaterOrEqual(t, t0, floor, "the floor rises with p0: Mach %g, p0 %g Pa", m, p0)
			floor = t0
			st, err := f.State(facilities.Setting{Mach: m, StagnationPressure: p0, StagnationTemperature: t0})
			require.NoError(t, err, "Mach %g, p0 %g Pa", m, p0)
			assert.Greater(t, st.DynamicPressure, prev, "Mach %g, p0 %g Pa", m, p0)
			prev = st.DynamicPressure
		}
	}
}

// TestTradePartialSetups: the trade curve with partial set-ups (topPartial:
// no state at p0 min on the floor, the q ceiling's root started from the
// curve's last roots) against the same curve with every set-up whole, in
// cn2-05 under q ceilings from 30 to 120 kPa, condensation margins of 0 and
// 0.02 and two p0 ranges: the same limits and points within 2e-13 relative
// (the roots' 1e-13: the condensation line's points are found from others,
// and alone, without a plan's scan before it, the curve's first line point
// is p0 max's, found by rootHi to 1e-13, up to 9.5e-14 from the whole
// curve's in T0, which Re/m follows as T0^-1.4 and the q ceiling's root in p0
// with it), each
// point's setting usable by the facility's own check (Violations of its
// State), and partial set-ups used (the regression guard of the saving).
func TestTradePartialSetups(t *testing.T) {
	t.Parallel()
	partials := 0
	forTradeCases(t, func(f *facilities.Facility, qmax, cond float64, pr facilities.Range) {
		whole, part := tradeSolver(t, f), tradeSolver(t, f)
		whole.noPartial = true
		whole.condMin, part.condMin = cond, cond
		want := whole.trade(1, 41)
		// Count the partial set-ups: they are not kept.
		got := part.trade(1, 41)
		partials += 41 - len(part.setups.keys)
		requireSameTrade(t, f, want, got, qmax, cond, pr)
	})
	assert.Greater(t, partials, 200, "partial set-ups")
}

// machLoad is a balance for TestTradeWithoutReference whose q ceiling in Pa
// at scale s depends on the state's Mach number, which LoadLimit may read
// (and on nothing else of it): q·s²·(1 + M²) ≤ limit.
type machLoad struct{ limit float64 }

func (l machLoad) Name() string { return facilities.ConstraintBalance }

func (l machLoad) MaxDynamicPressure(s float64, st facilities.State) float64 {
	return l.limit / (s * s * (1 + st.Mach*st.Mach))
}

// TestTradeWithoutReference: a trade point's partial set-up without its
// reference state at (p0 min, the warmest T0) (prepareNitrogen's noRef)
// gives the trade curve of the set-ups with it, to the bit, in cn2-05 under
// q ceilings from 30 to 120 kPa, condensation margins of 0 and 0.02, two p0
// ranges, and without and with a balance whose ceiling depends on the Mach
// number (below and above the q ceiling in parts of the range); and it saves
// states (regression guard of the saving: 608 states over the 24 curves, regression value).
func TestTradeWithoutReference(t *testing.T) {
	t.Parallel()
	base, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	saved := 0
	for _, qmax := range []float64{30e3, 70e3, 120e3} {
		for _, cond := range []float64{0, 0.02} {
			for _, pr := range []facilities.Range{base.StagnationPressure, {Min: 110e3, Max: 450e3}} {
				for _, load := range []LoadLimit{nil, machLoad{limit: 80e3}} {
					f := base
					f.MaxDynamicPressure = &qmax
					f.StagnationPressure = pr
					with, without := tradeSolver(t, &f), tradeSolver(t, &f)
					with.keepRef = true
					with.condMin, without.condMin = cond, cond
					with.load, without.load = load, load
					want := with.trade(1, 41)
					got := without.trade(1, 41)
					require.Equal(t, want, got, "q max %g, cond %g, p0 %v, load %v", qmax, cond, pr, load)
					saved += with.evals - without.evals
				}
			}
		}
	}
	t.Logf("%d states saved", saved)
	assert.Greater(t, saved, 500, "states saved")
}

// TestCeilingJointNear: on cn2-05's q ceiling, the joint step started from a
// point found at a Mach number within jointNear (jointMemos) finds the root
// that the step from the secant start finds, within 1e-13 relative, on the
// usable side (q ≤ the ceiling at the floor there), in no more iterations
// (one, with the point's own state, where the Mach numbers lie 1e-9 apart;
// regression values).
func TestCeilingJointNear(t *testing.T) {
	t.Parallel()
	qc, newSv := cn2Solvers(t, true)
	near, cold := newSv(), newSv()
	used := 0
	for _, m0 := range []float64{0.65, 0.72, 0.775, 0.85, 0.91} {
		for _, d := range []float64{0, 1e-9, -3e-8, 5e-7} {
			m := m0 * (1 + d)
			c := near.prepareNitrogen(m)
			require.True(t, c.ok, "Mach %g", m)
			qTop := near.qcurve(&c, c.pTop)
			require.Greater(t, qTop, qc, "Mach %g", m)
			j := near.joints.near(near, m, qc)
			if d == 0 {
				near.joints = jointMemos{}
				j = nil
			}
			e0 := near.evals
			p, ok := near.ceilingJoint(&c, qc, near.qcurve(&c, c.pa), qTop)
			require.True(t, ok, "Mach %g", m)
			evals := near.evals - e0
			cold.joints = jointMemos{}
			cc := cold.prepareNitrogen(m)
			e0 = cold.evals
			want, ok := cold.ceilingJoint(&cc, qc, cold.qcurve(&cc, cc.pa), cold.qcurve(&cc, cc.pTop))
			require.True(t, ok, "Mach %g", m)
			if d != 0 {
				require.NotNil(t, j, "Mach %g: a point within jointNear", m)
				used++
				assert.LessOrEqual(t, evals, cold.evals-e0, "Mach %g: evaluations", m)
				if math.Abs(d) <= 1e-9 {
					// One iteration and the point's own state.
					assert.Equal(t, 2, evals, "Mach %g: evaluations", m)
				}
			}
			assert.InEpsilon(t, want, p, 1e-13, "Mach %g", m)
			assert.LessOrEqual(t, near.qcurve(&c, p), qc, "Mach %g", m)
		}
	}
	assert.Equal(t, 15, used)
}

// TestFeasibleUnderTop: in nitrogen, every target Re/m under the top
// setting's has a usable candidate (atTarget ok), the certificate by which
// the feasibility scan takes such a candidate without solving its setting
// (atWindow with solver.feasOnly): in cn2-05 under q ceilings of 50 and 70 kPa
// and none, condensation minimums 0 and 0.02, over its Mach range, for
// targets from half the lowest Re/m to just under the top's, each solved
// candidate is ok, and the scan's is ok too.
func TestFeasibleUnderTop(t *testing.T) {
	t.Parallel()
	base, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	solved := 0
	for _, qmax := range []float64{50e3, 70e3, math.Inf(1)} {
		for _, cond := range []float64{0, 0.02} {
			f := base
			f.MaxDynamicPressure = nil
			if !math.IsInf(qmax, 1) {
				f.MaxDynamicPressure = &qmax
			}
			sv := tradeSolver(t, &f)
			sv.condMin = cond
			for m := 0.2; m <= 0.92; m += 0.06 {
				c := sv.prepare(m)
				if !c.ok {
					continue
				}
				rlo, rtop := sv.lowR(&c), sv.top(&c).r
				for _, r := range []float64{0.5 * rlo, rlo * (1 + 1e-15), 0.5 * (rlo + c.ra), c.ra, 0.5 * (c.ra + rtop), rtop * (1 - 1e-9)} {
					if !(r < rtop) {
						continue
					}
					x := sv.atTarget(&c, 1, r)
					require.True(t, x.ok, "q max %g, cond %g, Mach %g, Re/m %g: %s", qmax, cond, m, r, x.fail)
					solved++
					sv.feasOnly = true
					y := sv.atTarget(&c, 1, r)
					sv.feasOnly = false
					assert.True(t, y.ok, "scan: q max %g, cond %g, Mach %g, Re/m %g", qmax, cond, m, r)
				}
			}
		}
	}
	t.Logf("%d candidates", solved)
	assert.Greater(t, solved, 300)
}

// TestCeilingHistoryPredicts: on cn2-05's q ceiling (70 kPa), the trade
// curve's prediction of its next q-ceiling root (ceilingHistory.predict from
// the last three roots, with the joint step's derivatives) lies within the
// joint step's stop (1e-8 relative) in p0 and T0 at the curve's spacing
// (Mach 0.018; 3.2e-9 found; the parabola through the last three roots' ln
// T0 before was 1e-7 to 1e-5 off), so that the step from it takes one
// iteration and the point's own state (2 evaluations) at every predicted
// point, and finds the root the step from the secant start finds within the
// roots' 1e-13.
func TestCeilingHistoryPredicts(t *testing.T) {
	t.Parallel()
	qc, newSv := cn2Solvers(t, true)
	sv, cold := newSv(), newSv()
	var h ceilingHistory
	predicted, once := 0, 0
	for k := range 10 {
		m := 0.7 + 0.018*float64(k)
		c := sv.prepareNitrogen(m)
		require.True(t, c.ok, "Mach %g", m)
		qa, qTop := sv.qcurve(&c, c.pa), sv.qcurve(&c, c.pTop)
		p0, t0, ok := h.predict(m, qc)
		require.Equal(t, k >= 2, ok, "Mach %g", m)
		var p float64
		if k >= ceilingNodes {
			e0 := sv.evals
			p, ok = sv.ceilingJointFrom(&c, qc, p0, t0, nil)
			require.True(t, ok, "Mach %g", m)
			if sv.evals-e0 == 2 {
				once++ // one iteration and the point's own state
			}
			cold.joints = jointMemos{}
			cc := cold.prepareNitrogen(m)
			want, ok := cold.ceilingJoint(&cc, qc, cold.qcurve(&cc, cc.pa), cold.qcurve(&cc, cc.pTop))
			require.True(t, ok, "Mach %g", m)
			assert.InEpsilon(t, want, p, 1e-13, "Mach %g", m)
			predicted++
		} else {
			p, ok = sv.ceilingJoint(&c, qc, qa, qTop)
			require.True(t, ok, "Mach %g", m)
		}
		j := sv.joints.at(sv, m, qc, p)
		require.NotNil(t, j, "Mach %g", m)
		if k >= ceilingNodes {
			assert.InDelta(t, 0, p0/j.p-1, 1e-8, "Mach %g: p0", m)
			assert.InDelta(t, 0, t0/j.t-1, 1e-8, "Mach %g: T0", m)
		}
		h.add(m, qc, p, j.t, j)
	}
	assert.Equal(t, 7, predicted)
	assert.Equal(t, predicted, once, "points found in one iteration")
}

// TestHermiteAt: hermiteAt reproduces a polynomial of the degree its nodes
// determine (one less than the values and derivatives given), here
// x⁵ − 2x³ + x − 3 through three nodes with derivatives and the cubic
// part through nodes with a derivative at one of them only (Burden & Faires,
// Numerical Analysis, §3.4: the Hermite interpolant is unique), beyond the
// nodes as well; two nodes at one x give ok false.
func TestHermiteAt(t *testing.T) {
	f := func(x float64) float64 { return x*x*x*x*x - 2*x*x*x + x - 3 }
	d := func(x float64) float64 { return 5*x*x*x*x - 6*x*x + 1 }
	xs := []float64{0.5, 0.8, 1.1}
	fs := []float64{f(0.5), f(0.8), f(1.1)}
	ds := []float64{d(0.5), d(0.8), d(1.1)}
	for _, x := range []float64{0.6, 1.1, 1.3, 1.6} {
		got, ok := hermiteAt(xs, fs, ds, x)
		require.True(t, ok)
		assert.InEpsilon(t, f(x), got, 1e-12, "x %g", x)
	}
	g := func(x float64) float64 { return 2*x*x*x - x*x + 4 }
	gd := func(x float64) float64 { return 6*x*x - 2*x }
	nan := math.NaN()
	got, ok := hermiteAt([]float64{1, 2, 3}, []float64{g(1), g(2), g(3)}, []float64{nan, nan, gd(3)}, 3.7)
	require.True(t, ok)
	assert.InEpsilon(t, g(3.7), got, 1e-13)
	_, ok = hermiteAt([]float64{1, 1}, []float64{1, 2}, []float64{nan, nan}, 2)
	assert.False(t, ok)
}

// TestTradePredictsScanTops: a trade point at a scan's set-up, whose top
// setting the search left to its readers (topLazy), or at a whole set-up,
// starts its q-ceiling root from the curve's last roots
// (ceilingHistory.predict, as topPartial) instead of the secant across
// [pa, pTop]: in cn2-05 under q ceilings from 30 to 120 kPa, condensation
// margins of 0 and 0.02 and two p0 ranges, each curve after the scan's nine
// set-ups (prepared as the feasibility scan prepares them) has the limits
// and points of the curve with the secant starts (noTopPredict) within
// 2e-13 relative (the roots' 1e-13), each point usable by the facility's
// own check, and costs fewer states (the regression guard of the saving).
func TestTradePredictsScanTops(t *testing.T) {
	t.Parallel()
	saved, lazy := 0, 0
	forTradeCases(t, func(f *facilities.Facility, qmax, cond float64, pr facilities.Range) {
		secant, predicted := tradeSolver(t, f), tradeSolver(t, f)
		secant.noTopPredict = true
		secant.condMin, predicted.condMin = cond, cond
		for _, sv := range []*solver{secant, predicted} {
			for k := range scanGrid {
				u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*float64(k)/(scanGrid-1)
				var c machSetup
				sv.prepareIn(&c, u)
				if sv == predicted && c.topLazy {
					lazy++
				}
			}
		}
		e0, e1 := secant.evals, predicted.evals
		want := secant.trade(1, 41)
		got := predicted.trade(1, 41)
		saved += (secant.evals - e0) - (predicted.evals - e1)
		requireSameTrade(t, f, want, got, qmax, cond, pr)
	})
	t.Logf("%d states saved, %d lazy tops", saved, lazy)
	assert.Greater(t, lazy, 50, "scan set-ups with their tops left to the trade curve")
	assert.Greater(t, saved, 100, "states saved")
}
