package atmosphere

import (
	"fmt"
	"math"
	"strings"
)

// SpeedKind names which of the four airspeeds a value is.
type SpeedKind int

// The four ways to give a flight speed. The zero value is Mach.
const (
	// Mach is the Mach number, dimensionless.
	Mach SpeedKind = iota
	// TrueAirspeed is the speed relative to the air, m/s.
	TrueAirspeed
	// CalibratedAirspeed is the speed that gives the same impact pressure in the
	// sea-level standard atmosphere, m/s.
	CalibratedAirspeed
	// EquivalentAirspeed is the speed that gives the same dynamic pressure at the
	// sea-level standard density, m/s.
	EquivalentAirspeed
)

// MaxMach is the highest Mach number the airspeed conversions accept.
const MaxMach = 5.0

var speedKindNames = [...]string{
	Mach:               "mach",
	TrueAirspeed:       "true_airspeed",
	CalibratedAirspeed: "calibrated_airspeed",
	EquivalentAirspeed: "equivalent_airspeed",
}

// String returns the kind's snake_case API name ("mach", "true_airspeed",
// "calibrated_airspeed", "equivalent_airspeed").
func (k SpeedKind) String() string {
	if k >= 0 && int(k) < len(speedKindNames) {
		return speedKindNames[k]
	}
	return fmt.Sprintf("SpeedKind(%d)", int(k))
}

// ParseSpeedKind returns the kind named s: an API name as String gives it, or one of
// the abbreviations "tas", "cas", "eas". Other names give an error listing the
// accepted ones.
func ParseSpeedKind(s string) (SpeedKind, error) {
	switch s {
	case "mach":
		return Mach, nil
	case "true_airspeed", "tas":
		return TrueAirspeed, nil
	case "calibrated_airspeed", "cas":
		return CalibratedAirspeed, nil
	case "equivalent_airspeed", "eas":
		return EquivalentAirspeed, nil
	}
	return 0, fmt.Errorf("atmosphere: unknown speed kind %q: want mach, true_airspeed, calibrated_airspeed or equivalent_airspeed", s)
}

// Airspeeds are one flight speed expressed every way, SI.
type Airspeeds struct {
	// Mach is the Mach number, dimensionless.
	Mach float64 `json:"mach"`
	// True is the true airspeed V = M·a, m/s.
	True float64 `json:"true_airspeed"`
	// Calibrated is the calibrated airspeed, m/s: the speed that gives the same
	// impact pressure at p_SL = SeaLevelPressure and a_SL = SeaLevelSpeedOfSound.
	Calibrated float64 `json:"calibrated_airspeed"`
	// Equivalent is the equivalent airspeed Ve = V·√(ρ/ρ_SL), ρ_SL = SeaLevelDensity, m/s.
	Equivalent float64 `json:"equivalent_airspeed"`
	// DynamicPressure is q = ½·ρ·V², Pa.
	DynamicPressure float64 `json:"dynamic_pressure"`
	// ImpactPressure is qc, the pitot pressure less the static pressure, Pa.
	ImpactPressure float64 `json:"impact_pressure"`
}

// Airspeeds converts a speed of the given kind (Mach number, or m/s for the others)
// to all four airspeeds at this state, subsonic and supersonic. The impact pressure
// follows PitotPressureRatio (isentropic up to Mach 1, Rayleigh pitot formula above);
// calibrated airspeed is the speed giving the same impact pressure at sea level on a
// standard day; equivalent airspeed keeps the dynamic pressure at SeaLevelDensity.
// Inverse problems are solved to 1e-10 relative or better.
//
// value must be finite and non-negative and must not need a Mach number above
// MaxMach; otherwise the error wraps ErrRange and states the allowed range. The state
// must come from At or AtPressureAltitude.
func (s State) Airspeeds(kind SpeedKind, value float64) (Airspeeds, error) {
	a, p, rho := s.SpeedOfSound, s.Pressure, s.Density
	if !(a > 0 && p > 0 && rho > 0) {
		return Airspeeds{}, fmt.Errorf("atmosphere: state has no positive speed of sound, pressure and density; build it with At: %w", ErrRange)
	}
	var m float64
	switch kind {
	case Mach:
		if err := checkRange("Mach number", value, 0, MaxMach, ""); err != nil {
			return Airspeeds{}, err
		}
		m = value
	case TrueAirspeed:
		if err := checkSpeed(kind, value, MaxMach*a); err != nil {
			return Airspeeds{}, err
		}
		m = value / a
	case EquivalentAirspeed:
		if err := checkSpeed(kind, value, MaxMach*a*math.Sqrt(rho/SeaLevelDensity)); err != nil {
			return Airspeeds{}, err
		}
		m = value * math.Sqrt(SeaLevelDensity/rho) / a
	case CalibratedAirspeed:
		x := SeaLevelPressure * impactRatio(value/SeaLevelSpeedOfSound, Gamma) / p // qc/p
		maxRatio := impactRatio(MaxMach, Gamma)
		if !(value >= 0 && x <= maxRatio*(1+1e-12)) { // the edge itself, give or take rounding, is in range
			return Airspeeds{}, checkSpeed(kind, value, SeaLevelSpeedOfSound*machFromImpact(maxRatio*p/SeaLevelPressure, Gamma))
		}
		m = machFromImpact(x, Gamma)
	default:
		return Airspeeds{}, fmt.Errorf("atmosphere: unknown speed kind %d", int(kind))
	}
	m = math.Min(m, MaxMach) // a speed at the edge may round to a hair above it
	v := m * a
	qc := p * impactRatio(m, Gamma)
	out := Airspeeds{
		Mach:            m,
		True:            v,
		Equivalent:      v * math.Sqrt(rho/SeaLevelDensity),
		DynamicPressure: 0.5 * rho * v * v,
		ImpactPressure:  qc,
	}
	if kind == CalibratedAirspeed {
		out.Calibrated = value // already solved for; no second inverse
	} else {
		out.Calibrated = SeaLevelSpeedOfSound * machFromImpact(qc/SeaLevelPressure, Gamma)
	}
	return out, nil
}

// checkSpeed checks that a speed in m/s is finite and between zero and max, the
// speed of Mach MaxMach at this state, give or take rounding.
func checkSpeed(kind SpeedKind, v, max float64) error {
	if v >= 0 && v <= max*(1+1e-12) {
		return nil
	}
	return &RangeError{Quantity: strings.ReplaceAll(kind.String(), "_", " "), Value: v, Min: 0, Max: max, Unit: "m/s",
		Note: fmt.Sprintf("Mach %g at this altitude", MaxMach)}
}
