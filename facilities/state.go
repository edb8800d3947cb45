package facilities

// Setting is what the operator sets: a free-stream Mach number or speed, and the
// stagnation pressure and temperature. For gas media give Mach (or Speed, converted
// to Mach at the stagnation temperature); for water give Speed.
type Setting struct {
	// Mach is the free-stream Mach number; 0 when Speed is given instead.
	Mach float64
	// Speed is the free-stream speed in m/s; 0 when Mach is given instead.
	Speed float64
	// StagnationPressure in Pa.
	StagnationPressure float64
	// StagnationTemperature in K.
	StagnationTemperature float64
	// StaticPressure is the test-section static pressure in Pa of a water facility
	// with a StaticPressure range (a cavitation tunnel), which sets it independently
	// of speed; 0: held at Facility.HeldStaticPressure. Other facilities take none.
	StaticPressure float64
}

// Static is the static (free-stream) state of the medium in the test section.
type Static struct {
	Temperature  float64 `json:"temperature"`    // K
	Pressure     float64 `json:"pressure"`       // Pa
	Density      float64 `json:"density"`        // kg/m³
	Viscosity    float64 `json:"viscosity"`      // Pa·s
	SpeedOfSound float64 `json:"speed_of_sound"` // m/s
	// Compressibility is the compressibility factor Z = p/(ρRT); 1 for an ideal gas
	// and for water.
	Compressibility float64 `json:"compressibility"`
}

// State is the test-section state reached at a Setting.
type State struct {
	Mach                  float64 `json:"mach"`
	Speed                 float64 `json:"speed"`                  // m/s
	StagnationPressure    float64 `json:"stagnation_pressure"`    // Pa
	StagnationTemperature float64 `json:"stagnation_temperature"` // K
	Static                Static  `json:"static"`
	DynamicPressure       float64 `json:"dynamic_pressure"`   // Pa, ½ρV²
	ReynoldsPerMeter      float64 `json:"reynolds_per_meter"` // 1/m, ρV/μ
}

// Violation is one facility limit that a state breaks (or, in a plan's binding list,
// sits on). Constraint is one of the Constraint* names.
type Violation struct {
	Constraint string  `json:"constraint"`
	Value      float64 `json:"value"`
	Limit      float64 `json:"limit"`
	Message    string  `json:"message"`
}

// Constraint names shared by violations, the planner's binding list and the API.
const (
	ConstraintMachMin     = "mach_min"
	ConstraintMachMax     = "mach_max"
	ConstraintSpeedMin    = "speed_min"
	ConstraintSpeedMax    = "speed_max"
	ConstraintPressureMin = "stagnation_pressure_min"
	ConstraintPressureMax = "stagnation_pressure_max"
	// ConstraintStaticPressureMin and ConstraintStaticPressureMax are the
	// test-section static pressure range of a facility with StaticPressure.
	ConstraintStaticPressureMin = "static_pressure_min"
	ConstraintStaticPressureMax = "static_pressure_max"
	ConstraintTempMin           = "stagnation_temperature_min"
	ConstraintTempMax           = "stagnation_temperature_max"
	ConstraintDynamic           = "max_dynamic_pressure"
	ConstraintReynoldsUnit      = "max_reynolds_per_meter"
	ConstraintCondensation      = "condensation"
	// ConstraintBoiling: water at or above its boiling point at the stagnation
	// pressure (IAPWS-IF97); the liquid model does not hold there.
	ConstraintBoiling = "boiling"
	// ConstraintCavitation: a water test section whose static pressure is below
	// the IAPWS-IF97 vapour pressure.
	ConstraintCavitation = "cavitation"
	ConstraintSpan       = "max_span_fraction"
	ConstraintBlockage   = "max_blockage"
	// ConstraintModelLength is the model's overall length against the test
	// section's length, where both are known.
	ConstraintModelLength = "max_model_length"
	ConstraintScaleMin    = "scale_min"
	ConstraintScaleMax    = "scale_max"
	ConstraintBalance     = "balance"
	// ConstraintResolution is the least dynamic pressure at which the balance
	// resolves the coefficients to the request's required_resolution: a lower
	// limit on q (docs/loads.md, Measurement resolution).
	ConstraintResolution = "resolution"
)
