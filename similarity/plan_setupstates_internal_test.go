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

// twoBalanceFloor is a load floor of two balances, each resolving the test
// from a dynamic pressure lo/s² up to its load ceiling hi/s² (a force
// resolution and a force rating, both fixed, on a model whose loads grow as
// q·s²).
type twoBalanceFloor struct{ lo, hi [2]float64 }

func (f twoBalanceFloor) FloorName() string { return facilities.ConstraintResolution }

func (f twoBalanceFloor) Windows(dst []Window, s float64, _ facilities.State) []Window {
	for i := range f.lo {
		dst = append(dst, Window{Lo: f.lo[i] / (s * s), Hi: f.hi[i] / (s * s)})
	}
	return dst
}

// TestSetupStatesPlans compares whole plans in cn2-05 (the search, the
// binding gains' re-solves and a 41-point trade curve) made with a set-up's
// own states read where it holds them (the default: the T0 floor at p0 min,
// Re/m on it, q and V at the reference state; machSetup.floorP, raFloor,
// stRef) and asked of the solver's states again (noSetupStates): over 120
// random problems (randomGasProblemIn), weighted and, every other one, with
// the priority of the Mach number, then the Reynolds number; every third
// with a speed range (the T0 floor from the lowest speed), every fourth
// with a load floor of two balances (raiseFloor). The set-up's figures are
// those of the same states, so the plans are the same to the bit; the
// default computes fewer states (the regression guard of the saving).
func TestSetupStatesPlans(t *testing.T) {
	if testing.Short() {
		t.Skip("240 nitrogen plans with their gains and trade curves")
	}
	rng := rand.New(rand.NewSource(53))
	plans, floors, evals, evalsAgain, moved, worstTrade := 0, 0, 0, 0, 0, 0.0
	for i := 0; i < 120; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"cn2-05"})
		if i%2 == 1 {
			tol := 0.002 + 0.01*rng.Float64()
			p.Objective = Objective{Priority: []string{"mach", "reynolds"}, MachTolerance: &tol}
		}
		if i%3 == 2 {
			p.Facility.Speed = &facilities.Range{Min: 60 + 60*rng.Float64(), Max: 200 + 60*rng.Float64()}
		}
		if i%4 == 3 {
			g, _ := GeometricScale(p.Facility, p.Article)
			k := 20000 * g * g
			lo := k * (0.02 + 0.3*rng.Float64())
			p.LoadFloor = twoBalanceFloor{lo: [2]float64{lo, 3 * lo}, hi: [2]float64{lo * (4 + 20*rng.Float64()), lo * (10 + 40*rng.Float64())}}
		}
		solve := func(again bool) (candidate, []float64, []TradePoint, int, error) {
			sv, err := newSolver(p)
			require.NoError(t, err)
			sv.noSetupStates = again
			best, err := sv.solveCorrected()
			if err != nil {
				return candidate{}, nil, nil, sv.evals, err
			}
			n := 0
			var gains []float64
			for _, b := range sv.result(best).Binding {
				g, states, err := sv.gain(b.Constraint, best)
				require.NoError(t, err)
				gains = append(gains, g)
				n += states
			}
			trade := sv.trade(best.s, 41)
			return best, gains, trade, n + sv.evals, nil
		}
		x, xg, xt, xn, xerr := solve(false)
		y, yg, yt, yn, yerr := solve(true)
		name := fmt.Sprintf("case %d", i)
		require.Equal(t, yerr, xerr, name)
		evals += xn
		evalsAgain += yn
		if xerr != nil {
			continue
		}
		plans++
		if p.LoadFloor != nil {
			floors++
		}
		assert.Equal(t, y, x, name)
		assert.Equal(t, yg, xg, "%s: gains", name)
		require.Len(t, xt, len(yt), name)
		for k := range xt {
			a, b := xt[k], yt[k]
			require.Equal(t, b.Limit, a.Limit, "%s: trade point %d", name, k)
			for _, v := range [...][2]float64{{a.Mach, b.Mach}, {a.Speed, b.Speed}, {a.Reynolds, b.Reynolds}, {a.StagnationPressure, b.StagnationPressure},
				{a.StagnationTemperature, b.StagnationTemperature}, {a.DynamicPressure, b.DynamicPressure}, {a.ReynoldsPerMeter, b.ReynoldsPerMeter}} {
				d := relDiff(v[0], v[1])
				assert.LessOrEqual(t, d, 1e-13, "%s: trade point %d", name, k)
				if d > 0 {
					moved++
				}
				worstTrade = math.Max(worstTrade, d)
			}
		}
	}
	t.Logf("%d plans (%d with a load floor); states %d against %d asked again; trade figures moved %d, by at most %.3g relative",
		plans, floors, evals, evalsAgain, moved, worstTrade)
	require.Greater(t, plans, 60)
	require.Greater(t, floors, 10)
	assert.Less(t, evals, evalsAgain)
}

// TestPrepareNitrogenInOverwrites: prepareNitrogenIn into a set-up that
// holds another Mach number's (every field set, a partial or failed one
// among them) leaves nothing of it: over 40 random cn2-05 problems
// (randomGasProblemIn) at 9 Mach numbers each, the set-up is the one
// prepareNitrogen builds in a zero set-up of its own, field for field, in
// a second solver asked the same set-ups in the same order.
func TestPrepareNitrogenInOverwrites(t *testing.T) {
	rng := rand.New(rand.NewSource(59))
	n := 0
	for i := 0; i < 40; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"cn2-05"})
		if i%3 == 2 {
			p.Facility.Speed = &facilities.Range{Min: 60 + 60*rng.Float64(), Max: 200 + 60*rng.Float64()}
		}
		a, err := newSolver(p)
		require.NoError(t, err)
		b, err := newSolver(p)
		require.NoError(t, err)
		a.topOnly, b.topOnly = i%2 == 1, i%2 == 1 // partial set-ups too
		c := a.prepareNitrogen(a.machOrSpeedMax)
		require.Equal(t, b.prepareNitrogen(b.machOrSpeedMax), c)
		for j := range 9 {
			m := a.machOrSpeedMin + (a.machOrSpeedMax-a.machOrSpeedMin)*float64(j)/8
			c.floorP, c.floorT, c.raFloor, c.qWater, c.qWaterT = 1, 2, true, [2]float64{3, 4}, [2]float64{5, 6}
			c.rWaterTop, c.capWaterTop, c.linear = 7, "x", true
			a.prepareNitrogenIn(&c, m)
			want := b.prepareNitrogen(m)
			require.Equal(t, want, c, "case %d, Mach %g", i, m)
			if c.ok {
				n++
			}
		}
	}
	require.Greater(t, n, 100)
}
