package similarity

import (
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
