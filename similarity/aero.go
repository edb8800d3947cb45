package similarity

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"scalematch/facilities"
	"scalematch/internal/check"
)

// Coefficients are the aerodynamic coefficients of one test point: C_L, C_D in wind
// axes, C_m about the moment reference centre, C_Y, C_l, C_n in body axes. It is the
// facilities type, so that the balance check takes the estimate as it is.
type Coefficients = facilities.Coefficients

// MaxSweepPoints is the largest number of angles a Sweep may give.
const MaxSweepPoints = 2001

// ErrOutsideTable is wrapped by Aero.Coefficients when an angle lies outside the
// coefficient table.
var ErrOutsideTable = errors.New("angle outside the coefficient table")

// Validation ranges of the parametric estimate (wide enough for any aircraft; they
// exist to catch unit mistakes such as a lift slope per degree given per radian).
const (
	maxLiftSlope = 10.0 // per radian; a thin aerofoil has 2π
	maxAlphaZero = 20.0 // degrees
	maxCLMax     = 5.0
	maxCD        = 2.0
)

// Validate checks the estimate and returns a *check.Error (CodeInvalid) naming
// every bad field by its JSON path under "article.aero", or nil. A table replaces
// the parametric fields, which are then not checked.
func (a Aero) Validate() error {
	const p = "article.aero."
	var fe []check.FieldError
	bad := func(field, msg string) { fe = append(fe, check.FieldError{Field: p + field, Message: msg}) }
	in := func(field string, v, lo, hi float64, openLo bool) {
		ok := v <= hi && (v > lo || (!openLo && v == lo))
		if !ok || math.IsNaN(v) {
			lb := "["
			if openLo {
				lb = "("
			}
			bad(field, fmt.Sprintf("%g is outside %s%g, %g]", v, lb, lo, hi))
		}
	}
	if len(a.Table) > 0 {
		if _, err := compileTable(a.Table); err != nil {
			var e *check.Error
			if errors.As(err, &e) {
				return e
			}
			return err
		}
		return nil
	}
	in("lift_slope", a.LiftSlope, 0, maxLiftSlope, true)
	in("zero_lift_alpha", a.ZeroLiftAlpha, -maxAlphaZero, maxAlphaZero, false)
	in("cl_max", a.CLMax, 0, maxCLMax, true)
	in("cd_min", a.CDMin, 0, maxCD, true)
	in("cl_at_cd_min", a.CLAtCDMin, -maxCLMax, maxCLMax, false)
	in("induced_drag_factor", a.InducedDragFactor, 0, 1, false)
	in("cm_zero", a.CmZero, -2, 2, false)
	in("cm_slope", a.CmSlope, -20, 20, false)
	return check.Invalid("invalid aerodynamic estimate", fe)
}

// Coefficients returns the estimate's coefficients at angle of attack alphaDeg and
// sideslip betaDeg (degrees), and whether the lift is held at the stall.
//
// The parametric model (physics.md §6):
//
//	C_L = a·(α − α0), held at ±C_Lmax past the stall
//	C_D = C_Dmin + K·(C_L − C_L,minD)²   (polar with offset minimum; Raymer,
//	                                      Aircraft Design: A Conceptual Approach)
//	C_m = C_m0 + C_mα·α
//
// with α in radians; it has no lateral part, so C_Y = C_l = C_n = 0 at any β. A
// table is interpolated linearly in α, and in β between its β values; outside it
// the error wraps ErrOutsideTable. The estimate must be valid (Validate).
func (a Aero) Coefficients(alphaDeg, betaDeg float64) (Coefficients, bool, error) {
	m, err := newAeroModel(a)
	if err != nil {
		return Coefficients{}, false, err
	}
	return m.at(alphaDeg, betaDeg)
}

// aeroModel evaluates an Aero, with its table sorted once.
type aeroModel struct {
	a     Aero
	table *aeroTable
}

func newAeroModel(a Aero) (*aeroModel, error) {
	if err := a.Validate(); err != nil {
		return nil, err
	}
	m := &aeroModel{a: a}
	if len(a.Table) > 0 {
		t, err := compileTable(a.Table)
		if err != nil {
			return nil, err
		}
		m.table = t
	}
	return m, nil
}

func (m *aeroModel) at(alphaDeg, betaDeg float64) (Coefficients, bool, error) {
	if math.IsNaN(alphaDeg) || math.IsNaN(betaDeg) {
		return Coefficients{}, false, fmt.Errorf("aerodynamic estimate: angle is not a number")
	}
	if m.table != nil {
		c, err := m.table.at(alphaDeg, betaDeg)
		return c, false, err
	}
	a := m.a
	alpha := alphaDeg * math.Pi / 180
	cl := a.LiftSlope * (alpha - a.ZeroLiftAlpha*math.Pi/180)
	stalled := false
	if cl > a.CLMax {
		cl, stalled = a.CLMax, true
	} else if cl < -a.CLMax {
		cl, stalled = -a.CLMax, true
	}
	d := cl - a.CLAtCDMin
	return Coefficients{
		CL: cl,
		CD: a.CDMin + a.InducedDragFactor*d*d,
		Cm: a.CmZero + a.CmSlope*alpha,
	}, stalled, nil
}

// aeroTable is a coefficient table grouped by β (ascending), each group sorted by α.
type aeroTable struct {
	betas  []float64
	groups [][]AeroPoint
}

// tableTol is the angle tolerance in degrees for a point on a table edge.
const tableTol = 1e-9

func compileTable(rows []AeroPoint) (*aeroTable, error) {
	const p = "article.aero.table"
	var fe []check.FieldError
	bad := func(i int, field, msg string) {
		fe = append(fe, check.FieldError{Field: fmt.Sprintf("%s[%d].%s", p, i, field), Message: msg})
	}
	byBeta := map[float64][]int{}
	for i, r := range rows {
		for _, f := range [...]struct {
			name string
			v    float64
			b    facilities.Bound
		}{{"alpha", r.Alpha, BoundTableAngle}, {"beta", r.Beta, BoundTableBeta}, {"cl", r.CL, BoundTableCoefficient},
			{"cd", r.CD, BoundTableDrag}, {"cm", r.Cm, BoundTableCoefficient}, {"cy", r.CY, BoundTableCoefficient},
			{"cl_roll", r.Cl, BoundTableCoefficient}, {"cn", r.Cn, BoundTableCoefficient}} {
			if msg := f.b.Problem(f.v); msg != "" {
				bad(i, f.name, msg)
			}
		}
		byBeta[r.Beta] = append(byBeta[r.Beta], i)
	}
	t := &aeroTable{}
	for b := range byBeta {
		t.betas = append(t.betas, b)
	}
	sort.Float64s(t.betas)
	for _, b := range t.betas {
		idx := byBeta[b]
		if len(idx) < 2 {
			bad(idx[0], "alpha", fmt.Sprintf("β %g° has a single row; interpolation needs at least two α values per β", b))
		}
		g := make([]AeroPoint, len(idx))
		for k, i := range idx {
			g[k] = rows[i]
		}
		sort.SliceStable(g, func(x, y int) bool { return g[x].Alpha < g[y].Alpha })
		for k := 1; k < len(g); k++ {
			if g[k].Alpha == g[k-1].Alpha {
				bad(idx[0], "alpha", fmt.Sprintf("α %g° appears twice at β %g°", g[k].Alpha, b))
			}
		}
		t.groups = append(t.groups, g)
	}
	if len(rows) == 0 {
		fe = append(fe, check.FieldError{Field: p, Message: "the table is empty"})
	}
	if err := check.Invalid("invalid coefficient table", fe); err != nil {
		return nil, err
	}
	return t, nil
}

func lerpCoefficients(a, b Coefficients, f float64) Coefficients {
	l := func(x, y float64) float64 { return x + f*(y-x) }
	return Coefficients{CL: l(a.CL, b.CL), CD: l(a.CD, b.CD), Cm: l(a.Cm, b.Cm),
		CY: l(a.CY, b.CY), Cl: l(a.Cl, b.Cl), Cn: l(a.Cn, b.Cn)}
}

func rowCoefficients(r AeroPoint) Coefficients {
	return Coefficients{CL: r.CL, CD: r.CD, Cm: r.Cm, CY: r.CY, Cl: r.Cl, Cn: r.Cn}
}

// inAlpha interpolates one β group at α.
func inAlpha(g []AeroPoint, alpha, beta float64) (Coefficients, error) {
	lo, hi := g[0].Alpha, g[len(g)-1].Alpha
	if alpha < lo-tableTol || alpha > hi+tableTol {
		return Coefficients{}, fmt.Errorf("α %g° at β %g° is outside the table's %g° to %g°: %w", alpha, beta, lo, hi, ErrOutsideTable)
	}
	k := sort.Search(len(g), func(i int) bool { return g[i].Alpha >= alpha })
	switch {
	case k == 0:
		return rowCoefficients(g[0]), nil
	case k == len(g):
		return rowCoefficients(g[k-1]), nil
	}
	a, b := g[k-1], g[k]
	return lerpCoefficients(rowCoefficients(a), rowCoefficients(b), (alpha-a.Alpha)/(b.Alpha-a.Alpha)), nil
}

func (t *aeroTable) at(alpha, beta float64) (Coefficients, error) {
	lo, hi := t.betas[0], t.betas[len(t.betas)-1]
	if beta < lo-tableTol || beta > hi+tableTol {
		if lo == hi {
			return Coefficients{}, fmt.Errorf("β %g° is not in the table, which has only β %g°: %w", beta, lo, ErrOutsideTable)
		}
		return Coefficients{}, fmt.Errorf("β %g° is outside the table's %g° to %g°: %w", beta, lo, hi, ErrOutsideTable)
	}
	k := sort.SearchFloat64s(t.betas, beta)
	if k < len(t.betas) && math.Abs(t.betas[k]-beta) <= tableTol {
		return inAlpha(t.groups[k], alpha, beta)
	}
	if k == 0 {
		return inAlpha(t.groups[0], alpha, beta)
	}
	if k == len(t.betas) {
		return inAlpha(t.groups[k-1], alpha, beta)
	}
	ca, err := inAlpha(t.groups[k-1], alpha, t.betas[k-1])
	if err != nil {
		return Coefficients{}, err
	}
	cb, err := inAlpha(t.groups[k], alpha, t.betas[k])
	if err != nil {
		return Coefficients{}, err
	}
	return lerpCoefficients(ca, cb, (beta-t.betas[k-1])/(t.betas[k]-t.betas[k-1])), nil
}

// Sweep is a range of angles in degrees, From to To by Step (JSON
// {"from", "to", "step"}). To is included when To − From is a whole number of steps
// (within 1e-9 of a step).
type Sweep struct {
	From float64 `json:"from"`
	To   float64 `json:"to"`
	Step float64 `json:"step"`
}

// Angles returns the sweep's angles in degrees. field is the sweep's JSON path
// ("alpha", "beta") used in errors. Step must be positive, From ≤ To, both within
// ±180°, and the sweep at most MaxSweepPoints angles; otherwise a
// *check.Error (CodeInvalid) names the field.
func (s Sweep) Angles(field string) ([]float64, error) {
	var fe []check.FieldError
	bad := func(f, msg string) { fe = append(fe, check.FieldError{Field: field + "." + f, Message: msg}) }
	if !BoundSweepStep.Contains(s.Step) {
		bad("step", BoundSweepStep.Problem(s.Step))
	}
	if !(math.Abs(s.From) <= 180) {
		bad("from", fmt.Sprintf("%g° is outside −180° to 180°", s.From))
	}
	if !(math.Abs(s.To) <= 180) {
		bad("to", fmt.Sprintf("%g° is outside −180° to 180°", s.To))
	}
	if len(fe) == 0 && s.From > s.To {
		bad("to", fmt.Sprintf("%g° is below from (%g°); want from ≤ to", s.To, s.From))
	}
	if len(fe) == 0 {
		if n := math.Floor((s.To-s.From)/s.Step+1e-9) + 1; n > MaxSweepPoints {
			if n < 1e15 {
				bad("step", fmt.Sprintf("%g° gives %.0f points, more than the %d allowed", s.Step, n, MaxSweepPoints))
			} else {
				bad("step", fmt.Sprintf("%g° gives more than the %d points allowed", s.Step, MaxSweepPoints))
			}
		}
	}
	if err := check.Invalid("invalid "+field+" sweep", fe); err != nil {
		return nil, err
	}
	n := int(math.Floor((s.To-s.From)/s.Step+1e-9)) + 1
	out := make([]float64, n)
	for i := range out {
		out[i] = s.From + float64(i)*s.Step
	}
	if d := out[n-1] - s.To; math.Abs(d) <= 1e-9*s.Step {
		out[n-1] = s.To
	}
	return out, nil
}

// Matrix is a test matrix: the α sweep repeated at each β (one run per β), with
// the estimate's coefficients at every point.
type Matrix struct {
	// Points are ordered by β, then α.
	Points []facilities.Point
	// AlphaPoints is the number of α values per run.
	AlphaPoints int
	// BetaValues is the number of β values (runs); 1 when no β sweep is given.
	BetaValues int
	// Stalled is the number of points whose lift is held at ±C_Lmax.
	Stalled int
	// Warnings are notes on the estimate (stall).
	Warnings []string
}

// Matrix builds the test matrix of the α sweep at each angle of the β sweep (β = 0
// when beta is nil) with the estimate's coefficients at each point. Errors are
// *check.Error values naming "alpha", "beta" or "article.aero" fields.
func (a Aero) Matrix(alpha Sweep, beta *Sweep) (Matrix, error) {
	return a.MatrixIn(nil, alpha, beta)
}

// MatrixIn is Matrix with the points appended to points[:0], a caller's
// buffer used when it holds them all (nil: allocated).
func (a Aero) MatrixIn(points []facilities.Point, alpha Sweep, beta *Sweep) (Matrix, error) {
	m, err := newAeroModel(a)
	if err != nil {
		return Matrix{}, err
	}
	as, err := alpha.Angles("alpha")
	if err != nil {
		return Matrix{}, err
	}
	bs := []float64{0}
	if beta != nil {
		if bs, err = beta.Angles("beta"); err != nil {
			return Matrix{}, err
		}
	}
	if len(as)*len(bs) > MaxSweepPoints {
		return Matrix{}, check.Invalid("test matrix too large", []check.FieldError{{Field: "beta",
			Message: fmt.Sprintf("%d α × %d β = %d points, more than the %d allowed", len(as), len(bs), len(as)*len(bs), MaxSweepPoints)}})
	}
	mx := Matrix{Points: points[:0], AlphaPoints: len(as), BetaValues: len(bs)}
	if cap(points) < len(as)*len(bs) {
		mx.Points = make([]facilities.Point, 0, len(as)*len(bs))
	}
	var stallAt []float64
	for _, b := range bs {
		for _, al := range as {
			c, stalled, err := m.at(al, b)
			if err != nil {
				field := "alpha"
				if t := m.table; t != nil && (b < t.betas[0]-tableTol || b > t.betas[len(t.betas)-1]+tableTol) {
					field = "beta"
				}
				return Matrix{}, check.Invalid("the sweep leaves the coefficient table",
					[]check.FieldError{{Field: field, Message: err.Error()}})
			}
			if stalled {
				mx.Stalled++
				stallAt = append(stallAt, al)
			}
			mx.Points = append(mx.Points, facilities.Point{Alpha: al, Beta: b, Coefficients: c})
		}
	}
	if mx.Stalled > 0 {
		lo, hi := stallAt[0], stallAt[0]
		for _, v := range stallAt {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		mx.Warnings = append(mx.Warnings, stallNote(a.CLMax, mx.Stalled, len(mx.Points), lo, hi))
	}
	return mx, nil
}

// DragRange returns the least and the largest drag coefficient of the matrix's
// points, nil when it has none: the range the planner takes the wall-corrected
// Mach number over (Problem.MatrixDrag).
func (m Matrix) DragRange() *DragRange {
	if len(m.Points) == 0 {
		return nil
	}
	d := DragRange{Min: m.Points[0].CD, Max: m.Points[0].CD}
	for _, p := range m.Points[1:] {
		d.Min, d.Max = math.Min(d.Min, p.CD), math.Max(d.Max, p.CD)
	}
	return &d
}
