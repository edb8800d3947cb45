package facilities_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

var (
	mAir      = facilities.Medium{Kind: facilities.MediumAir}
	mNitrogen = facilities.Medium{Kind: facilities.MediumNitrogen}
	mWater    = facilities.Medium{Kind: facilities.MediumWater}
	mArgon    = facilities.Medium{Kind: facilities.MediumGas, Gas: &facilities.GasProperties{
		// Argon, rounded textbook constants (from memory); used only to exercise the
		// custom-gas path.
		MolarMass: 0.039948, Gamma: 5.0 / 3, ViscosityReference: 2.125e-5,
		TemperatureReference: 273.15, SutherlandConstant: 144,
	}}
)

func TestMediumConstants(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name          string
		m             facilities.Medium
		gamma, r, tol float64
		liquid        bool
	}{
		// R = R*/M: 8.31432/0.0289644 (1976 standard), 8.314462618/0.0280134.
		{"air", mAir, 1.4, 287.0531, 1e-6, false},
		{"nitrogen", mNitrogen, 1.4, 296.80305, 1e-6, false},
		{"argon", mArgon, 5.0 / 3, 208.1322, 1e-6, false},
		{"water", mWater, 0, 0, 0, true},
		{"unknown", facilities.Medium{Kind: "helium"}, 0, 0, 0, false},
		{"gas without constants", facilities.Medium{Kind: facilities.MediumGas}, 0, 0, 0, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			assert.InDelta(t, tc.gamma, tc.m.Gamma(), 1e-12, "Gamma()")
			assert.InDelta(t, tc.r, tc.m.GasConstant(), tc.tol*tc.r, "GasConstant() J/(kg·K), R*/M")
			assert.Equal(t, tc.liquid, tc.m.IsLiquid(), "IsLiquid()")
		})
	}
}

func TestViscosity(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name    string
		m       facilities.Medium
		T, want float64 // K, Pa·s
		tol     float64 // relative
	}{
		// U.S. Standard Atmosphere 1976, sea-level table value (from memory).
		{"air at 288.15 K", mAir, 288.15, 1.7894e-5, 1e-4},
		// NIST, nitrogen at 300 K and 0.1 MPa: 17.9 µPa·s (from memory).
		{"nitrogen at 300 K, 0.1 MPa", mNitrogen, 300, 17.9e-6, 0.005},
		{"custom gas at its reference", mArgon, 273.15, 2.125e-5, 1e-12},
		// IAPWS 2008 at 20 °C and 0.101325 MPa: 1001.6 µPa·s (python3-iapws, see
		// testdata/reference/water).
		{"water at 20 °C", mWater, 293.15, 1.0016e-3, 1e-3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			// At 0.1 MPa: the density matters only to nitrogen's residual term.
			testfixture.InRelative(t, tc.want, tc.m.Viscosity(tc.T, tc.m.Density(tc.T, 1e5)), tc.tol,
				"Viscosity(%g K) Pa·s, the source beside the case", tc.T)
		})
	}
}

func TestViscosityWarning(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		m    facilities.Medium
		T    float64
		warn bool
	}{
		{"nitrogen at 63 K, below the triple point", mNitrogen, 63, true},
		{"nitrogen at 63.151 K, the triple point", mNitrogen, 63.151, false},
		{"nitrogen at 99 K", mNitrogen, 99, false},
		{"nitrogen at 1000 K", mNitrogen, 1000, false},
		{"nitrogen at 1001 K", mNitrogen, 1001, true},
		{"air at 90 K", mAir, 90, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got := tc.m.ViscosityWarning(tc.T)
			assert.Equal(t, tc.warn, got != "", "ViscosityWarning(%g K) = %q", tc.T, got)
		})
	}
}

// TestWaterViscosityIAPWS checks the IAPWS 2008 formulation against the
// verification values of its release (Huber et al. 2009, J. Phys. Chem. Ref. Data
// 38:101, table 4, µPa·s; from memory, the first two also printed in
// python3-iapws's docstring of _Viscosity). The critical enhancement, left out,
// is 1 at all of these points.
func TestWaterViscosityIAPWS(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		T, rho float64 // K, kg/m³
		want   float64 // µPa·s, printed to 6 decimals
		tol    float64 // µPa·s: one unit of the last printed digit
	}{
		{"298.15 K, 998 kg/m³", 298.15, 998, 889.735100, 1e-6},
		{"873.15 K, 600 kg/m³", 873.15, 600, 77.430195, 1e-6},
		{"298.15 K, 1200 kg/m³", 298.15, 1200, 1437.649467, 1e-6},
		{"373.15 K, 1000 kg/m³", 373.15, 1000, 307.883622, 1e-6},
		{"433.15 K, 1 kg/m³", 433.15, 1, 14.538324, 1e-6},
		{"433.15 K, 1000 kg/m³", 433.15, 1000, 217.685358, 1e-6},
		{"873.15 K, 1 kg/m³", 873.15, 1, 32.619287, 1e-6},
		{"1173.15 K, 400 kg/m³", 1173.15, 400, 64.154608, 1e-6},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			assert.InDelta(t, tc.want, facilities.WaterViscosity(tc.T, tc.rho)*1e6, tc.tol,
				"WaterViscosity µPa·s, IAPWS 2008 verification table 4")
		})
	}
}

// waterRow is one line of testdata/reference/water/water.csv.
type waterRow struct{ tC, T, rho, mu float64 }

func readWater(t *testing.T) []waterRow {
	t.Helper()
	var rows []waterRow
	for _, v := range testfixture.ReadCSV(t, "../testdata/reference/water/water.csv") {
		require.Len(t, v, 4, "water.csv: t °C, T K, ρ kg/m³, µ Pa·s")
		rows = append(rows, waterRow{v[0], v[1], v[2], v[3]})
	}
	require.GreaterOrEqual(t, len(rows), 80, "water.csv: 1–80 °C at least every degree")
	return rows
}

// TestWaterAgainstIAPWS95 compares Kell's density and the IAPWS 2008 viscosity at
// Kell's density with IAPWS-95 at 0.101325 MPa, 1–80 °C (python3-iapws fixture,
// testdata/reference/water; physics.md §3 expects density within 1.5e-5).
func TestWaterAgainstIAPWS95(t *testing.T) {
	t.Parallel()
	rows := readWater(t)
	tests := []struct {
		name string
		tol  float64 // largest relative difference allowed
		got  func(r waterRow) float64
		want func(r waterRow) float64
	}{
		{"density, Kell 1975", 1e-4,
			func(r waterRow) float64 { return mWater.Density(r.T, 101325) },
			func(r waterRow) float64 { return r.rho }},
		{"viscosity, IAPWS 2008 at Kell's density", 0.01,
			func(r waterRow) float64 { return mWater.Viscosity(r.T, r.rho) },
			func(r waterRow) float64 { return r.mu }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			worst, at := 0.0, 0.0
			for _, r := range rows {
				if e := testfixture.RelErr(tc.got(r), tc.want(r)); e > worst {
					worst, at = e, r.tC
				}
			}
			t.Logf("largest relative difference %.2g at %g °C over %d rows", worst, at, len(rows))
			assert.LessOrEqual(t, worst, tc.tol, "largest relative difference from IAPWS-95 (python3-iapws fixture), at %g °C", at)
		})
	}
}

// TestPengRobinsonCritical: at the critical point the Peng–Robinson cubic has a
// triple root Zc = 0.30740 (Peng & Robinson 1976, a published property of the
// equation).
func TestPengRobinsonCritical(t *testing.T) {
	t.Parallel()
	z := mNitrogen.Compressibility(facilities.NitrogenCriticalTemperature, facilities.NitrogenCriticalPressure)
	assert.InDelta(t, 0.30740, z, 1e-5, "Z at the critical point, Peng & Robinson 1976")
}

// tsonopoulosB returns the second virial coefficient in m³/mol of a non-polar gas
// by the Tsonopoulos correlation (Tsonopoulos 1974, AIChE J. 20:263, eqs. 3–4,
// from memory):
//
//	B·pc/(R·Tc) = f0(Tr) + ω·f1(Tr)
//	f0 = 0.1445 − 0.330/Tr − 0.1385/Tr² − 0.0121/Tr³ − 0.000607/Tr⁸
//	f1 = 0.0637 + 0.331/Tr² − 0.423/Tr³ − 0.008/Tr⁸
func tsonopoulosB(T, tc, pc, omega float64) float64 {
	tr := T / tc
	f0 := 0.1445 - 0.330/tr - 0.1385/(tr*tr) - 0.0121/(tr*tr*tr) - 0.000607/math.Pow(tr, 8)
	f1 := 0.0637 + 0.331/(tr*tr) - 0.423/(tr*tr*tr) - 0.008/math.Pow(tr, 8)
	return (f0 + omega*f1) * facilities.MolarGasConstant * tc / pc
}

// TestPengRobinsonLowPressure: Z tends to 1 as p → 0, and its slope dZ/dp = B/(R·T)
// there is compared with Tsonopoulos' second virial coefficient B. The two agree
// within a few per cent at 90–100 K only: a cubic equation's B = b − a·α(T)/(R·T)
// runs 8–17 % (10–13 cm³/mol) more negative than the correlation from 110 to 150 K
// (a known weakness of cubic equations, which are fitted to vapour pressures and
// densities, not virial data). There the test bounds what matters, the difference
// in Z at 100 kPa, which is the relative density difference.
func TestPengRobinsonLowPressure(t *testing.T) {
	t.Parallel()
	const p = 100.0 // Pa: (Z − 1)/p is the slope to 1e-5 of itself
	tests := []struct {
		name   string
		T      float64 // K
		relTol float64 // |B_PR/B_T − 1|; 0: not checked
		zTol   float64 // |Z_PR − Z_T| at 100 kPa, Z_T = 1 + B_T·p/(R·T)
	}{
		{"90 K", 90, 0.02, 2e-4},
		{"100 K", 100, 0.05, 1e-3},
		{"120 K", 120, 0, 1.5e-3},
		{"150 K", 150, 0, 1.5e-3},
		{"200 K", 200, 0, 1e-3},
		{"300 K", 300, 0, 5e-4},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			z := mNitrogen.Compressibility(tc.T, p)
			require.InDelta(t, 1, z, 1e-4, "Z(%g K, %g Pa): an ideal gas as p → 0", tc.T, p)
			rt := facilities.MolarGasConstant * tc.T
			bPR := (z - 1) * rt / p // m³/mol
			bT := tsonopoulosB(tc.T, facilities.NitrogenCriticalTemperature,
				facilities.NitrogenCriticalPressure, facilities.NitrogenAcentricFactor)
			dz := math.Abs(bPR-bT) * 1e5 / rt
			t.Logf("B: Peng–Robinson %.2f cm³/mol, Tsonopoulos %.2f cm³/mol (%+.1f %%); ΔZ at 100 kPa %.2g",
				bPR*1e6, bT*1e6, 100*(bPR/bT-1), dz)
			if tc.relTol > 0 {
				assert.InEpsilon(t, bT, bPR, tc.relTol, "B m³/mol: Peng–Robinson against Tsonopoulos 1974")
			}
			assert.LessOrEqual(t, dz, tc.zTol, "ΔZ at 100 kPa against Tsonopoulos 1974")
		})
	}
	assert.Equal(t, 1.0, mNitrogen.Compressibility(200, 0), "Z at zero pressure")
}

// TestNitrogenNIST checks density and viscosity against NIST values (from memory).
func TestNitrogenNIST(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name      string
		got, want float64
		tol       float64 // relative
	}{
		{"density at 300 K, 0.1 MPa", mNitrogen.Density(300, 1e5), 1.1233, 0.005},
		{"viscosity at 300 K, 0.1 MPa", mNitrogen.Viscosity(300, mNitrogen.Density(300, 1e5)), 17.9e-6, 0.005},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			assert.InEpsilon(t, tc.want, tc.got, tc.tol, "NIST (from memory)")
		})
	}
}

func TestNitrogenSaturation(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name      string
		T, p, tol float64 // K, Pa, relative
	}{
		// The two points of the line (Span et al. 2000; from memory).
		{"normal boiling point", 77.355, 101325, 1e-12},
		{"critical point", 126.192, 3.3958e6, 1e-12},
		// NIST, saturated nitrogen at 100 K: 0.7783 MPa (from memory); the two-point
		// line is about ±2 % between its ends.
		{"100 K", 100, 0.7783e6, 0.03},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			p, ok := mNitrogen.SaturationPressure(tc.T)
			require.True(t, ok, "SaturationPressure(%g K) reports a saturation line", tc.T)
			assert.InEpsilon(t, tc.p, p, tc.tol, "SaturationPressure(%g K) Pa, the source beside the case", tc.T)
			if tc.T < facilities.NitrogenCriticalTemperature {
				T, ok := mNitrogen.SaturationTemperature(p)
				require.True(t, ok, "SaturationTemperature(%.6g Pa)", p)
				assert.InEpsilon(t, tc.T, T, 1e-12, "SaturationTemperature(%.6g Pa) K: the inverse of SaturationPressure", p)
			}
		})
	}
	_, ok := mNitrogen.SaturationPressure(130)
	assert.False(t, ok, "SaturationPressure above the critical temperature reports a saturation line")
	T, ok := mNitrogen.SaturationTemperature(4e6)
	assert.False(t, ok, "SaturationTemperature above the critical pressure")
	assert.Equal(t, facilities.NitrogenCriticalTemperature, T, "SaturationTemperature above the critical pressure")
	for _, m := range []facilities.Medium{mAir, mWater, mArgon} {
		_, ok := m.SaturationPressure(100)
		assert.False(t, ok, "%s reports a saturation line", m.Kind)
	}
}

// TestPengRobinsonRoot checks, over a seeded random sample of temperatures and
// pressures from the triple point to well above the critical point, that the
// returned Z solves the cubic, lies above the co-volume B, and is its largest real
// root (no root of the cubic above it).
func TestPengRobinsonRoot(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	const tc, pc, omega = facilities.NitrogenCriticalTemperature, facilities.NitrogenCriticalPressure, facilities.NitrogenAcentricFactor
	for range 5000 {
		T := 64 + 400*rng.Float64()
		p := math.Pow(10, 2+5*rng.Float64()) // 100 Pa to 10 MPa
		z := facilities.PengRobinsonZ(T, p, tc, pc, omega)
		tr, pr := T/tc, p/pc
		k := 0.37464 + 1.54226*omega - 0.26992*omega*omega
		s := 1 + k*(1-math.Sqrt(tr))
		a := 0.45723552892138219 * s * s * pr / (tr * tr)
		b := 0.077796073903888456 * pr / tr
		f := func(z float64) float64 { return z*z*z - (1-b)*z*z + (a-3*b*b-2*b)*z - (a*b - b*b - b*b*b) }
		scale := 1 + a + b
		require.Greater(t, z, b, "T %g K, p %g Pa: Z above the co-volume B", T, p)
		require.InDelta(t, 0, f(z), 1e-12*scale, "T %g K, p %g Pa: Z = %g solves the cubic", T, p, z)
		// The cubic is positive for every z above its largest root.
		for _, d := range []float64{1e-6, 1e-3, 0.1, 1, 10} {
			zz := z + d*(1+z)
			require.Positive(t, f(zz), "T %g K, p %g Pa: Z = %g is the largest root (f(%g))", T, p, z, zz)
		}
	}
}
