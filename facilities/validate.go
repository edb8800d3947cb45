package facilities

import (
	"fmt"
	"slices"
	"strings"
)

// Bounds that Validate applies beyond the physics (sanity limits on a facility
// record, in SI units).
const (
	// MaxIDLength is the longest facility or balance id, in bytes.
	MaxIDLength = 64
	// MaxNameLength is the longest facility, balance or gauge-row name, in bytes.
	MaxNameLength = 200
	// MinSectionSize and MaxSectionSize bound a test-section width, height or
	// length in m.
	MinSectionSize = 0.01
	MaxSectionSize = 100.0
	// MaxSpeed is the largest speed a facility may state, m/s.
	MaxSpeed = 5000.0
	// MinStagnationPressure is the lowest stagnation pressure a facility or a test
	// setting may state, Pa.
	MinStagnationPressure = 10.0
	// MaxStagnationPressure is the largest stagnation pressure a facility may state, Pa.
	MaxStagnationPressure = 1e8
	// MinStagnationTemperature and MaxStagnationTemperature bound the stagnation
	// temperature of a gas facility or test setting, K.
	MinStagnationTemperature = 10.0
	MaxStagnationTemperature = 5000.0
	// NitrogenTriplePointTemperature is the lowest temperature in K a nitrogen
	// facility may state: below it nitrogen is solid (63.151 K, Span et al. 2000;
	// from memory).
	NitrogenTriplePointTemperature = 63.151
)

// invalidFacility introduces the field errors of a bad facility.
const invalidFacility = "facility is invalid"

// Validate checks every field of the facility and returns a *Error with CodeInvalid
// that lists every problem at once, each with its JSON path ("test_section.width",
// "balances[1].limits.normal", "stagnation_pressure.max") and the allowed range, or
// nil when the facility is sound. It checks:
//   - id: 1–64 characters of lower-case letters, digits and single inner dashes;
//     name at most 200 characters; version 0 or more;
//   - medium: a known kind; a custom gas's constants in range (see
//     GasProperties), none given for the named media;
//   - test_section: width, height and length from 0.01 m to 100 m, area from
//     10⁻⁴ m² to 10⁴ m² when given, walls one of closed, open, slotted, porous;
//   - mach and speed: at least one (water: speed only), each min ≤ max, Mach from 0
//     to MaxSettingMach, speed from 0 to MaxSpeed;
//   - stagnation_pressure and stagnation_temperature: min ≤ max, within
//     BoundStagnationPressure and Medium.TemperatureBound (water 0–150 °C, nitrogen
//     above its triple point); static_pressure (water only) instead of
//     stagnation_pressure: min ≤ max within BoundStagnationPressure, and then no
//     stagnation_pressure;
//   - optional limits, each within its Bound (bounds.go): max_dynamic_pressure,
//     max_reynolds_per_meter, max_span_fraction, max_blockage,
//     lift_interference_factor, condensation_peak_mach;
//   - balances: ids present, well formed and unique; every given limit within
//     BoundForce or BoundMoment; safety_factor within BoundSafetyFactor; combined
//     rows with unique names, known component names, coefficients within
//     BoundCoefficient and not all 0, and a limit within BoundRowLimit;
//   - operations: every time within BoundSecondsPerPoint or BoundMinutes.
func (f *Facility) Validate() error {
	var e []FieldError
	add := func(field, format string, args ...any) {
		e = append(e, FieldError{Field: field, Message: fmt.Sprintf(format, args...)})
	}

	if msg := idProblem(f.ID); msg != "" {
		add("id", "%s", msg)
	}
	if len(f.Name) > MaxNameLength {
		add("name", "is %d characters long; at most %d", len(f.Name), MaxNameLength)
	}
	if f.Version < 0 {
		add("version", "%d: must be 0 or more", f.Version)
	}

	// Medium.
	switch f.Medium.Kind {
	case MediumAir, MediumNitrogen, MediumWater:
		if f.Medium.Gas != nil {
			add("medium.gas", "gas constants are given only for a custom gas, not for %s", f.Medium.Kind)
		}
	case MediumGas:
		e = gasFieldErrors(f.Medium.Gas, e)
	default:
		e = append(e, unknownMediumError(f.Medium.Kind))
	}
	liquid := f.Medium.IsLiquid()

	// Test section.
	ts := f.TestSection
	BoundSectionSize.Check(&e, "test_section.width", ts.Width)
	BoundSectionSize.Check(&e, "test_section.height", ts.Height)
	BoundSectionSize.Check(&e, "test_section.length", ts.Length)
	if ts.Area != nil {
		BoundSectionArea.Check(&e, "test_section.area", *ts.Area)
	}
	switch ts.Walls {
	case WallsClosed, WallsOpen, WallsSlotted, WallsPorous:
	default:
		add("test_section.walls", "%q: must be one of %q, %q, %q, %q", ts.Walls, WallsClosed, WallsOpen, WallsSlotted, WallsPorous)
	}

	// Speed envelope.
	switch {
	case f.Mach == nil && f.Speed == nil && liquid:
		add("speed", "is required for a water facility (in m/s)")
	case f.Mach == nil && f.Speed == nil:
		add("mach", "give a Mach range, a speed range (speed), or both")
	}
	if f.Mach != nil {
		if liquid {
			add("mach", "water facilities state a speed range: Mach is not a setting in water")
		} else {
			rangeBound(&e, "mach", *f.Mach, BoundMach)
		}
	}
	if f.Speed != nil {
		rangeBound(&e, "speed", *f.Speed, BoundSpeed)
	}

	// Stagnation conditions.
	if f.StaticPressure != nil {
		if !liquid {
			add("static_pressure", "only a water facility may set its test-section static pressure independently of speed; a gas facility states stagnation_pressure")
		}
		rangeBound(&e, "static_pressure", *f.StaticPressure, BoundStagnationPressure)
		if f.StagnationPressure != (Range{}) {
			add("stagnation_pressure", "leave it out: with static_pressure the stagnation pressure follows from the static pressure and the speed, p0 = p + q")
		}
	} else {
		rangeBound(&e, "stagnation_pressure", f.StagnationPressure, BoundStagnationPressure)
	}
	rangeBound(&e, "stagnation_temperature", f.StagnationTemperature, f.Medium.TemperatureBound())

	// Optional limits.
	for _, o := range [...]struct {
		field string
		v     *float64
		b     Bound
	}{
		{"max_dynamic_pressure", f.MaxDynamicPressure, BoundDynamicPressure},
		{"max_reynolds_per_meter", f.MaxReynoldsPerMeter, BoundReynoldsPerMeter},
		{"max_span_fraction", f.MaxSpanFraction, BoundSpanFraction},
		{"max_blockage", f.MaxBlockage, BoundBlockage},
		{"lift_interference_factor", f.LiftInterferenceFactor, BoundLiftInterference},
		{"condensation_peak_mach", f.CondensationPeakMach, BoundCondensationPeakMach},
		{"streamline_curvature_factor", f.StreamlineCurvatureFactor, BoundStreamlineCurvature},
	} {
		if o.v != nil {
			o.b.Check(&e, o.field, *o.v)
		}
	}

	// Balances.
	seen := make(map[string]int, len(f.Balances))
	for i, b := range f.Balances {
		p := fmt.Sprintf("balances[%d]", i)
		if msg := idProblem(b.ID); msg != "" {
			add(p+".id", "%s", msg)
		} else if j, dup := seen[b.ID]; dup {
			add(p+".id", "%q is also the id of balances[%d]: ids must be unique", b.ID, j)
		} else {
			seen[b.ID] = i
		}
		if len(b.Name) > MaxNameLength {
			add(p+".name", "is %d characters long; at most %d", len(b.Name), MaxNameLength)
		}
		for _, c := range limitComponents(&b.Limits) {
			if c.v != nil {
				bound := BoundForce
				if strings.HasSuffix(c.name, "_moment") {
					bound = BoundMoment
				}
				bound.Check(&e, p+".limits."+c.name, *c.v)
			}
		}
		BoundSafetyFactor.Check(&e, p+".safety_factor", b.SafetyFactor)
		if a := b.Accuracy; a != nil {
			if a.FractionOfRating != 0 {
				BoundAccuracyFraction.Check(&e, p+".accuracy.fraction_of_rating", a.FractionOfRating)
			}
			if a.Components != nil {
				for _, c := range limitComponents(a.Components) {
					if c.v != nil {
						bound := BoundForce
						if strings.HasSuffix(c.name, "_moment") {
							bound = BoundMoment
						}
						bound.Check(&e, p+".accuracy.components."+c.name, *c.v)
					}
				}
			}
			if a.FractionOfRating == 0 && a.Components == nil {
				add(p+".accuracy", "give fraction_of_rating or components, or leave accuracy out")
			}
		}
		rows := make(map[string]int, len(b.Combined))
		for j, row := range b.Combined {
			rp := fmt.Sprintf("%s.combined[%d]", p, j)
			switch {
			case row.Name == "":
				add(rp+".name", "is required")
			case len(row.Name) > MaxNameLength:
				add(rp+".name", "is %d characters long; at most %d", len(row.Name), MaxNameLength)
			default:
				if k, dup := rows[row.Name]; dup {
					add(rp+".name", "%q is also the name of combined[%d]: names must be unique within a balance", row.Name, k)
				} else {
					rows[row.Name] = j
				}
			}
			if len(row.Coefficients) == 0 {
				add(rp+".coefficients", "give at least one component coefficient")
			}
			names := make([]string, 0, len(row.Coefficients))
			for name := range row.Coefficients {
				names = append(names, name)
			}
			slices.Sort(names)
			nonzero := false
			for _, name := range names {
				c := row.Coefficients[name]
				if !knownComponent(name) {
					add(rp+".coefficients."+name, "unknown component: want one of %s", strings.Join(componentNames[:], ", "))
					continue
				}
				if msg := BoundCoefficient.Problem(c); msg != "" {
					add(rp+".coefficients."+name, "%s", msg)
					continue
				}
				nonzero = nonzero || c != 0
			}
			if len(row.Coefficients) > 0 && !nonzero {
				add(rp+".coefficients", "at least one coefficient must be a finite non-zero number")
			}
			BoundRowLimit.Check(&e, rp+".limit", row.Limit)
		}
	}

	// Operations.
	if op := f.Operations; op != nil {
		BoundSecondsPerPoint.Check(&e, "operations.seconds_per_point", op.SecondsPerPoint)
		BoundMinutes.Check(&e, "operations.minutes_per_run", op.MinutesPerRun)
		BoundMinutes.Check(&e, "operations.minutes_per_pressure_change", op.MinutesPerPressureChange)
		BoundMinutes.Check(&e, "operations.minutes_per_temperature_change", op.MinutesPerTemperatureChange)
	}
	return Invalid(invalidFacility, e)
}

// componentNames lists the load components in the order of Limits.
var componentNames = [...]string{
	ComponentNormal, ComponentAxial, ComponentSide,
	ComponentRollingMoment, ComponentPitchingMoment, ComponentYawingMoment,
}

// knownComponent reports whether name is one of the load component names.
func knownComponent(name string) bool {
	return slices.Contains(componentNames[:], name)
}

// namedLimit pairs a component name with its rated load.
type namedLimit struct {
	name string
	v    *float64
}

// limitComponents returns the components of l with their names, in componentNames
// order.
func limitComponents(l *Limits) [6]namedLimit {
	return [6]namedLimit{
		{ComponentNormal, l.Normal}, {ComponentAxial, l.Axial}, {ComponentSide, l.Side},
		{ComponentRollingMoment, l.RollingMoment}, {ComponentPitchingMoment, l.PitchingMoment},
		{ComponentYawingMoment, l.YawingMoment},
	}
}

// idProblem says what is wrong with a facility or balance id, or returns "".
func idProblem(id string) string {
	if id == "" {
		return "is required"
	}
	if len(id) > MaxIDLength {
		return fmt.Sprintf("is %d characters long; at most %d", len(id), MaxIDLength)
	}
	for i := 0; i < len(id); i++ {
		c := id[i]
		ok := c >= 'a' && c <= 'z' || c >= '0' && c <= '9' ||
			c == '-' && i > 0 && i < len(id)-1 && id[i-1] != '-'
		if !ok {
			return fmt.Sprintf("%q: use lower-case letters, digits and single dashes between them", id)
		}
	}
	return ""
}

// unknownMediumError reports an unknown medium kind.
func unknownMediumError(kind string) FieldError {
	return FieldError{Field: "medium", Message: fmt.Sprintf(
		"unknown medium %q: want %q, %q, %q or a custom gas", kind, MediumAir, MediumNitrogen, MediumWater)}
}

// Allowed ranges of a custom gas's constants (Validate and State).
const (
	gasMinMolarMass   = 1e-3 // kg/mol
	gasMaxMolarMass   = 1.0  // kg/mol
	gasMaxGamma       = 5.0 / 3
	gasMaxViscosity   = 1e-3   // Pa·s
	gasMaxTemperature = 5000.0 // K
)

// gasFieldErrors appends the problems of a custom gas's constants, with paths under
// "medium.gas", to dst. It does not allocate when there are none.
func gasFieldErrors(g *GasProperties, dst []FieldError) []FieldError {
	if g == nil {
		return append(dst, FieldError{Field: "medium.gas", Message: "a custom gas needs its constants"})
	}
	if !(g.MolarMass >= gasMinMolarMass && g.MolarMass <= gasMaxMolarMass) {
		dst = append(dst, FieldError{Field: "medium.gas.molar_mass", Message: fmt.Sprintf(
			"%g kg/mol is outside %g to %g kg/mol", g.MolarMass, gasMinMolarMass, gasMaxMolarMass)})
	}
	if !(g.Gamma > 1 && g.Gamma <= gasMaxGamma) {
		dst = append(dst, FieldError{Field: "medium.gas.gamma", Message: fmt.Sprintf(
			"%g: must be above 1 and at most 5/3", g.Gamma)})
	}
	if !(g.ViscosityReference > 0 && g.ViscosityReference <= gasMaxViscosity) {
		dst = append(dst, FieldError{Field: "medium.gas.viscosity_reference", Message: fmt.Sprintf(
			"%g Pa·s: must be above 0 and at most %g Pa·s", g.ViscosityReference, gasMaxViscosity)})
	}
	if !(g.TemperatureReference > 0 && g.TemperatureReference <= gasMaxTemperature) {
		dst = append(dst, FieldError{Field: "medium.gas.temperature_reference", Message: fmt.Sprintf(
			"%g K: must be above 0 and at most %g K", g.TemperatureReference, gasMaxTemperature)})
	}
	if !(g.SutherlandConstant >= 0 && g.SutherlandConstant <= gasMaxTemperature) {
		dst = append(dst, FieldError{Field: "medium.gas.sutherland_constant", Message: fmt.Sprintf(
			"%g K is outside 0 to %g K", g.SutherlandConstant, gasMaxTemperature)})
	}
	return gasCriticalErrors(g, dst)
}

// withUnit formats v with a unit when there is one.
func withUnit(v float64, unit string) string {
	if unit == "" {
		return fmt.Sprintf("%g", v)
	}
	return fmt.Sprintf("%g %s", v, unit)
}

// rangeBound appends errors for a range whose ends must lie in b with Min ≤ Max. A
// reversed range is reported on field.min.
func rangeBound(e *[]FieldError, field string, r Range, b Bound) {
	minMsg, maxMsg := b.Problem(r.Min), b.Problem(r.Max)
	if minMsg != "" {
		*e = append(*e, FieldError{Field: field + ".min", Message: minMsg})
	}
	if maxMsg != "" {
		*e = append(*e, FieldError{Field: field + ".max", Message: maxMsg})
	}
	if minMsg == "" && maxMsg == "" && r.Min > r.Max {
		*e = append(*e, FieldError{Field: field + ".min", Message: fmt.Sprintf(
			"%s is above %s.max (%s)", withUnit(r.Min, b.Unit), field, withUnit(r.Max, b.Unit))})
	}
}
