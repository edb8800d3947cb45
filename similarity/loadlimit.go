package similarity

import (
	"errors"
	"fmt"
	"math"

	"scalematch/facilities"
)

// BalanceLimit is the planner's LoadLimit for an article on a facility's balances
// over a test matrix: at a given model scale and test Mach number, the largest
// free-stream dynamic pressure at which every point of the matrix keeps every
// rated load and gauge row at or under 1/safety factor, wall corrections and the
// model's weight included.
//
// Scaling with the model: forces grow with q·s² and moments with q·s³ (the
// reference area and length are the article's times s² and s), and the blockage
// corrections with s². The installation does not scale: the model mass and the
// offsets are taken as given, in kg and in metres, for whatever scale is chosen
// (the same physical model support and ballast; a heavier model only makes the
// check stricter at small q).
//
// With one balance named in the installation the limit is that balance's. With
// none named it is the best over all the facility's balances: at each scale the
// largest q that some balance can carry, which is the balance ChooseBalance will
// then pick among those that are safe.
//
// The coefficients and their body-axis projections onto every rated row are
// computed once by NewLoadLimit; MaxDynamicPressure allocates nothing.
type BalanceLimit struct {
	balances []balanceRows
	cd       []float64 // drag coefficient per point, for the wake blockage
	facility *facilities.Facility
	// Full-scale geometry of the article.
	refArea, refLength, frontalArea float64
}

// balanceRows holds one balance's rows projected on every point, point-major:
// element i·rows + j is point i, row j.
type balanceRows struct {
	id      string
	rows    int
	allowed []float64 // per row, rating/safety factor
	force   []float64 // row value per unit q_c·S (forces, and their moments about the balance centre)
	moment  []float64 // row value per unit q_c·S·c (aerodynamic moments about the reference centre)
	up      []float64 // allowed − w: the margin left by the weight w for a load growing with q
	down    []float64 // allowed + w: the same for a load falling with q
	// weightBreaks is set when the weight alone exceeds a row's allowance.
	weightBreaks bool
}

var _ LoadLimit = (*BalanceLimit)(nil)

// NewLoadLimit returns the load limit of article art on facility f with
// installation in, over the test matrix mx (from Aero.Matrix). It returns an error
// naming the field for bad input or an unknown balance, and facilities.ErrNoBalance
// when the facility has no balance.
func NewLoadLimit(art *Article, f *facilities.Facility, in facilities.Installation, mx Matrix) (*BalanceLimit, error) {
	var fe []facilities.FieldError
	if !(art.ReferenceArea > 0) || math.IsInf(art.ReferenceArea, 0) {
		fe = append(fe, facilities.FieldError{Field: "article.reference_area", Message: "must be a positive area in m²"})
	}
	if !(art.ReferenceLength > 0) || math.IsInf(art.ReferenceLength, 0) {
		fe = append(fe, facilities.FieldError{Field: "article.reference_length", Message: "must be a positive length in m"})
	}
	if !(art.FrontalArea >= 0) || math.IsInf(art.FrontalArea, 0) {
		fe = append(fe, facilities.FieldError{Field: "article.frontal_area", Message: "must be a non-negative area in m²"})
	}
	if len(mx.Points) == 0 {
		fe = append(fe, facilities.FieldError{Field: "alpha", Message: "the test matrix has no points"})
	}
	if err := in.Validate(); err != nil {
		var e *facilities.Error
		if errors.As(err, &e) {
			fe = append(fe, e.Fields...)
		}
	}
	if err := facilities.Invalid("invalid load-limit input", fe); err != nil {
		return nil, err
	}
	if len(f.Balances) == 0 {
		return nil, facilities.ErrNoBalance
	}
	l := &BalanceLimit{facility: f, refArea: art.ReferenceArea, refLength: art.ReferenceLength,
		frontalArea: art.FrontalArea, cd: make([]float64, len(mx.Points))}
	for i, p := range mx.Points {
		l.cd[i] = p.CD
	}
	found := false
	for k := range f.Balances {
		b := &f.Balances[k]
		if in.BalanceID != "" && b.ID != in.BalanceID {
			continue
		}
		found = true
		rs, err := f.BalanceRatings(k)
		if err != nil {
			return nil, err
		}
		br := balanceRows{id: b.ID, rows: rs.Rows(), allowed: make([]float64, rs.Rows())}
		for j := range br.allowed {
			br.allowed[j] = rs.Allowed(j)
		}
		n := len(mx.Points) * br.rows
		br.force, br.moment = make([]float64, n), make([]float64, n)
		br.up, br.down = make([]float64, n), make([]float64, n)
		for i, p := range mx.Points {
			body := p.Body()
			force := facilities.AeroLoads(body, 1, 0, in.BalanceOffset)
			moment := facilities.AeroLoads(body, 0, 1, in.BalanceOffset)
			weight := in.WeightLoads(p.Alpha)
			for j := range br.rows {
				k := i*br.rows + j
				w := rs.Row(j, &weight)
				br.force[k] = rs.Row(j, &force)
				br.moment[k] = rs.Row(j, &moment)
				br.up[k], br.down[k] = br.allowed[j]-w, br.allowed[j]+w
				br.weightBreaks = br.weightBreaks || facilities.SafeDynamicPressure(0, w, br.allowed[j]) == 0
			}
		}
		l.balances = append(l.balances, br)
	}
	if !found {
		return nil, facilities.Invalid("unknown balance", []facilities.FieldError{{Field: "installation.balance_id",
			Message: fmt.Sprintf("facility %s has no balance %q", f.ID, in.BalanceID)}})
	}
	return l, nil
}

// Name returns facilities.ConstraintBalance, the constraint's name in a plan.
func (l *BalanceLimit) Name() string { return facilities.ConstraintBalance }

// MaxDynamicPressure returns the largest free-stream dynamic pressure in Pa at which
// a model of the given scale at st.Mach keeps every point of the test matrix at or
// under 1/safety factor on the balance (the best balance when none is named); 0
// when the weight alone breaks a limit or the scale is not positive; +Inf when no
// rated load grows with q.
func (l *BalanceLimit) MaxDynamicPressure(scale float64, st facilities.State) float64 {
	_, q := l.best(scale, st.Mach)
	return q
}

// Balance returns the balance that carries the most at the given scale and test
// state, and the dynamic pressure it allows (as MaxDynamicPressure).
func (l *BalanceLimit) Balance(scale float64, st facilities.State) (id string, q float64) {
	k, q := l.best(scale, st.Mach)
	if k < 0 {
		return "", q
	}
	return l.balances[k].id, q
}

func (l *BalanceLimit) best(scale, mach float64) (k int, q float64) {
	if !(scale > 0) || math.IsInf(scale, 0) {
		return -1, 0
	}
	s2 := scale * scale
	area := l.refArea * s2
	solid, wake, _ := facilities.BlockageFactors(l.facility, l.frontalArea*s2, area, mach)
	qS := area
	qSc := area * l.refLength * scale
	k = -1
	for b := range l.balances {
		qb := l.balances[b].maxQ(l.cd, solid, wake, qS, qSc)
		if k < 0 || qb > q {
			k, q = b, qb
		}
	}
	return k, q
}

// maxQ is the largest q keeping every point and row of one balance within its
// allowance. Each row is affine in q and solved exactly as in
// facilities.SafeDynamicPressure, q = (allowed − sign(u)·w)/|u|; the minimum over
// rows is found by comparing the fractions crosswise, with one division per call.
func (br *balanceRows) maxQ(cd []float64, solid, wake, qS, qSc float64) float64 {
	if br.weightBreaks {
		return 0
	}
	num, den := 1.0, 0.0 // +Inf
	n := br.rows
	for i, c := range cd {
		e := 1 + solid + wake*c
		f := e * e
		a, m := f*qS, f*qSc
		force := br.force[i*n : i*n+n]
		moment := br.moment[i*n : i*n+n]
		up := br.up[i*n : i*n+n]
		down := br.down[i*n : i*n+n]
		for j := range force {
			u := a*force[j] + m*moment[j]
			r := up[j]
			if u < 0 {
				u, r = -u, down[j]
			}
			if r*den < num*u {
				num, den = r, u
			}
		}
	}
	if den == 0 {
		return math.Inf(1)
	}
	return num / den
}

// LoadEstimate is the load answer of a plan or a load check at one model scale and
// test state.
type LoadEstimate struct {
	// Corrections summarise the wall corrections over the matrix.
	Corrections facilities.Corrections
	// Report is the named or chosen balance's check; nil when no balance can carry
	// the loads.
	Report *facilities.LoadReport
	// Reason says in a sentence which balance and why.
	Reason string
	// All are the checks of every balance considered (one when a balance is named).
	All []facilities.LoadReport
	// Warnings gather the matrix's, the corrections' and the report's warnings.
	Warnings []string
	// Cautions are the standing cautions of a load answer (facilities.Cautions).
	Cautions []string
}

// EstimateLoads computes the balance loads of article art at model scale scale in
// facility f at test state st (its Mach number and free-stream dynamic pressure),
// installed as in, over the test matrix mx: wall corrections per point, loads at the
// balance centre, the limit check, and the balance choice when none is named.
//
// When no balance can carry the loads the error is a CodeUnprocessable
// *facilities.Error and the estimate still holds All (every balance's check), the
// corrections and the cautions; a facility without balances gives
// facilities.ErrNoBalance.
func EstimateLoads(art *Article, f *facilities.Facility, in facilities.Installation, scale float64, st facilities.State, mx Matrix) (LoadEstimate, error) {
	if !(scale > 0) || math.IsInf(scale, 0) {
		return LoadEstimate{}, facilities.Invalid("invalid model", []facilities.FieldError{{Field: "model.scale", Message: fmt.Sprintf("must be a positive scale, got %g", scale)}})
	}
	s2 := scale * scale
	walls := facilities.NewWalls(f, art.FrontalArea*s2, art.ReferenceArea*s2, st.Mach)
	pts := append([]facilities.Point(nil), mx.Points...)
	walls.Apply(pts)
	lc := facilities.LoadCase{ReferenceArea: art.ReferenceArea * s2, ReferenceLength: art.ReferenceLength * scale,
		Installation: in, Points: pts}
	est := LoadEstimate{Corrections: walls.Summary(pts)}
	est.Warnings = append(est.Warnings, mx.Warnings...)
	est.Warnings = append(est.Warnings, walls.Warnings...)
	ch, err := lc.ChooseBalance(f, st.DynamicPressure)
	est.All = ch.All
	est.Cautions = facilities.Cautions(f, ch.All...)
	if err != nil {
		return est, err
	}
	est.Report = &ch.Report
	est.Reason = ch.Reason
	est.Cautions = facilities.Cautions(f, ch.Report)
	est.Warnings = append(est.Warnings, ch.Report.Warnings...)
	if in.BalanceID == "" {
		est.Warnings = append(est.Warnings, ch.Reason)
	}
	return est, nil
}

// Test returns the schedule input of the matrix run once at each of the given
// stagnation conditions.
func (m Matrix) Test(conds ...facilities.Condition) facilities.Test {
	return facilities.Test{AlphaPoints: m.AlphaPoints, BetaValues: m.BetaValues, Conditions: conds}
}
