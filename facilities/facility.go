package facilities

// Facility describes one wind or water tunnel as the API and the catalog carry it.
// All numbers are SI (m, m², Pa, K, m/s, N, N·m). Optional limits are pointers: nil
// means "no limit". A field's `unit` tag names its SI unit; the API's decoder uses it
// to accept unit strings such as "2.5 bar". A unit tag on a struct-typed field applies
// to the untagged float fields inside it (Range.Min and Range.Max).
type Facility struct {
	// ID is the catalog key, lower case letters, digits and dashes ("tsw-1").
	ID string `json:"id"`
	// Name is a human-readable name.
	Name string `json:"name"`
	// Version is the catalog version of this record; 0 for a facility given inline.
	Version int `json:"version,omitempty"`
	// Medium is the test medium: air, nitrogen, water or a custom ideal gas.
	Medium Medium `json:"medium"`
	// TestSection is the size and wall type of the test section.
	TestSection TestSection `json:"test_section"`
	// Mach is the free-stream Mach number range; nil when the facility states only speeds.
	Mach *Range `json:"mach,omitempty"`
	// Speed is the free-stream speed range in m/s; nil when only Mach is stated.
	Speed *Range `json:"speed,omitempty" unit:"m/s"`
	// StagnationPressure is the stagnation (total) pressure range in Pa; Min = Max
	// means fixed, as in an atmospheric tunnel.
	StagnationPressure Range `json:"stagnation_pressure" unit:"Pa"`
	// StaticPressure is the test-section static pressure range in Pa of a water
	// facility that sets it independently of speed (a cavitation tunnel); nil: the
	// static pressure follows from the stagnation pressure, p = p0 − q. With it the
	// record gives no stagnation_pressure: the test-section state holds the static
	// pressure at HeldStaticPressure and the stagnation pressure follows, p0 = p + q.
	StaticPressure *Range `json:"static_pressure,omitempty" unit:"Pa"`
	// StagnationTemperature is the stagnation (total) temperature range in K.
	StagnationTemperature Range `json:"stagnation_temperature" unit:"K"`
	// MaxDynamicPressure is the largest free-stream dynamic pressure in Pa; nil: no limit.
	MaxDynamicPressure *float64 `json:"max_dynamic_pressure,omitempty" unit:"Pa"`
	// MaxReynoldsPerMeter is the largest unit Reynolds number in 1/m; nil: no limit.
	MaxReynoldsPerMeter *float64 `json:"max_reynolds_per_meter,omitempty" unit:"1/m"`
	// MaxSpanFraction is the largest model span as a fraction of the test-section width.
	MaxSpanFraction *float64 `json:"max_span_fraction,omitempty"`
	// MaxBlockage is the largest model frontal area over test-section area (0.05 = 5 %).
	MaxBlockage *float64 `json:"max_blockage,omitempty"`
	// LiftInterferenceFactor is the boundary-correction factor δ of the lift
	// interference Δα = δ·(S/C)·C_L; nil: 0.125 closed walls, −0.125 open jet
	// (Glauert's values for a circular section, from memory).
	LiftInterferenceFactor *float64 `json:"lift_interference_factor,omitempty"`
	// StreamlineCurvatureFactor is τ2 of the streamline-curvature correction of a
	// wing in closed walls, Δα_sc = τ2·δ·(S/C)·C_L, read for the section's shape
	// from the chart of Barlow, Rae & Pope (1999, ch. 10) at 0.25·c/B (c the model's
	// reference chord, B the test-section width); nil: the correction is reported
	// as not computed. Dimensionless, 0 to 1.
	StreamlineCurvatureFactor *float64 `json:"streamline_curvature_factor,omitempty"`
	// CondensationPeakMach is the local peak Mach number over the model used by the
	// condensation check of condensable media; nil: 1.4 (common practice).
	CondensationPeakMach *float64 `json:"condensation_peak_mach,omitempty"`
	// Balances are the force balances the facility can fit.
	Balances []Balance `json:"balances,omitempty" maxItems:"20"`
	// Operations are the times used to estimate a test's schedule; nil: no schedule.
	Operations *Operations `json:"operations,omitempty"`
}

// HeldStaticPressure is the test-section static pressure in Pa at which the
// test-section state and the planner hold a facility with a StaticPressure range:
// its maximum. Water is incompressible here, so the pressure changes no similarity
// group and the Reynolds number does not depend on it; the top of the range keeps
// the most margin against cavitation, which is not checked (the same rule as the
// maximum stagnation pressure of other water facilities). 0 without a range.
func (f *Facility) HeldStaticPressure() float64 {
	if f.StaticPressure == nil {
		return 0
	}
	return f.StaticPressure.Max
}

// Range is a closed interval [Min, Max]; Min = Max means a fixed value. Its unit is
// the unit of the field that holds it.
type Range struct {
	Min float64 `json:"min"`
	Max float64 `json:"max"`
}

// Fixed reports whether the range is a single value.
func (r Range) Fixed() bool { return r.Min == r.Max }

// Contains reports whether v lies in [Min, Max].
func (r Range) Contains(v float64) bool { return v >= r.Min && v <= r.Max }

// Wall types of a test section.
const (
	WallsClosed  = "closed"
	WallsOpen    = "open"
	WallsSlotted = "slotted"
	WallsPorous  = "porous"
)

// TestSection is the size of the test section in metres and its wall type.
type TestSection struct {
	Width  float64 `json:"width" unit:"m"`
	Height float64 `json:"height" unit:"m"`
	Length float64 `json:"length" unit:"m"`
	// Area is the cross-section area in m²; nil: Width·Height.
	Area *float64 `json:"area,omitempty" unit:"m^2"`
	// Walls is one of "closed", "open", "slotted", "porous".
	Walls string `json:"walls"`
}

// CrossSection returns the test-section cross-section area in m².
func (t TestSection) CrossSection() float64 {
	if t.Area != nil {
		return *t.Area
	}
	return t.Width * t.Height
}

// Balance is a force balance with its rated loads.
type Balance struct {
	ID   string `json:"id"`
	Name string `json:"name,omitempty"`
	// Limits are the rated loads of each component; a nil component is unlimited.
	Limits Limits `json:"limits"`
	// Combined are gauge rows: |Σ coefficient·load| ≤ limit, coefficients in SI.
	Combined []CombinedLimit `json:"combined,omitempty" maxItems:"50"`
	// SafetyFactor divides every rating: a plan keeps utilisation ≤ 1/SafetyFactor.
	SafetyFactor float64 `json:"safety_factor"`
	// Accuracy is the balance's measurement uncertainty (2σ); nil: not known,
	// and load answers give no coefficient uncertainty.
	Accuracy *Accuracy `json:"accuracy,omitempty"`
}

// Accuracy is a balance's 2σ measurement uncertainty per component: a fraction
// of each component's rating, or per component in N and N·m (which wins for the
// components it gives).
type Accuracy struct {
	// FractionOfRating is the 2σ uncertainty as a fraction of each rated
	// component's rating (0.0005 = 0.05 %); 0: none given.
	FractionOfRating float64 `json:"fraction_of_rating,omitempty"`
	// Components gives the 2σ uncertainty of single components in N (forces) and
	// N·m (moments), rated or not.
	Components *Limits `json:"components,omitempty"`
}

// Of returns the 2σ uncertainty of component i (N or N·m) of a balance with
// the given limits, and whether it is known.
func (a *Accuracy) Of(i int, l *Limits) (float64, bool) {
	if a == nil {
		return 0, false
	}
	if a.Components != nil {
		if v := limitsArray(a.Components)[i]; v != nil {
			return *v, true
		}
	}
	if r := limitsArray(l)[i]; r != nil && a.FractionOfRating > 0 {
		return a.FractionOfRating * *r, true
	}
	return 0, false
}

// limitsArray returns the components of l in the order of the load vector
// (normal, axial, side, rolling, pitching, yawing moment; loads.Index*).
func limitsArray(l *Limits) [6]*float64 {
	return [6]*float64{l.Normal, l.Axial, l.Side, l.RollingMoment, l.PitchingMoment, l.YawingMoment}
}

// Limits are a balance's rated loads: forces in N, moments in N·m, body axes.
type Limits struct {
	Normal         *float64 `json:"normal,omitempty" unit:"N"`
	Axial          *float64 `json:"axial,omitempty" unit:"N"`
	Side           *float64 `json:"side,omitempty" unit:"N"`
	RollingMoment  *float64 `json:"rolling_moment,omitempty" unit:"N*m"`
	PitchingMoment *float64 `json:"pitching_moment,omitempty" unit:"N*m"`
	YawingMoment   *float64 `json:"yawing_moment,omitempty" unit:"N*m"`
}

// Load component names, as used in Limits, CombinedLimit.Coefficients and the API.
const (
	ComponentNormal         = "normal"
	ComponentAxial          = "axial"
	ComponentSide           = "side"
	ComponentRollingMoment  = "rolling_moment"
	ComponentPitchingMoment = "pitching_moment"
	ComponentYawingMoment   = "yawing_moment"
)

// CombinedLimit is a gauge row of a balance: |Σ Coefficients[c]·load[c]| ≤ Limit.
// Coefficients are SI (a force coefficient is dimensionless, a moment coefficient
// in 1/m when the row is in N).
type CombinedLimit struct {
	Name         string             `json:"name"`
	Coefficients map[string]float64 `json:"coefficients" maxItems:"6"`
	Limit        float64            `json:"limit"`
}

// Operations are the facility's timing figures for the schedule estimate.
type Operations struct {
	SecondsPerPoint             float64 `json:"seconds_per_point"`
	MinutesPerRun               float64 `json:"minutes_per_run"`
	MinutesPerPressureChange    float64 `json:"minutes_per_pressure_change"`
	MinutesPerTemperatureChange float64 `json:"minutes_per_temperature_change"`
}
