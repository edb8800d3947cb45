package similarity

import "scalematch/facilities"

// Article is the full-scale test article: its geometry in SI units at full scale and
// an estimate of its aerodynamic coefficients. Model dimensions are these times the
// model scale (areas times scale²).
type Article struct {
	// ReferenceLength is the reference chord (usually the mean aerodynamic chord) in m;
	// the Reynolds number is based on it.
	ReferenceLength float64 `json:"reference_length" unit:"m"`
	// ReferenceArea is the reference (wing) area in m² of the force coefficients.
	ReferenceArea float64 `json:"reference_area" unit:"m^2"`
	// Span is the wing span in m.
	Span float64 `json:"span" unit:"m"`
	// Length is the overall length in m; 0: unknown.
	Length float64 `json:"length,omitempty" unit:"m"`
	// FrontalArea is the frontal (cross-section) area in m² used for solid blockage.
	FrontalArea float64 `json:"frontal_area" unit:"m^2"`
	// WettedArea is the wetted area in m² used for the skin-friction estimate.
	WettedArea float64 `json:"wetted_area" unit:"m^2"`
	// FormFactor multiplies the flat-plate skin friction; 0: 1.0.
	FormFactor float64 `json:"form_factor,omitempty"`
	// FrictionLine is the skin-friction law of a boundary layer turbulent from the
	// leading edge (the full-scale vehicle, the tripped model): "prandtl_schlichting"
	// (the default when empty) or "ittc_1957" (the marine correlation line). Natural
	// transition on the model always uses the transitional Prandtl–Schlichting law.
	FrictionLine string `json:"friction_line,omitempty" enums:"prandtl_schlichting,ittc_1957"`
	// FullScaleBoundaryLayer is the state of the full-scale vehicle's boundary layer
	// in the skin-friction estimate: "turbulent" from the leading edge (the default
	// when empty) or "natural_transition" (transitional law, as on the model).
	FullScaleBoundaryLayer string `json:"full_scale_boundary_layer,omitempty" enums:"turbulent,natural_transition"`
	// Aero is the estimate of the aerodynamic coefficients.
	Aero Aero `json:"aero"`
}

// Aero is an aerodynamic estimate of the test article: either the parametric model
// (linear lift curve with a stall cap, drag polar with offset minimum, linear pitching
// moment) or, when Table is not empty, a table of coefficients against α.
type Aero struct {
	// LiftSlope is dC_L/dα per radian.
	LiftSlope float64 `json:"lift_slope"`
	// ZeroLiftAlpha is α at C_L = 0 in degrees.
	ZeroLiftAlpha float64 `json:"zero_lift_alpha"`
	// CLMax caps |C_L| past the stall.
	CLMax float64 `json:"cl_max"`
	// CDMin is the minimum drag coefficient.
	CDMin float64 `json:"cd_min"`
	// CLAtCDMin is the lift coefficient at minimum drag.
	CLAtCDMin float64 `json:"cl_at_cd_min"`
	// InducedDragFactor is K of C_D = C_Dmin + K·(C_L − C_L,minD)².
	InducedDragFactor float64 `json:"induced_drag_factor"`
	// CmZero is the pitching-moment coefficient at α = 0 about the moment reference centre.
	CmZero float64 `json:"cm_zero"`
	// CmSlope is dC_m/dα per radian.
	CmSlope float64 `json:"cm_slope"`
	// Table, when not empty, replaces the parametric model: coefficients against α
	// (degrees), interpolated linearly, an error outside the table.
	Table []AeroPoint `json:"table,omitempty" maxItems:"2000"`
}

// AeroPoint is one row of a coefficient table. Angles in degrees; C_Y, C_l, C_n are
// the side-force, rolling- and yawing-moment coefficients (optional, zero when absent).
type AeroPoint struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta,omitempty"`
	CL    float64 `json:"cl"`
	CD    float64 `json:"cd"`
	Cm    float64 `json:"cm"`
	CY    float64 `json:"cy,omitempty"`
	Cl    float64 `json:"cl_roll,omitempty"`
	Cn    float64 `json:"cn,omitempty"`
}

// LoadLimit is the planner's hook for limits that depend on the model's size and the
// test state, such as the rated loads of a balance. The planner treats it as a
// dynamic-pressure ceiling that varies with scale (forces grow with q·s², moments
// with q·s³).
type LoadLimit interface {
	// Name is the constraint's name in the plan's binding list, e.g. "balance".
	Name() string
	// MaxDynamicPressure returns the largest free-stream dynamic pressure in Pa at which
	// a model of the given scale, at the test state st (its Mach number and medium;
	// its dynamic pressure is ignored), keeps every load within its limit; +Inf when
	// nothing limits it. It returns 0 when even the smallest q breaks a limit (the
	// model's weight alone, say).
	MaxDynamicPressure(scale float64, st facilities.State) float64
}

// LoadFloor is a lower limit on the test's dynamic pressure that depends on the
// model scale and on the balance: the least q at which a balance resolves the
// coefficients the test needs (internal/loads.Limit.Resolved). Each balance the test may
// use has its own window of dynamic pressure, from its floor up to its load
// ceiling; the plan keeps within one of them, honours it like any facility
// limit, and reports the floor by FloorName in its binding list.
type LoadFloor interface {
	// FloorName is the constraint's name in the plan's binding list, e.g.
	// "resolution".
	FloorName() string
	// Windows appends to dst, for each balance the test may use, the window of
	// free-stream dynamic pressure in Pa in which a model of the given scale, at
	// the test state st (its Mach number; its dynamic pressure is ignored), keeps
	// within the balance's loads and meets its floor; a window whose Lo is above
	// its Hi cannot be used.
	Windows(dst []Window, scale float64, st facilities.State) []Window
}

// Window is a range of free-stream dynamic pressure, Lo to Hi in Pa.
type Window struct{ Lo, Hi float64 }

// CorrectionLiftSlope returns the lift slope per radian the wall corrections use
// (streamline curvature's lift and moment): LiftSlope for the parametric estimate,
// 0 (unknown) for a coefficient table.
func (a *Aero) CorrectionLiftSlope() float64 {
	if len(a.Table) > 0 {
		return 0
	}
	return a.LiftSlope
}
