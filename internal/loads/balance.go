package loads

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"scalematch/facilities"
)

// ErrNoBalance is returned when a load check is asked of a facility with no balance.
var ErrNoBalance = errors.New("facilities: the facility has no balance")

// Setup is the input of a balance load check: a model at test scale in the test
// section, its installation and its test matrix with coefficients and wall
// corrections.
type Setup struct {
	// ReferenceArea is the model's reference area S in m².
	ReferenceArea float64
	// ReferenceLength is the model's reference length c in m (moment coefficients).
	ReferenceLength float64
	// Installation places the model on the balance.
	Installation Installation
	// Points is the test matrix.
	Points []facilities.Point
	// Resolution, when not nil, is the coarsest 2σ uncertainty of each
	// coefficient the test accepts: each report then says whether the balance
	// resolves it (Report.Resolution), and loads.Choose prefers, among the
	// balances within the allowed loads, the one that resolves it with the most
	// margin.
	Resolution *Resolution
}

func (lc *Setup) validate(q float64) error {
	var fe []facilities.FieldError
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	if !(lc.ReferenceArea > 0) || !finite(lc.ReferenceArea) {
		fe = append(fe, facilities.FieldError{Field: "article.reference_area", Message: "model reference area must be positive"})
	}
	if !(lc.ReferenceLength > 0) || !finite(lc.ReferenceLength) {
		fe = append(fe, facilities.FieldError{Field: "article.reference_length", Message: "model reference length must be positive"})
	}
	fe = append(fe, lc.Installation.FieldErrors()...)
	if !(q >= 0) || !finite(q) {
		fe = append(fe, facilities.FieldError{Field: "test.dynamic_pressure", Message: fmt.Sprintf("must be a non-negative dynamic pressure in Pa, got %g", q)})
	}
	if len(lc.Points) == 0 {
		fe = append(fe, facilities.FieldError{Field: "alpha", Message: "the test matrix has no points"})
	}
	return facilities.Invalid("load check", fe)
}

// Affine returns the loads of point i at the balance as perQ·q + weight, where q is
// the free-stream dynamic pressure: perQ holds the aerodynamic loads per pascal of
// free-stream q (the point's wall correction q_c/q included), weight the model's
// weight.
func (lc *Setup) Affine(i int) (perQ, weight Vector) {
	sa, ca := math.Sincos(lc.Points[i].Alpha * math.Pi / 180)
	return lc.affineAt(i, sa, ca)
}

// affineAt is Affine with the sine and cosine of point i's α given (Sincos of
// α·π/180, which Body and Installation.Weight each took before): the same
// loads to the bit, with one Sincos a point instead of two.
func (lc *Setup) affineAt(i int, sa, ca float64) (perQ, weight Vector) {
	p := &lc.Points[i]
	f := p.DynamicPressureFactor
	if f == 0 {
		f = 1
	}
	qS := f * lc.ReferenceArea
	perQ = Aerodynamic(bodyAt(p, sa, ca), qS, qS*lc.ReferenceLength, lc.Installation.BalanceOffset)
	weight = lc.Installation.weightAt(sa, ca)
	return perQ, weight
}

// Check returns the loads of every test point on balance b at free-stream dynamic
// pressure q (Pa), the utilisation of each point, the worst point, and the
// free-stream dynamic pressure at which the worst point reaches the allowed load by
// this estimate (MaxSafeDynamicPressure). Bad input is a *Error naming the field.
func (lc *Setup) Check(b *facilities.Balance, q float64) (Report, error) {
	return lc.checkWith(b, q, -1, nil)
}

// pointLoads are one point's sine and cosine of α (Sincos of α·π/180) and
// its loads as Affine gives them, which do not depend on the balance.
type pointLoads struct {
	sa, ca       float64
	perQ, weight Vector
}

// pointsLoads returns every point's pointLoads, for the checks of several
// balances over the same points (CheckAll).
func (lc *Setup) pointsLoads() []pointLoads {
	out := make([]pointLoads, len(lc.Points))
	for i := range out {
		pl := &out[i]
		pl.sa, pl.ca = math.Sincos(lc.Points[i].Alpha * math.Pi / 180)
		pl.perQ, pl.weight = lc.affineAt(i, pl.sa, pl.ca)
	}
	return out
}

// checkWith is Check of balance b, naming bad balance fields under
// balancePath(idx), with every point's sines and loads taken from pre when it
// is not nil (lc.pointsLoads()) rather than computed again. Check,
// CheckBalance and Choose call it straight: a wrapper between them copied
// the Report once more.
func (lc *Setup) checkWith(b *facilities.Balance, q float64, idx int, pre []pointLoads) (Report, error) {
	if err := lc.validate(q); err != nil {
		return Report{}, err
	}
	// The ratings are the check's own: their rows live on its stack when the
	// balance has at most ten.
	var buf [10]rating
	rs, err := compileIn(buf[:], b, idx)
	if err != nil {
		return Report{}, err
	}
	rs.Derate(lc.Installation.Fraction())
	r := Report{
		BalanceID:              b.ID,
		SafetyFactor:           rs.SafetyFactor,
		AllowedUtilization:     rs.Fraction / rs.SafetyFactor,
		LoadFraction:           rs.Fraction,
		DynamicPressure:        q,
		Points:                 make([]PointResult, len(lc.Points)),
		MaxSafeDynamicPressure: Ceiling(math.Inf(1)),
		WeightIncluded:         lc.Installation.ModelMass > 0,
	}
	if !r.WeightIncluded {
		r.Warnings = append(r.Warnings, "model_mass not given: the model's weight is left out of the balance loads, which makes the check unconservative")
	}
	worst := -1
	nrow := 6 + len(rs.rows) - countSingle(&rs)
	table := make([]Row, len(lc.Points)*nrow)
	var unrated [6]bool
	// The uncertainties are computed with each point's loads, from the same
	// sine and cosine of α (the figures as CoefficientUncertainty gives them).
	var d Vector
	var known [6]bool
	uncertain := b.Accuracy != nil && q > 0
	if uncertain {
		d, known = AccuracyOf(b)
		r.Uncertainty = make([]Uncertainty, len(lc.Points))
	}
	var rr *resolutionRun
	if lc.Resolution != nil {
		rr = lc.newResolutionRun(b)
	}
	for i, p := range lc.Points {
		var sa, ca float64
		var perQ, weight Vector
		if pre != nil {
			pl := &pre[i]
			sa, ca, perQ, weight = pl.sa, pl.ca, pl.perQ, pl.weight
		} else {
			sa, ca = math.Sincos(p.Alpha * math.Pi / 180)
			perQ, weight = lc.affineAt(i, sa, ca)
		}
		var l Vector
		for k := range l {
			l[k] = q*perQ[k] + weight[k]
		}
		rows := table[i*nrow : (i+1)*nrow : (i+1)*nrow]
		u, row, over := rs.fillRows(rows, &l)
		for k := range 6 {
			if !rs.covered[k] && l[k] != 0 {
				unrated[k] = true
			}
		}
		for j := range rows {
			if !over {
				break // no row is over: none to list
			}
			if rows[j].ShareOfAllowed > 1+1e-12 {
				r.OverAllowed = append(r.OverAllowed, Limiting{rows[j].Name, p.Alpha, p.Beta})
			}
		}
		f := p.DynamicPressureFactor
		if f == 0 {
			f = 1
		}
		r.Points[i] = PointResult{
			Alpha: p.Alpha, Beta: p.Beta, DynamicPressure: q * f,
			Normal: l[IndexNormal], Axial: l[IndexAxial], Side: l[IndexSide],
			RollingMoment: l[IndexRollingMoment], PitchingMoment: l[IndexPitchingMoment],
			YawingMoment: l[IndexYawingMoment],
			Utilization:  u, Limiting: rs.RowName(row), Rows: rows,
		}
		if worst < 0 || u > r.MaxUtilization {
			worst, r.MaxUtilization = i, u
			r.Limiting = Limiting{rs.RowName(row), p.Alpha, p.Beta}
		}
		if qs, row := rs.MaxDynamicPressure(&perQ, &weight); qs < float64(r.MaxSafeDynamicPressure) {
			r.MaxSafeDynamicPressure = Ceiling(qs)
			r.MaxSafeLimiting = Limiting{rs.RowName(row), p.Alpha, p.Beta}
		}
		if uncertain {
			r.Uncertainty[i], r.UncertaintyUnknown = coefficientUncertaintyAt(d, known, sa, ca, r.Points[i].DynamicPressure,
				lc.ReferenceArea, lc.ReferenceLength)
			r.Uncertainty[i].Alpha, r.Uncertainty[i].Beta = p.Alpha, p.Beta
		}
		if rr != nil {
			rr.point(i, sa, ca)
		}
	}
	r.WithinLimits = r.MaxUtilization <= r.AllowedUtilization*(1+1e-12) &&
		q <= float64(r.MaxSafeDynamicPressure)*(1+1e-12)
	for k, u := range unrated {
		if u {
			r.UnratedLoaded = append(r.UnratedLoaded, ComponentName(k))
		}
	}
	if rr != nil {
		r.Resolution = rr.finish(q)
	}
	switch {
	case !r.WithinLimits:
		r.Verdict = VerdictOver
	case len(r.UnratedLoaded) > 0 || !r.WeightIncluded:
		r.Verdict = VerdictNotVerified
	default:
		r.Verdict = VerdictWithin
	}
	if len(r.UnratedLoaded) > 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("balance %s has no rating for %s, which carry load in this test matrix: the check cannot vouch for them (not verified)",
			b.ID, strings.Join(r.UnratedLoaded, ", ")))
	}
	if r.MaxSafeDynamicPressure == 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("the model's weight alone loads %s beyond %.0f %% of its rating at α %.4g°: the balance carries it wind-off and on the way to the test's dynamic pressure",
			r.MaxSafeLimiting.Component, 100*r.AllowedUtilization, r.MaxSafeLimiting.Alpha))
	}
	return r, nil
}

// CheckBalance returns the load check of facility f's i-th balance at
// free-stream dynamic pressure q (Pa), as Check, naming bad balance fields under
// "facility.balances[i]". The balance choice over a facility's balances is
// internal/loads' (loads.Choose).
func (lc *Setup) CheckBalance(f *facilities.Facility, i int, q float64) (Report, error) {
	return lc.checkWith(&f.Balances[i], q, i, nil)
}
