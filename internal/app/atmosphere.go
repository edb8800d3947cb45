package app

import (
	"errors"
	"math"
	"strconv"
	"strings"

	"scalematch/atmosphere"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// AtmosphereQuery reads the atmosphere query parameters (altitude,
// pressure_altitude, delta_isa: SI numbers or strings with units) through get (the
// query's value of a key) and has (whether it was given), and returns the state.
// The command line's atmosphere command reads its flags through it too, so both
// accept the same values.
func AtmosphereQuery(get func(string) string, has func(string) bool) (atmosphere.State, error) {
	var fe []check.FieldError
	num := func(key, unit string) (float64, bool) {
		v, err := similarity.ToSI(get(key), unit)
		if err != nil {
			fe = append(fe, check.FieldError{Field: key, Message: err.Error()})
			return 0, false
		}
		return v, true
	}
	// A bare number is SI here, as everywhere in the API; ToSI wants a unit on a
	// dimensional field, so a bare number is read with the field's own unit.
	length := func(key string) (float64, bool) {
		if v, ok := BareNumber(get(key)); ok {
			return v, true
		}
		return num(key, "m")
	}
	var dISA float64
	if has("delta_isa") {
		if v, ok := BareNumber(get("delta_isa")); ok {
			dISA = v
		} else if v, ok := num("delta_isa", "dK"); ok {
			dISA = v
		}
	}
	hasAlt, hasPA := has("altitude"), has("pressure_altitude")
	switch {
	case hasAlt && hasPA:
		fe = append(fe, check.FieldError{Field: "pressure_altitude", Message: "give only one of altitude and pressure_altitude"})
	case !hasAlt && !hasPA:
		fe = append(fe, check.FieldError{Field: "altitude", Message: "give altitude (geometric, m) or pressure_altitude (m)"})
	}
	var z float64
	var zok bool
	key := "altitude"
	if hasAlt {
		z, zok = length("altitude")
	} else if hasPA {
		key = "pressure_altitude"
		z, zok = length("pressure_altitude")
	}
	if err := check.Invalid(check.InvalidCount(len(fe)), fe); err != nil {
		return atmosphere.State{}, err
	}
	if !zok {
		return atmosphere.State{}, check.Invalid(check.InvalidCount(1), []check.FieldError{{Field: key, Message: "not a number"}})
	}
	var st atmosphere.State
	var err error
	if key == "altitude" {
		st, err = atmosphere.At(z, dISA)
	} else {
		st, err = atmosphere.AtPressureAltitude(z, dISA)
	}
	if err != nil {
		field := key
		var re *atmosphere.RangeError
		if errors.As(err, &re) && re.Quantity == "delta_isa" {
			field = "delta_isa"
		}
		return atmosphere.State{}, check.Invalid(check.InvalidCount(1), []check.FieldError{{Field: field, Message: err.Error()}})
	}
	return st, nil
}

// BareNumber parses s when it is a plain, finite decimal number with no unit.
func BareNumber(s string) (float64, bool) {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}
