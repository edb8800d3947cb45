package atmosphere

import (
	"errors"
	"fmt"
	"math"
)

// Constants of the U.S. Standard Atmosphere, 1976 (NOAA-S/T 76-1562, table 2 and
// section 1.2). Below 32 km they equal those of the ICAO Standard Atmosphere
// (ICAO Doc 7488/3).
const (
	// G0 is the standard acceleration of gravity, m/s².
	G0 = 9.80665
	// Rstar is the universal gas constant as the 1976 standard defines it, J/(mol·K).
	Rstar = 8.31432
	// M0 is the sea-level mean molar mass of air, kg/mol.
	M0 = 0.0289644
	// R is the specific gas constant of air, R*/M0 ≈ 287.053 J/(kg·K).
	R = Rstar / M0
	// Gamma is the ratio of specific heats of air, dimensionless.
	Gamma = 1.4
	// R0 is the effective earth radius used to convert between geometric and
	// geopotential altitude, m.
	R0 = 6356766.0

	// SeaLevelPressure is the standard sea-level pressure, Pa.
	SeaLevelPressure = 101325.0
	// SeaLevelTemperature is the standard sea-level temperature, K.
	SeaLevelTemperature = 288.15
	// SeaLevelDensity is the standard sea-level density as tabulated, kg/m³
	// (the model itself gives 1.2249991 kg/m³). Equivalent airspeed uses it.
	SeaLevelDensity = 1.2250
	// SeaLevelSpeedOfSound is the standard sea-level speed of sound as tabulated, m/s
	// (the model itself gives 340.29399 m/s). Calibrated airspeed uses it.
	SeaLevelSpeedOfSound = 340.294

	// SutherlandBeta is the constant β of Sutherland's law for air in the 1976
	// standard, kg/(m·s·K^0.5).
	SutherlandBeta = 1.458e-6
	// SutherlandS is Sutherland's constant S for air in the 1976 standard, K.
	SutherlandS = 110.4
)

// Limits of the model and of its inputs.
const (
	// MinAltitude and MaxAltitude bound the geometric altitude the 1976 standard
	// covers here, m.
	MinAltitude = -5000.0
	MaxAltitude = 86000.0
	// MinDeltaISA and MaxDeltaISA bound the temperature offset of a non-standard
	// day, K. The resulting temperature must also stay above zero.
	MinDeltaISA = -100.0
	MaxDeltaISA = 100.0
)

// gmr is g0·M0/R*, the hydrostatic constant of the standard, K/m'.
const gmr = G0 * M0 / Rstar

// layer is one layer of the standard: base geopotential altitude (m'), base
// molecular-scale temperature (K), lapse rate (K/m') and base pressure (Pa).
type layer struct {
	h, t, lapse, p float64
}

// layers are the seven layers of the 1976 standard up to 84 852 m' (86 km). The
// base pressures are chained from 101 325 Pa with the standard's pressure equations
// 33a/33b (as the function standard evaluates them) and written to full double
// precision, so that At does no chaining; TestBasePressures recomputes the chain,
// checks them to 1e-15, and checks their rounding to the standard's published values
// 22 632.06, 5 474.889, 868.0187, 110.9063, 66.93887 and 3.956420 Pa.
var layers = [...]layer{
	{0, 288.15, -0.0065, 101325},
	{11000, 216.65, 0, 22632.063973462911},
	{20000, 216.65, 0.001, 5474.8886696777745},
	{32000, 228.65, 0.0028, 868.01868475522872},
	{47000, 270.65, 0, 110.90630555496617},
	{51000, 270.65, -0.0028, 66.938873118687425},
	{71000, 214.65, -0.002, 3.9564204280407349},
}

// State is the air at one point of the standard atmosphere, all SI. Its JSON is the
// response of GET /v1/atmosphere.
type State struct {
	// Altitude is the geometric altitude, m.
	Altitude float64 `json:"altitude"`
	// GeopotentialAltitude is the geopotential altitude, m'.
	GeopotentialAltitude float64 `json:"geopotential_altitude"`
	// PressureAltitude is the geopotential altitude at which the standard day has
	// this state's pressure, m (ICAO convention; flight levels are pressure
	// altitudes). Because a non-standard day here keeps the standard pressure at
	// each altitude, it equals GeopotentialAltitude.
	PressureAltitude float64 `json:"pressure_altitude"`
	// DeltaISA is the temperature offset from the standard day, K; zero is a
	// standard day.
	DeltaISA float64 `json:"delta_isa"`
	// Temperature is the static temperature, K (molecular-scale temperature plus
	// DeltaISA).
	Temperature float64 `json:"temperature"`
	// Pressure is the static pressure, Pa.
	Pressure float64 `json:"pressure"`
	// Density is ρ = p/(R·T), kg/m³.
	Density float64 `json:"density"`
	// SpeedOfSound is a = √(γ·R·T), m/s.
	SpeedOfSound float64 `json:"speed_of_sound"`
	// Viscosity is the dynamic viscosity by Sutherland's law, Pa·s.
	Viscosity float64 `json:"viscosity"`
	// KinematicViscosity is ν = μ/ρ, m²/s.
	KinematicViscosity float64 `json:"kinematic_viscosity"`
}

// Geopotential converts geometric altitude z (m) to geopotential altitude (m'):
//
//	H = r0·z/(r0 + z),  r0 = R0
//
// (U.S. Standard Atmosphere 1976, eq. 18; equation number from memory). Zero maps
// to zero.
func Geopotential(z float64) float64 {
	return R0 * z / (R0 + z)
}

// Geometric converts geopotential altitude h (m') to geometric altitude (m), the
// inverse of Geopotential:
//
//	z = r0·h/(r0 − h)
func Geometric(h float64) float64 {
	return R0 * h / (R0 - h)
}

// Sutherland returns the dynamic viscosity of a gas by Sutherland's law, Pa·s:
//
//	μ = β·T^1.5/(T + S)
//
// with T in K, β in kg/(m·s·K^0.5) and S in K. For air the 1976 standard (eq. 51, from memory)
// uses β = SutherlandBeta and S = SutherlandS. T must be positive; zero T gives zero.
func Sutherland(T, beta, S float64) float64 {
	return beta * T * math.Sqrt(T) / (T + S)
}

// At returns the standard atmosphere at geometric altitude z (m) on a day whose
// temperature differs from the standard by deltaISA (K) at the same pressure
// (common practice). z must lie within -5 km to 86 km and deltaISA within
// -100 K to +100 K; otherwise the error wraps ErrRange and names the allowed range.
//
// Source: U.S. Standard Atmosphere, 1976, equations 23 (temperature), 33a/33b
// (pressure), 42 (density), 50 (speed of sound) and 51 (viscosity); equation
// numbers from memory. Temperature is the molecular-scale temperature; between 80
// and 86 km the standard's kinetic temperature is lower by under 0.05 %, which this
// model ignores.
func At(z, deltaISA float64) (State, error) {
	if err := checkRange("altitude", z, MinAltitude, MaxAltitude, "m"); err != nil {
		return State{}, err
	}
	return at(z, Geopotential(z), deltaISA)
}

// AtPressureAltitude returns the atmosphere at pressure altitude hp (m, the
// geopotential altitude of the standard day at that pressure; ICAO convention) on a
// day offset from standard by deltaISA (K). hp must lie between the pressure
// altitudes of -5 km and 86 km geometric, -5003.9359 m to 84852.0458 m (so
// 84852.05 m is refused); the range error states both bounds to 0.1 mm. The state's
// Altitude is the geometric altitude at which the standard day has that pressure.
func AtPressureAltitude(hp, deltaISA float64) (State, error) {
	lo, hi := Geopotential(MinAltitude), Geopotential(MaxAltitude)
	if err := checkRange("pressure altitude", hp, lo, hi, "m"); err != nil {
		var re *RangeError
		if errors.As(err, &re) {
			re.Note = fmt.Sprintf("the bounds are %.4f m and %.4f m, the geopotential altitudes of %g m and %g m geometric", lo, hi, MinAltitude, MaxAltitude)
		}
		return State{}, err
	}
	return at(Geometric(hp), hp, deltaISA)
}

// PressureAltitude returns the pressure altitude (m, geopotential) at which the
// standard atmosphere has static pressure p (Pa): the inverse of the standard's
// pressure equations 33a/33b. p must lie between the standard pressures at 86 km
// and -5 km geometric (about 0.3734 Pa to 177 687 Pa).
func PressureAltitude(p float64) (float64, error) {
	if !(p > 0) || math.IsInf(p, 1) {
		return 0, pressureRangeError(p)
	}
	i := len(layers) - 1
	for i > 0 && p > layers[i].p {
		i--
	}
	l := layers[i]
	var h float64
	if l.lapse == 0 {
		h = l.h - l.t/gmr*math.Log(p/l.p)
	} else {
		t := l.t * math.Pow(p/l.p, -l.lapse/gmr)
		h = l.h + (t-l.t)/l.lapse
	}
	if h < Geopotential(MinAltitude) || h > Geopotential(MaxAltitude) {
		return 0, pressureRangeError(p)
	}
	return h, nil
}

// pressureRangeError reports a static pressure outside the pressures of the
// model's altitude range.
func pressureRangeError(p float64) error {
	lo, _ := standard(Geopotential(MaxAltitude))
	hi, _ := standard(Geopotential(MinAltitude))
	return &RangeError{Quantity: "static pressure", Value: p, Min: lo, Max: hi, Unit: "Pa",
		Note: "the standard pressures at 86 km and -5 km"}
}

// standard returns the standard pressure (Pa) and molecular-scale temperature (K)
// at geopotential altitude h (m'), which the caller has checked.
func standard(h float64) (p, t float64) {
	i := len(layers) - 1
	for i > 0 && h < layers[i].h {
		i--
	}
	l := layers[i]
	dh := h - l.h
	if l.lapse == 0 {
		return l.p * math.Exp(-gmr*dh/l.t), l.t
	}
	t = l.t + l.lapse*dh
	return l.p * math.Pow(l.t/t, gmr/l.lapse), t
}

// at builds the state at geometric altitude z and geopotential altitude h, both
// checked, with the offset deltaISA still to check.
func at(z, h, deltaISA float64) (State, error) {
	if err := checkRange("delta_isa", deltaISA, MinDeltaISA, MaxDeltaISA, "K"); err != nil {
		return State{}, err
	}
	p, t := standard(h)
	t += deltaISA
	if !(t > 0) {
		return State{}, &RangeError{Quantity: "delta_isa", Value: deltaISA, Min: -(t - deltaISA), Max: MaxDeltaISA,
			Unit: "K", Note: "the temperature must stay above 0 K"}
	}
	rho := p / (R * t)
	mu := Sutherland(t, SutherlandBeta, SutherlandS)
	return State{
		Altitude:             z,
		GeopotentialAltitude: h,
		PressureAltitude:     h,
		DeltaISA:             deltaISA,
		Temperature:          t,
		Pressure:             p,
		Density:              rho,
		SpeedOfSound:         math.Sqrt(Gamma * R * t),
		Viscosity:            mu,
		KinematicViscosity:   mu / rho,
	}, nil
}
