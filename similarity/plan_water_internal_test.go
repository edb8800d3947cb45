package similarity

import (
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestWaterStateKeptMatchesFacility checks the water states the planner builds
// from its kept properties (waterStateKept, boilingMargin, cavitationMargin)
// against facilities.Facility.State and its margins: the same usable settings
// and the same State to the bit, in wtn-04 at random speeds (some with q past
// p0, some negative), stagnation pressures and temperatures inside and outside
// the water model, each temperature met several times (the memo's hits) among
// others that evict it; and in cvt-07, which holds its static pressure (p0
// then follows, p + q), where a stagnation pressure given is left to State.
func TestWaterStateKeptMatchesFacility(t *testing.T) {
	rng := rand.New(rand.NewSource(23))
	f, ok := facilities.DemoFacility("wtn-04")
	require.True(t, ok)
	sv := &solver{f: &f, liquid: true, water: &waterMemo{}}
	temps := make([]float64, 40)
	for i := range temps {
		tlo, thi := facilities.WaterMinTemperature-5, facilities.WaterMaxTemperature+5
		temps[i] = tlo + (thi-tlo)*rng.Float64()
	}
	temps = append(temps, facilities.WaterMinTemperature, facilities.WaterMaxTemperature, f.StagnationTemperature.Min, f.StagnationTemperature.Max)
	for i := 0; i < 5000; i++ {
		temp := temps[rng.Intn(len(temps))]
		v := 40 * rng.Float64()
		if rng.Intn(8) == 0 {
			v = 20 * (rng.Float64() - 0.5)
		}
		p0 := f.StagnationPressure.Min + (f.StagnationPressure.Max-f.StagnationPressure.Min)*rng.Float64()
		if rng.Intn(16) == 0 {
			p0 = math.Inf(1)
		}
		want, err := f.State(facilities.Setting{Speed: v, StagnationPressure: p0, StagnationTemperature: temp})
		got, ok := sv.waterStateKept(v, p0, temp)
		require.Equal(t, err == nil, ok, "wtn-04 at %g m/s, p0 %g Pa, %g K: %v", v, p0, temp, err)
		if ok {
			require.Equal(t, want, got, "wtn-04 at %g m/s, p0 %g Pa, %g K", v, p0, temp)
			require.Equal(t, f.BoilingMargin(want), sv.boilingMargin(&got), "boiling margin at %g K", temp)
			require.Equal(t, f.CavitationMargin(want), sv.cavitationMargin(&got), "cavitation margin at %g K", temp)
		}
	}
	held, ok := facilities.DemoFacility("cvt-07")
	require.True(t, ok)
	hv := &solver{f: &held, liquid: true, held: true, water: &waterMemo{}}
	for i := 0; i < 5000; i++ {
		temp := temps[rng.Intn(len(temps))]
		v := 40 * rng.Float64()
		if rng.Intn(8) == 0 {
			v = 20 * (rng.Float64() - 0.5)
		}
		if rng.Intn(32) == 0 {
			v = math.Inf(1)
		}
		want, err := held.State(facilities.Setting{Speed: v, StagnationTemperature: temp})
		got, ok := hv.waterStateKept(v, 0, temp)
		require.Equal(t, err == nil, ok, "cvt-07 at %g m/s, %g K: %v", v, temp, err)
		if ok {
			require.Equal(t, want, got, "cvt-07 at %g m/s, %g K", v, temp)
			require.Equal(t, held.BoilingMargin(want), hv.boilingMargin(&got), "boiling margin at %g K", temp)
			require.Equal(t, held.CavitationMargin(want), hv.cavitationMargin(&got), "cavitation margin at %g K", temp)
		}
	}
	_, ok = hv.waterStateKept(5, 150000, 293.15)
	assert.False(t, ok, "cvt-07 holds its static pressure: a stagnation pressure given is State's to check")
}

// TestWaterMemoKeepsTwoOfASet checks that two temperatures of one set of the
// water memo, asked for in turn, both stay kept (the second way), with their
// properties the memo's own to the bit: the pairs of 2000 random
// temperatures that share a set, and cvt-07's ends of the T0 range.
func TestWaterMemoKeepsTwoOfASet(t *testing.T) {
	rng := rand.New(rand.NewSource(37))
	set := func(temp float64) int { return (&waterMemo{}).slot(temp) }
	pairs := [][2]float64{{281.15, 307.15}}
	byset := map[int]float64{}
	for range 2000 {
		temp := 273.15 + 150*rng.Float64()
		if u, ok := byset[set(temp)]; ok {
			pairs = append(pairs, [2]float64{u, temp})
		}
		byset[set(temp)] = temp
	}
	require.Greater(t, len(pairs), 100)
	for _, p := range pairs {
		m := &waterMemo{}
		for range 3 {
			for _, temp := range p {
				i := m.slot(temp)
				require.Equal(t, temp, m.t[i])
				require.Equal(t, facilities.WaterDensity(temp), m.rho[i])
				require.Equal(t, facilities.WaterViscosity(temp, m.rho[i]), m.mu[i])
				require.Equal(t, facilities.WaterVapourPressure(temp), m.vapourPressure(temp))
			}
		}
		if set(p[0]) == set(p[1]) {
			kept := 0
			for _, u := range m.t {
				if u == p[0] || u == p[1] {
					kept++
				}
			}
			require.Equal(t, 2, kept, "%g and %g K", p[0], p[1])
		}
	}
}
