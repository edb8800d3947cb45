package similarity_test

import (
	"encoding/json"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/check"
	"scalematch/similarity"
)

func ptr(v float64) *float64 { return &v }

// TestBrisaCavitationByHand works the cavitation number of the demo hydrofoil Brisa
// F7 at its operating point by hand: sea water 35 g/kg at 18 °C, 14 m/s, foil 0.8 m
// below the surface, atmosphere 101.3 kPa.
//
//	ρ   = 1025.150 kg/m³ (TEOS-10, python3-gsw 3.6.16, at S_A 35 g/kg, 18 °C, 0 dbar)
//	p_v = 2064.657 Pa (IAPWS-IF97 at 291.15 K, python3-iapws) / (1 + 0.57357·35/965)
//	    = 2022.58 Pa
//	p   = 101300 + 1025.150·9.80665·0.8 = 109342.6 Pa
//	q   = ½·1025.150·14² = 100464.7 Pa
//	σ   = (109342.6 − 2022.58)/100464.7 = 1.06824
func TestBrisaCavitationByHand(t *testing.T) {
	t.Parallel()
	m := similarity.Marine{Water: similarity.WaterSea, Salinity: ptr(35), Temperature: 291.15, Depth: 0.8,
		AtmosphericPressure: ptr(101300), Speed: 14, FreeSurface: similarity.SurfacePiercing}
	fl, err := m.Resolve(0.42)
	require.NoError(t, err)
	ms := fl.Marine
	require.NotNil(t, ms)
	assert.InDelta(t, 1025.150, fl.Static.Density, 0.02, "density kg/m³ (EOS-80 against TEOS-10)")
	assert.InDelta(t, 2022.58, ms.VapourPressure, 0.05, "vapour pressure Pa")
	assert.InDelta(t, 109342.6, ms.Pressure, 0.5, "pressure at the reference depth Pa")
	assert.InDelta(t, 100464.7, fl.DynamicPressure, 2, "dynamic pressure Pa")
	assert.InDelta(t, 1.06824, ms.Cavitation, 2e-5, "cavitation number")
	require.NotNil(t, ms.FroudeDepth)
	assert.InDelta(t, 14/2.800950, *ms.FroudeDepth, 1e-4, "Froude number on depth: 14/√(9.80665·0.8)")
	assert.InDelta(t, 14/2.029453, fl.Froude, 1e-4, "Froude number on length: 14/√(9.80665·0.42)")

	// The answer's full-scale part has no Mach number or airspeeds.
	b, err := json.Marshal(fl)
	require.NoError(t, err)
	var got map[string]any
	require.NoError(t, json.Unmarshal(b, &got))
	for _, k := range []string{"mach", "true_airspeed", "calibrated_airspeed", "equivalent_airspeed"} {
		assert.NotContains(t, got, k)
	}
	assert.Contains(t, got, "marine")
}

// TestMarineValidate names each bad field of a marine condition.
func TestMarineValidate(t *testing.T) {
	t.Parallel()
	good := func() similarity.Marine {
		return similarity.Marine{Water: "sea", Temperature: 285.15, Depth: 45, Speed: 2.3}
	}
	tests := []struct {
		name  string
		edit  func(m *similarity.Marine)
		field string // "" : valid
	}{
		{"valid", func(m *similarity.Marine) {}, ""},
		{"no water", func(m *similarity.Marine) { m.Water = "" }, "marine.water"},
		{"unknown water", func(m *similarity.Marine) { m.Water = "brackish" }, "marine.water"},
		{"fresh with salinity", func(m *similarity.Marine) { m.Water = "fresh"; m.Salinity = ptr(3) }, "marine.salinity"},
		{"salinity above 42 g/kg", func(m *similarity.Marine) { m.Salinity = ptr(43) }, "marine.salinity"},
		{"salinity 0", func(m *similarity.Marine) { m.Salinity = ptr(0) }, "marine.salinity"},
		{"no temperature", func(m *similarity.Marine) { m.Temperature = 0 }, "marine.temperature"},
		{"temperature 45 °C", func(m *similarity.Marine) { m.Temperature = 318.15 }, "marine.temperature"},
		{"negative depth", func(m *similarity.Marine) { m.Depth = -1 }, "marine.depth"},
		{"atmosphere 1e308 Pa", func(m *similarity.Marine) { m.AtmosphericPressure = ptr(1e308) }, "marine.atmospheric_pressure"},
		{"no speed", func(m *similarity.Marine) { m.Speed = 0 }, "marine.speed"},
		{"speed 1e-310 m/s", func(m *similarity.Marine) { m.Speed = 1e-310 }, "marine.speed"},
		{"unknown free surface", func(m *similarity.Marine) { m.FreeSurface = "awash" }, "marine.free_surface"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			m := good()
			tc.edit(&m)
			err := m.Validate()
			if tc.field == "" {
				require.NoError(t, err)
				return
			}
			var fe *check.Error
			require.ErrorAs(t, err, &fe)
			require.NotEmpty(t, fe.Fields)
			assert.Equal(t, tc.field, fe.Fields[0].Field)
		})
	}
}
