package loads

import (
	"encoding/json"
	"math"
)

// PointResult is the loads of one test point at the balance moment centre, body axes,
// wall corrections and weight included: forces in N, moments in N·m, angles in
// degrees. Utilization is the largest |load|/rating of the point (not divided by
// the safety factor); Limiting names the component or gauge row that gives it.
type PointResult struct {
	Alpha           float64 `json:"alpha"`
	Beta            float64 `json:"beta"`
	DynamicPressure float64 `json:"dynamic_pressure"`
	Normal          float64 `json:"normal"`
	Axial           float64 `json:"axial"`
	Side            float64 `json:"side"`
	PitchingMoment  float64 `json:"pitching_moment"`
	RollingMoment   float64 `json:"rolling_moment"`
	YawingMoment    float64 `json:"yawing_moment"`
	Utilization     float64 `json:"utilization"`
	Limiting        string  `json:"limiting,omitempty"`
	// Rows are every component (normal, axial, side, rolling_moment,
	// pitching_moment, yawing_moment, in that order) and then every gauge row of
	// the balance at this point, rated or not.
	Rows []Row `json:"rows"`
}

// Row is one balance component or gauge row at one test point.
type Row struct {
	// Name is the component's name or the gauge row's name.
	Name string `json:"name"`
	// Load is the component's load (N for forces, N·m for moments) or the gauge
	// row's Σ coefficient·load, in its rating's unit.
	Load float64 `json:"load"`
	// Rated is false for a component with no rating of its own; such a component
	// may still enter a gauge row (Covered).
	Rated bool `json:"rated"`
	// Covered reports that the row is rated or that a gauge row of the balance
	// includes the component: false for a component the balance does not measure
	// against any limit.
	Covered bool `json:"covered"`
	// Rating is the rated load (N, N·m or the gauge row's unit); 0 when not rated.
	Rating float64 `json:"rating,omitempty"`
	// Allowed is Rating ÷ the safety factor, in the same unit; 0 when not rated.
	Allowed float64 `json:"allowed,omitempty"`
	// ShareOfAllowed is |Load| ÷ Allowed (1 = at the allowed load); 0 when not
	// rated.
	ShareOfAllowed float64 `json:"share_of_allowed"`
	// Limiting marks the row with the point's largest ShareOfAllowed.
	Limiting bool `json:"limiting,omitempty"`
}

// Verdicts of a load check (Report.Verdict and the answers built on it), in
// the order of how far they are from letting the model be run.
const (
	// VerdictWithin: the model fits the test section, every point keeps every
	// rated component and gauge row at or under its allowed load (rating ÷ safety
	// factor), the weight is included and no unrated component carries load.
	VerdictWithin = "within_allowed_loads"
	// VerdictNotVerified: no rated row is above its allowed load, but the check
	// cannot vouch for the loads: a component with no rating (and in no gauge
	// row) carries load, the model's weight was left out, or the facility lists
	// no balance to check.
	VerdictNotVerified = "not_verified"
	// VerdictOver: at least one point loads a rated component or gauge row above
	// its allowed load (or the weight alone does): those points must not be run.
	VerdictOver = "over_allowed_load"
	// VerdictDoesNotFit: the model breaks a test-section limit (span, blockage or
	// length); no load figure makes it runnable.
	VerdictDoesNotFit = "does_not_fit"
)

// VerdictRank orders the verdicts from VerdictWithin (0) to VerdictDoesNotFit
// (3); an unknown verdict ranks with VerdictNotVerified.
func VerdictRank(v string) int {
	switch v {
	case VerdictWithin:
		return 0
	case VerdictOver:
		return 2
	case VerdictDoesNotFit:
		return 3
	}
	return 1
}

// Limiting names a component (or gauge row) and the test point where it binds.
type Limiting struct {
	Component string  `json:"component"`
	Alpha     float64 `json:"alpha"`
	Beta      float64 `json:"beta"`
}

// Report is the load check of one balance over the test matrix.
type Report struct {
	// BalanceID names the balance.
	BalanceID string `json:"balance_id"`
	// SafetyFactor is the balance's safety factor (0 taken as 1).
	SafetyFactor float64 `json:"safety_factor"`
	// AllowedUtilization is 1/SafetyFactor.
	AllowedUtilization float64 `json:"allowed_utilization"`
	// DynamicPressure is the free-stream dynamic pressure checked, in Pa.
	DynamicPressure float64 `json:"dynamic_pressure"`
	// Points are the loads of every test point.
	Points []PointResult `json:"points"`
	// MaxUtilization is the largest point utilisation.
	MaxUtilization float64 `json:"max_utilization"`
	// WithinLimits reports MaxUtilization ≤ AllowedUtilization and that the wind-off
	// loads (the model's weight alone, which the balance carries at every q on the
	// way up) stay within it too: DynamicPressure ≤ MaxSafeDynamicPressure.
	WithinLimits bool `json:"within_limits"`
	// Limiting is the component and point of MaxUtilization.
	Limiting Limiting `json:"limiting"`
	// MaxSafeLimiting is the component and point that set MaxSafeDynamicPressure.
	MaxSafeLimiting Limiting `json:"max_safe_limiting"`
	// WeightIncluded reports whether the model's weight is in the loads.
	WeightIncluded bool `json:"weight_included"`
	// Warnings are notes on the check's inputs.
	Warnings []string `json:"warnings,omitempty"`
	// Verdict is this balance's verdict on the loads (the Verdict* names; a
	// report alone never says VerdictDoesNotFit: the fit is the answer's).
	Verdict string `json:"verdict"`
	// UnratedLoaded names the components that carry load at some point but have
	// no rating and enter no gauge row: the check cannot vouch for them.
	UnratedLoaded []string `json:"unrated_loaded,omitempty"`
	// OverAllowed lists every point and row above its allowed load.
	OverAllowed []Limiting `json:"over_allowed,omitempty"`
	// Uncertainty is, per point in the order of Points, the 2σ uncertainty of
	// the coefficients from the balance's accuracy (facilities.Balance.Accuracy); empty
	// when the balance gives no accuracy.
	Uncertainty []Uncertainty `json:"uncertainty,omitempty"`
	// UncertaintyUnknown names the coefficients whose uncertainty is not known
	// (a component they need has no accuracy).
	UncertaintyUnknown []string `json:"uncertainty_unknown,omitempty"`
	// LoadFraction is the share of the allowed load (rating ÷ safety factor)
	// the check allowed (Installation.LoadFraction; 1: all of it):
	// AllowedUtilization and every row's Allowed include it.
	LoadFraction float64 `json:"load_fraction"`
	// Resolution says whether the balance resolves the required resolution
	// (Setup.Resolution); absent when none was asked.
	Resolution *ResolutionCheck `json:"resolution,omitempty"`
	// MaxSafeDynamicPressure is the free-stream dynamic pressure in Pa at which, by
	// this estimate, the worst point reaches AllowedUtilization (rating ÷ safety
	// factor); 0 when the weight alone exceeds it; +Inf (JSON null) when no rated
	// load grows with q. Despite the published name (kept for compatibility) it is
	// not a safe limit: it is where a linear-lift, parabolic-polar, steady estimate
	// reaches the allowed loads, and the safety factor is the only margin left for
	// the estimate's error and for unsteady loads. It comes last in the JSON
	// object, as it always has.
	MaxSafeDynamicPressure Ceiling `json:"max_safe_dynamic_pressure"`
}

// Ceiling is an upper bound in which +Inf means that there is none; JSON
// writes that as null and reads null back as +Inf.
type Ceiling float64

// MarshalJSON writes the bound as encoding/json writes a float64, or null when
// there is none.
func (c Ceiling) MarshalJSON() ([]byte, error) {
	if math.IsInf(float64(c), 1) {
		return []byte("null"), nil
	}
	return json.Marshal(float64(c))
}

// UnmarshalJSON reads a number, or null as no bound (+Inf).
func (c *Ceiling) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*c = Ceiling(math.Inf(1))
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*c = Ceiling(f)
	return nil
}

// Uncertainty is the 2σ uncertainty of the coefficients at one point, from the
// balance components' 2σ uncertainties δF at the point's corrected dynamic
// pressure q_c, the model's reference area S and reference length c:
//
//	δC = δF/(q_c·S) for forces, δF/(q_c·S·c) for moments,
//	δC_L = √((δN·cos α)² + (δA·sin α)²)/(q_c·S),
//	δC_D = √((δA·cos α)² + (δN·sin α)²)/(q_c·S)
//
// (the rotation of normal and axial force into lift and drag at angle of
// attack α; sideslip is not in the rotation). A coefficient that is not known is
// 0 and named in Report.UncertaintyUnknown. At q_c = 0 nothing is resolved
// and every figure is 0 with "all" unknown.
type Uncertainty struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
	// CL is δC_L (dimensionless).
	CL float64 `json:"cl,omitempty"`
	// CDCounts is δC_D in drag counts (1 count = 0.0001).
	CDCounts float64 `json:"cd_counts,omitempty"`
	// Cm is δC_m (dimensionless).
	Cm float64 `json:"cm,omitempty"`
	// CY is δC_Y (dimensionless).
	CY float64 `json:"cy,omitempty"`
	// Cl is δC_l, the rolling moment (dimensionless).
	Cl float64 `json:"cl_roll,omitempty"`
	// Cn is δC_n (dimensionless).
	Cn float64 `json:"cn,omitempty"`
}

// CoefficientUncertainty returns the 2σ uncertainty of the coefficients at
// angle of attack alphaDeg (degrees) for component uncertainties d (N, N·m;
// known[i] false where not given), corrected dynamic pressure qc (Pa),
// reference area s (m²) and length c (m), and the names of the coefficients not
// known.
func CoefficientUncertainty(d Vector, known [6]bool, alphaDeg, qc, s, c float64) (Uncertainty, []string) {
	sa, ca := math.Sincos(alphaDeg * math.Pi / 180)
	return coefficientUncertaintyAt(d, known, sa, ca, qc, s, c)
}

// coefficientUncertaintyAt is CoefficientUncertainty with the sine and cosine
// of α given (Sincos of α·π/180, as CoefficientUncertainty takes them).
func coefficientUncertaintyAt(d Vector, known [6]bool, sa, ca, qc, s, c float64) (Uncertainty, []string) {
	u := Uncertainty{}
	var unknown []string
	qs := qc * s
	if known[IndexNormal] && known[IndexAxial] {
		u.CL = math.Hypot(d[IndexNormal]*ca, d[IndexAxial]*sa) / qs
		u.CDCounts = 1e4 * math.Hypot(d[IndexAxial]*ca, d[IndexNormal]*sa) / qs
	} else {
		unknown = append(unknown, "cl", "cd")
	}
	one := func(i int, name string, den float64, dst *float64) {
		if known[i] {
			*dst = d[i] / den
		} else {
			unknown = append(unknown, name)
		}
	}
	one(IndexPitchingMoment, "cm", qs*c, &u.Cm)
	one(IndexSide, "cy", qs, &u.CY)
	one(IndexRollingMoment, "cl_roll", qs*c, &u.Cl)
	one(IndexYawingMoment, "cn", qs*c, &u.Cn)
	return u, unknown
}

// validate checks the case's numbers, naming fields by their request paths.
