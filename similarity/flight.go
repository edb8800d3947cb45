package similarity

import (
	"errors"
	"fmt"
	"math"

	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/check"
)

// Flight is a full-scale flight condition as a plan request gives it: one altitude
// (geometric or pressure altitude), an optional temperature offset from the standard
// day, and one airspeed. Pointer fields are optional; nil means "not given".
type Flight struct {
	// Altitude is the geometric altitude in m; nil when PressureAltitude is given.
	Altitude *float64 `json:"altitude,omitempty" unit:"m"`
	// PressureAltitude is the pressure altitude in m (ICAO convention); nil when
	// Altitude is given.
	PressureAltitude *float64 `json:"pressure_altitude,omitempty" unit:"m"`
	// DeltaISA is the day's temperature offset from the standard atmosphere at the
	// same pressure, a temperature difference in K; zero is a standard day.
	DeltaISA float64 `json:"delta_isa,omitempty" unit:"dK"`
	// Mach is the flight Mach number; nil when a speed in m/s is given instead.
	Mach *float64 `json:"mach,omitempty"`
	// TrueAirspeed in m/s; nil when another speed is given.
	TrueAirspeed *float64 `json:"true_airspeed,omitempty" unit:"m/s"`
	// CalibratedAirspeed in m/s; nil when another speed is given.
	CalibratedAirspeed *float64 `json:"calibrated_airspeed,omitempty" unit:"m/s"`
	// EquivalentAirspeed in m/s; nil when another speed is given.
	EquivalentAirspeed *float64 `json:"equivalent_airspeed,omitempty" unit:"m/s"`
}

// FlightState is a resolved flight condition, all SI. Its JSON is the `flight` part
// of a plan response. Reynolds and Froude are based on ReferenceLength.
type FlightState struct {
	// Mach is the flight Mach number; 0 and absent from the JSON for a marine
	// condition (water is incompressible here).
	Mach float64 `json:"mach,omitempty"`
	// Reynolds is ρ·V·L/μ on the full-scale reference length L.
	Reynolds float64 `json:"reynolds"`
	// Froude is V/√(g0·L) on the full-scale reference length L.
	Froude float64 `json:"froude"`
	// ReferenceLength is the full-scale length L in m the numbers are based on.
	ReferenceLength float64 `json:"reference_length"`
	// TrueAirspeed in m/s; 0 and absent for a marine condition (its speed is
	// Marine.Speed).
	TrueAirspeed float64 `json:"true_airspeed,omitempty"`
	// CalibratedAirspeed in m/s; 0 and absent for a marine condition.
	CalibratedAirspeed float64 `json:"calibrated_airspeed,omitempty"`
	// EquivalentAirspeed in m/s; 0 and absent for a marine condition.
	EquivalentAirspeed float64 `json:"equivalent_airspeed,omitempty"`
	// DynamicPressure is ½·ρ·V² in Pa.
	DynamicPressure float64 `json:"dynamic_pressure"`
	// Static is the free air's static state; Compressibility is 1 (ideal gas). For
	// a marine condition: the water at the reference depth (pressure
	// p_atm + ρ·g0·h, speed of sound 0).
	Static facilities.Static `json:"static"`
	// Marine is the resolved marine condition; nil (absent) for a flight.
	Marine *MarineState `json:"marine,omitempty"`
	// Atmosphere is the full standard-atmosphere state the flight is in.
	Atmosphere atmosphere.State `json:"-"`
}

// speed returns the first given speed, its kind and its JSON field name, and n, the
// number of speeds given.
func (f *Flight) speed() (v float64, kind atmosphere.SpeedKind, field string, n int) {
	cands := [...]struct {
		p     *float64
		kind  atmosphere.SpeedKind
		field string
	}{
		{f.Mach, atmosphere.Mach, "mach"},
		{f.TrueAirspeed, atmosphere.TrueAirspeed, "true_airspeed"},
		{f.CalibratedAirspeed, atmosphere.CalibratedAirspeed, "calibrated_airspeed"},
		{f.EquivalentAirspeed, atmosphere.EquivalentAirspeed, "equivalent_airspeed"},
	}
	for _, c := range cands {
		if c.p != nil {
			if n == 0 {
				v, kind, field = *c.p, c.kind, c.field
			}
			n++
		}
	}
	return v, kind, field, n
}

// Validate checks that exactly one altitude and exactly one speed are given and
// that every number is finite and in range. It returns a *check.Error with
// CodeInvalid naming each bad field by its JSON path ("flight.altitude"), or nil.
func (f *Flight) Validate() error {
	var fe []check.FieldError
	add := func(field, msg string) {
		fe = append(fe, check.FieldError{Field: "flight." + field, Message: msg})
	}
	switch {
	case f.Altitude == nil && f.PressureAltitude == nil:
		add("altitude", "give one of altitude or pressure_altitude (m)")
	case f.Altitude != nil && f.PressureAltitude != nil:
		add("altitude", "give only one of altitude and pressure_altitude")
		add("pressure_altitude", "give only one of altitude and pressure_altitude")
	case f.Altitude != nil && !BoundAltitude.Contains(*f.Altitude):
		add("altitude", BoundAltitude.Problem(*f.Altitude))
	case f.PressureAltitude != nil && !BoundPressureAltitude.Contains(*f.PressureAltitude):
		add("pressure_altitude", BoundPressureAltitude.Problem(*f.PressureAltitude))
	}
	if !inRange(f.DeltaISA, atmosphere.MinDeltaISA, atmosphere.MaxDeltaISA) {
		add("delta_isa", fmt.Sprintf("%g K is outside %g K to %g K", f.DeltaISA, atmosphere.MinDeltaISA, atmosphere.MaxDeltaISA))
	}
	v, _, field, n := f.speed()
	switch {
	case n == 0:
		add("mach", "give one of mach, true_airspeed, calibrated_airspeed or equivalent_airspeed")
	case n > 1:
		add(field, "give only one of mach, true_airspeed, calibrated_airspeed and equivalent_airspeed")
	case field == "mach":
		if !BoundFlightMach.Contains(v) {
			add(field, BoundFlightMach.Problem(v))
		}
	case !BoundFlightSpeed.Contains(v):
		add(field, BoundFlightSpeed.Problem(v))
	}
	return check.Invalid("invalid flight condition", fe)
}

// inRange reports whether v is finite and within [lo, hi].
func inRange(v, lo, hi float64) bool { return v >= lo && v <= hi }

// Resolve validates the flight and returns its state: the standard atmosphere at its
// altitude (U.S. Standard Atmosphere 1976), its airspeeds, and its Reynolds and
// Froude numbers on the full-scale reference length referenceLength in m (physics.md
// §1, §2, §5). referenceLength must be positive. Errors are *check.Error with
// CodeInvalid naming the field.
func (f *Flight) Resolve(referenceLength float64) (FlightState, error) {
	if err := f.Validate(); err != nil {
		return FlightState{}, err
	}
	if !(referenceLength > 0) || math.IsInf(referenceLength, 0) {
		return FlightState{}, check.Invalid("invalid article", []check.FieldError{{
			Field: "article.reference_length", Message: fmt.Sprintf("%g m must be a positive length", referenceLength)}})
	}
	var (
		atm      atmosphere.State
		err      error
		altField = "flight.altitude"
	)
	if f.Altitude != nil {
		atm, err = atmosphere.At(*f.Altitude, f.DeltaISA)
	} else {
		altField = "flight.pressure_altitude"
		atm, err = atmosphere.AtPressureAltitude(*f.PressureAltitude, f.DeltaISA)
	}
	if err != nil {
		return FlightState{}, fieldError(altField, err)
	}
	v, kind, field, _ := f.speed()
	sp, err := atm.Airspeeds(kind, v)
	if err != nil {
		return FlightState{}, fieldError("flight."+field, err)
	}
	if !(sp.True > 0) {
		return FlightState{}, fieldError("flight."+field, errors.New("the flight speed must be above zero"))
	}
	return FlightState{
		Mach:               sp.Mach,
		Reynolds:           atm.Density * sp.True * referenceLength / atm.Viscosity,
		Froude:             Froude(sp.True, referenceLength),
		ReferenceLength:    referenceLength,
		TrueAirspeed:       sp.True,
		CalibratedAirspeed: sp.Calibrated,
		EquivalentAirspeed: sp.Equivalent,
		DynamicPressure:    sp.DynamicPressure,
		Static: facilities.Static{
			Temperature:     atm.Temperature,
			Pressure:        atm.Pressure,
			Density:         atm.Density,
			Viscosity:       atm.Viscosity,
			SpeedOfSound:    atm.SpeedOfSound,
			Compressibility: 1,
		},
		Atmosphere: atm,
	}, nil
}

// fieldError wraps err as a CodeInvalid domain error naming field.
func fieldError(field string, err error) error {
	return &check.Error{Code: check.CodeInvalid, Message: "invalid flight condition",
		Fields: []check.FieldError{{Field: field, Message: err.Error()}}}
}

// Froude returns the Froude number Fr = V/√(g0·L) of speed V in m/s on length L in
// m, with g0 the standard gravity (atmosphere.G0).
func Froude(speed, length float64) float64 {
	return speed / math.Sqrt(atmosphere.G0*length)
}
