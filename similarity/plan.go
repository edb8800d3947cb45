package similarity

import (
	"fmt"
	"math"
	"sort"

	"scalematch/facilities"
	"scalematch/internal/check"
)

// Similarity groups an objective can name.
const (
	GroupReynolds = "reynolds"
	GroupMach     = "mach"
	GroupFroude   = "froude"
	// GroupCavitation is the cavitation number σ = (p − p_v)/(½·ρ·V²); only a
	// marine condition has one.
	GroupCavitation = "cavitation"
)

// DefaultCavitationTolerance is the cavitation-number band half-width of the
// default marine objective: |Δσ| ≤ 0.02 counts as matched.
const DefaultCavitationTolerance = 0.02

// DefaultMachTolerance is the Mach-number band half-width of the default priority
// objective: |ΔM| ≤ 0.005 counts as matched.
const DefaultMachTolerance = 0.005

// DefaultScaleMin is the smallest scale the planner considers when the request sets
// no lower bound (a free or open-ended model): 1:1000.
const DefaultScaleMin = 1e-3

// maxScale is the largest scale a request may give: a model a hundred times its
// full-scale article is a request error, not a plan.
const maxScale = 100.0

// Model is the request's choice of model size: a fixed Scale, a range
// [ScaleMin, ScaleMax], or a list of Scales of models that exist. Scale is model
// length over full-scale length. The zero value means any scale from
// DefaultScaleMin up to what the test section allows. A missing ScaleMin of a range
// is DefaultScaleMin; a missing ScaleMax is the test section's limit.
type Model struct {
	Scale    *float64  `json:"scale,omitempty" unit:"scale"`
	ScaleMin *float64  `json:"scale_min,omitempty" unit:"scale"`
	ScaleMax *float64  `json:"scale_max,omitempty" unit:"scale"`
	Scales   []float64 `json:"scales,omitempty" unit:"scale" maxItems:"100"`
}

// Validate checks that at most one form is given and every scale lies in (0, 100].
// It returns a *check.Error with CodeInvalid naming each bad field, or nil.
func (m *Model) Validate() error {
	var fe []check.FieldError
	add := func(field, msg string) {
		fe = append(fe, check.FieldError{Field: "model." + field, Message: msg})
	}
	forms := 0
	if m.Scale != nil {
		forms++
	}
	if m.ScaleMin != nil || m.ScaleMax != nil {
		forms++
	}
	if len(m.Scales) > 0 {
		forms++
	}
	if forms > 1 {
		add("scale", "give only one of scale, scale_min/scale_max and scales")
	}
	inRange := func(field string, v float64) {
		if !BoundScale.Contains(v) {
			add(field, "scale "+BoundScale.Problem(v))
		}
	}
	if m.Scale != nil {
		inRange("scale", *m.Scale)
	}
	if m.ScaleMin != nil {
		inRange("scale_min", *m.ScaleMin)
	}
	if m.ScaleMax != nil {
		inRange("scale_max", *m.ScaleMax)
	}
	if m.ScaleMin != nil && m.ScaleMax != nil && *m.ScaleMin > *m.ScaleMax {
		add("scale_min", fmt.Sprintf("scale_min %g is above scale_max %g", *m.ScaleMin, *m.ScaleMax))
	}
	for i, s := range m.Scales {
		if !BoundScale.Contains(s) {
			// The field's name is built only for an error.
			inRange(fmt.Sprintf("scales[%d]", i), s)
		}
	}
	return check.Invalid("invalid model", fe)
}

// Objective says what the plan optimises. Either Priority, a list of groups met in
// order (the Mach number within ±MachTolerance, the others as closely as the
// facility allows), or Weights, a weight per group for the sum
//
//	Σ w·(ln(test/flight))²
//
// Ties go to the lowest dynamic pressure in both; with weights, plans that meet
// every weighted target (the Reynolds number exactly, the others within 1e-9)
// tie at a sum of 0 (docs/planner.md, Objectives). The zero value is the priority
// ["mach", "reynolds"] with MachTolerance DefaultMachTolerance; for a water
// facility, which never targets the Mach number, it is ["reynolds"]; for a marine
// condition in a water facility it is ["cavitation", "reynolds"] with
// CavitationTolerance DefaultCavitationTolerance (in a gas facility, where the
// cavitation number means nothing, ["reynolds"]). The weighted sum takes the
// cavitation number as (ln(σ_test/σ_full))² too.
type Objective struct {
	// Priority lists groups (GroupReynolds, GroupMach, GroupFroude,
	// GroupCavitation) in order of importance; nil: the default.
	Priority []string `json:"priority,omitempty" maxItems:"4"`
	// MachTolerance is the half-width of the Mach band that counts as matched;
	// nil: DefaultMachTolerance.
	MachTolerance *float64 `json:"mach_tolerance,omitempty"`
	// CavitationTolerance is the half-width of the cavitation-number band that
	// counts as matched (absolute, 0–10); nil: DefaultCavitationTolerance.
	CavitationTolerance *float64 `json:"cavitation_tolerance,omitempty"`
	// Weights maps groups to non-negative weights; when not empty it replaces
	// Priority.
	Weights map[string]float64 `json:"weights,omitempty" maxItems:"3"`
}

// Validate checks group names, weights and the tolerance. It returns a
// *check.Error with CodeInvalid naming each bad field, or nil.
func (o *Objective) Validate() error {
	var fe []check.FieldError
	add := func(field, msg string) {
		fe = append(fe, check.FieldError{Field: "objective." + field, Message: msg})
	}
	known := func(g string) bool {
		return g == GroupReynolds || g == GroupMach || g == GroupFroude || g == GroupCavitation
	}
	if len(o.Priority) > 0 && len(o.Weights) > 0 {
		add("weights", "give either priority or weights, not both")
	}
	seen := map[string]bool{}
	for i, g := range o.Priority {
		switch {
		case !known(g):
			add(fmt.Sprintf("priority[%d]", i), fmt.Sprintf("unknown group %q: want reynolds, mach, froude or cavitation", g))
		case seen[g]:
			add(fmt.Sprintf("priority[%d]", i), fmt.Sprintf("group %q is listed twice", g))
		}
		seen[g] = true
	}
	if o.Priority != nil && len(o.Priority) == 0 && len(o.Weights) == 0 {
		add("priority", "the priority list is empty")
	}
	positive := false
	keys := make([]string, 0, len(o.Weights))
	for g := range o.Weights {
		keys = append(keys, g)
	}
	sort.Strings(keys)
	for _, g := range keys {
		w := o.Weights[g]
		switch {
		case !known(g):
			add("weights."+g, fmt.Sprintf("unknown group %q: want reynolds, mach, froude or cavitation", g))
		case !BoundWeight.Contains(w):
			add("weights."+g, "weight "+BoundWeight.Problem(w))
		case w > 0:
			positive = true
		}
	}
	if len(o.Weights) > 0 && !positive {
		add("weights", "at least one weight must be above zero")
	}
	if o.MachTolerance != nil && !(*o.MachTolerance >= 0 && *o.MachTolerance <= 1) {
		add("mach_tolerance", fmt.Sprintf("%g is outside 0 to 1", *o.MachTolerance))
	}
	if o.CavitationTolerance != nil && !BoundCavitationTolerance.Contains(*o.CavitationTolerance) {
		add("cavitation_tolerance", BoundCavitationTolerance.Problem(*o.CavitationTolerance))
	}
	return check.Invalid("invalid objective", fe)
}

// Problem is one planning problem: a resolved flight, the full-scale article, the
// facility, the model choice and the objective. Flight must come from
// Flight.Resolve on the article's reference length.
type Problem struct {
	// Flight is the full-scale condition to match.
	Flight FlightState
	// Article is the full-scale test article; its reference length, span and frontal
	// area size the model.
	Article *Article
	// Facility is the tunnel; it is not modified.
	Facility *facilities.Facility
	// Model is the choice of model size; the zero value leaves it free.
	Model Model
	// Objective is what to optimise; the zero value is the default priority.
	Objective Objective
	// LoadLimit, when not nil, caps the dynamic pressure for each scale (the balance's
	// rated loads); the plan honours it like any facility limit.
	LoadLimit LoadLimit
	// LoadFloor, when not nil, bounds the dynamic pressure from below at each
	// scale (the least q at which the balance resolves the required resolution);
	// the plan honours it like any facility limit.
	LoadFloor LoadFloor
	// MatrixDrag, when not nil, is the range of the test matrix's drag
	// coefficients. In a gas facility whose walls take a blockage correction
	// (closed walls below M 1) the planner then matches the corrected Mach number
	// M_c = M·[1 + (1 + 0.2·M²)·ε] at the middle of that range to the flight, not
	// the free-stream M (facilities.MachRatio).
	MatrixDrag *DragRange
	// CavitationAllowed lets the plan's water test section run below the vapour
	// pressure (a cavitating free stream, facilities.ConstraintCavitation); false,
	// the default, makes cavitation a limit the planner avoids like any other.
	// Boiling at the stagnation pressure (facilities.ConstraintBoiling) is always
	// avoided: the liquid model does not hold there.
	CavitationAllowed bool
}

// DragRange is the least and the largest drag coefficient of a test matrix.
type DragRange struct{ Min, Max float64 }

// Mach bases of a plan (Mismatch.MachBasis).
const (
	// MachBasisCorrected: the wall-corrected Mach number is matched to the flight.
	MachBasisCorrected = "corrected"
	// MachBasisFreeStream: the free-stream Mach number is matched (no blockage
	// correction applies, or no test matrix was given).
	MachBasisFreeStream = "free_stream"
)

// Settings tune the planner. The zero value is sensible: a 41-point trade curve and
// a Reynolds gain for every binding limit.
type Settings struct {
	// TradePoints is the number of points of the trade curve; 0: 41; negative: none.
	TradePoints int
	// NoGains skips the re-solves that give each binding limit's Reynolds gain.
	NoGains bool
}

// ModelSize is the chosen model's size: scale and the model-scale dimensions.
type ModelSize struct {
	// Scale is model length over full-scale length.
	Scale float64 `json:"scale"`
	// ReferenceLength is the model's reference chord in m.
	ReferenceLength float64 `json:"reference_length"`
	// ReferenceArea is the model's reference area in m².
	ReferenceArea float64 `json:"reference_area"`
	// Span is the model's span in m.
	Span float64 `json:"span"`
	// FrontalArea is the model's frontal area in m².
	FrontalArea float64 `json:"frontal_area"`
	// Blockage is FrontalArea over the test-section area (0.01 = 1 %).
	Blockage float64 `json:"blockage"`
}

// SizeAt returns the size of a model of a at the given scale (model length over
// full-scale length) in a test section whose cross-section is crossSection m².
func (a *Article) SizeAt(scale, crossSection float64) ModelSize {
	s2 := scale * scale
	return ModelSize{
		Scale:           scale,
		ReferenceLength: scale * a.ReferenceLength,
		ReferenceArea:   s2 * a.ReferenceArea,
		Span:            scale * a.Span,
		FrontalArea:     s2 * a.FrontalArea,
		Blockage:        s2 * a.FrontalArea / crossSection,
	}
}

// TestOn returns the test condition of state st for a model of reference length
// l in m: the state, Re = (Re/m)·l and Fr = V/√(g0·l).
func TestOn(st facilities.State, l float64) Test {
	return Test{State: st, Reynolds: st.ReynoldsPerMeter * l, Froude: Froude(st.Speed, l)}
}

// Test is the chosen test condition: the facility state plus the model's Reynolds
// number on its reference length.
type Test struct {
	facilities.State
	// Reynolds is ρ·V·l/μ on the model's reference length l.
	Reynolds float64 `json:"reynolds"`
	// Froude is V/√(g0·l) on the model's reference length l.
	Froude float64 `json:"froude"`
	// Cavitation is the test section's cavitation number (p − p_v)/(½·ρ·V²) at the
	// static pressure p and the IAPWS-IF97 vapour pressure p_v of the tunnel water
	// (Pa); present only in a water facility.
	Cavitation *float64 `json:"cavitation,omitempty"`
	// VapourPressure is the tunnel water's vapour pressure in Pa; present only in
	// a water facility.
	VapourPressure *float64 `json:"vapour_pressure,omitempty"`
}

// Mismatch compares the test with the flight.
type Mismatch struct {
	// ReynoldsRatio is Re_test/Re_flight.
	ReynoldsRatio float64 `json:"reynolds_ratio"`
	// MachDifference is M_test − M_flight; nil (JSON null) in water, where the Mach
	// number is not a similarity target.
	MachDifference *float64 `json:"mach_difference"`
	// MachBasis says which test Mach number the plan matches to the flight's:
	// "corrected" (the wall-corrected M_c at the middle of the matrix's drag
	// range, closed walls) or "free_stream"; null in water.
	MachBasis *string `json:"mach_basis" enums:"corrected,free_stream"`
	// CorrectedMachDifference is M_c − M_flight with M_c at the middle of the
	// matrix's drag range; null when no blockage correction applies or in water.
	CorrectedMachDifference *float64 `json:"corrected_mach_difference"`
	// FroudeRatio is Fr_test/Fr_flight, reported for water facilities and for
	// objectives naming froude; 0 otherwise.
	FroudeRatio float64 `json:"froude_ratio,omitempty"`
	// ReynoldsMatched reports that the test Reynolds number is within
	// RatioMatchBand of the flight's: |Re_test/Re_flight − 1| ≤ 0.001.
	ReynoldsMatched bool `json:"reynolds_matched"`
	// MachMatched reports that the test Mach number (the corrected one when
	// MachBasis is "corrected") is within MachTolerance of the flight's, decided here so that a script need not compare floating-point
	// numbers: |M_test − M_flight| ≤ MachTolerance, up to a relative 1e-9 of the
	// tolerance for rounding (a plan the planner put on the band's edge counts as
	// matched). Nil (JSON null) in water, where the Mach number is not a target.
	MachMatched *bool `json:"mach_matched"`
	// MachTolerance is the Mach band half-width MachMatched was decided with: the
	// objective's mach_tolerance, or DefaultMachTolerance; 0 (absent) in water.
	MachTolerance float64 `json:"mach_tolerance,omitempty"`
	// FroudeMatched reports |Fr_test/Fr_flight − 1| ≤ RatioMatchBand; present only
	// with FroudeRatio.
	FroudeMatched *bool `json:"froude_matched,omitempty"`
	// CavitationDifference is σ_test − σ_full of a marine condition in a water
	// facility; absent otherwise.
	CavitationDifference *float64 `json:"cavitation_difference,omitempty"`
	// CavitationMatched reports |σ_test − σ_full| ≤ CavitationTolerance (up to a
	// relative 1e-9 of the tolerance for rounding); present with
	// CavitationDifference.
	CavitationMatched *bool `json:"cavitation_matched,omitempty"`
	// CavitationTolerance is the band half-width CavitationMatched was decided
	// with: the objective's cavitation_tolerance or DefaultCavitationTolerance.
	CavitationTolerance float64 `json:"cavitation_tolerance,omitempty"`
}

// RatioMatchBand is the relative band within which a ratio of a test group to the
// flight's counts as matched (0.1 %), for reynolds_matched and froude_matched and
// for the plan's warnings on the Reynolds mismatch.
const RatioMatchBand = 0.001

// machSlack is the relative share of the Mach tolerance allowed for rounding when
// deciding MachMatched: the planner places a Mach number on the band's edge, and
// M_test − M_flight computed from it can exceed the tolerance by a few ulps.
const machSlack = 1e-9

// Decide fills the matched booleans from the ratios and the Mach difference,
// with machTol the Mach band half-width (ignored when MachDifference is nil).
func (m *Mismatch) Decide(machTol float64) {
	m.ReynoldsMatched = math.Abs(m.ReynoldsRatio-1) <= RatioMatchBand
	m.MachMatched, m.MachTolerance = nil, 0
	if m.MachDifference != nil {
		d := *m.MachDifference
		if m.CorrectedMachDifference != nil {
			d = *m.CorrectedMachDifference
		}
		ok := math.Abs(d) <= machTol*(1+machSlack)
		m.MachMatched, m.MachTolerance = &ok, machTol
	}
	m.FroudeMatched = nil
	if m.FroudeRatio != 0 {
		ok := math.Abs(m.FroudeRatio-1) <= RatioMatchBand
		m.FroudeMatched = &ok
	}
}

// Binding is one limit the plan sits on. Value and Limit are in the limit's own SI
// unit (scale limits in model scale, blockage as a fraction, condensation as the
// margin in K to saturation).
type Binding struct {
	// Constraint is a facilities.Constraint* name or the load limit's Name().
	Constraint string `json:"constraint"`
	// Value is the plan's value of the constrained quantity.
	Value float64 `json:"value"`
	// Limit is the limit it sits on.
	Limit float64 `json:"limit"`
	// ReynoldsGainPerPercent is the change of the test Reynolds number, in per cent,
	// when this one limit is relaxed by 1 % and the problem solved again (a maximum
	// raised by 1 %, a minimum lowered by 1 %). Zero when the re-solve gains
	// nothing, e.g. because the flight's Reynolds number is already met.
	ReynoldsGainPerPercent float64 `json:"reynolds_gain_per_percent"`
}

// Stats are the planner's work counts.
type Stats struct {
	// Evaluations is the number of test-section states computed.
	Evaluations int `json:"evaluations"`
	// Solves is the number of full optimisations: one, plus one per binding gain
	// that needs a re-solve (none when the plan meets the flight's Reynolds
	// number: every gain is then 0).
	Solves int `json:"solves"`
	// RefineEvaluations is the number of objective evaluations (each a candidate at
	// one Mach number or speed and scale) of the Nelder–Mead refinement
	// (gonum/optimize) that follows the structured search of a weighted objective
	// over a scale range, summed over all solves; 0: it did not run. Their states
	// are counted in Evaluations too.
	RefineEvaluations int `json:"refine_evaluations,omitempty"`
}

// Result is a plan: the model, the test condition, how well it matches the flight,
// what limits it, and the trade curve.
type Result struct {
	// Flight is the full-scale condition.
	Flight FlightState `json:"flight"`
	// Model is the chosen model size.
	Model ModelSize `json:"model"`
	// Setting is what the operator sets.
	Setting facilities.Setting `json:"-"`
	// Test is the chosen test condition.
	Test Test `json:"test"`
	// Mismatch compares test and flight.
	Mismatch Mismatch `json:"mismatch"`
	// Binding lists every limit the plan sits on, with its Reynolds gain.
	Binding []Binding `json:"binding"`
	// Trade is the best Reynolds number reachable at each test Mach number (speed in
	// water) across the facility's range for the chosen model.
	Trade []TradePoint `json:"trade_curve,omitempty"`
	// Warnings are notes on the request and the result.
	Warnings []string `json:"warnings"`
	// Cautions are the facility's standing safety cautions (facilities.Cautions): the
	// figures are estimates, pressure vessels, cryogenic nitrogen.
	Cautions []string `json:"cautions,omitempty"`
	// Stats are the planner's work counts.
	Stats Stats `json:"statistics"`
}

// Plan chooses the model scale and the test Mach number (speed in water),
// stagnation pressure and stagnation temperature that bring the test's similarity
// groups closest to the flight's within every limit of the facility, the model
// choice and p.LoadLimit; see docs/planner.md. A nil s means the zero Settings.
//
// Bad input gives a *check.Error with CodeInvalid; a problem no plan can
// satisfy gives CodeUnprocessable with Limits naming the conflicting limits.
func Plan(p *Problem, s *Settings) (*Result, error) {
	if s == nil {
		s = &Settings{}
	}
	sc := scratchPool.Get().(*planScratch)
	defer func() {
		setups, spare := sc.setups, sc.spareSetups
		line, spareLine := sc.cond.line, sc.spareCond.line
		kept := sc.kept
		*sc = planScratch{}
		sc.kept = kept
		sc.setups, sc.spareSetups = setups, spare
		sc.cond.line, sc.spareCond.line = line, spareLine
		scratchPool.Put(sc)
	}()
	sv, err := newSolverIn(&sc.sv, p, sc)
	if err != nil {
		return nil, err
	}
	best, err := sv.solveCorrected()
	if err != nil {
		return nil, err
	}
	res := sv.result(best)
	res.Stats.Solves = 1
	if !s.NoGains && !sv.reynoldsMet(best) {
		for i := range res.Binding {
			g, n, err := sv.gain(res.Binding[i].Constraint, best)
			res.Stats.Evaluations += n
			res.Stats.Solves++
			if err == nil {
				res.Binding[i].ReynoldsGainPerPercent = g
			}
		}
	}
	if n := s.TradePoints; n >= 0 {
		if n == 0 {
			n = 41
		}
		if n == 1 {
			n = 2
		}
		res.Trade = sv.trade(best.s, n)
	}
	res.Stats.Evaluations += sv.evals
	res.Stats.RefineEvaluations = sv.polishEvals
	return res, nil
}
