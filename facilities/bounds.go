package facilities

import "math"

// Bound is the documented physical range of an input number, in the SI unit Unit:
// Min ≤ v ≤ Max, with Min excluded when MinExclusive and Max when MaxExclusive.
// Every number a request or a catalog record carries has one: the validation
// checks it with the field's JSON path, and the OpenAPI document publishes it
// (docs/openapi3 reads Bounds). A value inside its bound keeps every computed
// figure finite; the bounds are wide enough for any real model, tunnel or flight
// and exist to refuse what is not physical (a 1e-310 m² wing, a 1e308 Pa tunnel).
type Bound struct {
	Min, Max                   float64
	MinExclusive, MaxExclusive bool
	// Unit names the SI unit of Min and Max ("" for a dimensionless number).
	Unit string
}

// Contains reports whether v is a finite number inside b.
func (b Bound) Contains(v float64) bool {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return false
	}
	lo := v > b.Min || !b.MinExclusive && v == b.Min
	hi := v < b.Max || !b.MaxExclusive && v == b.Max
	return lo && hi
}

// String says the range in words: "from 0.01 m to 100 m", "above 0 and at most 1".
func (b Bound) String() string {
	lo, hi := "from "+withUnit(b.Min, b.Unit), " to "+withUnit(b.Max, b.Unit)
	if b.MinExclusive {
		lo = "above " + withUnit(b.Min, b.Unit)
		hi = " and at most " + withUnit(b.Max, b.Unit)
	}
	if b.MaxExclusive {
		hi = " and below " + withUnit(b.Max, b.Unit)
	}
	return lo + hi
}

// Problem returns the message for v outside b ("1e-310 m²: must be from 1e-06 m²
// to 100000 m²"), or "" when b contains v.
func (b Bound) Problem(v float64) string {
	if b.Contains(v) {
		return ""
	}
	return withUnit(v, b.Unit) + ": must be " + b.String()
}

// Check appends a FieldError for field when b does not contain v.
func (b Bound) Check(e *[]FieldError, field string, v float64) {
	if msg := b.Problem(v); msg != "" {
		*e = append(*e, FieldError{Field: field, Message: msg})
	}
}

// Documented ranges of the facility record (SI units).
var (
	// BoundSectionSize bounds a test section's width, height and length, m.
	BoundSectionSize = Bound{Min: MinSectionSize, Max: MaxSectionSize, Unit: "m"}
	// BoundSectionArea bounds a test section's stated cross-section area, m².
	BoundSectionArea = Bound{Min: MinSectionSize * MinSectionSize, Max: MaxSectionSize * MaxSectionSize, Unit: "m²"}
	// BoundMach bounds the ends of a facility's Mach range.
	BoundMach = Bound{Min: 0, Max: MaxSettingMach}
	// BoundSpeed bounds the ends of a facility's speed range, m/s.
	BoundSpeed = Bound{Min: 0, Max: MaxSpeed, Unit: "m/s"}
	// BoundStagnationPressure bounds a stagnation pressure, Pa.
	BoundStagnationPressure = Bound{Min: MinStagnationPressure, Max: MaxStagnationPressure, Unit: "Pa"}
	// BoundStagnationTemperature bounds a gas's stagnation temperature, K (water
	// and nitrogen have narrower ranges; see Validate).
	BoundStagnationTemperature = Bound{Min: MinStagnationTemperature, Max: MaxStagnationTemperature, Unit: "K"}
	// BoundDynamicPressure bounds max_dynamic_pressure, Pa.
	BoundDynamicPressure = Bound{Min: 1, Max: 1e9, Unit: "Pa"}
	// BoundReynoldsPerMeter bounds max_reynolds_per_meter, 1/m.
	BoundReynoldsPerMeter = Bound{Min: 1, Max: 1e10, Unit: "1/m"}
	// BoundSpanFraction bounds max_span_fraction (fraction of the section width).
	BoundSpanFraction = Bound{Min: 0.01, Max: 1}
	// BoundBlockage bounds max_blockage (fraction of the section area).
	BoundBlockage = Bound{Min: 1e-4, Max: 1, MaxExclusive: true}
	// BoundLiftInterference bounds lift_interference_factor.
	BoundLiftInterference = Bound{Min: -1, Max: 1}
	// BoundStreamlineCurvature bounds streamline_curvature_factor (τ2).
	BoundStreamlineCurvature = Bound{Min: 0, Max: 1}
	// BoundCondensationPeakMach bounds condensation_peak_mach.
	BoundCondensationPeakMach = Bound{Min: 0.1, Max: MaxSettingMach}
	// BoundForce bounds a balance's rated force, N.
	BoundForce = Bound{Min: 1e-3, Max: 1e9, Unit: "N"}
	// BoundMoment bounds a balance's rated moment, N·m.
	BoundMoment = Bound{Min: 1e-3, Max: 1e9, Unit: "N·m"}
	// BoundSafetyFactor bounds a balance's safety factor.
	BoundSafetyFactor = Bound{Min: 1, Max: 100}
	// BoundAccuracyFraction bounds a balance's accuracy.fraction_of_rating (2σ,
	// a fraction of the rating: 0.0005 is 0.05 %).
	BoundAccuracyFraction = Bound{Min: 1e-6, Max: 0.5}
	// BoundCoefficient bounds the size of a gauge row's coefficient (1 or 1/m).
	BoundCoefficient = Bound{Min: -1e6, Max: 1e6}
	// BoundRowLimit bounds a gauge row's limit (the row's unit, N or N·m).
	BoundRowLimit = Bound{Min: 1e-3, Max: 1e9}
	// BoundSecondsPerPoint bounds operations.seconds_per_point, s (one day).
	BoundSecondsPerPoint = Bound{Min: 0, Max: 86400, Unit: "s"}
	// BoundMinutes bounds the operations' minutes per run and per change, min
	// (one week).
	BoundMinutes = Bound{Min: 0, Max: 10080, Unit: "min"}
)

// Bounds returns the documented range of every number of the facility record,
// keyed "schema.field" by the OpenAPI schema names
// ("facilities.TestSection.width"); a Range field's bound applies to its min and
// max. docs/openapi3 publishes them; TestBoundsCoverEveryNumber checks that every
// number of a request has one.
func Bounds() map[string]Bound {
	return map[string]Bound{
		"facilities.TestSection.width":                         BoundSectionSize,
		"facilities.TestSection.height":                        BoundSectionSize,
		"facilities.TestSection.length":                        BoundSectionSize,
		"facilities.TestSection.area":                          BoundSectionArea,
		"facilities.Facility.mach":                             BoundMach,
		"facilities.Facility.speed":                            BoundSpeed,
		"facilities.Facility.stagnation_pressure":              BoundStagnationPressure,
		"facilities.Facility.static_pressure":                  BoundStagnationPressure,
		"facilities.Facility.stagnation_temperature":           BoundStagnationTemperature,
		"facilities.Facility.max_dynamic_pressure":             BoundDynamicPressure,
		"facilities.Facility.max_reynolds_per_meter":           BoundReynoldsPerMeter,
		"facilities.Facility.max_span_fraction":                BoundSpanFraction,
		"facilities.Facility.max_blockage":                     BoundBlockage,
		"facilities.Facility.lift_interference_factor":         BoundLiftInterference,
		"facilities.Facility.condensation_peak_mach":           BoundCondensationPeakMach,
		"facilities.Facility.streamline_curvature_factor":      BoundStreamlineCurvature,
		"facilities.Limits.normal":                             BoundForce,
		"facilities.Limits.axial":                              BoundForce,
		"facilities.Limits.side":                               BoundForce,
		"facilities.Limits.rolling_moment":                     BoundMoment,
		"facilities.Limits.pitching_moment":                    BoundMoment,
		"facilities.Limits.yawing_moment":                      BoundMoment,
		"facilities.Balance.safety_factor":                     BoundSafetyFactor,
		"facilities.Accuracy.fraction_of_rating":               BoundAccuracyFraction,
		"facilities.CombinedLimit.coefficients":                BoundCoefficient,
		"facilities.CombinedLimit.limit":                       BoundRowLimit,
		"facilities.Operations.seconds_per_point":              BoundSecondsPerPoint,
		"facilities.Operations.minutes_per_run":                BoundMinutes,
		"facilities.Operations.minutes_per_pressure_change":    BoundMinutes,
		"facilities.Operations.minutes_per_temperature_change": BoundMinutes,
		"facilities.GasProperties.molar_mass":                  {Min: gasMinMolarMass, Max: gasMaxMolarMass, Unit: "kg/mol"},
		"facilities.GasProperties.gamma":                       {Min: 1, Max: gasMaxGamma, MinExclusive: true},
		"facilities.GasProperties.viscosity_reference":         {Min: 0, Max: gasMaxViscosity, MinExclusive: true, Unit: "Pa·s"},
		"facilities.GasProperties.temperature_reference":       {Min: 0, Max: gasMaxTemperature, MinExclusive: true, Unit: "K"},
		"facilities.GasProperties.sutherland_constant":         {Min: 0, Max: gasMaxTemperature, Unit: "K"},
		"facilities.GasProperties.critical_temperature":        BoundGasCriticalTemperature,
		"facilities.GasProperties.critical_pressure":           BoundGasCriticalPressure,
		"facilities.GasProperties.acentric_factor":             BoundGasAcentricFactor,
	}
}

// TemperatureBound is the range of stagnation temperatures the medium's models
// hold for, K: water 0–150 °C (Kell's density equation), nitrogen above its triple
// point, any gas BoundStagnationTemperature.
func (m Medium) TemperatureBound() Bound {
	switch m.Kind {
	case MediumWater:
		return Bound{Min: WaterMinTemperature, Max: WaterMaxTemperature, Unit: "K"}
	case MediumNitrogen:
		return Bound{Min: NitrogenTriplePointTemperature, Max: MaxStagnationTemperature, Unit: "K"}
	}
	return BoundStagnationTemperature
}
