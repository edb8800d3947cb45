package facilities

import (
	"fmt"
	"math"

	"scalematch/atmosphere"
)

// MolarGasConstant is the molar gas constant R* in J/(mol·K) used for nitrogen and
// custom gases: the CODATA 2018 value, exact in the SI since 2019. Air keeps the
// 1976 standard atmosphere's R* = 8.31432 J/(mol·K) (atmosphere.Rstar) so that a
// tunnel's air and the flight's air are the same gas; the two differ by 1.7e-5.
const MolarGasConstant = 8.314462618

// Nitrogen constants (physics.md §3).
const (
	// NitrogenMolarMass is the molar mass of N₂ in kg/mol.
	NitrogenMolarMass = 0.0280134
	// NitrogenGamma is the ideal diatomic ratio of specific heats of nitrogen. The
	// test-section state does not use it (it follows the real-gas isentrope of
	// nitrogen's equation of state); it starts that solution and gives the
	// ideal-gas figures in messages.
	NitrogenGamma = 1.4
	// NitrogenCriticalTemperature is Tc of N₂ in K (Span et al. 2000, J. Phys. Chem.
	// Ref. Data 29:1361; from memory).
	NitrogenCriticalTemperature = 126.192
	// NitrogenCriticalPressure is pc of N₂ in Pa (Span et al. 2000; from memory).
	NitrogenCriticalPressure = 3.3958e6
	// NitrogenAcentricFactor is Pitzer's acentric factor ω of N₂ (Span et al. 2000;
	// from memory).
	NitrogenAcentricFactor = 0.0372
	// NitrogenBoilingTemperature is the normal boiling point of N₂ in K, where the
	// vapour pressure is 101 325 Pa (Span et al. 2000; from memory).
	NitrogenBoilingTemperature = 77.355
	// NitrogenViscosityMin and NitrogenViscosityMax bound, in K, the range of the
	// nitrogen viscosity correlation of Lemmon & Jacobsen (2004): the triple point
	// 63.151 K to 1000 K (the paper's range for nitrogen; from memory). Outside it
	// the value is extrapolated (ViscosityWarning).
	NitrogenViscosityMin = 63.151
	NitrogenViscosityMax = 1000.0
)

// Water constants (physics.md §3).
const (
	// WaterMinTemperature and WaterMaxTemperature bound Kell's density equation,
	// 0–150 °C, in K.
	WaterMinTemperature = 273.15
	WaterMaxTemperature = 423.15
)

// standardPressure is one standard atmosphere in Pa, the pressure of nitrogen's
// normal boiling point.
const standardPressure = 101325.0

// IsLiquid reports whether the medium is a liquid (water): incompressible, Mach is
// not a similarity target, the static pressure is p0 − q.
func (m Medium) IsLiquid() bool { return m.Kind == MediumWater }

// Gamma returns the ratio of specific heats used in the isentropic relations: 1.4
// for air (atmosphere.Gamma) and nitrogen, the given value for a custom gas, 0 for
// water and for an unknown or incomplete medium.
func (m Medium) Gamma() float64 {
	switch m.Kind {
	case MediumAir:
		return atmosphere.Gamma
	case MediumNitrogen:
		return NitrogenGamma
	case MediumGas:
		if m.Gas != nil {
			return m.Gas.Gamma
		}
	}
	return 0
}

// GasConstant returns the specific gas constant R = R*/M in J/(kg·K): 287.053 for air
// (atmosphere.R), 296.80 for nitrogen, MolarGasConstant/MolarMass for a custom gas,
// and 0 for water and for an unknown or incomplete medium.
func (m Medium) GasConstant() float64 {
	switch m.Kind {
	case MediumAir:
		return atmosphere.R
	case MediumNitrogen:
		return MolarGasConstant / NitrogenMolarMass
	case MediumGas:
		if m.Gas != nil && m.Gas.MolarMass > 0 {
			return MolarGasConstant / m.Gas.MolarMass
		}
	}
	return 0
}

// Viscosity returns the dynamic viscosity in Pa·s at temperature T in K and density
// rho in kg/m³: Sutherland's law for air (the 1976 standard's β and S) and a custom
// gas (its own three constants), which ignore rho; Lemmon & Jacobsen (2004) for
// nitrogen (NitrogenViscosity, whose residual term takes rho); and for water
// WaterViscosity at Kell's one-atmosphere density, ignoring rho (liquid water's
// viscosity changes by well under 1 % between 0.1 and 1 MPa). Outside a model's
// validity range the formula is extrapolated: State rejects water outside 0–150 °C
// and ViscosityWarning and the range warnings flag the gases. An unknown or
// incomplete medium gives 0.
func (m Medium) Viscosity(T, rho float64) float64 {
	switch m.Kind {
	case MediumAir:
		return atmosphere.Sutherland(T, atmosphere.SutherlandBeta, atmosphere.SutherlandS)
	case MediumNitrogen:
		return NitrogenViscosity(T, rho)
	case MediumGas:
		if g := m.Gas; g != nil && g.TemperatureReference > 0 {
			return sutherlandRef(T, g.ViscosityReference, g.TemperatureReference, g.SutherlandConstant)
		}
	case MediumWater:
		return WaterViscosity(T, WaterDensity(T))
	}
	return 0
}

// sutherlandRef evaluates Sutherland's law given by a reference viscosity μ_ref at
// T_ref and the constant S, by way of atmosphere.Sutherland:
//
//	μ = μ_ref·(T/T_ref)^1.5·(T_ref+S)/(T+S) = β·T^1.5/(T+S), β = μ_ref·(T_ref+S)/T_ref^1.5
func sutherlandRef(T, muRef, tRef, s float64) float64 {
	beta := muRef * (tRef + s) / (tRef * math.Sqrt(tRef))
	return atmosphere.Sutherland(T, beta, s)
}

// ViscosityWarning returns a warning the API can show when the medium's viscosity
// model is extrapolated at temperature T in K, or "" when it is not: nitrogen
// outside NitrogenViscosityMin to NitrogenViscosityMax (the range of Lemmon &
// Jacobsen 2004). Air and custom gases are flagged by the range warnings.
func (m Medium) ViscosityWarning(T float64) string {
	if m.Kind == MediumNitrogen && (T < NitrogenViscosityMin || T > NitrogenViscosityMax) {
		return fmt.Sprintf("the nitrogen viscosity at %.4g K is extrapolated beyond the range of Lemmon & Jacobsen (2004), %g K to %g K: Reynolds numbers are rough",
			T, NitrogenViscosityMin, NitrogenViscosityMax)
	}
	return ""
}

// Compressibility returns the compressibility factor Z = p/(ρ·R·T) at temperature T
// in K and pressure p in Pa: nitrogen's from the Peng–Robinson equation (see
// PengRobinsonZ), 1 for the ideal gases and for water.
func (m Medium) Compressibility(T, p float64) float64 {
	if m.Kind == MediumNitrogen {
		return PengRobinsonZ(T, p, NitrogenCriticalTemperature, NitrogenCriticalPressure, NitrogenAcentricFactor)
	}
	return 1
}

// Density returns the density in kg/m³ at temperature T in K and pressure p in Pa:
// ρ = p/(Z·R·T) for gases, Kell's equation for water (incompressible here, so p is
// unused). An unknown or incomplete medium, or T ≤ 0, gives 0.
func (m Medium) Density(T, p float64) float64 {
	if m.Kind == MediumWater {
		return WaterDensity(T)
	}
	r := m.GasConstant()
	if r <= 0 || T <= 0 {
		return 0
	}
	return p / (m.Compressibility(T, p) * r * T)
}

// SaturationPressure returns the vapour pressure in Pa at temperature T in K and
// true, for media whose saturation line is in the model: nitrogen, between absolute
// zero and the critical temperature. Other media, T ≤ 0 and T above nitrogen's
// critical temperature give (0, false).
//
// Nitrogen's line is the two-point Clausius–Clapeyron form through the normal
// boiling point (77.355 K, 101 325 Pa) and the critical point (126.192 K,
// 3.3958 MPa), about ±2 % in pressure between them (from memory):
//
//	ln(p/p_b) = B·(1/T_b − 1/T), B = ln(p_c/p_b)/(1/T_b − 1/T_c) ≈ 702 K
func (m Medium) SaturationPressure(T float64) (float64, bool) {
	if m.Kind != MediumNitrogen || !(T > 0) || T > NitrogenCriticalTemperature {
		return 0, false
	}
	return standardPressure * math.Exp(nitrogenClausiusB*(1/NitrogenBoilingTemperature-1/T)), true
}

// SaturationTemperature returns the saturation temperature in K at pressure p in Pa
// and true, the inverse of SaturationPressure. At or above nitrogen's critical
// pressure it returns (NitrogenCriticalTemperature, false): no saturation, but below
// that temperature the fluid is liquid-like. Other media and p ≤ 0 give (0, false).
func (m Medium) SaturationTemperature(p float64) (float64, bool) {
	if m.Kind != MediumNitrogen || !(p > 0) {
		return 0, false
	}
	if p >= NitrogenCriticalPressure {
		return NitrogenCriticalTemperature, false
	}
	return 1 / (1/NitrogenBoilingTemperature - math.Log(p/standardPressure)/nitrogenClausiusB), true
}

// nitrogenClausiusB is the slope B in K of nitrogen's two-point Clausius–Clapeyron
// line, ln p against −1/T: ln(p_c/p_b)/(1/T_b − 1/T_c) with the constants above
// (TestNitrogenSaturation checks both ends of the line).
const nitrogenClausiusB = 701.9739241428215

// Peng–Robinson constants Ω_a and Ω_b: the exact solution of the critical conditions
// (∂p/∂v = ∂²p/∂v² = 0 at Tc, pc), which Peng & Robinson (1976) print rounded as
// 0.45724 and 0.07780. With them the cubic has a triple root Zc = 0.307401 at the
// critical point.
const (
	prOmegaA = 0.45723552892138219
	prOmegaB = 0.077796073903888456
)

// PengRobinsonZ returns the compressibility factor Z = p·v/(R·T) of a gas at
// temperature T in K and pressure p in Pa from the Peng–Robinson equation of state
// (Peng & Robinson 1976, Ind. Eng. Chem. Fundam. 15:59), for a substance of
// critical temperature tc in K, critical pressure pc in Pa and acentric factor omega:
//
//	Z³ − (1−B)·Z² + (A − 3B² − 2B)·Z − (A·B − B² − B³) = 0
//	A = Ω_a·α·p_r/T_r², B = Ω_b·p_r/T_r, T_r = T/tc, p_r = p/pc
//	α = (1 + κ·(1 − √T_r))², κ = 0.37464 + 1.54226·ω − 0.26992·ω²
//
// Where the cubic has three real roots (inside the equation's two-phase dome) the
// largest is returned: the vapour root, the one a gas-phase test medium has, also
// in a supersaturated (metastable) state; elsewhere the single real root. The root
// comes from Newton's method started at the second-virial estimate Z = 1 + B − A,
// kept where it lies past both turning points of the cubic (so it is the largest),
// else from Cardano's formula (trigonometric form for three real roots) polished by
// Newton steps; the two agree within 1e-15 relative (TestPengRobinsonZNewton).
// p ≤ 0 gives 1 (the ideal-gas limit); T ≤ 0 gives 0.
//
// Accuracy: a few per cent in density for nitrogen away from saturation; it is
// worst close to the saturation line and the critical point (several per cent in
// the liquid-like region), which the test-section states of a gas tunnel avoid.
func PengRobinsonZ(T, p, tc, pc, omega float64) float64 {
	if !(T > 0) {
		return 0
	}
	if !(p > 0) {
		return 1
	}
	tr, pr := T/tc, p/pc
	kappa := 0.37464 + omega*(1.54226-0.26992*omega)
	s := 1 + kappa*(1-math.Sqrt(tr))
	a := prOmegaA * s * s * pr / (tr * tr)
	b := prOmegaB * pr / tr
	c2, c1, c0 := -(1 - b), a-b*(3*b+2), -b*(a-b-b*b)
	// Newton's method from the second-virial estimate Z = 1 + B − A (within
	// about 1e-3 in a gas: three or four steps), Cardano's formula where that
	// does not reach the largest root.
	if z, ok := largestCubicRootFrom(c2, c1, c0, 1+b-a); ok {
		return z
	}
	return largestCubicRoot(c2, c1, c0)
}

// largestCubicRootFrom returns the root of z³ + c2·z² + c1·z + c0 that
// Newton's method reaches from z, stopping after a step below 1e-15 relative
// (at most 8 steps), and true when that root is the largest: past the cubic's
// inflection point (z > −c2/3) with a positive slope, so past both its turning
// points. Otherwise ok is false (the caller takes Cardano's formula).
func largestCubicRootFrom(c2, c1, c0, z float64) (float64, bool) {
	for range 8 {
		f := ((z+c2)*z+c1)*z + c0
		d := (3*z+2*c2)*z + c1
		if !(d > 0) {
			return 0, false
		}
		step := f / d
		z -= step
		if math.Abs(step) <= 1e-15*math.Abs(z) {
			return z, 3*z+c2 > 0 && (3*z+2*c2)*z+c1 > 0
		}
	}
	return 0, false
}

// largestCubicRoot returns the largest real root of z³ + c2·z² + c1·z + c0 by
// Cardano's formula, polished by up to three Newton steps.
func largestCubicRoot(c2, c1, c0 float64) float64 {
	// Depressed cubic t³ + p·t + q = 0 with z = t − c2/3.
	shift := c2 / 3
	p := c1 - c2*shift
	q := c0 - shift*(c1-2*shift*shift)
	disc := 0.25*q*q + p*p*p/27
	var t float64
	switch {
	case disc > 0:
		r := math.Sqrt(disc)
		t = math.Cbrt(-0.5*q+r) + math.Cbrt(-0.5*q-r)
	case p < 0:
		// Three real roots: t_k = 2√(−p/3)·cos(φ/3 − 2πk/3); k = 0 is the largest.
		m := math.Sqrt(-p / 3)
		c := -0.5 * q / (m * m * m)
		// Clamped to [−1, 1] by comparisons (math.Min and math.Max are calls
		// on amd64; a NaN stays NaN either way).
		if c > 1 {
			c = 1
		} else if c < -1 {
			c = -1
		}
		t = 2 * m * math.Cos(math.Acos(c)/3)
	default:
		// p = q = 0: a triple root.
		t = math.Cbrt(-q)
	}
	z := t - shift
	for range 3 {
		f := ((z+c2)*z+c1)*z + c0
		d := (3*z+2*c2)*z + c1
		if d <= 0 || f == 0 {
			break
		}
		step := f / d
		z -= step
		if math.Abs(step) <= 1e-15*math.Abs(z) {
			break
		}
	}
	return z
}

// WaterDensity returns the density of liquid water in kg/m³ at temperature T in K
// and one standard atmosphere, by Kell's equation (Kell 1975, J. Chem. Eng. Data
// 20:97), t in °C, valid 0–150 °C (outside it the polynomial is extrapolated):
//
//	ρ = (999.83952 + 16.945176·t − 7.9870401e-3·t² − 46.170461e-6·t³
//	     + 105.56302e-9·t⁴ − 280.54253e-12·t⁵) / (1 + 16.879850e-3·t)
func WaterDensity(T float64) float64 {
	t := T - 273.15
	return kellNumerator(t) / (1 + kellB*t)
}

// kellNumerator is the numerator of Kell's equation (WaterDensity) at t in °C,
// in kg/m³, and kellB its denominator's coefficient in 1/°C.
func kellNumerator(t float64) float64 {
	return 999.83952 + t*(16.945176+t*(-7.9870401e-3+t*(-46.170461e-6+t*(105.56302e-9+t*(-280.54253e-12)))))
}

const kellB = 16.879850e-3

// WaterDensitySlope returns dρ/dT in kg/m³/K of WaterDensity at temperature T
// in K, Kell's equation differentiated: with ρ = N(t)/D(t), D = 1 + 16.879850e-3·t,
//
//	dρ/dT = (N′(t)·D − N(t)·16.879850e-3) / D²
//	N′ = 16.945176 − 2·7.9870401e-3·t − 3·46.170461e-6·t² + 4·105.56302e-9·t³
//	     − 5·280.54253e-12·t⁴
//
// It is positive below water's density maximum near 4 °C and negative above it,
// and falls with T over the whole 0–150 °C (ρ is concave there;
// TestWaterSlopesMonotone).
func WaterDensitySlope(T float64) float64 {
	t := T - 273.15
	dnum := 16.945176 + t*(2*-7.9870401e-3+t*(3*-46.170461e-6+t*(4*105.56302e-9+t*(5*-280.54253e-12))))
	den := 1 + kellB*t
	return (dnum*den - kellNumerator(t)*kellB) / (den * den)
}

// IAPWS 2008 viscosity reference values: T* = 647.096 K, ρ* = 322 kg/m³,
// μ* = 1e-6 Pa·s.
const (
	iapwsTStar   = 647.096
	iapwsRhoStar = 322.0
	iapwsMuStar  = 1e-6
)

// iapwsH holds the coefficients H_ij of the residual term μ̄₁ of the IAPWS 2008
// viscosity formulation (Huber et al. 2009, table 2), row i = 0…5, column j = 0…6.
var iapwsH = [6][7]float64{
	{5.20094e-1, 2.22531e-1, -2.81378e-1, 1.61913e-1, -3.25372e-2, 0, 0},
	{8.50895e-2, 9.99115e-1, -9.06851e-1, 2.57399e-1, 0, 0, 0},
	{-1.08374, 1.88797, -7.72479e-1, 0, 0, 0, 0},
	{-2.89555e-1, 1.26613, -4.89837e-1, 0, 6.98452e-2, 0, -4.35673e-3},
	{0, 0, -2.57040e-1, 0, 0, 8.72102e-3, 0},
	{0, 1.20573e-1, 0, 0, 0, 0, -5.93264e-4},
}

// iapwsMu0Sum is Σ_{i=0..3} H_i·u^i, the denominator of μ̄₀ (WaterViscosity),
// at u = 1/T̄.
func iapwsMu0Sum(u float64) float64 {
	return 1.67752 + u*(2.20462+u*(0.6366564+u*(-0.241605)))
}

// WaterViscosity returns the dynamic viscosity of water in Pa·s at temperature T in
// K and density rho in kg/m³, by the IAPWS 2008 formulation (Huber et al. 2009,
// J. Phys. Chem. Ref. Data 38:101) without its critical enhancement, which matters
// only within a few kelvin of the critical point (647 K):
//
//	μ/μ* = μ̄₀(T̄)·μ̄₁(T̄, ρ̄), T̄ = T/T*, ρ̄ = ρ/ρ*
//	μ̄₀ = 100·√T̄ / Σ_{i=0..3} H_i/T̄^i, H = 1.67752, 2.20462, 0.6366564, −0.241605
//	μ̄₁ = exp(ρ̄·Σ_i Σ_j H_ij·(1/T̄ − 1)^i·(ρ̄ − 1)^j)
//
// Its stated uncertainty for liquid water at atmospheric pressure is about 1 %.
func WaterViscosity(T, rho float64) float64 {
	tb := T / iapwsTStar
	rb := rho / iapwsRhoStar
	inv := 1 / tb
	mu0 := 100 * math.Sqrt(tb) / iapwsMu0Sum(inv)
	x, y := inv-1, rb-1
	var sum, xi float64 = 0, 1
	for i := range iapwsH {
		row := &iapwsH[i]
		inner := 0.0
		for j := len(row) - 1; j >= 0; j-- {
			inner = inner*y + row[j]
		}
		sum += xi * inner
		xi *= x
	}
	return iapwsMuStar * mu0 * math.Exp(rb*sum)
}

// WaterViscositySlope returns dμ/dT in Pa·s/K of WaterViscosity at temperature T
// in K along a liquid line whose density is rho in kg/m³ with slope drho =
// dρ/dT in kg/m³/K there (WaterDensity and WaterDensitySlope): the IAPWS 2008
// formulation differentiated, with u = 1/T̄, x = u − 1, y = ρ̄ − 1, D(u) = Σ H_i·u^i
// and S = Σ_i Σ_j H_ij·x^i·y^j,
//
//	d ln μ/dT = (1/(2T̄) + D′(u)·u²/D(u))/T* + S·ρ′/ρ* + ρ̄·(−S_x·u²/T* + S_y·ρ′/ρ*)
//
// Along Kell's density, −d ln(μ/ρ)/dT, the rise of Re/m with T, is positive and
// falls with T over 0–150 °C (TestWaterSlopesMonotone).
func WaterViscositySlope(T, rho, drho float64) float64 {
	_, dMu := iapwsViscosityAndSlope(T, rho, drho)
	return dMu
}

// iapwsViscosityAndSlope returns the IAPWS 2008 viscosity at T in K and
// density rho in kg/m³ (WaterViscosity's value, to the bit) and its slope in T
// along a density whose own slope is drho (WaterViscositySlope).
func iapwsViscosityAndSlope(T, rho, drho float64) (mu, dMu float64) {
	tb := T / iapwsTStar
	rb := rho / iapwsRhoStar
	u := 1 / tb
	d := iapwsMu0Sum(u)
	dd := 2.20462 + u*(2*0.6366564+u*(3*-0.241605))
	x, y := u-1, rb-1
	sum, sx, sy := iapwsSums(x, y)
	sq, ex := math.Sqrt(tb), math.Exp(rb*sum)
	mu0 := 100 * sq / d
	mu = iapwsMuStar * mu0 * ex
	muS := iapwsMuStar * 100 * sq / d * ex
	dRb := drho / iapwsRhoStar
	dLn := (0.5/tb+dd*u*u/d)/iapwsTStar + sum*dRb + rb*(-sx*u*u/iapwsTStar+sy*dRb)
	return mu, muS * dLn
}

// iapwsSums returns S = Σ_i Σ_j H_ij·x^i·y^j of IAPWS 2008's μ̄₁ and its
// partial derivatives S_x and S_y (WaterViscositySlope,
// WaterPropertiesAndSlopes), at x = 1/T̄ − 1, y = ρ̄ − 1.
func iapwsSums(x, y float64) (sum, sx, sy float64) {
	var xi, xi1 float64 = 1, 0 // xi1 = i·x^(i−1)
	for i := range iapwsH {
		row := &iapwsH[i]
		inner, dinner := 0.0, 0.0
		for j := len(row) - 1; j >= 0; j-- {
			dinner = dinner*y + inner
			inner = inner*y + row[j]
		}
		sum += xi * inner
		sx += xi1 * inner
		sy += xi * dinner
		xi1 = float64(i+1) * xi
		xi *= x
	}
	return sum, sx, sy
}

// WaterPropertiesAndSlopes returns, at temperature T in K, the density ρ in
// kg/m³, the viscosity μ in Pa·s and the vapour pressure p_v in Pa of pure
// water with their slopes in T (per K): the values WaterDensity,
// WaterDensitySlope, WaterViscosity, WaterViscositySlope (along Kell's
// density), WaterVapourPressure and WaterVapourPressureSlope give, to the
// bit, with the terms they share computed once (Kell's numerator and
// denominator, the IAPWS 2008 sums, the square root and the exponential, the
// IF97 coefficients and discriminant). TestWaterPropertiesAndSlopes holds
// them equal.
func WaterPropertiesAndSlopes(T float64) (rho, dRho, mu, dMu, pv, dPv float64) {
	// Kell's equation (WaterDensity, WaterDensitySlope).
	t := T - 273.15
	num, den := kellNumerator(t), 1+kellB*t
	rho = num / den
	dnum := 16.945176 + t*(2*-7.9870401e-3+t*(3*-46.170461e-6+t*(4*105.56302e-9+t*(5*-280.54253e-12))))
	dRho = (dnum*den - num*kellB) / (den * den)
	// IAPWS 2008 (WaterViscosity, WaterViscositySlope).
	mu, dMu = iapwsViscosityAndSlope(T, rho, dRho)
	// IAPWS-IF97 (WaterVapourPressure, WaterVapourPressureSlope).
	n := &if97N
	th, a, b, c := if97Coefficients(T)
	r := math.Sqrt(b*b - 4*a*c)
	beta := 2 * c / (-b + r)
	p := beta * beta
	pv = 1e6 * p * p
	dBeta := ((2*th+n[0])*beta*beta + (2*n[2]*th+n[3])*beta + 2*n[5]*th + n[6]) / r
	dTh := 1 - n[8]/((T-n[9])*(T-n[9]))
	dPv = 4e6 * beta * beta * beta * dBeta * dTh
	return rho, dRho, mu, dMu, pv, dPv
}
