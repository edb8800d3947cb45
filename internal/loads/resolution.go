package loads

import (
	"fmt"
	"math"

	"scalematch/facilities"
)

// Resolution is the coarsest 2σ uncertainty of each coefficient a test can
// accept (the required resolution): C_L, C_D in drag counts (1 count = 0.0001),
// C_m, C_Y, C_l and C_n, dimensionless, in the names of Uncertainty. A nil
// field asks nothing of that coefficient.
type Resolution struct {
	// CL is the required resolution of the lift coefficient, e.g. 0.005.
	CL *float64 `json:"cl,omitempty"`
	// CDCounts is the required resolution of the drag coefficient in drag
	// counts, e.g. 1.
	CDCounts *float64 `json:"cd_counts,omitempty"`
	// Cm is the required resolution of the pitching-moment coefficient.
	Cm *float64 `json:"cm,omitempty"`
	// CY is the required resolution of the side-force coefficient.
	CY *float64 `json:"cy,omitempty"`
	// Cl is the required resolution of the rolling-moment coefficient.
	Cl *float64 `json:"cl_roll,omitempty"`
	// Cn is the required resolution of the yawing-moment coefficient.
	Cn *float64 `json:"cn,omitempty"`
}

// Resolution states (ResolutionCheck.State and the answers built on it).
const (
	// ResolutionResolved: the balance keeps within its allowed loads and its
	// 2σ uncertainty meets the required resolution at every point.
	ResolutionResolved = "resolved"
	// ResolutionTooCoarse: the balance's uncertainty at the test's dynamic
	// pressure is coarser than the required resolution at some point.
	ResolutionTooCoarse = "too_coarse"
	// ResolutionAccuracyUnknown: the balance record gives no accuracy for a
	// component a required coefficient needs.
	ResolutionAccuracyUnknown = "accuracy_unknown"
	// ResolutionNoBalance: no balance of the facility (the named one, when a
	// balance is named) can both keep within its allowed loads and resolve the
	// test: in a plan at any setting and model scale the request allows, in a
	// load check at the test's dynamic pressure.
	ResolutionNoBalance = "no_balance_resolves"
)

// resolutionTerm is one required coefficient: its name (Uncertainty's JSON
// name), its index in Uncertainty.figures, the required value, and whether it
// is a moment coefficient.
type resolutionTerm struct {
	name   string
	index  int
	v      float64
	moment bool
}

// terms returns the coefficients the resolution asks for, in Uncertainty's
// order; C_D's requirement is in counts, as its uncertainty is.
func (r *Resolution) terms() []resolutionTerm {
	var out []resolutionTerm
	for i, t := range []struct {
		name   string
		v      *float64
		moment bool
	}{{"cl", r.CL, false}, {"cd", r.CDCounts, false}, {"cm", r.Cm, true}, {"cy", r.CY, false},
		{"cl_roll", r.Cl, true}, {"cn", r.Cn, true}} {
		if t.v != nil {
			out = append(out, resolutionTerm{t.name, i, *t.v, t.moment})
		}
	}
	return out
}

// figures returns the uncertainty's coefficients in the order of
// Resolution.terms: C_L, C_D in counts, C_m, C_Y, C_l, C_n.
func (u *Uncertainty) figures() [6]float64 {
	return [6]float64{u.CL, u.CDCounts, u.Cm, u.CY, u.Cl, u.Cn}
}

// Empty reports whether the resolution asks for nothing.
func (r *Resolution) Empty() bool { return r == nil || len(r.terms()) == 0 }

// FieldErrors returns the problems of the resolution under prefix (e.g.
// "required_resolution"): each given figure within its bound, and at least one.
func (r *Resolution) FieldErrors(prefix string) []facilities.FieldError {
	var fe []facilities.FieldError
	for _, t := range []struct {
		name string
		v    *float64
		b    facilities.Bound
	}{{"cl", r.CL, BoundResolutionCoefficient}, {"cd_counts", r.CDCounts, BoundResolutionCounts},
		{"cm", r.Cm, BoundResolutionCoefficient}, {"cy", r.CY, BoundResolutionCoefficient},
		{"cl_roll", r.Cl, BoundResolutionCoefficient}, {"cn", r.Cn, BoundResolutionCoefficient}} {
		if t.v != nil {
			t.b.Check(&fe, prefix+"."+t.name, *t.v)
		}
	}
	if r.Empty() {
		fe = append(fe, facilities.FieldError{Field: prefix, Message: "give at least one of cl, cd_counts, cm, cy, cl_roll, cn, or leave it out"})
	}
	return fe
}

// ResolutionNeed returns what the required resolution r asks of the dynamic
// pressure at one point at angle of attack alphaDeg (degrees), for component
// uncertainties d (N, N·m; known[i] false where not given): the least q_c·S in N
// that the force coefficients need and the least q_c·S·c in N·m that the moment
// coefficients need, with q_c the point's corrected dynamic pressure (Pa), S the
// model's reference area (m²) and c its reference length (m). Dividing the
// uncertainty formulas of Uncertainty by the requirement,
//
//	q_c·S ≥ δF_C/δC_req   (forces; δF_C the rotated force of C_L or C_D),
//	q_c·S·c ≥ δM/δC_req   (moments),
//
// the larger over the asked coefficients. unknown names the asked coefficients
// whose uncertainty is not known (then the need is +Inf).
func (r *Resolution) Need(d Vector, known [6]bool, alphaDeg float64) (force, moment float64, unknown []string) {
	sa, ca := math.Sincos(alphaDeg * math.Pi / 180)
	terms := r.terms()
	force, moment, unk, _ := needAt(terms, d, known, sa, ca)
	for _, t := range terms {
		if unk&(1<<t.index) != 0 {
			unknown = append(unknown, t.name)
		}
	}
	return force, moment, unknown
}

// needAt is Need for the asked terms with the sine and cosine of α given
// (Sincos of α·π/180, as Need takes them); unknown has bit t.index set for
// each asked term whose uncertainty is not known, and figs are the
// uncertainty's figures at q_c·S = 1 N, which limitingName reads.
func needAt(terms []resolutionTerm, d Vector, known [6]bool, sa, ca float64) (force, moment float64, unknown uint8, figs [6]float64) {
	u, unk := coefficientUncertaintyAt(d, known, sa, ca, 1, 1, 1)
	figs = u.figures()
	for _, t := range terms {
		per := figs[t.index] // uncertainty at q_c·S = 1 N (or q_c·S·c = 1 N·m)
		for _, n := range unk {
			if n == t.name {
				unknown |= 1 << t.index
				per = math.Inf(1)
			}
		}
		if t.moment {
			moment = math.Max(moment, per/t.v)
		} else {
			force = math.Max(force, per/t.v)
		}
	}
	return force, moment, unknown, figs
}

// ResolutionCheck is whether one balance resolves the required resolution over
// the test matrix at the checked dynamic pressure.
type ResolutionCheck struct {
	// Required is the resolution asked.
	Required Resolution `json:"required"`
	// State is resolved, too_coarse or accuracy_unknown (the Resolution*
	// names).
	State string `json:"state" enums:"resolved,too_coarse,accuracy_unknown"`
	// MinDynamicPressure is the least free-stream dynamic pressure in Pa at
	// which every point meets the required resolution; 0 when it is not known.
	MinDynamicPressure float64 `json:"min_dynamic_pressure"`
	// Margin is the checked dynamic pressure over MinDynamicPressure: the
	// required uncertainty over the achieved one at the coarsest point and
	// coefficient (1 just meets it, 2 resolves twice as finely); 0 when not
	// known.
	Margin float64 `json:"margin"`
	// Limiting is the coefficient (cl, cd, cm, cy, cl_roll, cn) and point that
	// set MinDynamicPressure.
	Limiting Limiting `json:"limiting"`
	// Unknown names the asked coefficients whose uncertainty is not known.
	Unknown []string `json:"unknown,omitempty"`
}

// resolutionRun builds one balance's ResolutionCheck point by point, within
// Setup.check's loop over the points: each point's need is taken from the sine
// and cosine of α the check took for its loads, and the asked terms are listed
// once a check. (The check once took them again for each point, twice: in
// Need and in limitingName, with a Sincos and the terms' slice each time.)
type resolutionRun struct {
	lc    *Setup
	terms []resolutionTerm
	d     Vector
	known [6]bool
	// seen marks, by term index, the unknown terms already in rc.Unknown.
	seen uint8
	rc   *ResolutionCheck
}

// newResolutionRun starts the check of the required resolution on balance b.
func (lc *Setup) newResolutionRun(b *facilities.Balance) *resolutionRun {
	rr := &resolutionRun{lc: lc, terms: lc.Resolution.terms(), rc: &ResolutionCheck{Required: *lc.Resolution}}
	if b.Accuracy != nil {
		rr.d, rr.known = AccuracyOf(b)
	}
	return rr
}

// point adds point i with the sine and cosine of its α (Sincos of α·π/180).
func (rr *resolutionRun) point(i int, sa, ca float64) {
	lc, rc := rr.lc, rr.rc
	p := &lc.Points[i]
	force, moment, unk, figs := needAt(rr.terms, rr.d, rr.known, sa, ca)
	if unk != 0 {
		for _, t := range rr.terms {
			if bit := uint8(1) << t.index; unk&bit != 0 && rr.seen&bit == 0 {
				rr.seen |= bit
				rc.Unknown = append(rc.Unknown, t.name)
			}
		}
		return
	}
	f := p.DynamicPressureFactor
	if f == 0 {
		f = 1
	}
	qf := force / (f * lc.ReferenceArea)
	qm := moment / (f * lc.ReferenceArea * lc.ReferenceLength)
	name := limitingName(rr.terms, &figs, qf >= qm)
	if qn := math.Max(qf, qm); qn > rc.MinDynamicPressure {
		rc.MinDynamicPressure = qn
		rc.Limiting = Limiting{Component: name, Alpha: p.Alpha, Beta: p.Beta}
	}
}

// finish returns the check at free-stream dynamic pressure q (Pa) once every
// point is in.
func (rr *resolutionRun) finish(q float64) *ResolutionCheck {
	rc := rr.rc
	switch {
	case len(rc.Unknown) > 0:
		rc.State, rc.MinDynamicPressure, rc.Limiting = ResolutionAccuracyUnknown, 0, Limiting{}
	case q >= rc.MinDynamicPressure*(1-1e-12):
		rc.State = ResolutionResolved
	default:
		rc.State = ResolutionTooCoarse
	}
	if rc.MinDynamicPressure > 0 {
		rc.Margin = q / rc.MinDynamicPressure
	}
	return rc
}

// limitingName returns the asked coefficient with the largest need at a point
// whose uncertainty figures (at q_c·S = 1 N) are figs: among the force
// coefficients when force is true, else among the moments.
func limitingName(terms []resolutionTerm, figs *[6]float64, force bool) string {
	best, name := -1.0, ""
	for _, t := range terms {
		if t.moment == force {
			continue
		}
		if v := figs[t.index] / t.v; v > best {
			best, name = v, t.name
		}
	}
	return name
}

// ResolutionWarning returns the answer's note for a resolution state other than
// resolved ("" for resolved or none).
func ResolutionWarning(state string, rc *ResolutionCheck, balanceID string) string {
	switch state {
	case ResolutionTooCoarse:
		if rc != nil {
			return fmt.Sprintf("balance %s does not resolve the required resolution: %s at α %.4g° needs a dynamic pressure of %.4g Pa, %.3g times the test's",
				balanceID, rc.Limiting.Component, rc.Limiting.Alpha, rc.MinDynamicPressure, 1/rc.Margin)
		}
	case ResolutionAccuracyUnknown:
		return fmt.Sprintf("balance %s gives no accuracy for a component the required resolution needs: whether it resolves the test is not known", balanceID)
	case ResolutionNoBalance:
		return ResolutionNoBalanceWarning
	}
	return ""
}

// ResolutionNoBalanceWarning goes with the state no_balance_resolves.
const ResolutionNoBalanceWarning = "no balance of the facility can both keep within its allowed loads and resolve the required resolution: a balance strong enough for the loads is too coarse for the coefficients the test needs, so choose a balance with a smaller rating or finer accuracy, a larger model, a higher dynamic pressure, or a coarser required resolution"
