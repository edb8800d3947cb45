package facilities_test

import (
	"bufio"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"

	"scalematch/facilities"
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

func relDev(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

func TestMediumConstants(t *testing.T) {
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
			if g := tc.m.Gamma(); math.Abs(g-tc.gamma) > 1e-12 {
				t.Errorf("Gamma() = %g, want %g", g, tc.gamma)
			}
			if r := tc.m.GasConstant(); math.Abs(r-tc.r) > tc.tol*tc.r {
				t.Errorf("GasConstant() = %.7g J/(kg·K), want %.7g", r, tc.r)
			}
			if l := tc.m.IsLiquid(); l != tc.liquid {
				t.Errorf("IsLiquid() = %v, want %v", l, tc.liquid)
			}
		})
	}
}

func TestViscosity(t *testing.T) {
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
			// At 0.1 MPa: the density matters only to nitrogen's residual term.
			if got := tc.m.Viscosity(tc.T, tc.m.Density(tc.T, 1e5)); relDev(got, tc.want) > tc.tol {
				t.Errorf("Viscosity(%g K) = %.6g Pa·s, want %.6g (tolerance %g)", tc.T, got, tc.want, tc.tol)
			}
		})
	}
}

func TestViscosityWarning(t *testing.T) {
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
			if got := tc.m.ViscosityWarning(tc.T); (got != "") != tc.warn {
				t.Errorf("ViscosityWarning(%g K) = %q, want a warning: %v", tc.T, got, tc.warn)
			}
		})
	}
}

// TestWaterViscosityIAPWS checks the IAPWS 2008 formulation against the
// verification values of its release (Huber et al. 2009, J. Phys. Chem. Ref. Data
// 38:101, table 4, µPa·s; from memory, the first two also printed in
// python3-iapws's docstring of _Viscosity). The critical enhancement, left out,
// is 1 at all of these points.
func TestWaterViscosityIAPWS(t *testing.T) {
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
			got := facilities.WaterViscosity(tc.T, tc.rho) * 1e6
			if math.Abs(got-tc.want) > tc.tol {
				t.Errorf("WaterViscosity = %.7f µPa·s, want %.6f", got, tc.want)
			}
		})
	}
}

// waterRow is one line of testdata/reference/water/water.csv.
type waterRow struct{ tC, T, rho, mu float64 }

func readWater(t *testing.T) []waterRow {
	t.Helper()
	f, err := os.Open("../testdata/reference/water/water.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows []waterRow
	sc := bufio.NewScanner(f)
	header := true
	for sc.Scan() {
		line := sc.Text()
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		if header {
			header = false
			continue
		}
		var v [4]float64
		parts := strings.Split(line, ",")
		if len(parts) != 4 {
			t.Fatalf("water.csv: %q: want 4 columns", line)
		}
		for i, p := range parts {
			if v[i], err = strconv.ParseFloat(p, 64); err != nil {
				t.Fatalf("water.csv: %q: %v", line, err)
			}
		}
		rows = append(rows, waterRow{v[0], v[1], v[2], v[3]})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(rows) < 80 {
		t.Fatalf("water.csv has %d rows, want 1–80 °C at least every degree", len(rows))
	}
	return rows
}

// TestWaterAgainstIAPWS95 compares Kell's density and the IAPWS 2008 viscosity at
// Kell's density with IAPWS-95 at 0.101325 MPa, 1–80 °C (python3-iapws fixture,
// testdata/reference/water; physics.md §3 expects density within 1.5e-5).
func TestWaterAgainstIAPWS95(t *testing.T) {
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
			worst, at := 0.0, 0.0
			for _, r := range rows {
				if e := relDev(tc.got(r), tc.want(r)); e > worst {
					worst, at = e, r.tC
				}
			}
			t.Logf("largest relative difference %.2g at %g °C over %d rows", worst, at, len(rows))
			if worst > tc.tol {
				t.Errorf("largest relative difference %.3g at %g °C, want at most %g", worst, at, tc.tol)
			}
		})
	}
}

// TestPengRobinsonCritical: at the critical point the Peng–Robinson cubic has a
// triple root Zc = 0.30740 (Peng & Robinson 1976, a published property of the
// equation).
func TestPengRobinsonCritical(t *testing.T) {
	z := mNitrogen.Compressibility(facilities.NitrogenCriticalTemperature, facilities.NitrogenCriticalPressure)
	if math.Abs(z-0.30740) > 1e-5 {
		t.Errorf("Z at the critical point = %.6f, want 0.30740", z)
	}
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
			z := mNitrogen.Compressibility(tc.T, p)
			if math.Abs(z-1) > 1e-4 {
				t.Fatalf("Z(%g K, %g Pa) = %.8f, want 1 to 1e-4", tc.T, p, z)
			}
			rt := facilities.MolarGasConstant * tc.T
			bPR := (z - 1) * rt / p // m³/mol
			bT := tsonopoulosB(tc.T, facilities.NitrogenCriticalTemperature,
				facilities.NitrogenCriticalPressure, facilities.NitrogenAcentricFactor)
			dz := math.Abs(bPR-bT) * 1e5 / rt
			t.Logf("B: Peng–Robinson %.2f cm³/mol, Tsonopoulos %.2f cm³/mol (%+.1f %%); ΔZ at 100 kPa %.2g",
				bPR*1e6, bT*1e6, 100*(bPR/bT-1), dz)
			if tc.relTol > 0 && math.Abs(bPR/bT-1) > tc.relTol {
				t.Errorf("B: Peng–Robinson %.2f cm³/mol, Tsonopoulos %.2f, want within %g %%", bPR*1e6, bT*1e6, 100*tc.relTol)
			}
			if dz > tc.zTol {
				t.Errorf("ΔZ at 100 kPa = %.3g, want at most %g", dz, tc.zTol)
			}
		})
	}
	if z := mNitrogen.Compressibility(200, 0); z != 1 {
		t.Errorf("Z at zero pressure = %g, want 1", z)
	}
}

// TestNitrogenNIST checks density and viscosity against NIST values (from memory).
func TestNitrogenNIST(t *testing.T) {
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
			if relDev(tc.got, tc.want) > tc.tol {
				t.Errorf("got %.5g, want %.5g within %g", tc.got, tc.want, tc.tol)
			}
		})
	}
}

func TestNitrogenSaturation(t *testing.T) {
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
			p, ok := mNitrogen.SaturationPressure(tc.T)
			if !ok || relDev(p, tc.p) > tc.tol {
				t.Errorf("SaturationPressure(%g K) = %.6g Pa, %v; want %.6g", tc.T, p, ok, tc.p)
			}
			T, ok := mNitrogen.SaturationTemperature(p)
			if tc.T < facilities.NitrogenCriticalTemperature && (!ok || relDev(T, tc.T) > 1e-12) {
				t.Errorf("SaturationTemperature(%.6g Pa) = %.8g K, %v; want %g", p, T, ok, tc.T)
			}
		})
	}
	if _, ok := mNitrogen.SaturationPressure(130); ok {
		t.Error("SaturationPressure above the critical temperature reports a saturation line")
	}
	if T, ok := mNitrogen.SaturationTemperature(4e6); ok || T != facilities.NitrogenCriticalTemperature {
		t.Errorf("SaturationTemperature above the critical pressure = %g, %v; want Tc, false", T, ok)
	}
	for _, m := range []facilities.Medium{mAir, mWater, mArgon} {
		if _, ok := m.SaturationPressure(100); ok {
			t.Errorf("%s reports a saturation line", m.Kind)
		}
	}
}

// TestPengRobinsonRoot checks, over a seeded random sample of temperatures and
// pressures from the triple point to well above the critical point, that the
// returned Z solves the cubic, lies above the co-volume B, and is its largest real
// root (no root of the cubic above it).
func TestPengRobinsonRoot(t *testing.T) {
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
		if math.IsNaN(z) || z <= b || math.Abs(f(z)) > 1e-12*scale {
			t.Fatalf("T %g K, p %g Pa: Z = %g (B = %g), residual %g", T, p, z, b, f(z))
		}
		// The cubic is positive for every z above its largest root.
		for _, d := range []float64{1e-6, 1e-3, 0.1, 1, 10} {
			if zz := z + d*(1+z); f(zz) <= 0 {
				t.Fatalf("T %g K, p %g Pa: Z = %g is not the largest root (f(%g) = %g)", T, p, z, zz, f(zz))
			}
		}
	}
}
