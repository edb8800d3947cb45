// Package loads is the one home of the balance load check: the model's fit in
// the test section, the wall corrections of the test matrix, the loads on every
// component and gauge row of the facility's balances, the verdict, and the
// planner's load window. Plans (the composition of POST /v1/plans) build a Limit
// (NewLimit), which gives the planner its load ceiling and, with a required
// resolution, its floor (similarity.LoadLimit and similarity.LoadFloor, the small
// interfaces similarity declares), and then call Check at the plan's answer; load
// checks (POST /v1/loads, scalematch loads) call Check alone. The balance
// choice is Choose. Under them are the per-balance primitives: the load Vector
// in body axes (Body, Aerodynamic, Installation.Weight), a balance's compiled
// Ratings, one balance's check of a Setup (Setup.Check) and its Report, the
// required Resolution, the model's Buoyancy in water, and the load Cautions.
//
// The verdicts, from best to worst (Verdict*):
//
//   - within_allowed_loads: the model fits, and every point keeps every rated
//     component and gauge row at or under its allowed load (rating ÷ safety
//     factor), with the weight included and no unrated component loaded;
//   - not_verified: nothing rated is over, but the check cannot vouch for the
//     loads (an unrated component carries load, the weight was left out, the
//     facility lists no balance);
//   - over_allowed_load: a point loads a rated row above its allowed load;
//   - does_not_fit: the model breaks a test-section limit.
package loads

import (
	"fmt"
	"strings"
	"sync"

	"scalematch/facilities"
	"scalematch/similarity"
)

// Case is one load check: an article at a model scale in a facility at a test
// state, with its installation and test matrix.
type Case struct {
	Facility *facilities.Facility
	Article  *similarity.Article
	// Installation places the model on the balance; in water its buoyancy
	// (Installation.WithBuoyancy) is added here.
	Installation Installation
	Matrix       similarity.Matrix
	// Scale is model length over full-scale length.
	Scale float64
	// State is the test state; its DynamicPressure (Pa) loads the model.
	State facilities.State
	// Every checks every balance of the facility when the installation names
	// none; false chooses one (Choose).
	Every bool
	// Resolution, when not nil, is the required resolution: every report says
	// whether its balance resolves it, and the balance choice prefers the one
	// that resolves it with the most margin.
	Resolution *Resolution
}

// Result is the answer of Check.
type Result struct {
	// FitBroken lists the test-section limits the model breaks; empty when it
	// fits.
	FitBroken []facilities.Violation
	// Corrections are the wall corrections at the test state.
	Corrections facilities.Corrections
	// Reports are the load reports: the named or chosen balance's alone, or
	// every balance's (Case.Every); nil when the facility has no balance.
	Reports []Report
	// Reason says why the balance was chosen ("" when none was chosen).
	Reason string
	// Verdict is the check's verdict (Verdict*): does_not_fit when
	// FitBroken is not empty, else the best report's (not_verified without one).
	Verdict string
	// ResolutionState sums up the reports' resolution checks
	// (ResolutionState): "" when no resolution was asked.
	ResolutionState string
	// Warnings are notes on the corrections and the loads, in order.
	Warnings []string
}

// Check checks the case: the fit first, then the wall corrections and the loads.
// A facility without balances gives no reports and the verdict not_verified.
// Errors are check.Error values naming the field.
func Check(c *Case) (Result, error) {
	f, a, s := c.Facility, c.Article, c.Scale
	s2 := s * s
	res := Result{FitBroken: Fit(f, a, s)}
	w := facilities.NewWalls(f, a.FrontalArea*s2, a.ReferenceArea*s2, c.State.Mach)
	// The points with their wall corrections are scratch: the answer copies
	// what it shows of them.
	buf := pointScratch.Get().(*[]facilities.Point)
	pts := append((*buf)[:0], c.Matrix.Points...)
	defer func() {
		*buf = pts[:0]
		pointScratch.Put(buf)
	}()
	w.Apply(pts)
	res.Corrections = w.Summary(pts, a.Aero.CorrectionLiftSlope())
	res.Warnings = append(res.Warnings, w.Warnings...)
	if len(f.Balances) > 0 {
		lc := Setup{ReferenceArea: a.ReferenceArea * s2, ReferenceLength: a.ReferenceLength * s,
			Installation: c.Installation.WithBuoyancy(f), Points: pts, Resolution: c.Resolution}
		q := c.State.DynamicPressure
		if c.Every && c.Installation.BalanceID == "" {
			all, err := CheckAll(&lc, f, q)
			if err != nil {
				return Result{}, err
			}
			res.Reports = all
		} else {
			ch, err := Choose(&lc, f, q)
			if err != nil {
				return Result{}, err
			}
			res.Reports = []Report{ch.Report}
			if c.Installation.BalanceID == "" {
				res.Reason = ch.Reason
			}
		}
	}
	res.Verdict = verdict(res.FitBroken, res.Reports)
	if !c.Resolution.Empty() {
		res.ResolutionState = ResolutionState(res.Reports)
		if len(res.Reports) == 0 {
			res.ResolutionState = ResolutionNoBalance
		}
	}
	return res, nil
}

// pointScratch holds Check's corrected points (*[]facilities.Point, no
// pointers in them).
var pointScratch = sync.Pool{New: func() any { return new([]facilities.Point) }}

// verdict is does_not_fit with broken fit limits, not_verified without reports,
// else the best report's verdict: with every balance checked, the model can go
// in on the best one.
func verdict(broken []facilities.Violation, reports []Report) string {
	if len(broken) > 0 {
		return VerdictDoesNotFit
	}
	if len(reports) == 0 {
		return VerdictNotVerified
	}
	v := reports[0].Verdict
	for _, r := range reports[1:] {
		if VerdictRank(r.Verdict) < VerdictRank(v) {
			v = r.Verdict
		}
	}
	return v
}

// Fit returns the test-section limits that a model of article a at scale s
// breaks in facility f, in this order: span over width (the facility's
// max_span_fraction, 1 when it gives none: a model wider than the section never
// fits), blockage (frontal area over the section's cross-section: the facility's
// max_blockage, 1 when it gives none) and overall length against the section's
// length (when the article and the record both give one). Values and limits are
// fractions, or metres for the length.
func Fit(f *facilities.Facility, a *similarity.Article, s float64) []facilities.Violation {
	var out []facilities.Violation
	ts := f.TestSection
	if ts.Width > 0 {
		lim := 1.0
		if f.MaxSpanFraction != nil {
			lim = *f.MaxSpanFraction
		}
		if v := a.Span * s / ts.Width; v > lim*(1+1e-12) {
			src := "the test-section width"
			if f.MaxSpanFraction != nil {
				src = fmt.Sprintf("the facility's %.3g of the width", *f.MaxSpanFraction)
			}
			out = append(out, facilities.Violation{Constraint: facilities.ConstraintSpan, Value: v, Limit: lim,
				Message: fmt.Sprintf("the model's span of %.4g m is %.3g of the %.4g m test-section width, above %s", a.Span*s, v, ts.Width, src)})
		}
	}
	if cs := ts.CrossSection(); cs > 0 {
		lim := 1.0
		if f.MaxBlockage != nil {
			lim = *f.MaxBlockage
		}
		if v := a.FrontalArea * s * s / cs; v > lim*(1+1e-12) {
			src := "the whole test section"
			if f.MaxBlockage != nil {
				src = fmt.Sprintf("the facility's %.3g %%", 100**f.MaxBlockage)
			}
			out = append(out, facilities.Violation{Constraint: facilities.ConstraintBlockage, Value: v, Limit: lim,
				Message: fmt.Sprintf("the model's frontal area of %.4g m² blocks %.3g %% of the %.4g m² test section, above %s", a.FrontalArea*s*s, 100*v, cs, src)})
		}
	}
	if a.Length > 0 && ts.Length > 0 {
		if v := a.Length * s; v > ts.Length*(1+1e-12) {
			out = append(out, facilities.Violation{Constraint: facilities.ConstraintModelLength, Value: v, Limit: ts.Length,
				Message: fmt.Sprintf("the model's length of %.4g m is longer than the %.4g m test section", v, ts.Length)})
		}
	}
	return out
}

// ResolutionWarning returns the note on a result's resolution state other than
// resolved, naming the first report's balance ("" when resolved or not asked).
func (r *Result) ResolutionWarning() string {
	var rc *ResolutionCheck
	id := ""
	if len(r.Reports) > 0 {
		rc, id = r.Reports[0].Resolution, r.Reports[0].BalanceID
	}
	return ResolutionWarning(r.ResolutionState, rc, id)
}

// Cautions returns the cautions of the result beyond Cautions (of the facility
// and the reports): a model that does not fit, and loads the check cannot vouch
// for.
func (r *Result) Cautions() []string {
	var out []string
	if len(r.FitBroken) > 0 {
		names := make([]string, len(r.FitBroken))
		for i, v := range r.FitBroken {
			names[i] = v.Constraint
		}
		out = append(out, fmt.Sprintf("The model does not fit the test section (%s): do not install it. A model this size would strike or foul the walls or support, or carry wall interference no correction covers; change the model scale and check again.",
			strings.Join(names, ", ")))
	}
	if r.Verdict == VerdictNotVerified {
		out = append(out, CautionNotVerified)
	}
	return out
}

// CautionNotVerified goes with an answer whose loads are not verified.
const CautionNotVerified = "The balance loads are not verified: a component without a rating carries load, the model's weight was left out, or there is no balance to check. Do not run until every loaded component is rated and the check is repeated with the model's weight."
