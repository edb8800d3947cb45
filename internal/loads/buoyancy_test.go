package loads_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// TestBuoyancy checks the weight, buoyancy and net of a model in water, worked by
// hand with g0 = 9.80665 m/s² and Kell's density at the facility's highest
// temperature (34 °C: 994.37 kg/m³, Kell 1975), and that the balance's weight loads
// carry the net weight.
func TestBuoyancy(t *testing.T) {
	t.Parallel()
	water := &facilities.Facility{ID: "w", Medium: facilities.Medium{Kind: facilities.MediumWater},
		StagnationTemperature: facilities.Range{Min: 281.15, Max: 307.15}}
	air := &facilities.Facility{ID: "a", Medium: facilities.Medium{Kind: facilities.MediumAir},
		StagnationTemperature: facilities.Range{Min: 288, Max: 300}}
	rho := facilities.WaterDensity(307.15)
	require.InDelta(t, 994.37, rho, 0.01, "Kell at 34 °C")
	tests := []struct {
		name      string
		f         *facilities.Facility
		in        loads.Installation
		frontal   float64 // m²
		length    float64 // m
		nilWant   bool
		volume    float64 // m³
		basis     string
		buoyancy  float64 // N
		net       float64 // N
		loadCheck bool
	}{
		// 40 kg, 0.019 m³: W = 392.266 N, B = 994.37·9.80665·0.019 = 185.28 N.
		{"given volume", water, loads.Installation{ModelMass: 40, ModelVolume: 0.019}, 0.05, 1.2, false,
			0.019, "given", 185.28, 392.266 - 185.28, true},
		// 0.65·0.02·0.5 = 0.0065 m³: B = 994.37·9.80665·0.0065 = 63.386 N.
		{"estimated volume", water, loads.Installation{ModelMass: 5}, 0.02, 0.5, false,
			0.0065, "estimated", 63.386, 49.033 - 63.386, false},
		{"gas facility", air, loads.Installation{ModelMass: 5, ModelVolume: 1}, 0.02, 0.5, true, 0, "", 0, 0, false},
		{"no volume, no length", water, loads.Installation{ModelMass: 5}, 0.02, 0, true, 0, "", 0, 0, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			b := loads.BuoyancyOf(tc.f, tc.in, tc.frontal, tc.length)
			if tc.nilWant {
				assert.Nil(t, b)
				return
			}
			require.NotNil(t, b)
			assert.InDelta(t, tc.volume, b.ModelVolume, 1e-12)
			assert.Equal(t, tc.basis, b.VolumeBasis)
			assert.InDelta(t, tc.buoyancy, b.Buoyancy, 0.01)
			assert.InDelta(t, tc.net, b.Net, 0.01)
			assert.Equal(t, tc.loadCheck, b.InLoadCheck)
			assert.NotEmpty(t, b.Note())
		})
	}
	// The weight loads carry the net weight: N_w = −(W − B)·cos α at α 10°.
	in := loads.Installation{ModelMass: 40, ModelVolume: 0.019}.WithBuoyancy(water)
	l := in.Weight(10)
	assert.InDelta(t, -(392.266-185.28)*math.Cos(10*math.Pi/180), l[loads.IndexNormal], 0.01)
	dry := loads.Installation{ModelMass: 40, ModelVolume: 0.019}.WithBuoyancy(air)
	assert.InDelta(t, -392.266*math.Cos(10*math.Pi/180), dry.Weight(10)[loads.IndexNormal], 0.001)
}
