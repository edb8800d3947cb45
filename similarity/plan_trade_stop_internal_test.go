package similarity

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestTradeJointStop: the trade curve's q-ceiling roots stopped after a step
// of jointTradeStop (1e-6) instead of the search's 1e-8 (noTradeStop) give
// the same curve within tradeStopBound: in cn2-05 under q ceilings from 30
// to 120 kPa, condensation margins of 0 and 0.02 and two p0 ranges
// (forTradeCases), and 40 random ceilings, margins and p0 ranges, each curve after the scan's nine set-ups has the same
// limits, every figure within 1e-12 relative (5.5e-14 found), each point
// usable by the facility's own check and under the ceiling, and the curves
// cost fewer states (1710 -> 1648 when written; the guard asks for 40
// fewer). It fails with the stop at 1e-4 (the figures then 1e-10 off).
func TestTradeJointStop(t *testing.T) {
	t.Parallel()
	worst, saved := 0.0, 0
	check := func(f *facilities.Facility, qmax, cond float64, pr facilities.Range) {
		var curves [2][]TradePoint
		var states [2]int
		for k, tight := range []bool{true, false} {
			sv := tradeSolver(t, f)
			sv.condMin = cond
			sv.noTradeStop = tight
			for i := range scanGrid {
				u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*float64(i)/(scanGrid-1)
				var c machSetup
				sv.prepareIn(&c, u)
			}
			e0 := sv.evals
			curves[k] = sv.trade(1, 41)
			states[k] = sv.evals - e0
		}
		saved += states[0] - states[1]
		got := curves[1]
		worst = math.Max(worst, requireSameTradeWithin(t, f, curves[0], got, qmax, cond, pr, tradeStopBound))
		for i, g := range got {
			if g.Reynolds == 0 {
				continue
			}
			// On the usable side of the condensation line by the facility's
			// own local margin (from its own start), whether the point's check
			// computed its local margin or carried it from the iteration.
			assert.GreaterOrEqual(t, f.LocalCondensationMargin(g.StagnationPressure, g.StagnationTemperature), cond,
				"q max %g, cond %g, p0 %v, point %d", qmax, cond, pr, i)
		}
	}
	forTradeCases(t, check)
	// And 40 random set-ups: q ceilings 25-150 kPa, margins 0-0.03, p0 ranges
	// within the facility's.
	base, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	rng := rand.New(rand.NewPCG(17, 6))
	for range 40 {
		f := base
		qmax := 25e3 + 125e3*rng.Float64()
		lo := base.StagnationPressure.Min + 0.3*(base.StagnationPressure.Max-base.StagnationPressure.Min)*rng.Float64()
		hi := base.StagnationPressure.Max - 0.3*(base.StagnationPressure.Max-lo)*rng.Float64()
		f.MaxDynamicPressure = &qmax
		f.StagnationPressure = facilities.Range{Min: lo, Max: hi}
		check(&f, qmax, 0.03*rng.Float64(), f.StagnationPressure)
	}
	t.Logf("largest relative difference %.3g, %d states saved", worst, saved)
	assert.Greater(t, saved, 40, "states saved")
}

// tradeStopBound is the largest relative difference jointTradeStop may make
// in a trade point's figures.
const tradeStopBound = 1e-12
