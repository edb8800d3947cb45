package api

import (
	"errors"
	"math"
	"net/http"
	"strconv"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/similarity"
)

// getAtmosphere answers GET /v1/atmosphere.
//
//	@Summary		Standard atmosphere
//	@Description	The U.S. Standard Atmosphere 1976 at a geometric altitude or a pressure altitude, on a day offset from standard by delta_isa (K) at the same pressure. Each query value is a number in SI units or a string with a unit ("35000 ft", "10 degC" for delta_isa). Response: altitude and geopotential_altitude and pressure_altitude in m, delta_isa and temperature in K, pressure in Pa, density in kg/m³, speed_of_sound in m/s, viscosity in Pa·s, kinematic_viscosity in m²/s.
//	@Tags			planning
//	@Produce		json
//	@Param			altitude			query		string	false	"geometric altitude, m (or a length with a unit, e.g. 35000 ft); give this or pressure_altitude"
//	@Param			pressure_altitude	query		string	false	"pressure altitude (ICAO), m (or a length with a unit); give this or altitude"
//	@Param			delta_isa			query		string	false	"temperature offset from the standard day, K (or e.g. 10 degC); default 0"
//	@Success		200					{object}	atmosphere.State
//	@Failure		400					{object}	Problem	"a bad or missing altitude, or one outside -5 km to 86 km"
//	@Router			/v1/atmosphere [get]
func (s *Server) getAtmosphere(c *gin.Context) {
	st, err := AtmosphereQuery(c.Query, func(k string) bool { _, ok := c.GetQuery(k); return ok })
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, st)
}

// AtmosphereQuery reads the atmosphere query parameters (altitude,
// pressure_altitude, delta_isa: SI numbers or strings with units) through get (the
// query's value of a key) and has (whether it was given), and returns the state.
// The command line's atmosphere command reads its flags through it too, so both
// accept the same values.
func AtmosphereQuery(get func(string) string, has func(string) bool) (atmosphere.State, error) {
	var fe []facilities.FieldError
	num := func(key, unit string) (float64, bool) {
		v, err := similarity.ToSI(get(key), unit)
		if err != nil {
			fe = append(fe, facilities.FieldError{Field: key, Message: err.Error()})
			return 0, false
		}
		return v, true
	}
	// A bare number is SI here, as everywhere in the API; ToSI wants a unit on a
	// dimensional field, so a bare number is read with the field's own unit.
	length := func(key string) (float64, bool) {
		if v, ok := bareNumber(get(key)); ok {
			return v, true
		}
		return num(key, "m")
	}
	var dISA float64
	if has("delta_isa") {
		if v, ok := bareNumber(get("delta_isa")); ok {
			dISA = v
		} else if v, ok := num("delta_isa", "dK"); ok {
			dISA = v
		}
	}
	hasAlt, hasPA := has("altitude"), has("pressure_altitude")
	switch {
	case hasAlt && hasPA:
		fe = append(fe, facilities.FieldError{Field: "pressure_altitude", Message: "give only one of altitude and pressure_altitude"})
	case !hasAlt && !hasPA:
		fe = append(fe, facilities.FieldError{Field: "altitude", Message: "give altitude (geometric, m) or pressure_altitude (m)"})
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
	if err := facilities.Invalid(countFields(len(fe)), fe); err != nil {
		return atmosphere.State{}, err
	}
	if !zok {
		return atmosphere.State{}, facilities.Invalid(countFields(1), []facilities.FieldError{{Field: key, Message: "not a number"}})
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
		return atmosphere.State{}, facilities.Invalid(countFields(1), []facilities.FieldError{{Field: field, Message: err.Error()}})
	}
	return st, nil
}

// bareNumber parses s when it is a plain, finite decimal number with no unit.
func bareNumber(s string) (float64, bool) {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return v, true
}
