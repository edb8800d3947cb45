package similarity

import (
	"fmt"
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestLazyTopCandidates compares candidates in cn2-05 made by a solver that
// computes a set-up's top setting only where a candidate reads it (topLazy,
// the default) with one that computes it in every set-up (noLazyTop), over
// 120 random problems (randomGasProblemIn: q ceilings, balances, flights
// up to 45 km) at 9 Mach numbers and 9 scales each. A candidate that left the top
// uncomputed (hiLazy) is the same to the bit, and lies under the top's Re/m
// as underTop claims; every other one within 1e-12 relative (the tops are
// found at another point of the plan, from another start of the q
// ceiling's joint step, each within rounding of its crossing; regression
// bound). The top read afterwards (hiOf) agrees within 1e-12 too.
func TestLazyTopCandidates(t *testing.T) {
	rng := rand.New(rand.NewSource(31))
	n, lazy, worst := 0, 0, 0.0
	for i := 0; i < 120; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"cn2-05"})
		a, err := newSolver(p)
		require.NoError(t, err)
		b, err := newSolver(p)
		require.NoError(t, err)
		b.noLazyTop = true
		for j := range 9 {
			m := a.machOrSpeedMin + (a.machOrSpeedMax-a.machOrSpeedMin)*float64(j)/8
			ca, cb := a.prepare(m), b.prepare(m)
			require.Equal(t, cb.ok, ca.ok, "case %d, Mach %g", i, m)
			for k := range 9 {
				s := a.sLo * math.Pow(a.sHi/a.sLo, float64(k)/8)
				name := fmt.Sprintf("case %d, Mach %g, scale %g", i, m, s)
				x, y := a.at(&ca, s), b.at(&cb, s)
				require.Equal(t, y.ok, x.ok, name)
				require.Equal(t, y.fail, x.fail, name)
				if !x.ok {
					continue
				}
				n++
				rhi, capHi := a.hiOf(&ca, x)
				assert.Equal(t, y.capHi, capHi, name)
				d := relDiff(rhi, y.rhi)
				if x.hiLazy {
					lazy++
					assert.Less(t, x.r, y.rhi, "%s: under the top", name)
					assert.Equal(t, y.k, x.k, name)
					for _, v := range [...][2]float64{{x.p0, y.p0}, {x.t0, y.t0}, {x.r, y.r}, {x.rlo, y.rlo}, {x.q, y.q}, {x.v, y.v}} {
						assert.Equal(t, v[1], v[0], name)
					}
				} else {
					for _, v := range [...][2]float64{{x.p0, y.p0}, {x.t0, y.t0}, {x.r, y.r}, {x.q, y.q}, {x.v, y.v}, {x.k.v[0], y.k.v[0]}, {x.k.q, y.k.q}} {
						d = math.Max(d, relDiff(v[0], v[1]))
					}
				}
				assert.LessOrEqual(t, d, 1e-12, name)
				worst = math.Max(worst, d)
			}
		}
	}
	t.Logf("%d candidates, %d left the top uncomputed; largest difference %.3g relative", n, lazy, worst)
	require.Greater(t, lazy, 100)
}

// relDiff is |a − b| relative to the larger, 0 where they are equal.
func relDiff(a, b float64) float64 {
	if a == b {
		return 0
	}
	return math.Abs(a-b) / math.Max(math.Abs(a), math.Abs(b))
}

// TestLazyTopPlans compares whole plans in cn2-05 (the search, the binding
// gains' re-solves and a 41-point trade curve) made with the top settings
// computed where read (the default) and in every set-up (noLazyTop): 120
// random problems (randomGasProblemIn), weighted and, every other one, with
// the priority of the Mach number, then the Reynolds number. The tops found
// later start the q ceiling's joint step from another point of the
// condensation line found so far, within rounding of the same crossing, so
// a weighted search may take another path within its 1e-9: the plan's Mach
// number, scale, T0 and p0 within 1e-9 relative, its weighted sum no higher
// but for 1e-12 relative, the trade curve within 1e-12 relative and the
// binding gains within 1e-5 percentage points (a gain is 100 times a ratio
// of two Reynolds numbers, each from a weighted search; regression bounds,
// measured values logged).
func TestLazyTopPlans(t *testing.T) {
	if testing.Short() {
		t.Skip("240 nitrogen plans with their gains and trade curves")
	}
	rng := rand.New(rand.NewSource(37))
	plans, worstAt, worstTrade, worstGain := 0, 0.0, 0.0, 0.0
	for i := 0; i < 120; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"cn2-05"})
		if i%2 == 1 {
			tol := 0.002 + 0.01*rng.Float64()
			p.Objective = Objective{Priority: []string{"mach", "reynolds"}, MachTolerance: &tol}
		}
		solve := func(eager bool) (candidate, []float64, []TradePoint, bool) {
			sv, err := newSolver(p)
			require.NoError(t, err)
			sv.noLazyTop = eager
			best, err := sv.solveCorrected()
			if err != nil {
				return candidate{}, nil, nil, false
			}
			var gains []float64
			for _, b := range sv.result(best).Binding {
				g, _, err := sv.gain(b.Constraint, best)
				require.NoError(t, err)
				gains = append(gains, g)
			}
			return best, gains, sv.trade(best.s, 41), true
		}
		x, xg, xt, okx := solve(false)
		y, yg, yt, oky := solve(true)
		name := fmt.Sprintf("case %d", i)
		require.Equal(t, oky, okx, name)
		if !okx {
			continue
		}
		plans++
		if p.Objective.Weights != nil {
			assert.LessOrEqual(t, x.k.v[0], y.k.v[0]*(1+1e-12)+1e-300, "%s: weighted sum", name)
		}
		for _, v := range [...][2]float64{{x.machOrSpeed, y.machOrSpeed}, {x.s, y.s}, {x.t0, y.t0}, {x.p0, y.p0}} {
			d := relDiff(v[0], v[1])
			assert.LessOrEqual(t, d, 1e-9, name)
			worstAt = math.Max(worstAt, d)
		}
		require.Len(t, xg, len(yg), name)
		for k := range xg {
			d := math.Abs(xg[k] - yg[k])
			assert.LessOrEqual(t, d, 1e-5, "%s: gain %d", name, k)
			worstGain = math.Max(worstGain, d)
		}
		require.Len(t, xt, len(yt), name)
		for k := range xt {
			a, b := xt[k], yt[k]
			require.Equal(t, b.Limit, a.Limit, "%s: trade point %d", name, k)
			for _, v := range [...][2]float64{{a.Mach, b.Mach}, {a.Speed, b.Speed}, {a.Reynolds, b.Reynolds}, {a.StagnationPressure, b.StagnationPressure},
				{a.StagnationTemperature, b.StagnationTemperature}, {a.DynamicPressure, b.DynamicPressure}} {
				d := relDiff(v[0], v[1])
				assert.LessOrEqual(t, d, 1e-12, "%s: trade point %d", name, k)
				worstTrade = math.Max(worstTrade, d)
			}
		}
	}
	t.Logf("%d plans; largest move: plan %.3g relative, trade curve %.3g relative, gains %.3g percentage points", plans, worstAt, worstTrade, worstGain)
	require.Greater(t, plans, 60)
}

// TestRelaxedLineSkipsScan: a binding gain's re-solve in nitrogen whose
// relaxation gives it a condensation line of its own (the condensation
// limit, the T0 range) skips the feasibility scan where the plan's scan found
// the whole range feasible (wholeRangeFeasible), as any other relaxation
// does: relaxing a limit only widens the feasible set. Over 120 random cn2-05
// problems (randomGasProblemIn) the gain so found agrees with the re-solve
// after a scan of its own within 1e-5 percentage points (measured 7.1e-7),
// the relaxed plan's Mach number and scale within 1e-7 relative (1.45e-8):
// the scan's set-ups seed the relaxed line, from which the roots start, so
// the states move by rounding, and a weighted search's Brent steps, whose
// 1e-9 lies below the objective's resolution on its flat minimum (about
// 1e-8), then take another path (regression bounds, measured values logged).
func TestRelaxedLineSkipsScan(t *testing.T) {
	if testing.Short() {
		t.Skip("nitrogen plans with their gains re-solved twice")
	}
	rng := rand.New(rand.NewSource(41))
	n, worstGain, worstAt := 0, 0.0, 0.0
	for i := 0; i < 120; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"cn2-05"})
		sv, err := newSolver(p)
		require.NoError(t, err)
		best, err := sv.solveCorrected()
		if err != nil {
			continue
		}
		for _, name := range []string{facilities.ConstraintCondensation, facilities.ConstraintTempMin, facilities.ConstraintTempMax} {
			r, ok := sv.relaxed(name)
			if !ok || !sv.wholeRangeFeasible(r) {
				continue
			}
			g, _, err := sv.gain(name, best)
			require.NoError(t, err)
			// The re-solve as gain makes it, then after a scan of its own.
			resolve := func(scan bool) candidate {
				r, _ := sv.relaxed(name)
				r.warmAt, r.warmCell = best.machOrSpeed, sv.cellAt(best.machOrSpeed)
				r.noPolish = sv.noPolish || !sv.polishImproved
				if !scan {
					r.ivs, r.ivsFails, r.ivsKnown = sv.ivs, sv.ivsFails, true
				}
				b, err := r.solveCorrected()
				require.NoError(t, err)
				return b
			}
			b1, b2 := resolve(false), resolve(true)
			g1, g2 := 100*(b1.r*b1.s/(best.r*best.s)-1), 100*(b2.r*b2.s/(best.r*best.s)-1)
			caseName := fmt.Sprintf("case %d, %s", i, name)
			require.Equal(t, g, g1, caseName)
			n++
			assert.LessOrEqual(t, math.Abs(g-g2), 1e-5, caseName)
			worstGain = math.Max(worstGain, math.Abs(g-g2))
			for _, v := range [...][2]float64{{b1.machOrSpeed, b2.machOrSpeed}, {b1.s, b2.s}} {
				d := relDiff(v[0], v[1])
				assert.LessOrEqual(t, d, 1e-7, caseName)
				worstAt = math.Max(worstAt, d)
			}
		}
	}
	t.Logf("%d re-solves without the scan; largest difference: gain %.3g percentage points, Mach number or scale %.3g relative", n, worstGain, worstAt)
	require.Greater(t, n, 20)
}

// TestQGainSetupsFromPlan: the q ceiling's gain re-solves with the set-ups
// of the plan's own solver where they hold (qSetupFrom: their top setting
// left to its readers) instead of preparing them anew (noQSetups): over 60
// random problems in cn2-05 (randomGasProblemIn), the gain is the same to
// the bit, and the re-solves compute fewer states (the regression guard of
// the saving).
func TestQGainSetupsFromPlan(t *testing.T) {
	rng := rand.New(rand.NewSource(47))
	n, withStates, anewStates := 0, 0, 0
	for i := 0; i < 60; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"cn2-05"})
		var gains [2]float64
		var errs [2]error
		for k, anew := range []bool{false, true} {
			sv, err := newSolver(p)
			require.NoError(t, err)
			sv.noQSetups = anew
			best, err := sv.solveCorrected()
			if err != nil {
				break
			}
			g, states, err := sv.gain(facilities.ConstraintDynamic, best)
			gains[k], errs[k] = g, err
			if anew {
				anewStates += states
			} else {
				withStates += states
			}
		}
		require.Equal(t, errs[1] == nil, errs[0] == nil, "case %d", i)
		assert.Equal(t, gains[1], gains[0], "case %d", i)
		if errs[0] == nil {
			n++
		}
	}
	t.Logf("%d gains; states %d against %d anew", n, withStates, anewStates)
	require.Greater(t, n, 30)
	assert.Less(t, withStates, anewStates)
}
