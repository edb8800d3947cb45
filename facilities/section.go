package facilities

import (
	"fmt"
	"math"

	"scalematch/atmosphere"
)

// MaxSettingMach is the highest free-stream Mach number a Setting may give, as
// atmosphere.MaxMach.
const MaxSettingMach = atmosphere.MaxMach

// DefaultCondensationPeakMach is the local peak Mach number over the model that the
// condensation check assumes when the facility gives none (common practice).
const DefaultCondensationPeakMach = 1.4

// settingMessage introduces the field errors of a bad Setting.
const settingMessage = "test-section setting is invalid"

// State returns the test-section state at setting s (physics.md §4).
//
// Ideal gases (air, custom gases): the free-stream Mach number is s.Mach or, when
// s.Mach is 0, the one s.Speed gives at the stagnation temperature (closed form
// below). With the isentropic relations of NACA Report 1135 for the medium's γ:
//
//	T = T0/(1 + (γ−1)/2·M²), p = p0/(T0/T)^(γ/(γ−1))
//	ρ = p/(R·T), a = √(γ·R·T), V = M·a, q = ½·ρ·V², Re/m = ρ·V/μ(T)
//
// A speed V becomes M² = V²/(γ·R·T0 − (γ−1)/2·V²).
//
// Nitrogen, a real gas: the static state lies on the isentrope of its equation of
// state through the stagnation state, with h0 = h + V²/2 and V = M·a, a the same
// equation's speed of sound (nitrogenState); ρ is the Peng–Robinson density, Z =
// p/(ρRT), q = ½·ρ·V² and μ the Lemmon & Jacobsen (2004) viscosity.
//
// Water (incompressible): s.Speed is the speed and s.Mach must be 0; T = T0,
// ρ and μ from WaterDensity and WaterViscosity, static p = p0 − q, Mach 0 and
// SpeedOfSound 0 (the model has no compressibility), Z = 1. A facility with a
// StaticPressure range sets its static pressure to s.StaticPressure (held at
// HeldStaticPressure when that is 0) and p0 = p + q; s.StagnationPressure is 0 or
// that p0 (to 1e-9), anything else is refused. Other facilities refuse a
// s.StaticPressure.
//
// Bad settings give a *Error with CodeInvalid naming every bad field ("mach",
// "speed", "stagnation_pressure", "stagnation_temperature", or "medium" when the
// facility's medium is unusable) with the allowed range: pressures and temperatures
// must be positive and finite, Mach from 0 to MaxSettingMach, speed 0 or more (and,
// in a gas, below the limiting expansion speed √(2γRT0/(γ−1))); nitrogen must not
// be below saturation in the free stream; water must be 0–150 °C with p > 0 after
// the dynamic pressure. The facility's own ranges are not checked here: see
// Violations. State does not allocate when it succeeds.
func (f *Facility) State(s Setting) (State, error) {
	return f.state(s, nil)
}

// StateFrom is State for a setting whose stagnation state g (at s's
// stagnation pressure and temperature) was computed before
// (NitrogenStagnation): the same State, to the bit, without computing the
// stagnation state again. g is used only for nitrogen at g's own p0 and T0;
// otherwise (or with g nil) StateFrom is State.
func (f *Facility) StateFrom(g *Stagnation, s Setting) (State, error) {
	if g != nil && (f.Medium.Kind != MediumNitrogen || g.P0 != s.StagnationPressure || g.T0 != s.StagnationTemperature) {
		g = nil
	}
	return f.state(s, g)
}

// StateFromIn is StateFrom into *st (State{} where it fails): a real-gas
// nitrogen state is written there in place, without the copies of the
// 96-byte State on its way back through state and nitrogenState and the
// caller's (a planner keeps its states, some 240 of them a cryogenic plan).
// Other media are StateFrom's, copied into *st.
func (f *Facility) StateFromIn(st *State, g *Stagnation, s Setting) error {
	if f.Medium.Kind != MediumNitrogen {
		var err error
		*st, err = f.StateFrom(g, s)
		return err
	}
	if g != nil && (g.P0 != s.StagnationPressure || g.T0 != s.StagnationTemperature) {
		g = nil
	}
	if !settingOK(s) {
		*st = State{}
		return Invalid(settingMessage, settingErrors(s, nil))
	}
	if err := f.nitrogenStateIn(st, s, g); err != nil {
		*st = State{}
		return err
	}
	return nil
}

// state is State, from the nitrogen stagnation state g when it is not nil.
func (f *Facility) state(s Setting, g *Stagnation) (State, error) {
	if f.Medium.IsLiquid() {
		return f.waterState(s)
	}
	m := f.Medium
	gamma, r := m.Gamma(), m.GasConstant()
	var errs []FieldError
	switch m.Kind {
	case MediumAir, MediumNitrogen:
	case MediumGas:
		errs = gasFieldErrors(m.Gas, errs)
	default:
		errs = append(errs, unknownMediumError(m.Kind))
	}
	if !settingOK(s) {
		errs = settingErrors(s, errs)
	}
	if len(errs) > 0 {
		return State{}, Invalid(settingMessage, errs)
	}

	t0, p0 := s.StagnationTemperature, s.StagnationPressure
	if m.Kind == MediumNitrogen {
		var st State
		if err := f.nitrogenStateIn(&st, s, g); err != nil {
			return State{}, err
		}
		return st, nil
	}
	mach := s.Mach
	if mach == 0 && s.Speed > 0 {
		den := gamma*r*t0 - 0.5*(gamma-1)*s.Speed*s.Speed
		if den > 0 {
			mach = s.Speed / math.Sqrt(den)
		}
		if !(den > 0) || mach > MaxSettingMach {
			return State{}, speedError(s.Speed, gamma, r, t0)
		}
	}

	tr := atmosphere.TemperatureRatio(mach, gamma)
	t := t0 / tr
	p := p0 / atmosphere.PressureRatio(mach, gamma)
	rho := p / (r * t)
	a := math.Sqrt(gamma * r * t)
	v := mach * a
	mu := m.Viscosity(t, rho)
	return gasState(mach, v, p0, t0, Static{Temperature: t, Pressure: p, Density: rho, Viscosity: mu,
		SpeedOfSound: a, Compressibility: 1}), nil
}

// settingOK reports whether settingErrors finds nothing wrong with s: the
// test of every setting, inlined, without the call.
// (Positive and finite is above 0 and at most MaxFloat64, false for a NaN;
// of a Mach number and a speed each 0 or more, one is 0 unless both are
// above 0.)
func settingOK(s Setting) bool {
	return s.StagnationPressure > 0 && s.StagnationPressure <= math.MaxFloat64 &&
		s.StagnationTemperature > 0 && s.StagnationTemperature <= math.MaxFloat64 &&
		s.Mach >= 0 && s.Mach <= MaxSettingMach && s.Speed >= 0 && s.Speed <= math.MaxFloat64 &&
		(s.Mach == 0 || s.Speed == 0)
}

// settingErrors appends the errors of a gas setting's stagnation pressure
// and temperature (checkStagnation), Mach number and speed to errs.
func settingErrors(s Setting, errs []FieldError) []FieldError {
	errs = checkStagnation(s, errs)
	if !(s.Mach >= 0 && s.Mach <= MaxSettingMach) {
		errs = append(errs, FieldError{Field: "mach", Message: fmt.Sprintf("%g is outside 0 to %g", s.Mach, MaxSettingMach)})
	}
	if !(s.Speed >= 0) || math.IsInf(s.Speed, 1) {
		errs = append(errs, FieldError{Field: "speed", Message: fmt.Sprintf("%g m/s: must be 0 m/s or more and finite", s.Speed)})
	}
	if s.Mach > 0 && s.Speed > 0 {
		errs = append(errs, FieldError{Field: "speed", Message: "give mach or speed, not both"})
	}
	return errs
}

// gasState is the test-section state of a gas moving at Mach mach and speed v in
// m/s from stagnation pressure p0 in Pa and temperature t0 in K, with static state
// st: q = ½ρV² and Re/m = ρV/μ.
func gasState(mach, v, p0, t0 float64, st Static) State {
	return State{
		Mach:                  mach,
		Speed:                 v,
		StagnationPressure:    p0,
		StagnationTemperature: t0,
		Static:                st,
		DynamicPressure:       0.5 * st.Density * v * v,
		ReynoldsPerMeter:      st.Density * v / st.Viscosity,
	}
}

// speedError is the error of a speed beyond Mach MaxSettingMach (or the limiting
// expansion speed) at stagnation temperature t0 in K, with the ideal-gas figures of
// γ and R.
func speedError(speed, gamma, r, t0 float64) error {
	vmax := math.Sqrt(2 * gamma * r * t0 / (gamma - 1))
	return Invalid(settingMessage, []FieldError{{Field: "speed", Message: fmt.Sprintf(
		"%g m/s is outside 0 to %.4g m/s, the speed of Mach %g at a stagnation temperature of %g K (limiting expansion speed %.4g m/s)",
		speed, speedAtMach(MaxSettingMach, gamma, r, t0), MaxSettingMach, t0, vmax)}})
}

// nitrogenStateIn is State for nitrogen, a real gas: the static state lies on the
// isentrope of nitrogen's equation of state through (p0, T0) with h0 = h + V²/2, and
// the speed of sound is that equation's own (nitrogenFreeStream); a speed setting
// is solved for directly (h = h0 − V²/2) and gives M = V/a. ρ is the Peng–Robinson
// density, μ the Lemmon & Jacobsen (2004) viscosity at it. It writes the state
// into *st, in place, and leaves *st as it was where it fails.
func (f *Facility) nitrogenStateIn(st *State, s Setting, g *Stagnation) error {
	m := f.Medium
	t0, p0 := s.StagnationTemperature, s.StagnationPressure
	gamma, r := m.Gamma(), m.GasConstant()
	if s.Speed > 0 {
		// The ideal-gas limit as a first screen: beyond it no real-gas state either.
		if den := gamma*r*t0 - 0.5*(gamma-1)*s.Speed*s.Speed; !(den > 0) || s.Speed/math.Sqrt(den) > 1.05*MaxSettingMach {
			return speedError(s.Speed, gamma, r, t0)
		}
	}
	var fs nitrogenStatic
	var err error
	if g != nil {
		fs, err = nitrogenFreeStreamFrom(g, s.Mach, s.Speed)
	} else {
		fs, err = nitrogenFreeStream(t0, p0, s.Mach, s.Speed)
	}
	if err != nil {
		return err
	}
	if fs.mach > MaxSettingMach {
		return speedError(s.Speed, gamma, r, t0)
	}
	t, p, rho := fs.T, fs.p, fs.rho
	if margin := nitrogenMargin(m, t, p); margin < 0 {
		return Invalid(settingMessage, []FieldError{{Field: "stagnation_temperature", Message: fmt.Sprintf(
			"%g K gives a free stream of %.4g K at %.4g Pa, below nitrogen's saturation temperature %.4g K there: raise the stagnation temperature or lower the Mach number or pressure",
			t0, t, p, t/(1+margin))}})
	}
	mu := NitrogenViscosity(t, rho)
	v := fs.speed
	*st = gasState(fs.mach, v, p0, t0, Static{Temperature: t, Pressure: p, Density: rho, Viscosity: mu,
		SpeedOfSound: fs.a, Compressibility: p / (rho * r * t)})
	return nil
}

// speedAtMach returns the free-stream speed in m/s of an ideal gas at Mach number
// mach and stagnation temperature t0 in K: M·√(γ·R·T0/(1 + (γ−1)/2·M²)).
func speedAtMach(mach, gamma, r, t0 float64) float64 {
	return mach * math.Sqrt(gamma*r*t0/atmosphere.TemperatureRatio(mach, gamma))
}

// checkStagnation appends the errors of a setting's stagnation pressure and
// temperature, which must be positive and finite, to errs.
func checkStagnation(s Setting, errs []FieldError) []FieldError {
	if !(s.StagnationPressure > 0) || math.IsInf(s.StagnationPressure, 1) {
		errs = append(errs, FieldError{Field: "stagnation_pressure", Message: fmt.Sprintf("%g Pa: must be above 0 Pa and finite", s.StagnationPressure)})
	}
	if !(s.StagnationTemperature > 0) || math.IsInf(s.StagnationTemperature, 1) {
		errs = append(errs, FieldError{Field: "stagnation_temperature", Message: fmt.Sprintf("%g K: must be above 0 K and finite", s.StagnationTemperature)})
	}
	return errs
}

// waterState is State for water.
func (f *Facility) waterState(s Setting) (State, error) {
	var errs []FieldError
	held := f.StaticPressure != nil
	ps := f.HeldStaticPressure()
	if held {
		// The facility sets its static pressure: s.StaticPressure, or held at
		// HeldStaticPressure (the stagnation pressure, if given, is checked against
		// p + q below).
		if s.StaticPressure != 0 {
			ps = s.StaticPressure
		}
		errs = checkStagnation(Setting{StagnationPressure: ps, StagnationTemperature: s.StagnationTemperature}, errs)
		if len(errs) > 0 && s.StaticPressure != 0 && errs[len(errs)-1].Field == "stagnation_pressure" {
			errs[len(errs)-1].Field = "static_pressure"
		}
	} else {
		errs = checkStagnation(s, errs)
		if s.StaticPressure != 0 {
			errs = append(errs, FieldError{Field: "static_pressure", Message: fmt.Sprintf(
				"%g Pa: facility %s does not set its test-section static pressure independently of speed: give the stagnation pressure", s.StaticPressure, f.ID)})
		}
	}
	if s.Mach != 0 {
		errs = append(errs, FieldError{Field: "mach", Message: "water facilities take a speed: Mach is not a setting in water"})
	}
	if !(s.Speed >= 0) || math.IsInf(s.Speed, 1) {
		errs = append(errs, FieldError{Field: "speed", Message: fmt.Sprintf("%g m/s: must be 0 m/s or more and finite", s.Speed)})
	}
	if t0 := s.StagnationTemperature; t0 > 0 && !(t0 >= WaterMinTemperature && t0 <= WaterMaxTemperature) {
		errs = append(errs, FieldError{Field: "stagnation_temperature", Message: fmt.Sprintf(
			"%g K is outside %g to %g K (0 to 150 °C), the range of the water model", t0, WaterMinTemperature, WaterMaxTemperature)})
	}
	if len(errs) > 0 {
		return State{}, Invalid(settingMessage, errs)
	}
	t, v := s.StagnationTemperature, s.Speed
	rho := WaterDensity(t)
	mu := WaterViscosity(t, rho)
	q := 0.5 * rho * v * v
	p0 := s.StagnationPressure
	if held {
		p0 = ps + q
		if given := s.StagnationPressure; given != 0 && !(math.Abs(given-p0) <= 1e-9*p0) {
			return State{}, Invalid(settingMessage, []FieldError{{Field: "stagnation_pressure", Message: fmt.Sprintf(
				"%g Pa: facility %s sets its test-section static pressure (here %g Pa) and the stagnation pressure follows, p0 = p + q = %.10g Pa at %g m/s: leave it out",
				given, f.ID, ps, p0, v)}})
		}
	}
	st, ok := LiquidState(v, p0, t, rho, mu)
	if !ok {
		return State{}, Invalid(settingMessage, []FieldError{{Field: "speed", Message: fmt.Sprintf(
			"%g m/s gives a dynamic pressure of %.4g Pa, more than the stagnation pressure %g Pa: the static pressure would not be positive",
			v, q, s.StagnationPressure)}})
	}
	return st, nil
}

// LiquidState is the test-section state of water moving at speed v (m/s) with
// stagnation pressure p0 (Pa) and temperature t (K), of density rho (kg/m³) and
// viscosity mu (Pa·s): q = ½ρv², p = p0 − q, Re/m = ρv/μ, incompressible. It
// is false where the static pressure would not be positive.
func LiquidState(v, p0, t, rho, mu float64) (State, bool) {
	var st State
	ok := LiquidStateIn(&st, v, p0, t, rho, mu)
	return st, ok
}

// LiquidStateIn is LiquidState into *st, which it sets to the zero State where
// it reports false: a caller that keeps the state in a larger value writes it
// there without the State's copy on the way back.
func LiquidStateIn(st *State, v, p0, t, rho, mu float64) bool {
	q := 0.5 * rho * v * v
	p := p0 - q
	if !(p > 0) {
		*st = State{}
		return false
	}
	*st = State{}
	st.Speed, st.StagnationPressure, st.StagnationTemperature = v, p0, t
	st.Static.Temperature, st.Static.Pressure, st.Static.Density, st.Static.Viscosity, st.Static.Compressibility = t, p, rho, mu, 1
	st.DynamicPressure, st.ReynoldsPerMeter = q, rho*v/mu
	return true
}

// condensationPeakMach returns the facility's local peak Mach number for the
// condensation check, DefaultCondensationPeakMach when it gives none.
// CondensationPeak returns the local peak Mach number over the model that
// the condensation check assumes: CondensationPeakMach, or
// DefaultCondensationPeakMach when nil.
func (f *Facility) CondensationPeak() float64 { return f.condensationPeakMach() }

func (f *Facility) condensationPeakMach() float64 {
	if f.CondensationPeakMach != nil {
		return *f.CondensationPeakMach
	}
	return DefaultCondensationPeakMach
}

// CondensationMargin returns how far the flow at state st stays from condensing,
// T_local/T_sat(p_local) − 1, at the worse of two places: the free stream
// (st.Static), and a local isentropic expansion over the model from the same
// stagnation state (st.StagnationPressure, st.StagnationTemperature) to the
// facility's CondensationPeakMach (DefaultCondensationPeakMach when nil). The rule
// (common practice): the flow must not reach saturation, so a negative margin means
// it condenses and 0 sits on the line. At pressures at or above the critical
// pressure, T_sat is taken as the critical temperature.
//
// The saturation line is nitrogen's, air's dew line (Lemmon et al. 2000,
// AirDewPressure) or, for a custom gas that states its critical point, the
// Lee–Kesler vapour pressure (LeeKeslerVapourPressure); for air and custom gases
// the local expansion follows their ideal-gas isentrope, for nitrogen the real-gas
// isentrope of its equation of state (as its free stream does). Media without a
// saturation line in the model (water, a custom gas without a critical point) give
// +Inf, as does a state with no positive stagnation pressure and temperature.
// CondensationMargin does not allocate.
func (f *Facility) CondensationMargin(st State) float64 {
	if !(st.StagnationTemperature > 0 && st.StagnationPressure > 0) {
		return math.Inf(1)
	}
	margin := f.condensationMarginFunc(st.StagnationPressure)
	if margin == nil {
		return math.Inf(1)
	}
	return math.Min(margin(f.Medium, st.Static.Temperature, st.Static.Pressure),
		f.localMargin(margin, st.StagnationPressure, st.StagnationTemperature))
}

// CondensationNear returns CondensationMargin(st) and true when the margin lies
// within tol of 0 (the state sits on the saturation line), else false. For air
// and a custom gas it answers false without solving the saturation line when the
// free stream and the local expansion are both warmer than (1 + tol) times the
// line's top temperature (air's maxcondentherm, a gas's critical temperature),
// which bounds T_sat at every pressure: the margin is then above tol.
func (f *Facility) CondensationNear(st State, tol float64) (float64, bool) {
	if top, ok := f.Medium.dewTop(); ok && st.StagnationTemperature > 0 && st.StagnationPressure > 0 {
		local := st.StagnationTemperature / atmosphere.TemperatureRatio(f.condensationPeakMach(), f.Medium.Gamma())
		if st.Static.Temperature/top-1 > tol && local/top-1 > tol {
			return 0, false
		}
	}
	m := f.CondensationMargin(st)
	return m, !math.IsInf(m, 1) && math.Abs(m) <= tol
}

// condensationMarginFunc returns the margin T/T_sat(p) − 1 of the facility's
// medium at T in K and p in Pa, or nil when the medium has no saturation line in
// the model (water, a custom gas without a critical point) or none at p0.
func (f *Facility) condensationMarginFunc(p0 float64) func(Medium, float64, float64) float64 {
	m := f.Medium
	switch m.Kind {
	case MediumNitrogen:
		return nitrogenMargin
	case MediumAir, MediumGas:
		if m.hasDewLine(p0) {
			return Medium.idealGasMargin
		}
	}
	return nil
}

// FreeStreamCondensationMargin is the free-stream part of CondensationMargin:
// T/T_sat(p) − 1 at st.Static, +Inf where CondensationMargin is.
func (f *Facility) FreeStreamCondensationMargin(st State) float64 {
	if !(st.StagnationTemperature > 0 && st.StagnationPressure > 0) {
		return math.Inf(1)
	}
	margin := f.condensationMarginFunc(st.StagnationPressure)
	if margin == nil {
		return math.Inf(1)
	}
	return margin(f.Medium, st.Static.Temperature, st.Static.Pressure)
}

// LocalCondensationMargin is the local part of CondensationMargin: the margin
// after an isentropic expansion from stagnation pressure p0 in Pa and
// temperature t0 in K to the facility's condensation peak Mach number. It does
// not depend on the test Mach number. For nitrogen an expansion that leaves the
// gas phase of its equation of state counts as −1; +Inf where
// CondensationMargin is.
func (f *Facility) LocalCondensationMargin(p0, t0 float64) float64 {
	if !(t0 > 0 && p0 > 0) {
		return math.Inf(1)
	}
	margin := f.condensationMarginFunc(p0)
	if margin == nil {
		return math.Inf(1)
	}
	return f.localMargin(margin, p0, t0)
}

// LocalCondensationMarginFrom is LocalCondensationMargin at the stagnation
// state g computed before (NitrogenStagnation): the same margin, to the bit.
// For another medium it is LocalCondensationMargin at g's P0 and T0.
func (f *Facility) LocalCondensationMarginFrom(g *Stagnation) float64 {
	if f.Medium.Kind != MediumNitrogen || !(g.T0 > 0 && g.P0 > 0) {
		return f.LocalCondensationMargin(g.P0, g.T0)
	}
	loc, err := nitrogenFreeStreamFrom(g, f.condensationPeakMach(), 0)
	if err != nil {
		return -1
	}
	return nitrogenMargin(f.Medium, loc.T, loc.p)
}

// LocalCondensationMarginSlope returns LocalCondensationMargin at (p0, t0) and
// its derivative in t0 at fixed p0 in 1/K, for Newton steps along the
// condensation line. For nitrogen the derivative follows the real-gas isentrope
// by implicit differentiation (nitrogenExpandSlope); where it is not known
// (other media, an expansion out of the gas phase) it is NaN. The margin is
// LocalCondensationMargin's to the last bit.
func (f *Facility) LocalCondensationMarginSlope(p0, t0 float64) (m, dm float64) {
	if f.Medium.Kind != MediumNitrogen || !(t0 > 0 && p0 > 0) {
		return f.LocalCondensationMargin(p0, t0), math.NaN()
	}
	t, p, dt, dp, ok := nitrogenExpandSlope(t0, p0, f.condensationPeakMach())
	if !ok {
		return -1, math.NaN()
	}
	if !(p > 0) {
		return math.Inf(1), math.NaN()
	}
	// m = T/T_sat(p) − 1 with dT_sat/dp = T_sat²/(B·p) below the critical
	// pressure (SaturationTemperature), 0 above it.
	tsat, below := f.Medium.SaturationTemperature(p)
	dm = dt / tsat
	if below {
		dm -= t * dp / (nitrogenClausiusB * p)
	}
	return nitrogenMargin(f.Medium, t, p), dm
}

// localMargin is LocalCondensationMargin with the medium's margin function.
func (f *Facility) localMargin(margin func(Medium, float64, float64) float64, p0, t0 float64) float64 {
	m := f.Medium
	peak := f.condensationPeakMach()
	if m.Kind == MediumNitrogen {
		// The local expansion follows nitrogen's real-gas isentrope, as the free
		// stream does; one that leaves the gas phase has condensed.
		loc, err := nitrogenFreeStream(t0, p0, peak, 0)
		if err != nil {
			return -1
		}
		return margin(m, loc.T, loc.p)
	}
	gamma := m.Gamma()
	return margin(m, t0/atmosphere.TemperatureRatio(peak, gamma), p0/atmosphere.PressureRatio(peak, gamma))
}

// nitrogenMargin returns T/T_sat(p) − 1 for nitrogen at temperature T in K and
// pressure p in Pa; +Inf when p ≤ 0, and T/Tc − 1 at or above the critical pressure.
func nitrogenMargin(m Medium, t, p float64) float64 {
	if !(p > 0) {
		return math.Inf(1)
	}
	tsat, _ := m.SaturationTemperature(p)
	return t/tsat - 1
}

// Warnings returns the model warnings that apply to state st, for the API to show:
// an extrapolated viscosity (nitrogen below 100 K), the medium's validity range
// (rangeWarnings: air's and a custom gas's viscosity law, a gas far from ideal or
// near its critical point), and a nitrogen state within 5 %
// of saturation, where the Peng–Robinson density and the two-point saturation line
// are least accurate. Empty (nil) when none apply.
func (f *Facility) Warnings(st State) []string {
	var w []string
	if msg := f.Medium.ViscosityWarning(st.Static.Temperature); msg != "" {
		w = append(w, msg)
	}
	w = append(w, f.rangeWarnings(st)...)
	if f.Medium.Kind != MediumNitrogen {
		// Only nitrogen's margin is flagged: air's dew line costs a root.
		return w
	}
	if margin := f.CondensationMargin(st); margin >= 0 && margin < nearSaturation {
		w = append(w, fmt.Sprintf(
			"the flow comes within %.1f %% of nitrogen's saturation temperature (free stream or local Mach %g): density and the saturation line are least accurate there (about ±2 %%)",
			100*margin, f.condensationPeakMach()))
	}
	return w
}

// nearSaturation is the condensation margin below which Warnings flags a state.
const nearSaturation = 0.05
