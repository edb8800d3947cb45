package campaign

import (
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

func demoFacility(t *testing.T, id string) *facilities.Facility {
	t.Helper()
	for _, f := range facilities.Demo() {
		if f.ID == id {
			return &f
		}
	}
	require.FailNow(t, "no demo facility", id)
	return nil
}

// TestRunOrderCryogenic is a hand-checked case in cn2-05 (20 s a point, 10 min
// a run, 30 min a pressure change, 240 min a temperature change; it rests at
// 130 kPa, the bottom of its range, and 288.15 K) with three temperature
// levels, six conditions of 7 α points each, one run each:
//
//	A 120 K 200 kPa, B 200 K 150 kPa, C 288 K 130 kPa,
//	D 120 K 300 kPa, E 200 K 150 kPa, F 288 K 250 kPa.
//
// Points and runs: 42·20 s = 14 min, 6·10 min = 60 min, in any order.
// In the caller's order every step changes both: 6·30 + 6·240 = 1620 min, so
// 1694 min = 28.23 h. Sorted by (T, p): A D B E C F changes p at A, D, B, C, F
// and T at A, B, C: 5·30 + 3·240 = 870 min, 944 min = 15.73 h. The best order
// starts in the resting temperature's group, at the resting pressure: C F,
// then B E, then A D: pressure changes at F, B, A, D and temperature changes
// at B and A: 4·30 + 2·240 = 600 min, 674 min = 11.23 h.
func TestRunOrderCryogenic(t *testing.T) {
	t.Parallel()
	f := demoFacility(t, "cn2-05")
	set := func(tk, pk float64) facilities.RunSet {
		return facilities.RunSet{Condition: facilities.Condition{StagnationTemperature: tk, StagnationPressure: pk * 1000}, AlphaPoints: 7, BetaValues: 1}
	}
	sets := []facilities.RunSet{set(120, 200), set(200, 150), set(288, 130), set(120, 300), set(200, 150), set(288, 250)}
	assert.InDelta(t, 1694.0/60, hoursOf(f, sets), 1e-9, "caller's order")
	order, sch := bestOrder(f, sets)
	assert.InDelta(t, 674.0/60, sch.Hours, 1e-9)
	assert.Equal(t, 4, sch.PressureChanges)
	assert.Equal(t, 2, sch.TemperatureChanges)
	assert.Equal(t, []int{2, 5}, order[:2], "the resting temperature's group first, at the resting pressure")
	byTP := slices.Clone(sets)
	sort.SliceStable(byTP, func(i, j int) bool {
		if byTP[i].StagnationTemperature != byTP[j].StagnationTemperature {
			return byTP[i].StagnationTemperature < byTP[j].StagnationTemperature
		}
		return byTP[i].StagnationPressure < byTP[j].StagnationPressure
	})
	assert.InDelta(t, 944.0/60, hoursOf(f, byTP), 1e-9, "sorted by (T, p)")
}

// TestRunOrderNeverWorse checks on 300 seeded random programmes in the demo
// facilities (a few temperature levels with jitter below the 2 K tolerance,
// pressures on a few levels or anywhere) that the chosen order takes no more
// hours than the caller's order or the sort by (temperature, pressure), and is
// a permutation of the sets.
func TestRunOrderNeverWorse(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(7, 7))
	ids := []string{"cn2-05", "tsw-1", "plp-3", "lsw-2", "wtn-04"}
	better := 0
	for k := range 300 {
		f := demoFacility(t, ids[k%len(ids)])
		n := 1 + rng.IntN(30)
		tl := 1 + rng.IntN(4)
		sets := make([]facilities.RunSet, n)
		for i := range sets {
			tr, pr := f.StagnationTemperature, f.StagnationPressure
			tk := tr.Min + (tr.Max-tr.Min)*float64(rng.IntN(tl))/float64(tl) + rng.Float64()
			p := pr.Min + (pr.Max-pr.Min)*rng.Float64()
			if k%2 == 0 {
				p = pr.Min + (pr.Max-pr.Min)*float64(rng.IntN(3))/3
			}
			sets[i] = facilities.RunSet{Condition: facilities.Condition{StagnationTemperature: tk, StagnationPressure: p},
				AlphaPoints: 1 + rng.IntN(20), BetaValues: rng.IntN(3)}
		}
		order, sch := bestOrder(f, sets)
		perm := slices.Clone(order)
		slices.Sort(perm)
		for i := range perm {
			require.Equal(t, i, perm[i])
		}
		caller := hoursOf(f, sets)
		byTP := slices.Clone(sets)
		sort.SliceStable(byTP, func(i, j int) bool {
			if byTP[i].StagnationTemperature != byTP[j].StagnationTemperature {
				return byTP[i].StagnationTemperature < byTP[j].StagnationTemperature
			}
			return byTP[i].StagnationPressure < byTP[j].StagnationPressure
		})
		sorted := hoursOf(f, byTP)
		require.LessOrEqual(t, sch.Hours, caller*(1+1e-12), "case %d", k)
		require.LessOrEqual(t, sch.Hours, sorted*(1+1e-12), "case %d", k)
		if sch.Hours < sorted*(1-1e-12) {
			better++
		}
	}
	t.Logf("better than the sort by (T, p) in %d of 300 programmes", better)
}
