package atmosphere

import "math"

// The relations below are those of NACA Report 1135, "Equations, tables, and charts
// for compressible flow" (Ames Research Staff, 1953), for a perfect gas of ratio of
// specific heats gamma. They take mach ≥ 0 and gamma > 1; facilities pass γ of
// their test gas, the atmosphere uses Gamma.

// TemperatureRatio returns the stagnation-to-static temperature ratio T0/T at Mach
// number mach (NACA Report 1135, eq. 43):
//
//	T0/T = 1 + (γ−1)/2·M²
//
// Zero mach gives 1.
func TemperatureRatio(mach, gamma float64) float64 {
	return 1 + 0.5*(gamma-1)*mach*mach
}

// PressureRatio returns the isentropic stagnation-to-static pressure ratio p0/p at
// Mach number mach (NACA Report 1135, eq. 44):
//
//	p0/p = (1 + (γ−1)/2·M²)^(γ/(γ−1))
//
// Zero mach gives 1.
func PressureRatio(mach, gamma float64) float64 {
	return isentropicPow(TemperatureRatio(mach, gamma), gamma/(gamma-1))
}

// DensityRatio returns the isentropic stagnation-to-static density ratio ρ0/ρ at
// Mach number mach (NACA Report 1135, eq. 45):
//
//	ρ0/ρ = (1 + (γ−1)/2·M²)^(1/(γ−1))
//
// Zero mach gives 1.
func DensityRatio(mach, gamma float64) float64 {
	return isentropicPow(TemperatureRatio(mach, gamma), 1/(gamma-1))
}

// isentropicPow returns x^e for an isentropic exponent e = γ/(γ−1) or 1/(γ−1)
// computed in floating point. The ratios of the common gases are simple fractions
// that make e a multiple of ½ (γ = 7/5: 3.5 and 2.5; γ = 5/3: 2.5 and 1.5;
// γ = 4/3: 4 and 3), but the division rounds (1.4/(1.4 − 1) is
// 3.5000000000000004), and math.Pow computes any fractional exponent, 3.5 too,
// by a logarithm and an exponential. An e within 1e-14 relative of a multiple of
// ½ up to 16 is taken as that multiple, and x^e is then a square root and
// repeated squaring. The answer differs from math.Pow(x, e) by rounding: e's
// rounding times ln x and the products', under 2e-15 relative up to MaxMach
// (TestIsentropicPowHalfInteger).
func isentropicPow(x, e float64) float64 {
	k := math.Round(2 * e)
	if k < 0 || k > 32 || math.Abs(2*e-k) > 1e-14*k || !(x > 0) || math.IsInf(x, 1) {
		return math.Pow(x, e)
	}
	r := 1.0
	if int(k)&1 == 1 {
		r = math.Sqrt(x)
	}
	for n, b := int(k)>>1, x; n > 0; n >>= 1 {
		if n&1 == 1 {
			r *= b
		}
		b *= b
	}
	return r
}

// PitotPressureRatio returns (p + qc)/p, the pressure a pitot probe reads over the
// static pressure, at Mach number mach. For mach ≤ 1 it is the isentropic p0/p; above
// it the probe sits behind a normal shock and the Rayleigh pitot formula applies
// (NACA Report 1135, eq. 100; equation number from memory):
//
//	(p + qc)/p = ((γ+1)/2·M²)^(γ/(γ−1)) · ((γ+1)/(2γM² − (γ−1)))^(1/(γ−1))
//
// The two branches meet at M = 1. Zero mach gives 1.
func PitotPressureRatio(mach, gamma float64) float64 {
	return 1 + impactRatio(mach, gamma)
}

// impactRatio returns qc/p = PitotPressureRatio − 1 without the rounding loss of the
// subtraction at low Mach numbers.
func impactRatio(mach, gamma float64) float64 {
	return math.Expm1(logPitot(mach, gamma))
}

// logPitot returns ln((p + qc)/p) at Mach number mach.
func logPitot(mach, gamma float64) float64 {
	m2 := mach * mach
	if mach <= 1 {
		return gamma / (gamma - 1) * math.Log1p(0.5*(gamma-1)*m2)
	}
	return (gamma*math.Log(0.5*(gamma+1)*m2) + math.Log((gamma+1)/(2*gamma*m2-(gamma-1)))) / (gamma - 1)
}

// machFromImpact returns the Mach number at which qc/p equals x ≥ 0, the inverse of
// impactRatio: in closed form below Mach 1, by safeguarded Newton iteration on
// ln((p+qc)/p) above it; the result is good to about 1e-14 relative.
func machFromImpact(x, gamma float64) float64 {
	lf := math.Log1p(x)
	if lf <= logPitot(1, gamma) {
		// Inverse of the isentropic branch: M² = 2/(γ−1)·((1+x)^((γ−1)/γ) − 1).
		return math.Sqrt(2 / (gamma - 1) * math.Expm1((gamma-1)/gamma*lf))
	}
	// Above Mach 1, ln((p+qc)/p) rises monotonically with slope
	//	d/dM = 2γ(2M² − 1)/(M·(2γM² − γ + 1)),
	// and for large M the ratio grows as M². Bracket the root, then iterate.
	lo, hi := 1.0, 2.0
	for logPitot(hi, gamma) < lf {
		lo, hi = hi, 2*hi
	}
	// Large-M asymptote: (p+qc)/p → C·M², C = ((γ+1)/2)^(γ/(γ−1))·((γ+1)/(2γ))^(1/(γ−1)).
	lc := (gamma*math.Log(0.5*(gamma+1)) + math.Log((gamma+1)/(2*gamma))) / (gamma - 1)
	m := math.Exp(0.5 * (lf - lc))
	if m <= lo || m >= hi {
		m = 0.5 * (lo + hi)
	}
	for range 100 {
		g := logPitot(m, gamma) - lf
		if g > 0 {
			hi = m
		} else {
			lo = m
		}
		m2 := m * m
		slope := 2 * gamma * (2*m2 - 1) / (m * (2*gamma*m2 - gamma + 1))
		next := m - g/slope
		// Newton converges quadratically: once a step is below 1e-13, what error
		// remains comes from rounding in the logarithms.
		if math.Abs(next-m) <= 1e-13*m {
			return next
		}
		if next <= lo || next >= hi {
			next = 0.5 * (lo + hi)
		}
		m = next
	}
	return m
}
