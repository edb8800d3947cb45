package similarity

import (
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestWaterStateMatchesFacility checks the cavitation search's own water state
// (waterState, from the properties waterPropsAt and the grids keep) against
// facilities.Facility.State: the same usable settings, and the same q and Re/m
// to the bit, in a facility that holds its static pressure (cvt-07, also with a
// stagnation pressure given, which State refuses) and in one that does not
// (wtn-04, also at speeds whose q exceeds p0), at temperatures inside and
// outside the water model.
func TestWaterStateMatchesFacility(t *testing.T) {
	rng := rand.New(rand.NewSource(17))
	for _, id := range []string{"cvt-07", "wtn-04"} {
		f, ok := facilities.DemoFacility(id)
		require.True(t, ok, id)
		sv := &solver{f: &f, liquid: true, held: f.StaticPressure != nil}
		grids := &waterGrids{}
		for i := 0; i < 4000; i++ {
			tlo, thi := facilities.WaterMinTemperature-5, facilities.WaterMaxTemperature+5
			ta := tlo + (thi-tlo)*rng.Float64()
			tb := ta + (thi-ta)*rng.Float64()
			j := rng.Intn(cavGrid)
			temp := cavGridT(ta, tb, j)
			wp := waterPropsAt(temp)
			if rng.Intn(2) == 0 {
				wp = grids.grid(ta, tb).wp[j]
			}
			v := 40 * rng.Float64()
			if rng.Intn(8) == 0 {
				v = 20 * (rng.Float64() - 0.5)
			}
			p0 := f.StagnationPressure.Max
			if sv.held && rng.Intn(8) == 0 {
				p0 = 150000
			}
			st, err := f.State(facilities.Setting{Speed: v, StagnationPressure: p0, StagnationTemperature: temp})
			q, r, ok := sv.waterState(v, p0, temp, wp.rho, wp.mu)
			require.Equal(t, err == nil, ok, "%s at %g m/s, p0 %g Pa, %g K: %v", id, v, p0, temp, err)
			if ok {
				require.Equal(t, st.DynamicPressure, q, "%s q at %g m/s, %g K", id, v, temp)
				require.Equal(t, st.ReynoldsPerMeter, r, "%s Re/m at %g m/s, %g K", id, v, temp)
				require.Equal(t, facilities.WaterVapourPressure(temp), wp.pv, "%s vapour pressure at %g K", id, temp)
			}
		}
	}
}

// TestWaterGridFalls checks the certificate of the cavitation search's ends
// (waterGrid.falls): where it holds, (k − p_v)/ρ falls over 4000 temperatures
// of the grid's range; it holds for the demo tunnels' pressures over their
// temperature ranges, and not where k is so high that the water's expansion
// outweighs the vapour pressure's rise, nor outside the water model.
func TestWaterGridFalls(t *testing.T) {
	rng := rand.New(rand.NewSource(19))
	ratio := func(k, temp float64) float64 {
		return (k - facilities.WaterVapourPressure(temp)) / facilities.WaterDensity(temp)
	}
	grids := &waterGrids{}
	shown := 0
	for i := 0; i < 400; i++ {
		ta := facilities.WaterMinTemperature + 100*rng.Float64()
		tb := ta + 50*rng.Float64()
		k := math.Exp(math.Log(1e3) + math.Log(1e4)*rng.Float64())
		if !grids.grid(ta, tb).falls(k) {
			continue
		}
		shown++
		prev := math.Inf(1)
		for j := 0; j <= 4000; j++ {
			r := ratio(k, ta+(tb-ta)*float64(j)/4000)
			require.Less(t, r, prev, "k %g Pa over %g–%g K, point %d", k, ta, tb, j)
			prev = r
		}
	}
	require.Greater(t, shown, 100)
	for _, id := range []string{"cvt-07", "wtn-04"} {
		f, ok := facilities.DemoFacility(id)
		require.True(t, ok, id)
		g := grids.grid(f.StagnationTemperature.Min, f.StagnationTemperature.Max)
		lo, hi := f.StagnationPressure.Min, f.StagnationPressure.Max
		if f.StaticPressure != nil {
			lo, hi = f.StaticPressure.Min, f.StaticPressure.Max
		}
		require.True(t, g.falls(lo), "%s at %g Pa", id, lo)
		require.True(t, g.falls(hi), "%s at %g Pa", id, hi)
	}
	// At 50 MPa the density's fall (ρ′/ρ ≈ −2.6e-4 /K near 300 K) outweighs
	// p_v′/(k − p_v) ≈ 4e-6 /K: the ratio rises.
	require.False(t, grids.grid(290, 310).falls(5e7))
	require.Greater(t, ratio(5e7, 310), ratio(5e7, 290))
	require.False(t, grids.grid(facilities.WaterMinTemperature-1, 300).falls(1e5))
	require.False(t, grids.grid(400, facilities.WaterMaxTemperature+1).falls(1e6))
}
