package facilities

import (
	"fmt"
	"math"
)

// limitTolerance is the relative slack of the range checks in Violations, so that
// a setting an optimiser places on a limit (to rounding) does not count as breaking
// it: 1e-9 of the limit.
const limitTolerance = 1e-9

// Violations lists every facility limit that state st breaks, in this order: Mach
// range (gas media), speed range, stagnation pressure (or, with StaticPressure, the
// test-section static pressure) and temperature ranges, maximum
// dynamic pressure, maximum Reynolds number per metre, condensation (nitrogen, air,
// a custom gas with a critical point: CondensationMargin below 0), boiling water
// (BoilingMargin below 0) and cavitation (CavitationMargin below 0), the last three
// reported with Value the margin and Limit 0. Value and
// Limit are in the limit's SI unit. Ranges are checked with a relative slack of
// 1e-9. The result is empty (non-nil, so it encodes as []) when st is within every
// limit. Nil optional limits are not checked.
func (f *Facility) Violations(st State) []Violation {
	v := []Violation{}
	if f.Mach != nil && !f.Medium.IsLiquid() {
		v = checkRange(v, st.Mach, *f.Mach, ConstraintMachMin, ConstraintMachMax, "Mach number", "", "%.4g")
	}
	if f.Speed != nil {
		v = checkRange(v, st.Speed, *f.Speed, ConstraintSpeedMin, ConstraintSpeedMax, "speed", " m/s", "%.4g")
	}
	if f.StaticPressure != nil {
		v = checkRange(v, st.Static.Pressure, *f.StaticPressure, ConstraintStaticPressureMin, ConstraintStaticPressureMax, "test-section static pressure", " Pa", "%.6g")
	} else {
		v = checkRange(v, st.StagnationPressure, f.StagnationPressure, ConstraintPressureMin, ConstraintPressureMax, "stagnation pressure", " Pa", "%.6g")
	}
	v = checkRange(v, st.StagnationTemperature, f.StagnationTemperature, ConstraintTempMin, ConstraintTempMax, "stagnation temperature", " K", "%.5g")
	if lim := f.MaxDynamicPressure; lim != nil && above(st.DynamicPressure, *lim) {
		v = append(v, Violation{Constraint: ConstraintDynamic, Value: st.DynamicPressure, Limit: *lim,
			Message: fmt.Sprintf("dynamic pressure %.5g Pa is above the facility's maximum %.5g Pa", st.DynamicPressure, *lim)})
	}
	if lim := f.MaxReynoldsPerMeter; lim != nil && above(st.ReynoldsPerMeter, *lim) {
		v = append(v, Violation{Constraint: ConstraintReynoldsUnit, Value: st.ReynoldsPerMeter, Limit: *lim,
			Message: fmt.Sprintf("Reynolds number per metre %.4g 1/m is above the facility's maximum %.4g 1/m", st.ReynoldsPerMeter, *lim)})
	}
	if margin := f.CondensationMargin(st); margin < 0 {
		v = append(v, Violation{Constraint: ConstraintCondensation, Value: margin, Limit: 0,
			Message: fmt.Sprintf("the flow reaches saturation (%.2g %% below the saturation temperature, free stream or local Mach %g): raise the stagnation temperature",
				-100*margin, f.condensationPeakMach())})
	}
	v = appendRangeViolations(v, f, st)
	return v
}

// checkRange appends the violation of [r.Min, r.Max] by x, if any.
func checkRange(v []Violation, x float64, r Range, minName, maxName, what, unit, verb string) []Violation {
	switch {
	case below(x, r.Min):
		return append(v, Violation{Constraint: minName, Value: x, Limit: r.Min,
			Message: fmt.Sprintf("%s "+verb+"%s is below the facility's minimum "+verb+"%s", what, x, unit, r.Min, unit)})
	case above(x, r.Max):
		return append(v, Violation{Constraint: maxName, Value: x, Limit: r.Max,
			Message: fmt.Sprintf("%s "+verb+"%s is above the facility's maximum "+verb+"%s", what, x, unit, r.Max, unit)})
	}
	return v
}

// below reports whether x is below lim by more than limitTolerance.
func below(x, lim float64) bool { return x < lim-limitTolerance*math.Abs(lim) }

// above reports whether x is above lim by more than limitTolerance.
func above(x, lim float64) bool { return x > lim+limitTolerance*math.Abs(lim) }
