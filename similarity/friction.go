package similarity

import (
	"fmt"
	"math"

	"scalematch/facilities"
	"scalematch/internal/check"
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

// Friction lines: the law of a boundary layer turbulent from the leading edge
// (a tripped model, and the full-scale vehicle unless the caller states natural
// transition). Natural transition always uses the transitional law
// (TransitionalSkinFriction), whatever the medium and the line.
const (
	// LinePrandtlSchlichting is the Prandtl–Schlichting law, the default.
	LinePrandtlSchlichting = "prandtl_schlichting"
	// LineITTC1957 is the ITTC 1957 model-ship correlation line, used only when
	// the caller chooses it (article.friction_line).
	LineITTC1957 = "ittc_1957"
)

// Boundary-layer states of the full-scale vehicle (article.full_scale_boundary_layer).
const (
	// BoundaryLayerTurbulent: turbulent from the leading edge, the default.
	BoundaryLayerTurbulent = "turbulent"
	// BoundaryLayerNatural: natural transition at TransitionReynolds.
	BoundaryLayerNatural = "natural_transition"
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

// TransitionConstant returns A of the transitional law C_f = C_f,turb(Re) − A/Re for
// transition at length Reynolds number reTr: the turbulent friction the laminar run
// ahead of transition does not have,
//
//	A = Re_tr·[0.455/(log10 Re_tr)^2.58 − 1.328/√Re_tr]
//
// (Schlichting, Boundary-Layer Theory, ch. 21: the turbulent layer is taken to
// start at the leading edge and the laminar run's deficit is subtracted). With
// this A the law equals Blasius at Re = Re_tr, so C_f is continuous there. At
// Re_tr = 5·10⁵ it gives A = 1614; Schlichting's table gives 1700 (the test
// compares the four tabulated values).
func TransitionConstant(reTr float64) float64 {
	return reTr * (TurbulentSkinFriction(reTr) - LaminarSkinFriction(reTr))
}

// TransitionalSkinFriction returns the mean skin-friction coefficient of a flat
// plate with natural transition at Re_tr = 5·10⁵ (TransitionReynolds): laminar
// (Blasius) up to Re_tr, and above it the Prandtl–Schlichting law less the laminar
// run's deficit,
//
//	C_f = 0.455/(log10 Re)^2.58 − A/Re,  A = TransitionConstant(Re_tr)
//
// (Schlichting, Boundary-Layer Theory, ch. 21). It is continuous at Re_tr.
func TransitionalSkinFriction(re float64) float64 {
	return CompressibleTransitionalSkinFriction(re, 1, 1)
}

// CompressibleTransitionalSkinFriction is TransitionalSkinFriction with the laminar
// and turbulent parts each reduced by its own compressibility factor: kLam
// (LaminarCompressibilityFactor) on the laminar run, kTurb (CompressibilityFactor)
// on the turbulent part,
//
//	C_f = kTurb·C_f,turb(Re) − (Re_tr/Re)·[kTurb·C_f,turb(Re_tr) − kLam·C_f,lam(Re_tr)]
//
// which is kLam·Blasius up to Re_tr and continuous there.
func CompressibleTransitionalSkinFriction(re, kLam, kTurb float64) float64 {
	if re <= TransitionReynolds {
		return kLam * LaminarSkinFriction(re)
	}
	rt := TransitionReynolds
	return kTurb*TurbulentSkinFriction(re) - rt/re*(kTurb*TurbulentSkinFriction(rt)-kLam*LaminarSkinFriction(rt))
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

// Reference-temperature constants of the laminar compressibility factor for an
// air-like gas (Prandtl number 0.72, adiabatic wall).
const (
	// laminarRecovery is the laminar recovery factor r = √Pr = √0.72 (White,
	// Viscous Fluid Flow, 2nd ed., 1991, ch. 7; from memory).
	laminarRecovery = 0.8485
	// viscosityExponent is ω of the power law μ ∝ T^ω for air near room
	// temperature, 0.76 (White, Viscous Fluid Flow, ch. 1; from memory).
	viscosityExponent = 0.76
)

// LaminarCompressibilityFactor returns the reduction of laminar flat-plate skin
// friction with Mach number on an adiabatic wall by the reference-temperature
// method (Eckert 1955; White, Viscous Fluid Flow, 2nd ed., 1991, §7-3; from
// memory). The reference temperature is
//
//	T*/T_e = 0.5 + 0.039·M² + 0.5·T_aw/T_e,  T_aw/T_e = 1 + r·(γ−1)/2·M²
//
// with r = √0.72 and γ = 1.4, and the Blasius law evaluated at the reference state
// gives C_f/C_f,incompressible = √C* with the Chapman–Rubesin parameter
// C* = ρ*μ*/(ρ_e·μ_e) = (T*/T_e)^(ω−1) for μ ∝ T^ω, ω = 0.76. The factor is
// (T*/T_e)^((ω−1)/2): 0.9908 at M 0.8, against 0.9443 for the turbulent factor.
func LaminarCompressibilityFactor(mach float64) float64 {
	m2 := mach * mach
	taw := 1 + laminarRecovery*0.2*m2
	ts := 0.5 + 0.039*m2 + 0.5*taw
	return math.Pow(ts, (viscosityExponent-1)/2)
}

// TransitionFraction returns the estimated chordwise position of natural
// transition, x/L ≈ Re_tr/Re_L, limited to 1 (laminar throughout).
func TransitionFraction(re float64) float64 { return math.Min(1, TransitionReynolds/re) }

// FrictionFieldErrors returns the problems of the article's skin-friction
// settings (friction_line, full_scale_boundary_layer), nil when there are none.
func (a *Article) FrictionFieldErrors() []check.FieldError {
	var fe []check.FieldError
	switch a.FrictionLine {
	case "", LinePrandtlSchlichting, LineITTC1957:
	default:
		fe = append(fe, check.FieldError{Field: "article.friction_line", Message: fmt.Sprintf("%q: must be %q (the default) or %q", a.FrictionLine, LinePrandtlSchlichting, LineITTC1957)})
	}
	switch a.FullScaleBoundaryLayer {
	case "", BoundaryLayerTurbulent, BoundaryLayerNatural:
	default:
		fe = append(fe, check.FieldError{Field: "article.full_scale_boundary_layer", Message: fmt.Sprintf("%q: must be %q (the default) or %q", a.FullScaleBoundaryLayer, BoundaryLayerTurbulent, BoundaryLayerNatural)})
	}
	return fe
}

// ReynoldsEffects is the estimate of how the Reynolds-number mismatch shifts the
// measured drag (docs/physics.md, skin friction). Reynolds numbers are on the
// reference length; skin-friction coefficients are based on the wetted area; drag
// increments are in counts (1 count = 0.0001 in C_D on the reference area).
type ReynoldsEffects struct {
	// ReynoldsFlight and ReynoldsTest are the full-scale and model Reynolds numbers.
	ReynoldsFlight float64 `json:"reynolds_flight"`
	ReynoldsTest   float64 `json:"reynolds_test"`
	// Line names the law of fully turbulent friction (full scale, tripped model):
	// LinePrandtlSchlichting or, when the caller chose it, LineITTC1957.
	Line string `json:"friction_line"`
	// FullScaleBoundaryLayer is the full-scale state used: BoundaryLayerTurbulent
	// (the default) or BoundaryLayerNatural.
	FullScaleBoundaryLayer string `json:"full_scale_boundary_layer"`
	// TransitionConstant is A of the transitional law C_f = C_f,turb − A/Re at
	// Re_tr = 5·10⁵ (incompressible), dimensionless.
	TransitionConstant float64 `json:"transition_constant"`
	// SkinFrictionFlight is the full-scale C_f.
	SkinFrictionFlight float64 `json:"skin_friction_flight"`
	// SkinFrictionTest is the model's C_f with natural transition (transitional
	// Prandtl–Schlichting law in every medium).
	SkinFrictionTest float64 `json:"skin_friction_test"`
	// SkinFrictionTestTripped is the model's C_f with transition fixed at the nose.
	SkinFrictionTestTripped float64 `json:"skin_friction_test_tripped"`
	// LaminarCompressibilityTest and TurbulentCompressibilityTest are the factors
	// on the model's laminar and turbulent friction at the test Mach number
	// (reference-temperature method; Raymer's factor), dimensionless; 1 in a liquid.
	LaminarCompressibilityTest   float64 `json:"laminar_compressibility_test"`
	TurbulentCompressibilityTest float64 `json:"turbulent_compressibility_test"`
	// DeltaCDCounts is (C_f,test − C_f,flight)·FF·S_wet/S_ref in counts, natural
	// transition on the model: what the model's drag exceeds (or, when negative,
	// falls short of) the full-scale vehicle's by friction alone.
	DeltaCDCounts float64 `json:"delta_cd_counts"`
	// DeltaCDCountsTripped is the same with the model tripped at the nose.
	DeltaCDCountsTripped float64 `json:"delta_cd_counts_tripped"`
	// NaturalTransitionFraction is x/L ≈ Re_tr/Re_L on the model (1: laminar).
	NaturalTransitionFraction float64 `json:"natural_transition_fraction"`
	// FlightTransitionFraction is the same on the full-scale vehicle, were it
	// free to transition naturally.
	FlightTransitionFraction float64 `json:"flight_transition_fraction"`
	// TripsRecommended: the model would run laminar far further aft than the
	// full-scale vehicle (see TripModelFraction, TripFlightFraction).
	TripsRecommended bool `json:"trips_recommended"`
	// Notes explain the recommendation and the estimate's limits.
	Notes []string `json:"notes,omitempty"`
	// Trip sizes the trip when trips are recommended (Braslow & Knox 1958,
	// NACA TN 4363; see SizeTrip); absent otherwise.
	Trip *TripSize `json:"trip,omitempty"`
}

// ReynoldsEffect estimates the skin-friction drag shift of a model test: the flight
// at Reynolds number reFlight and Mach number machFlight, the test at reTest and
// machTest in the given medium (a facilities.Medium* name), for article art (its
// wetted area, reference area, form factor and friction settings).
//
// The model with natural transition takes the transitional Prandtl–Schlichting law
// (transition at Re_tr = 5·10⁵, Blasius below it) in every medium; the tripped
// model takes the fully turbulent line (art.FrictionLine: Prandtl–Schlichting by
// default, ITTC 1957 when chosen); the full-scale vehicle is turbulent from the
// nose on that line unless art.FullScaleBoundaryLayer says natural transition. In
// a gas the turbulent part takes Raymer's compressibility factor and the laminar
// part the reference-temperature factor, each at its own Mach number; a liquid
// takes neither. Bad input gives a *check.Error naming the field.
func ReynoldsEffect(art *Article, reFlight, machFlight, reTest, machTest float64, medium string) (ReynoldsEffects, error) {
	fe := append(art.geometryErrors("wetted_area", "reference_area", "form_factor"), art.FrictionFieldErrors()...)
	for _, r := range []struct {
		field string
		v     float64
	}{{"flight.reynolds", reFlight}, {"test.reynolds", reTest}} {
		if !(r.v >= minFrictionReynolds) || math.IsInf(r.v, 0) {
			fe = append(fe, check.FieldError{Field: r.field, Message: fmt.Sprintf("Reynolds number %g is outside the skin-friction laws' range (at least %g)", r.v, minFrictionReynolds)})
		}
	}
	for _, m := range []struct {
		field string
		v     float64
	}{{"flight.mach", machFlight}, {"test.mach", machTest}} {
		if !(m.v >= 0 && m.v <= 5) {
			fe = append(fe, check.FieldError{Field: m.field, Message: fmt.Sprintf("Mach number %g is outside 0 to 5", m.v)})
		}
	}
	if err := check.Invalid("invalid skin-friction input", fe); err != nil {
		return ReynoldsEffects{}, err
	}
	ff := art.FormFactor
	if ff == 0 {
		ff = 1
	}
	r := ReynoldsEffects{
		ReynoldsFlight:            reFlight,
		ReynoldsTest:              reTest,
		Line:                      LinePrandtlSchlichting,
		FullScaleBoundaryLayer:    BoundaryLayerTurbulent,
		TransitionConstant:        TransitionConstant(TransitionReynolds),
		NaturalTransitionFraction: TransitionFraction(reTest),
		FlightTransitionFraction:  TransitionFraction(reFlight),
	}
	if art.FrictionLine != "" {
		r.Line = art.FrictionLine
	}
	if art.FullScaleBoundaryLayer != "" {
		r.FullScaleBoundaryLayer = art.FullScaleBoundaryLayer
	}
	turbulent := TurbulentSkinFriction
	if r.Line == LineITTC1957 {
		turbulent = ITTC1957
	}
	klF, ktF, klT, ktT := 1.0, 1.0, 1.0, 1.0
	if medium != facilities.MediumWater {
		klF, ktF = LaminarCompressibilityFactor(machFlight), CompressibilityFactor(machFlight)
		klT, ktT = LaminarCompressibilityFactor(machTest), CompressibilityFactor(machTest)
	}
	r.LaminarCompressibilityTest, r.TurbulentCompressibilityTest = klT, ktT
	if r.FullScaleBoundaryLayer == BoundaryLayerNatural {
		r.SkinFrictionFlight = CompressibleTransitionalSkinFriction(reFlight, klF, ktF)
	} else {
		r.SkinFrictionFlight = turbulent(reFlight) * ktF
	}
	r.SkinFrictionTest = CompressibleTransitionalSkinFriction(reTest, klT, ktT)
	r.SkinFrictionTestTripped = turbulent(reTest) * ktT
	area := ff * art.WettedArea / art.ReferenceArea
	r.DeltaCDCounts = (r.SkinFrictionTest - r.SkinFrictionFlight) * area * 1e4
	r.DeltaCDCountsTripped = (r.SkinFrictionTestTripped - r.SkinFrictionFlight) * area * 1e4
	flightTurbulent := r.FullScaleBoundaryLayer == BoundaryLayerTurbulent || r.FlightTransitionFraction < TripFlightFraction
	r.TripsRecommended = r.NaturalTransitionFraction > TripModelFraction && flightTurbulent
	if r.TripsRecommended {
		var where string
		if r.FullScaleBoundaryLayer == BoundaryLayerTurbulent {
			where = "the leading edge (turbulent full scale)"
		} else {
			where = flightTransitionAt(100 * r.FlightTransitionFraction)
		}
		r.Notes = append(r.Notes, transitionNote(100*r.NaturalTransitionFraction, where, r.DeltaCDCountsTripped))
	}
	if reTest < TransitionReynolds {
		r.Notes = append(r.Notes, lowReynoldsNote(reTest))
	}
	if r.Line == LineITTC1957 {
		r.Notes = append(r.Notes, "fully turbulent friction (full scale, tripped model) on the ITTC 1957 line as chosen; natural transition on the model on the transitional Prandtl–Schlichting law")
	}
	r.Notes = append(r.Notes, "flat-plate friction on the reference length with a form factor: an estimate of the friction shift only; pressure drag, separation and transonic effects of the Reynolds number are not included")
	return r, nil
}
