package facilities

import (
	"errors"
	"fmt"
	"math"
)

// ErrNoOperations is returned by ScheduleTest when the facility gives no operations
// figures.
var ErrNoOperations = errors.New("facilities: the facility gives no operations figures, so no schedule")

// Tolerances within which two stagnation settings count as the same, so that no
// pressure or temperature change is scheduled between them (common practice: the
// tunnel's controllers hold them within about this much).
const (
	// SamePressureFraction is the relative stagnation-pressure tolerance (1 %).
	SamePressureFraction = 0.01
	// SameTemperature is the stagnation-temperature tolerance in K.
	SameTemperature = 2.0
)

// Condition is one stagnation setting of a test: pressure in Pa, temperature in K.
type Condition struct {
	StagnationPressure    float64
	StagnationTemperature float64
}

// Test is a test programme to schedule: AlphaPoints points per run (one α sweep),
// one run per sideslip angle (BetaValues, 0 taken as 1) at each of the Conditions
// in order.
type Test struct {
	AlphaPoints int
	BetaValues  int
	Conditions  []Condition
}

// Schedule is the time estimate of a test: data points, runs, pressure and
// temperature changes, and the total in hours.
type Schedule struct {
	Points             int     `json:"points"`
	Runs               int     `json:"runs"`
	PressureChanges    int     `json:"pressure_changes"`
	TemperatureChanges int     `json:"temperature_changes"`
	Hours              float64 `json:"hours"`
}

// RestingCondition is the state a facility starts a test from: the sea-level
// standard pressure (101 325 Pa) and temperature (288.15 K), each clamped to the
// facility's stagnation ranges. A fixed range is always its own value.
func RestingCondition(f *Facility) Condition {
	clamp := func(v float64, r Range) float64 { return math.Min(math.Max(v, r.Min), r.Max) }
	return Condition{
		StagnationPressure:    clamp(101325, f.StagnationPressure),
		StagnationTemperature: clamp(288.15, f.StagnationTemperature),
	}
}

// ScheduleTest estimates the time of test t in facility f from its operations
// figures:
//
//	hours = (points·seconds_per_point/60 + runs·minutes_per_run
//	         + pressure changes·minutes_per_pressure_change
//	         + temperature changes·minutes_per_temperature_change)/60
//
// A pressure (temperature) change is counted whenever a condition's stagnation
// pressure (temperature) differs from the one before it, beyond SamePressureFraction
// (SameTemperature); the test starts from RestingCondition. It returns
// ErrNoOperations when f has none, and a CodeInvalid error for negative counts.
func ScheduleTest(f *Facility, t Test) (Schedule, error) {
	var fe []FieldError
	if t.AlphaPoints < 0 {
		fe = append(fe, FieldError{Field: "alpha", Message: fmt.Sprintf("the number of α points must not be negative, got %d", t.AlphaPoints)})
	}
	if t.BetaValues < 0 {
		fe = append(fe, FieldError{Field: "beta", Message: fmt.Sprintf("the number of β values must not be negative, got %d", t.BetaValues)})
	}
	if f.Operations == nil {
		return Schedule{}, ErrNoOperations
	}
	if err := Invalid("schedule", fe); err != nil {
		return Schedule{}, err
	}
	sets := make([]RunSet, len(t.Conditions))
	for i, c := range t.Conditions {
		sets[i] = RunSet{Condition: c, AlphaPoints: t.AlphaPoints, BetaValues: t.BetaValues}
	}
	return ScheduleRuns(f, sets)
}

// RunSet is the runs of one test condition: one run per sideslip angle
// (BetaValues, 0 taken as 1), each of AlphaPoints points, at one stagnation
// setting.
type RunSet struct {
	Condition
	AlphaPoints int
	BetaValues  int
}

// ScheduleRuns estimates the time of the run sets in their order in facility f,
// with ScheduleTest's formula; each set may have its own sweep. It returns
// ErrNoOperations when f has none, and a CodeInvalid error for negative counts.
func ScheduleRuns(f *Facility, sets []RunSet) (Schedule, error) {
	if f.Operations == nil {
		return Schedule{}, ErrNoOperations
	}
	var s Schedule
	prev := RestingCondition(f)
	for i, c := range sets {
		if c.AlphaPoints < 0 || c.BetaValues < 0 {
			return Schedule{}, Invalid("schedule", []FieldError{{Field: fmt.Sprintf("runs[%d]", i),
				Message: fmt.Sprintf("the numbers of α points and β values must not be negative, got %d and %d", c.AlphaPoints, c.BetaValues)}})
		}
		runs := max(c.BetaValues, 1)
		s.Runs += runs
		s.Points += runs * c.AlphaPoints
		p, t := Changes(prev, c.Condition)
		if p {
			s.PressureChanges++
		}
		if t {
			s.TemperatureChanges++
		}
		prev = c.Condition
	}
	s.Hours = f.Operations.Minutes(s) / 60
	return s, nil
}

// Changes reports whether going from condition a to b changes the stagnation
// pressure (beyond SamePressureFraction of a's) and the stagnation temperature
// (beyond SameTemperature).
func Changes(a, b Condition) (pressure, temperature bool) {
	pressure = math.Abs(b.StagnationPressure-a.StagnationPressure) > SamePressureFraction*math.Abs(a.StagnationPressure)
	temperature = math.Abs(b.StagnationTemperature-a.StagnationTemperature) > SameTemperature
	return pressure, temperature
}

// Minutes returns the time in minutes of a schedule's points, runs and
// pressure and temperature changes with these figures (its Hours are not read).
func (op *Operations) Minutes(s Schedule) float64 {
	return float64(s.Points)*op.SecondsPerPoint/60 +
		float64(s.Runs)*op.MinutesPerRun +
		float64(s.PressureChanges)*op.MinutesPerPressureChange +
		float64(s.TemperatureChanges)*op.MinutesPerTemperatureChange
}
