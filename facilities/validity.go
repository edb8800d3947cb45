package facilities

import (
	"fmt"
	"math"
)

// ModelRange is the validity range of one medium model, kept in one place per
// medium (Medium.Range). A state outside it gives a warning (Facility.Warnings) or,
// where the model cannot describe the state at all, a named limit
// (Facility.Violations: condensation, boiling, cavitation).
type ModelRange struct {
	// Medium names the model.
	Medium string
	// ViscosityMin and ViscosityMax bound, in K, the static temperatures over which
	// the viscosity law holds to the accuracy ViscositySource states; outside it
	// the law is extrapolated (a warning: Medium.ViscosityWarning for nitrogen, the
	// range warnings for air and custom gases; water: State refuses temperatures
	// outside 0–150 °C).
	ViscosityMin, ViscosityMax float64
	ViscositySource            string
	// CriticalTemperature in K and CriticalPressure in Pa locate the critical point
	// and AcentricFactor is Pitzer's ω; all 0 when unknown (a custom gas that
	// states none: no condensation or near-critical check). For air the critical
	// point is that of Lemmon et al. (2000).
	CriticalTemperature, CriticalPressure, AcentricFactor float64
	// SaturationSource names the saturation line the condensation, boiling or
	// cavitation rule uses; "" when the model has none.
	SaturationSource string
}

// Air's model constants (physics.md §3).
const (
	// AirViscosityMin and AirViscosityMax bound, in K, the range over which
	// Sutherland's law with the 1976 standard's constants stays within 2 % of the
	// air viscosity correlation of Lemmon & Jacobsen (2004, Int. J. Thermophys.
	// 25:21) at 0.1 MPa: −2.0 % at 110.4 K, −2.0 % at 606 K, under 0.6 % from 170 K
	// to 300 K (measured with python3-iapws 1.5.3, iapws.humidAir.Air; see
	// TestAirSutherlandRange).
	AirViscosityMin = 111.0
	AirViscosityMax = 600.0
	// AirCriticalTemperature (K), AirCriticalPressure (Pa) and AirAcentricFactor:
	// the critical point of air as the pseudo-pure fluid of Lemmon, Jacobsen,
	// Penoncello & Friend (2000, J. Phys. Chem. Ref. Data 29:331), as python3-iapws
	// 1.5.3 carries them (iapws.humidAir.Air: Tc, Pc, f_acent).
	AirCriticalTemperature = 132.6306
	AirCriticalPressure    = 3.786e6
	AirAcentricFactor      = 0.0335
	// airDewTj (K) and airDewPj (Pa) are the reducing point of the dew-line
	// equation of Lemmon et al. (2000): the maxcondentherm.
	airDewTj = 132.6312
	airDewPj = 3.78502e6
)

// airDewN are the coefficients N_k of the dew-line equation of Lemmon et al.
// (2000), ln(p_dew/p_j) = (T_j/T)·Σ N_k·θ^(k/2), θ = 1 − T/T_j, for k = 1, 2, 5, 8
// (the zeros fill k = 3, 4, 6, 7); checked against python3-iapws 1.5.3
// (iapws.humidAir.Air._blend["dew"]) in TestAirDewLine.
var airDewN = [8]float64{-0.1567266, -5.539635, 0, 0, 0.7567212, 0, 0, -3.514322}

// gasViscosityBand is the range, as multiples of a custom gas's reference
// temperature T_ref, over which its Sutherland constants are taken to hold: air's
// measured 2 % band (111–600 K about T_ref = 273.15 K) scaled to the gas. A rule
// of this program, not a published range: the caller's constants hold where they
// were fitted.
var gasViscosityBand = [2]float64{0.4, 2.2}

// Range returns the medium's validity range. A custom gas's viscosity range scales
// air's with its reference temperature (gasViscosityBand) and its critical point
// is the one it states, if any.
func (m Medium) Range() ModelRange {
	switch m.Kind {
	case MediumAir:
		return ModelRange{Medium: MediumAir,
			ViscosityMin: AirViscosityMin, ViscosityMax: AirViscosityMax,
			ViscositySource:     "Sutherland's law with the 1976 standard's constants is within 2 % of Lemmon & Jacobsen (2004) from 111 K to 600 K",
			CriticalTemperature: AirCriticalTemperature, CriticalPressure: AirCriticalPressure, AcentricFactor: AirAcentricFactor,
			SaturationSource: "the dew line of Lemmon et al. (2000)"}
	case MediumNitrogen:
		return ModelRange{Medium: MediumNitrogen,
			ViscosityMin: NitrogenViscosityMin, ViscosityMax: NitrogenViscosityMax,
			ViscositySource:     "Lemmon & Jacobsen (2004), from the triple point to 1000 K",
			CriticalTemperature: NitrogenCriticalTemperature, CriticalPressure: NitrogenCriticalPressure, AcentricFactor: NitrogenAcentricFactor,
			SaturationSource: "nitrogen's saturation line"}
	case MediumWater:
		return ModelRange{Medium: MediumWater,
			ViscosityMin: WaterMinTemperature, ViscosityMax: WaterMaxTemperature,
			ViscositySource:     "IAPWS 2008 at Kell's density, 0 °C to 150 °C",
			CriticalTemperature: 647.096, CriticalPressure: 22.064e6,
			SaturationSource: "the IAPWS-IF97 saturation-pressure equation"}
	}
	r := ModelRange{Medium: MediumGas, ViscosityMax: math.Inf(1)}
	g := m.Gas
	if g == nil {
		return r
	}
	r.ViscosityMin, r.ViscosityMax = gasViscosityBand[0]*g.TemperatureReference, gasViscosityBand[1]*g.TemperatureReference
	r.ViscositySource = fmt.Sprintf("the gas's Sutherland constants are taken to hold from %.3g to %.3g times their reference temperature (air's 2 %% band, scaled)",
		gasViscosityBand[0], gasViscosityBand[1])
	if g.CriticalTemperature != nil && g.CriticalPressure != nil {
		r.CriticalTemperature, r.CriticalPressure = *g.CriticalTemperature, *g.CriticalPressure
		if g.AcentricFactor != nil {
			r.AcentricFactor = *g.AcentricFactor
		}
		r.SaturationSource = "the Lee–Kesler vapour pressure from the gas's critical point"
	}
	return r
}

// AirDewPressure returns the dew-point pressure of dry air in Pa at T in K by the
// dew-line equation of Lemmon et al. (2000), stated from the triple point 59.75 K to
// the maxcondentherm 132.6312 K (extrapolated below), and false for T ≤ 0 or above
// the maxcondentherm.
func AirDewPressure(T float64) (float64, bool) {
	if !(T > 0) || T > airDewTj {
		return 0, false
	}
	rt := math.Sqrt(1 - T/airDewTj)
	sum, x := 0.0, rt
	for _, n := range airDewN {
		sum += n * x
		x *= rt
	}
	return airDewPj * math.Exp(airDewTj/T*sum), true
}

// LeeKeslerVapourPressure returns the vapour pressure in Pa at T in K of a fluid of
// critical temperature tc in K, critical pressure pc in Pa and acentric factor
// omega, by the corresponding-states correlation of Lee & Kesler (1975, AIChE J.
// 21:510), as Poling, Prausnitz & O'Connell (The Properties of Gases and Liquids,
// 5th ed., 2001, eq. 7-4.1) print it (from memory):
//
//	ln p_r = f⁰(T_r) + ω·f¹(T_r)
//	f⁰ = 5.92714 − 6.09648/T_r − 1.28862·ln T_r + 0.169347·T_r⁶
//	f¹ = 15.2518 − 15.6875/T_r − 13.4721·ln T_r + 0.43577·T_r⁶
//
// It suits non-polar fluids (nitrogen, argon: 0.5 % at the normal boiling point;
// water, polar: 10 % low; see TestLeeKesler).
func LeeKeslerVapourPressure(T, tc, pc, omega float64) float64 {
	tr := T / tc
	l := math.Log(tr)
	t6 := tr * tr * tr
	t6 *= t6
	f0 := 5.92714 - 6.09648/tr - 1.28862*l + 0.169347*t6
	f1 := 15.2518 - 15.6875/tr - 13.4721*l + 0.43577*t6
	return pc * math.Exp(f0+omega*f1)
}

// satTemperature inverts a saturation line p(T), increasing on [lo, hi], by
// bisection on ln p: the temperature in K at which it reaches p in Pa. A step
// whose midpoint lies outside the certified bracket of the crossing
// (satBracket) takes the side it is on without evaluating the line, so only
// the last steps evaluate it: the answer is the plain bisection's to the bit
// (TestSatTemperatureBisection) at about a third of the evaluations.
func satTemperature(line func(float64) float64, p, lo, hi float64) float64 {
	lp := math.Log(p)
	a, b := satBracket(line, lp, lo, hi)
	for range 200 {
		mid := 0.5 * (lo + hi)
		var under bool
		switch {
		case mid < a:
			under = true
		case mid > b:
			under = false
		default:
			under = math.Log(line(mid)) < lp
		}
		if under {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return 0.5 * (lo + hi)
}

// satBracket returns a < b around the temperature in [lo, hi] where ln line(T)
// reaches lp such that ln line(T) < lp, as computed, at a and every T below it,
// and not at b and every T above it: the crossing is found by the secant method
// in 1/T (ln p is nearly linear in 1/T along a saturation line), and a and b
// are 1e-11 relative either side of it, checked by evaluating there. ln p
// changes there by several times 1e-11, thousands of times its rounding, so the
// computed line keeps its side beyond them. Where the secant does not settle or
// a check fails, the bracket is (−Inf, +Inf) and every step evaluates.
func satBracket(line func(float64) float64, lp, lo, hi float64) (a, b float64) {
	none := func() (float64, float64) { return math.Inf(-1), math.Inf(1) }
	g := func(t float64) float64 { return math.Log(line(t)) - lp }
	t0, t1 := hi, 0.9*hi
	g0, g1 := g(t0), g(t1)
	settled := false
	for range 40 {
		if !(g1 != g0) || math.IsInf(g0, 0) || math.IsInf(g1, 0) || math.IsNaN(g0) || math.IsNaN(g1) {
			break
		}
		u0, u1 := 1/t0, 1/t1
		u := u1 - g1*(u1-u0)/(g1-g0)
		t := 1 / u
		if !(t > lo && t < hi) {
			t = 0.5 * (t1 + math.Min(math.Max(t, lo), hi))
		}
		t0, g0 = t1, g1
		t1, g1 = t, g(t)
		if math.Abs(t1-t0) <= 1e-14*t1 {
			settled = true
			break
		}
	}
	if !settled {
		return none()
	}
	a, b = t1*(1-1e-11), t1*(1+1e-11)
	if !(g(a) < 0) || g(b) < 0 {
		return none()
	}
	return a, b
}

// dewTemperature returns, for air and for a custom gas that states its critical
// point, the temperature in K at which the gas at pressure p in Pa reaches its
// saturation (dew) line, and true; false for other media and p ≤ 0. At or above the
// line's top pressure it is the top temperature (air's maxcondentherm, a gas's
// critical temperature).
func (m Medium) dewTemperature(p float64) (float64, bool) {
	if !(p > 0) {
		return 0, false
	}
	switch m.Kind {
	case MediumAir:
		if p >= airDewPj {
			return airDewTj, true
		}
		return satTemperature(func(t float64) float64 { v, _ := AirDewPressure(t); return v }, p, 1, airDewTj), true
	case MediumGas:
		r := m.Range()
		if !(r.CriticalTemperature > 0 && r.CriticalPressure > 0) {
			return 0, false
		}
		if p >= r.CriticalPressure {
			return r.CriticalTemperature, true
		}
		return satTemperature(func(t float64) float64 {
			return LeeKeslerVapourPressure(t, r.CriticalTemperature, r.CriticalPressure, r.AcentricFactor)
		}, p, 1e-3*r.CriticalTemperature, r.CriticalTemperature), true
	}
	return 0, false
}

// dewTop returns the highest temperature dewTemperature gives at any pressure
// (air's maxcondentherm, a custom gas's critical temperature) and true; false
// for a medium without a dew line.
func (m Medium) dewTop() (float64, bool) {
	switch m.Kind {
	case MediumAir:
		return airDewTj, true
	case MediumGas:
		if m.hasDewLine(1) {
			return *m.Gas.CriticalTemperature, true
		}
	}
	return 0, false
}

// hasDewLine reports whether dewTemperature(p) gives a temperature (its ok),
// without finding it.
func (m Medium) hasDewLine(p float64) bool {
	if !(p > 0) {
		return false
	}
	switch m.Kind {
	case MediumAir:
		return true
	case MediumGas:
		g := m.Gas
		return g != nil && g.CriticalTemperature != nil && g.CriticalPressure != nil &&
			*g.CriticalTemperature > 0 && *g.CriticalPressure > 0
	}
	return false
}

// idealGasMargin returns T/T_dew(p) − 1 for air or a custom gas with a critical
// point at temperature t in K and pressure p in Pa, +Inf when the medium has no
// saturation line.
func (m Medium) idealGasMargin(t, p float64) float64 {
	td, ok := m.dewTemperature(p)
	if !ok {
		return math.Inf(1)
	}
	return t/td - 1
}

// VirialDeparture estimates Z − 1 of a gas at T in K and p in Pa from its critical
// point (tc in K, pc in Pa) and acentric factor omega by the Pitzer correlation of
// the second virial coefficient (Abbott's form; Smith, Van Ness & Abbott,
// Introduction to Chemical Engineering Thermodynamics, 7th ed., eqs. 3.61–3.66;
// from memory):
//
//	Z − 1 = (B⁰ + ω·B¹)·p_r/T_r, B⁰ = 0.083 − 0.422/T_r^1.6, B¹ = 0.139 − 0.172/T_r^4.2
//
// It is the ideal-gas model's density error to first order: for air it agrees with
// the equation of state of Lemmon et al. (2000) within 10 % of Z − 1 up to 1 MPa
// from 150 K to 300 K (TestVirialDeparture); beyond |Z − 1| of about 0.05 the
// estimate itself no longer holds.
func VirialDeparture(T, p, tc, pc, omega float64) float64 {
	tr, pr := T/tc, p/pc
	b0 := 0.083 - 0.422/math.Pow(tr, 1.6)
	b1 := 0.139 - 0.172/math.Pow(tr, 4.2)
	return (b0 + omega*b1) * pr / tr
}

// IdealGasLimit is the largest |Z − 1| (VirialDeparture) at which an ideal-gas
// medium goes without a warning: 1 % in density, q and Reynolds number.
const IdealGasLimit = 0.01

// BoilingMargin returns, for water, p0/p_v(T0) − 1 with p_v the IAPWS-IF97 vapour
// pressure (WaterVapourPressure) at the stagnation temperature: negative when the
// water boils at the stagnation pressure, a state the liquid model cannot describe.
// Other media give +Inf.
func (f *Facility) BoilingMargin(st State) float64 {
	if !f.Medium.IsLiquid() || !(st.StagnationTemperature > 0) {
		return math.Inf(1)
	}
	return st.StagnationPressure/WaterVapourPressure(st.StagnationTemperature) - 1
}

// CavitationMargin returns, for water, p/p_v(T) − 1 with p the test-section static
// pressure and p_v the IAPWS-IF97 vapour pressure at the water's temperature:
// negative where the free stream cavitates. Other media give +Inf.
func (f *Facility) CavitationMargin(st State) float64 {
	if !f.Medium.IsLiquid() || !(st.Static.Temperature > 0) {
		return math.Inf(1)
	}
	return st.Static.Pressure/WaterVapourPressure(st.Static.Temperature) - 1
}

// rangeWarnings returns the warnings of the medium's ModelRange at state st: a
// viscosity law used outside its range (air, custom gas) and a gas far from the
// ideal gas the model assumes (air, custom gas with a critical point), in the free
// stream or at stagnation, whichever is worse; and a custom gas that states no
// critical point (nothing of this is checked for it).
func (f *Facility) rangeWarnings(st State) []string {
	m := f.Medium
	if m.Kind != MediumAir && m.Kind != MediumGas {
		return nil
	}
	var w []string
	r := m.Range()
	T, p := st.Static.Temperature, st.Static.Pressure
	if T < r.ViscosityMin || T > r.ViscosityMax {
		w = append(w, fmt.Sprintf("the %s viscosity at the free-stream temperature %.4g K is extrapolated (%s): Reynolds numbers are rough",
			r.Medium, T, r.ViscositySource))
	}
	if r.CriticalTemperature > 0 && r.CriticalPressure > 0 {
		z := VirialDeparture(T, p, r.CriticalTemperature, r.CriticalPressure, r.AcentricFactor)
		t0, p0 := st.StagnationTemperature, st.StagnationPressure
		if t0 > 0 && p0 > 0 {
			if z0 := VirialDeparture(t0, p0, r.CriticalTemperature, r.CriticalPressure, r.AcentricFactor); math.Abs(z0) > math.Abs(z) {
				z, T, p = z0, t0, p0
			}
		}
		if math.Abs(z) > IdealGasLimit {
			near := ""
			if T < 1.5*r.CriticalTemperature && p > 0.3*r.CriticalPressure {
				near = fmt.Sprintf(", near its critical point (%.5g K, %.4g MPa)", r.CriticalTemperature, r.CriticalPressure/1e6)
			}
			beyond := ""
			if math.Abs(z) > 0.05 {
				beyond = "; that far off, the estimate itself no longer holds"
			}
			w = append(w, fmt.Sprintf("the %s is not an ideal gas at %.4g K and %.4g MPa%s: a second-virial estimate puts its density %.2g %% from the ideal-gas value the model uses%s; density, q and Reynolds numbers are not reliable",
				r.Medium, T, p/1e6, near, 100*math.Abs(z), beyond))
		}
	}
	if m.Kind == MediumGas && !(r.CriticalTemperature > 0 && r.CriticalPressure > 0) {
		w = append(w, "the custom gas states no critical point (critical_temperature, critical_pressure): condensation and departures from the ideal gas are not checked")
	}
	return w
}

// Bounds of a custom gas's optional critical constants.
var (
	// BoundGasCriticalTemperature bounds critical_temperature, K.
	BoundGasCriticalTemperature = Bound{Min: 0, Max: gasMaxTemperature, MinExclusive: true, Unit: "K"}
	// BoundGasCriticalPressure bounds critical_pressure, Pa.
	BoundGasCriticalPressure = Bound{Min: 0, Max: MaxStagnationPressure, MinExclusive: true, Unit: "Pa"}
	// BoundGasAcentricFactor bounds acentric_factor (Pitzer's ω; quantum gases
	// such as helium are slightly negative, heavy polar fluids near 1).
	BoundGasAcentricFactor = Bound{Min: -0.5, Max: 1.5}
)

// gasCriticalErrors appends the errors of a custom gas's optional critical
// constants to dst: critical_temperature and critical_pressure come together, each
// within its bound, and acentric_factor only with them.
func gasCriticalErrors(g *GasProperties, dst []FieldError) []FieldError {
	if (g.CriticalTemperature == nil) != (g.CriticalPressure == nil) {
		dst = append(dst, FieldError{Field: "medium.gas.critical_pressure", Message: "give critical_temperature and critical_pressure together, or neither"})
	}
	if g.AcentricFactor != nil && g.CriticalTemperature == nil {
		dst = append(dst, FieldError{Field: "medium.gas.acentric_factor", Message: "an acentric factor needs critical_temperature and critical_pressure"})
	}
	for _, c := range []struct {
		field string
		v     *float64
		b     Bound
	}{
		{"critical_temperature", g.CriticalTemperature, BoundGasCriticalTemperature},
		{"critical_pressure", g.CriticalPressure, BoundGasCriticalPressure},
		{"acentric_factor", g.AcentricFactor, BoundGasAcentricFactor},
	} {
		if c.v != nil {
			if msg := c.b.Problem(*c.v); msg != "" {
				dst = append(dst, FieldError{Field: "medium.gas." + c.field, Message: msg})
			}
		}
	}
	return dst
}

// appendRangeViolations appends to v the named limits of the water model: boiling
// at the stagnation pressure (BoilingMargin) and cavitation in the test section
// (CavitationMargin), each with Value the margin and Limit 0.
func appendRangeViolations(v []Violation, f *Facility, st State) []Violation {
	if margin := f.BoilingMargin(st); margin < 0 {
		v = append(v, Violation{Constraint: ConstraintBoiling, Value: margin, Limit: 0,
			Message: fmt.Sprintf("water at %.5g K boils at the stagnation pressure %.6g Pa (vapour pressure %.6g Pa, IAPWS-IF97): the liquid model does not hold; lower the temperature or raise the pressure",
				st.StagnationTemperature, st.StagnationPressure, WaterVapourPressure(st.StagnationTemperature))})
	}
	if margin := f.CavitationMargin(st); margin < 0 {
		v = append(v, Violation{Constraint: ConstraintCavitation, Value: margin, Limit: 0,
			Message: fmt.Sprintf("the test-section static pressure %.4g Pa is below the vapour pressure %.4g Pa at %.5g K (IAPWS-IF97): the free stream cavitates; lower the speed or raise the pressure",
				st.Static.Pressure, WaterVapourPressure(st.Static.Temperature), st.Static.Temperature)})
	}
	return v
}
