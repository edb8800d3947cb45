package facilities

import "math"

// Natural-water constants: the ranges of the sea-water correlations below.
const (
	// SeaMinTemperature and SeaMaxTemperature bound the full-scale water temperature
	// of a marine condition in K (0–40 °C): the range of the EOS-80 one-atmosphere
	// density (UNESCO 1981; −2 to 40 °C) within which the sea-water viscosity
	// correlation (0–180 °C) and the vapour-pressure line also hold.
	SeaMinTemperature = 273.15
	SeaMaxTemperature = 313.15
	// SeaMaxSalinity is the highest absolute salinity in g/kg a marine condition
	// may give: EOS-80 holds to a practical salinity of 42, about 42.2 g/kg.
	SeaMaxSalinity = 42.0
	// ReferenceSalinityRatio is u_PS = 35.16504/35 (g/kg), the ratio of absolute
	// salinity S_A of standard sea water to its practical salinity S_P
	// (Millero et al. 2008, Deep-Sea Res. I 55:50, the reference-composition
	// salinity scale of TEOS-10).
	ReferenceSalinityRatio = 35.16504 / 35
)

// WaterProperties are the properties of natural water at one atmosphere.
type WaterProperties struct {
	// Density in kg/m³.
	Density float64
	// Viscosity is the dynamic viscosity in Pa·s.
	Viscosity float64
	// VapourPressure is the saturation vapour pressure in Pa.
	VapourPressure float64
}

// NaturalWater returns the density, viscosity and vapour pressure of water at
// temperature T in K and absolute salinity sa in g/kg, at one standard atmosphere.
// Fresh water (sa = 0) is the facilities' own water: Kell's density
// (WaterDensity), IAPWS 2008 viscosity (WaterViscosity) and the IAPWS-IF97
// saturation pressure (WaterVapourPressure). Sea water (sa > 0) takes
// SeawaterDensity, SeawaterViscosity and SeawaterVapourPressure. The caller keeps
// T within SeaMinTemperature–SeaMaxTemperature and sa within 0–SeaMaxSalinity.
// At sa → 0 the two differ by the difference of the fresh-water densities of
// Kell and of EOS-80 (below 2e-5 relative over 0–40 °C).
func NaturalWater(T, sa float64) WaterProperties {
	if sa == 0 {
		rho := WaterDensity(T)
		return WaterProperties{Density: rho, Viscosity: WaterViscosity(T, rho), VapourPressure: WaterVapourPressure(T)}
	}
	return WaterProperties{
		Density:        SeawaterDensity(T, sa),
		Viscosity:      SeawaterViscosity(T, sa),
		VapourPressure: SeawaterVapourPressure(T, sa),
	}
}

// SeawaterDensity returns the density of sea water in kg/m³ at temperature T in K
// (ITS-90), absolute salinity sa in g/kg and one standard atmosphere, by the
// one-atmosphere international equation of state of sea water, EOS-80 (Millero &
// Poisson 1981, Deep-Sea Res. 28A:625; UNESCO 1983, Tech. Pap. Mar. Sci. 44, eq. 13
// and 14), valid −2 to 40 °C and practical salinity 0 to 42:
//
//	ρ = ρ_w + A·S + B·S^1.5 + C·S²
//	ρ_w = 999.842594 + 6.793952e-2·t − 9.095290e-3·t² + 1.001685e-4·t³
//	      − 1.120083e-6·t⁴ + 6.536332e-9·t⁵
//	A = 8.24493e-1 − 4.0899e-3·t + 7.6438e-5·t² − 8.2467e-7·t³ + 5.3875e-9·t⁴
//	B = −5.72466e-3 + 1.0227e-4·t − 1.6546e-6·t², C = 4.8314e-4
//
// with t the IPTS-68 temperature in °C, t68 = 1.00024·t90 (Saunders 1990), and S the
// practical salinity, S = sa/ReferenceSalinityRatio.
func SeawaterDensity(T, sa float64) float64 {
	t := 1.00024 * (T - 273.15)
	s := sa / ReferenceSalinityRatio
	rw := 999.842594 + t*(6.793952e-2+t*(-9.095290e-3+t*(1.001685e-4+t*(-1.120083e-6+t*6.536332e-9))))
	a := 8.24493e-1 + t*(-4.0899e-3+t*(7.6438e-5+t*(-8.2467e-7+t*5.3875e-9)))
	b := -5.72466e-3 + t*(1.0227e-4+t*(-1.6546e-6))
	const c = 4.8314e-4
	return rw + a*s + b*s*math.Sqrt(s) + c*s*s
}

// SeawaterViscosity returns the dynamic viscosity of sea water in Pa·s at
// temperature T in K and absolute salinity sa in g/kg, at one atmosphere, by
// Sharqawy, Lienhard & Zubair (2010, Desalination Water Treat. 16:354, eq. 22, a fit
// to the data of Isdale et al. 1972; ±1.5 %, 0–180 °C, 0–150 g/kg), on the pure-water
// viscosity of IAPWS 2008 (WaterViscosity at Kell's density), as their eq. 22 uses:
//
//	μ_sw = μ_w·(1 + A·S + B·S²), S = sa/1000 in kg/kg, t in °C
//	A = 1.541 + 1.998e-2·t − 9.52e-5·t², B = 7.974 − 7.561e-2·t + 4.724e-4·t²
func SeawaterViscosity(T, sa float64) float64 {
	t := T - 273.15
	s := sa / 1000
	a := 1.541 + t*(1.998e-2+t*(-9.52e-5))
	b := 7.974 + t*(-7.561e-2+t*4.724e-4)
	return WaterViscosity(T, WaterDensity(T)) * (1 + a*s + b*s*s)
}

// IAPWS-IF97 saturation-pressure coefficients n1…n10 (IAPWS 2007, Revised Release
// on the IAPWS Industrial Formulation 1997, table 34).
var if97N = [10]float64{
	0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.12020824702470e5,
	-0.32325550322333e7, 0.14915108613530e2, -0.48232657361591e4, 0.40511340542057e6,
	-0.23855557567849, 0.65017534844798e3,
}

// WaterVapourPressure returns the saturation vapour pressure of pure water in Pa at
// temperature T in K, by the saturation-pressure equation of IAPWS-IF97 (IAPWS 2007,
// eq. 30; 273.15 K to the critical point 647.096 K):
//
//	θ = T + n9/(T − n10), A = θ² + n1·θ + n2, B = n3·θ² + n4·θ + n5,
//	C = n6·θ² + n7·θ + n8, p = [2C/(−B + √(B² − 4AC))]⁴ MPa
func WaterVapourPressure(T float64) float64 {
	_, a, b, c := if97Coefficients(T)
	x := 2 * c / (-b + math.Sqrt(b*b-4*a*c))
	x *= x
	return 1e6 * x * x
}

// if97Coefficients returns θ and the coefficients A, B and C of IAPWS-IF97's
// saturation equation (IAPWS 2007, eqs. 29 and 30) at temperature T in K, as
// WaterVapourPressure defines them.
func if97Coefficients(T float64) (th, a, b, c float64) {
	n := &if97N
	th = T + n[8]/(T-n[9])
	a = th*th + n[0]*th + n[1]
	b = n[2]*th*th + n[3]*th + n[4]
	c = n[5]*th*th + n[6]*th + n[7]
	return th, a, b, c
}

// WaterVapourPressureSlope returns dp/dT in Pa/K of WaterVapourPressure at
// temperature T in K: IAPWS-IF97's saturation equation (IAPWS 2007, eq. 29)
// A·β² + B·β + C = 0 in β = p^¼ (p in MPa), differentiated implicitly, with A, B,
// C and θ as in WaterVapourPressure, β = (−B − √(B² − 4AC))/(2A) its root:
//
//	dβ/dθ = (A′·β² + B′·β + C′)/√(B² − 4AC), A′ = 2θ + n1, B′ = 2n3·θ + n4, C′ = 2n6·θ + n7
//	dθ/dT = 1 − n9/(T − n10)², dp/dT = 4β³·dβ/dθ·dθ/dT MPa/K
//
// It is positive and rises with T over 0–150 °C (the line is convex there;
// TestWaterSlopesMonotone).
func WaterVapourPressureSlope(T float64) float64 {
	n := &if97N
	th, a, b, c := if97Coefficients(T)
	r := math.Sqrt(b*b - 4*a*c)
	beta := 2 * c / (-b + r)
	dBeta := ((2*th+n[0])*beta*beta + (2*n[2]*th+n[3])*beta + 2*n[5]*th + n[6]) / r
	dTh := 1 - n[8]/((T-n[9])*(T-n[9]))
	return 4e6 * beta * beta * beta * dBeta * dTh
}

// SeawaterVapourPressure returns the vapour pressure of sea water in Pa at
// temperature T in K and absolute salinity sa in g/kg: the pure-water line
// (WaterVapourPressure) lowered by the dissolved salts as Sharqawy, Lienhard &
// Zubair (2010, eq. 37 after Robinson 1954; ±0.1 %, 0–100 °C, 0–160 g/kg; from
// memory) give it:
//
//	p_v,sw = p_v,w / (1 + 0.57357·S/(1000 − S)), S in g/kg
//
// 35 g/kg lowers it by 2.0 %.
func SeawaterVapourPressure(T, sa float64) float64 {
	return WaterVapourPressure(T) / (1 + 0.57357*sa/(1000-sa))
}
