package similarity

import (
	"fmt"
	"math"

	"scalematch/facilities"
)

// TransitionReynolds is the flat-plate transition Reynolds number Re_tr = 5·10⁵ of
// the transitional skin-friction law (Schlichting, Boundary-Layer Theory).
const TransitionReynolds = 5e5

// Trip thresholds (common practice): transition trips are recommended when natural
// transition on the model lies aft of TripModelFraction of the reference length
// while on the full-scale aircraft it lies ahead of TripFlightFraction, i.e. the
// aircraft is turbulent almost from the nose and the model is not.
const (
	TripModelFraction  = 0.10
	TripFlightFraction = 0.05
)

// Friction lines used for the skin-friction estimate.
const (
	// LinePrandtlSchlichting: Blasius below Re_tr, Prandtl–Schlichting above.
	LinePrandtlSchlichting = "prandtl_schlichting"
	// LineITTC1957: the ITTC 1957 model-ship correlation line, used in water.
	LineITTC1957 = "ittc_1957"
)

// minFrictionReynolds is the lowest Reynolds number the skin-friction laws accept.
const minFrictionReynolds = 1e3

// LaminarSkinFriction returns the mean skin-friction coefficient of a laminar flat
// plate at length Reynolds number re (Blasius):
//
//	C_f = 1.328/√Re
//
// (Schlichting, Boundary-Layer Theory, ch. 7).
func LaminarSkinFriction(re float64) float64 { return 1.328 / math.Sqrt(re) }

// TurbulentSkinFriction returns the mean skin-friction coefficient of a flat plate
// turbulent from the leading edge at length Reynolds number re (Prandtl–Schlichting):
//
//	C_f = 0.455/(log10 Re)^2.58
//
// (Schlichting, Boundary-Layer Theory, ch. 21).
func TurbulentSkinFriction(re float64) float64 { return 0.455 / math.Pow(math.Log10(re), 2.58) }

// TransitionalSkinFriction returns the mean skin-friction coefficient of a flat
// plate with natural transition at Re_tr = 5·10⁵: laminar (Blasius) below Re_tr, and
// above it the Prandtl–Schlichting law less the laminar run's deficit
//
//	C_f = 0.455/(log10 Re)^2.58 − 1700/Re
//
// (Schlichting, Boundary-Layer Theory, ch. 21).
func TransitionalSkinFriction(re float64) float64 {
	if re <= TransitionReynolds {
		return LaminarSkinFriction(re)
	}
	return TurbulentSkinFriction(re) - 1700/re
}

// ITTC1957 returns the ITTC 1957 model-ship correlation line
//
//	C_F = 0.075/(log10 Re − 2)²
//
// (8th International Towing Tank Conference, 1957). Re = 10⁷ gives 0.0030.
func ITTC1957(re float64) float64 {
	d := math.Log10(re) - 2
	return 0.075 / (d * d)
}

// CompressibilityFactor returns the reduction of turbulent skin friction with Mach
// number, (1 + 0.144·M²)^−0.65 (Raymer, Aircraft Design: A Conceptual Approach;
// common practice).
func CompressibilityFactor(mach float64) float64 { return math.Pow(1+0.144*mach*mach, -0.65) }

// TransitionFraction returns the estimated chordwise position of natural
// transition, x/L ≈ Re_tr/Re_L, limited to 1 (laminar throughout).
func TransitionFraction(re float64) float64 { return math.Min(1, TransitionReynolds/re) }

// ReynoldsEffects is the estimate of how the Reynolds-number mismatch shifts the
// measured drag (physics.md §9). Reynolds numbers are on the reference length;
// skin-friction coefficients are based on the wetted area; drag increments are in
// counts (1 count = 0.0001 in C_D on the reference area).
type ReynoldsEffects struct {
	// ReynoldsFlight and ReynoldsTest are the full-scale and model Reynolds numbers.
	ReynoldsFlight float64 `json:"reynolds_flight"`
	ReynoldsTest   float64 `json:"reynolds_test"`
	// Line names the friction law: LinePrandtlSchlichting or LineITTC1957.
	Line string `json:"friction_line"`
	// SkinFrictionFlight is the full-scale C_f, turbulent from the nose.
	SkinFrictionFlight float64 `json:"skin_friction_flight"`
	// SkinFrictionTest is the model's C_f with natural transition.
	SkinFrictionTest float64 `json:"skin_friction_test"`
	// SkinFrictionTestTripped is the model's C_f with transition fixed at the nose.
	SkinFrictionTestTripped float64 `json:"skin_friction_test_tripped"`
	// DeltaCDCounts is (C_f,test − C_f,flight)·FF·S_wet/S_ref in counts, natural
	// transition on the model: what the model's drag exceeds (or, when negative,
	// falls short of) the aircraft's by friction alone.
	DeltaCDCounts float64 `json:"delta_cd_counts"`
	// DeltaCDCountsTripped is the same with the model tripped at the nose.
	DeltaCDCountsTripped float64 `json:"delta_cd_counts_tripped"`
	// NaturalTransitionFraction is x/L ≈ Re_tr/Re_L on the model (1: laminar).
	NaturalTransitionFraction float64 `json:"natural_transition_fraction"`
	// FlightTransitionFraction is the same on the full-scale aircraft.
	FlightTransitionFraction float64 `json:"flight_transition_fraction"`
	// TripsRecommended: the model would run laminar far further aft than the
	// aircraft (see TripModelFraction, TripFlightFraction).
	TripsRecommended bool `json:"trips_recommended"`
	// Notes explain the recommendation and the estimate's limits.
	Notes []string `json:"notes,omitempty"`
}

// ReynoldsEffect estimates the skin-friction drag shift of a model test: the flight
// at Reynolds number reFlight and Mach number machFlight, the test at reTest and
// machTest in the given medium (a facilities.Medium* name), for article art (its
// wetted area, reference area and form factor).
//
// In gas media the full scale is turbulent from the nose (Prandtl–Schlichting) and
// the model has natural transition at Re_tr = 5·10⁵ (Blasius below it, Schlichting's
// transitional law above), both times the compressibility factor at their Mach
// numbers. In water both use the ITTC 1957 line, the marine practice, with no
// compressibility factor (below Re_tr the model is laminar and Blasius is used).
// Bad input gives a *facilities.Error naming the field.
func ReynoldsEffect(art *Article, reFlight, machFlight, reTest, machTest float64, medium string) (ReynoldsEffects, error) {
	var fe []facilities.FieldError
	if !(art.WettedArea > 0) || math.IsInf(art.WettedArea, 0) {
		fe = append(fe, facilities.FieldError{Field: "article.wetted_area", Message: "must be a positive area in m² for the skin-friction estimate"})
	}
	if !(art.ReferenceArea > 0) || math.IsInf(art.ReferenceArea, 0) {
		fe = append(fe, facilities.FieldError{Field: "article.reference_area", Message: "must be a positive area in m²"})
	}
	if !(art.FormFactor >= 0) || math.IsInf(art.FormFactor, 0) {
		fe = append(fe, facilities.FieldError{Field: "article.form_factor", Message: fmt.Sprintf("must be 0 (taken as 1) or positive, got %g", art.FormFactor)})
	}
	for _, r := range []struct {
		field string
		v     float64
	}{{"flight.reynolds", reFlight}, {"test.reynolds", reTest}} {
		if !(r.v >= minFrictionReynolds) || math.IsInf(r.v, 0) {
			fe = append(fe, facilities.FieldError{Field: r.field, Message: fmt.Sprintf("Reynolds number %g is outside the skin-friction laws' range (at least %g)", r.v, minFrictionReynolds)})
		}
	}
	for _, m := range []struct {
		field string
		v     float64
	}{{"flight.mach", machFlight}, {"test.mach", machTest}} {
		if !(m.v >= 0 && m.v <= 5) {
			fe = append(fe, facilities.FieldError{Field: m.field, Message: fmt.Sprintf("Mach number %g is outside 0 to 5", m.v)})
		}
	}
	if err := facilities.Invalid("invalid skin-friction input", fe); err != nil {
		return ReynoldsEffects{}, err
	}
	ff := art.FormFactor
	if ff == 0 {
		ff = 1
	}
	r := ReynoldsEffects{
		ReynoldsFlight:            reFlight,
		ReynoldsTest:              reTest,
		NaturalTransitionFraction: TransitionFraction(reTest),
		FlightTransitionFraction:  TransitionFraction(reFlight),
	}
	if medium == facilities.MediumWater {
		r.Line = LineITTC1957
		line := func(re float64) float64 {
			if re <= TransitionReynolds {
				return LaminarSkinFriction(re)
			}
			return ITTC1957(re)
		}
		r.SkinFrictionFlight = line(reFlight)
		r.SkinFrictionTest = line(reTest)
		r.SkinFrictionTestTripped = ITTC1957(reTest)
	} else {
		r.Line = LinePrandtlSchlichting
		kf, kt := CompressibilityFactor(machFlight), CompressibilityFactor(machTest)
		r.SkinFrictionFlight = TurbulentSkinFriction(reFlight) * kf
		r.SkinFrictionTest = TransitionalSkinFriction(reTest) * kt
		r.SkinFrictionTestTripped = TurbulentSkinFriction(reTest) * kt
	}
	area := ff * art.WettedArea / art.ReferenceArea
	r.DeltaCDCounts = (r.SkinFrictionTest - r.SkinFrictionFlight) * area * 1e4
	r.DeltaCDCountsTripped = (r.SkinFrictionTestTripped - r.SkinFrictionFlight) * area * 1e4
	r.TripsRecommended = r.NaturalTransitionFraction > TripModelFraction && r.FlightTransitionFraction < TripFlightFraction
	if r.TripsRecommended {
		r.Notes = append(r.Notes, fmt.Sprintf(
			"natural transition on the model near %.0f %% of the reference length against %.1f %% at full scale: fix transition with trips near the leading edges (common practice); the tripped estimate is %+.1f counts",
			100*r.NaturalTransitionFraction, 100*r.FlightTransitionFraction, r.DeltaCDCountsTripped))
	}
	if reTest < TransitionReynolds {
		r.Notes = append(r.Notes, fmt.Sprintf("the model's Reynolds number %.3g is below the flat-plate transition value %.0e: trips may not hold a turbulent boundary layer and size them with care", reTest, TransitionReynolds))
	}
	r.Notes = append(r.Notes, "flat-plate friction on the reference length with a form factor: an estimate of the friction shift only; pressure drag, separation and transonic effects of the Reynolds number are not included")
	return r, nil
}
