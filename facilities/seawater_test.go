package facilities_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

// readCSV reads a reference fixture's numeric rows (testfixture.ReadCSV) and
// checks that they have want columns.
func readCSV(t *testing.T, path string, want int) [][]float64 {
	t.Helper()
	rows := testfixture.ReadCSV(t, path)
	require.NotEmpty(t, rows, path)
	require.Len(t, rows[0], want, "%s: columns", path)
	return rows
}

// t68 converts an IPTS-68 temperature in °C, as the UNESCO tables give it, to an
// ITS-90 temperature in K (Saunders 1990: t90 = t68/1.00024).
func t68(t float64) float64 { return 273.15 + t/1.00024 }

// sp converts a practical salinity to an absolute salinity in g/kg.
func sp(s float64) float64 { return s * facilities.ReferenceSalinityRatio }

// TestSeawaterPublished checks sea-water density and kinematic viscosity against
// published tables, the source beside each value.
func TestSeawaterPublished(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name    string
		T, sa   float64 // K, g/kg
		rho     float64 // kg/m³; 0: not checked
		rhoTol  float64 // kg/m³
		nu      float64 // m²/s; 0: not checked
		nuTol   float64 // relative
		density func(T, sa float64) float64
	}{
		// UNESCO 1983 (Tech. Pap. Mar. Sci. 44, p. 22) check values of the
		// one-atmosphere EOS-80, t in IPTS-68, practical salinity (from memory).
		{"UNESCO 1983 S 0, 0 °C", t68(0), 0, 999.842594, 1e-6, 0, 0, facilities.SeawaterDensity},
		{"UNESCO 1983 S 0, 30 °C", t68(30), 0, 995.651134, 1e-6, 0, 0, facilities.SeawaterDensity},
		{"UNESCO 1983 S 35, 0 °C", t68(0), sp(35), 1028.106331, 1e-6, 0, 0, facilities.SeawaterDensity},
		{"UNESCO 1983 S 35, 30 °C", t68(30), sp(35), 1021.728639, 1e-6, 0, 0, facilities.SeawaterDensity},
		// EOS-80 at practical salinity 35, 15 °C, one atmosphere: 1025.97 kg/m³
		// (from memory).
		{"EOS-80 S 35, 15 °C", 288.15, sp(35), 1025.97, 0.01, 0, 0, facilities.SeawaterDensity},
		// Tupper, Introduction to Naval Architecture, 4th ed. (2004), Table 5.1:
		// fresh water and salt water of salinity 3.5 %, density to 0.1 kg/m³ and
		// kinematic viscosity to 0.001e-6 m²/s. The table's fresh density at 10 and
		// 20 °C is 0.1 kg/m³ below IAPWS-95, hence 0.15 kg/m³; the sea-water
		// viscosity correlation states ±1.5 % (Sharqawy et al. 2010), hence 1.5 %.
		{"Tupper 5.1 fresh 0 °C", 273.15, 0, 999.8, 0.15, 1.787e-6, 0.01, nil},
		{"Tupper 5.1 fresh 10 °C", 283.15, 0, 999.6, 0.15, 1.306e-6, 0.01, nil},
		{"Tupper 5.1 fresh 20 °C", 293.15, 0, 998.1, 0.15, 1.004e-6, 0.01, nil},
		{"Tupper 5.1 fresh 30 °C", 303.15, 0, 995.6, 0.15, 0.801e-6, 0.01, nil},
		{"Tupper 5.1 salt 0 °C", 273.15, sp(35), 1028.0, 0.15, 1.828e-6, 0.015, nil},
		{"Tupper 5.1 salt 10 °C", 283.15, sp(35), 1026.9, 0.15, 1.354e-6, 0.015, nil},
		{"Tupper 5.1 salt 20 °C", 293.15, sp(35), 1024.7, 0.15, 1.054e-6, 0.015, nil},
		{"Tupper 5.1 salt 30 °C", 303.15, sp(35), 1021.7, 0.15, 0.849e-6, 0.015, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			w := facilities.NaturalWater(tc.T, tc.sa)
			rho := w.Density
			if tc.density != nil {
				rho = tc.density(tc.T, tc.sa)
			}
			t.Logf("density %.4f kg/m³, %+.4f kg/m³ from the table", rho, rho-tc.rho)
			assert.InDelta(t, tc.rho, rho, tc.rhoTol, "density kg/m³")
			if tc.nu > 0 {
				nu := w.Viscosity / w.Density
				t.Logf("kinematic viscosity %.5g m²/s, %+.2f %% from the table", nu, 100*(nu/tc.nu-1))
				assert.InEpsilon(t, tc.nu, nu, tc.nuTol, "kinematic viscosity m²/s: %.5g", nu)
			}
		})
	}
}

// TestSeawaterDensityTEOS10 compares the EOS-80 density with TEOS-10 (python3-gsw
// fixture, testdata/reference/seawater/seawater.csv) at 10–40 g/kg, 0–40 °C. The two
// standards agree to a few parts in 1e5 at one atmosphere.
func TestSeawaterDensityTEOS10(t *testing.T) {
	t.Parallel()
	rows := readCSV(t, "../testdata/reference/seawater/seawater.csv", 4)
	require.GreaterOrEqual(t, len(rows), 200)
	worst, at := 0.0, []float64(nil)
	for _, r := range rows {
		got := facilities.SeawaterDensity(r[2], r[0])
		if d := testfixture.RelErr(got, r[3]); d > worst {
			worst, at = d, r
		}
	}
	t.Logf("largest relative difference %.3g at %g g/kg, %g °C", worst, at[0], at[1])
	assert.Less(t, worst, 1e-5) // docs/physics.md quotes this bound
}

// TestWaterVapourPressure checks the IAPWS-IF97 saturation pressure against the
// release's verification values and python3-iapws (fixture
// testdata/reference/seawater/vapour.csv, 1–40 °C).
func TestWaterVapourPressure(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		T    float64 // K
		want float64 // Pa
		tol  float64 // relative
	}{
		// IAPWS-IF97 (IAPWS 2007), table 35: p_s(300 K) = 0.353658941e-2 MPa,
		// p_s(500 K) = 0.263889776e1 MPa, p_s(600 K) = 0.123443146e2 MPa (from memory).
		{"IF97 table 35, 300 K", 300, 0.353658941e4, 1e-8},
		{"IF97 table 35, 500 K", 500, 0.263889776e7, 1e-8},
		{"IF97 table 35, 600 K", 600, 0.123443146e8, 1e-8},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			assert.InEpsilon(t, tc.want, facilities.WaterVapourPressure(tc.T), tc.tol)
		})
	}
	rows := readCSV(t, "../testdata/reference/seawater/vapour.csv", 3)
	require.GreaterOrEqual(t, len(rows), 5)
	for _, r := range rows {
		assert.InEpsilon(t, r[2], facilities.WaterVapourPressure(r[1]), 1e-10, "python3-iapws _PSat_T at %g °C", r[0])
	}
	// Sea water lowers the vapour pressure by 1/(1 + 0.57357·S/(1000 − S)):
	// 35 g/kg gives 1/1.020803 = 0.979621 (worked by hand).
	assert.InEpsilon(t, 0.979621, facilities.SeawaterVapourPressure(291.15, 35)/facilities.WaterVapourPressure(291.15), 1e-5)
}

// TestWaterSlopes checks WaterDensitySlope and WaterVapourPressureSlope against
// central differences of WaterDensity and WaterVapourPressure (step 1e-3 K: the
// truncation error, h²/6 of the third derivative, is below 1e-8 relative).
func TestWaterSlopes(t *testing.T) {
	t.Parallel()
	const h = 1e-3
	for _, T := range []float64{273.15, 277.13, 280, 288.15, 293.15, 303.15, 313.15, 333.15, 373.15, 423.15} {
		dRho := (facilities.WaterDensity(T+h) - facilities.WaterDensity(T-h)) / (2 * h)
		assert.InDelta(t, dRho, facilities.WaterDensitySlope(T), 1e-7, "dρ/dT at %g K", T)
		dPv := (facilities.WaterVapourPressure(T+h) - facilities.WaterVapourPressure(T-h)) / (2 * h)
		assert.InEpsilon(t, dPv, facilities.WaterVapourPressureSlope(T), 1e-7, "dp_v/dT at %g K", T)
		mu := func(T float64) float64 { return facilities.WaterViscosity(T, facilities.WaterDensity(T)) }
		dMu := (mu(T+h) - mu(T-h)) / (2 * h)
		got := facilities.WaterViscositySlope(T, facilities.WaterDensity(T), facilities.WaterDensitySlope(T))
		assert.InEpsilon(t, dMu, got, 1e-7, "dμ/dT at %g K", T)
	}
	// Near the normal boiling point (373.124 K) the saturation line rises by about
	// 3.6 kPa/K (steam tables, from memory).
	assert.InEpsilon(t, 3.6e3, facilities.WaterVapourPressureSlope(373.124), 0.02)
}

// TestWaterSlopesMonotone holds what the planner's cavitation search assumes
// of the water model over its whole range, 0–150 °C (similarity, the
// certificate of an end temperature): the density's slope falls with the
// temperature (ρ concave) and the vapour pressure's slope is positive and
// rises (p_v increasing and convex), and the rise of Re/m, −d ln(μ/ρ)/dT,
// is positive and falls (ln ν convex), checked every 0.01 K.
func TestWaterSlopesMonotone(t *testing.T) {
	t.Parallel()
	prevRho, prevPv, prevRe := math.Inf(1), 0.0, math.Inf(1)
	for i := 0; ; i++ {
		T := facilities.WaterMinTemperature + 0.01*float64(i)
		if T > facilities.WaterMaxTemperature {
			break
		}
		dRho, dPv := facilities.WaterDensitySlope(T), facilities.WaterVapourPressureSlope(T)
		require.Less(t, dRho, prevRho, "dρ/dT at %g K", T)
		require.Greater(t, dPv, prevPv, "dp_v/dT at %g K", T)
		rho := facilities.WaterDensity(T)
		dRe := dRho/rho - facilities.WaterViscositySlope(T, rho, dRho)/facilities.WaterViscosity(T, rho)
		require.Greater(t, dRe, 0.0, "d ln(ρ/μ)/dT at %g K", T)
		require.Less(t, dRe, prevRe, "d ln(ρ/μ)/dT at %g K", T)
		prevRho, prevPv, prevRe = dRho, dPv, dRe
	}
}

// TestWaterPropertiesAndSlopes holds WaterPropertiesAndSlopes equal, to the
// bit, to the six functions it stands for (its documented contract), every
// 0.001 K over the water model's range and at its ends.
func TestWaterPropertiesAndSlopes(t *testing.T) {
	t.Parallel()
	n := 0
	for i := 0; ; i++ {
		T := facilities.WaterMinTemperature + 0.001*float64(i)
		if T > facilities.WaterMaxTemperature {
			T = facilities.WaterMaxTemperature
		}
		rho, dRho, mu, dMu, pv, dPv := facilities.WaterPropertiesAndSlopes(T)
		wantRho, wantDRho := facilities.WaterDensity(T), facilities.WaterDensitySlope(T)
		require.Equal(t, math.Float64bits(wantRho), math.Float64bits(rho), "ρ at %v K", T)
		require.Equal(t, math.Float64bits(wantDRho), math.Float64bits(dRho), "dρ/dT at %v K", T)
		require.Equal(t, math.Float64bits(facilities.WaterViscosity(T, wantRho)), math.Float64bits(mu), "μ at %v K", T)
		require.Equal(t, math.Float64bits(facilities.WaterViscositySlope(T, wantRho, wantDRho)), math.Float64bits(dMu), "dμ/dT at %v K", T)
		require.Equal(t, math.Float64bits(facilities.WaterVapourPressure(T)), math.Float64bits(pv), "p_v at %v K", T)
		require.Equal(t, math.Float64bits(facilities.WaterVapourPressureSlope(T)), math.Float64bits(dPv), "dp_v/dT at %v K", T)
		n++
		if T == facilities.WaterMaxTemperature {
			break
		}
	}
	require.Greater(t, n, 150000)
}
