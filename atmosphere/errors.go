package atmosphere

import (
	"errors"
	"fmt"
)

// ErrRange is wrapped by every error this package returns for an input outside the
// range the models cover: an altitude outside -5 km to 86 km, a pressure or
// temperature offset outside its range, a negative or non-finite speed, a Mach
// number outside 0 to 5. Test for it with errors.Is.
var ErrRange = errors.New("out of range")

// RangeError says which input was out of range and what range is allowed. It wraps
// ErrRange. Quantity names the input, one of "altitude", "pressure altitude",
// "delta_isa", "static pressure", "Mach number", "true airspeed", "calibrated
// airspeed" and "equivalent airspeed"; callers may rely on these names to point at
// the bad field. Unit is the SI unit of Value, Min and Max, empty for a
// dimensionless quantity.
type RangeError struct {
	Quantity string
	Value    float64
	Min, Max float64
	Unit     string
	// Note, when not empty, adds why the value is out of range (for a speed, the
	// Mach number it would need).
	Note string
}

// Error reports the quantity, its value and the allowed range with their unit.
func (e *RangeError) Error() string {
	u := ""
	if e.Unit != "" {
		u = " " + e.Unit
	}
	msg := fmt.Sprintf("atmosphere: %s %.6g%s is outside %.6g%s to %.6g%s", e.Quantity, e.Value, u, e.Min, u, e.Max, u)
	if e.Note != "" {
		msg += " (" + e.Note + ")"
	}
	return msg + ": " + ErrRange.Error()
}

// Unwrap returns ErrRange.
func (e *RangeError) Unwrap() error { return ErrRange }

// checkRange returns a *RangeError when v is not finite or lies outside [min, max].
func checkRange(quantity string, v, min, max float64, unit string) error {
	if v >= min && v <= max { // false for NaN
		return nil
	}
	return &RangeError{Quantity: quantity, Value: v, Min: min, Max: max, Unit: unit}
}
