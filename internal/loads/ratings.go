package loads

import (
	"fmt"
	"math"
	"sort"

	"scalematch/facilities"
)

// combined gauge row (index −1, coefficients coef).
type rating struct {
	name    string
	index   int
	coef    Vector
	limit   float64 // rated load
	allowed float64 // limit / safety factor
}

func (r *rating) value(l *Vector) float64 {
	if r.index >= 0 {
		return l[r.index]
	}
	var s float64
	for i, c := range r.coef {
		s += c * l[i]
	}
	return s
}

// Ratings are a balance's limits compiled for fast checks. Build them with
// NewRatings; the zero value limits nothing.
type Ratings struct {
	rows []rating
	// single holds, per component, the index of its own rating row, −1 when
	// it has none; covered marks the components that are rated or enter a
	// gauge row with a non-zero coefficient.
	single  [6]int
	covered [6]bool
	// SafetyFactor divides every rated load.
	SafetyFactor float64
	// Fraction is the share of rating ÷ SafetyFactor allowed (Derate); 1 as
	// compiled.
	Fraction float64
}

// Derate allows only the fraction f (0 < f ≤ 1) of every row's allowed load:
// allowed = f·rating ÷ safety factor. Other values leave the ratings as they are.
func (rs *Ratings) Derate(f float64) {
	if !(f > 0 && f < 1) {
		return
	}
	rs.Fraction *= f
	for i := range rs.rows {
		rs.rows[i].allowed *= f
	}
}

// Ratings compiles the balance's limits. A safety factor of 0 is taken as 1; one
// below 1, a non-positive rated load or an unknown component name in a combined
// row is an error naming the field under "balance".
func NewRatings(b *facilities.Balance) (Ratings, error) { return compile(b, -1) }

// BalanceRatings compiles the limits of the facility's i-th balance, naming bad
// fields under "facility.balances[i]".
func BalanceRatings(f *facilities.Facility, i int) (Ratings, error) {
	return compile(&f.Balances[i], i)
}

// balancePath returns the JSON path of a facility's i-th balance, or "balance" for
// i < 0 (a balance on its own).
func balancePath(i int) string {
	if i < 0 {
		return "balance"
	}
	return fmt.Sprintf("facility.balances[%d]", i)
}

// ratings compiles the limits of the balance at balancePath(idx); the path is
// written only when there is an error to name.
func compile(b *facilities.Balance, idx int) (Ratings, error) {
	return compileIn(nil, b, idx)
}

// compileIn is compile with the rows appended to buf[:0] (a caller's array
// for the usual six components and a few gauge rows; nil: allocated).
func compileIn(buf []rating, b *facilities.Balance, idx int) (Ratings, error) {
	var fe []facilities.FieldError
	path := ""
	at := func(field string) string {
		if path == "" {
			path = balancePath(idx)
		}
		return path + field
	}
	sf := b.SafetyFactor
	switch {
	case sf == 0:
		sf = 1
	case !(sf >= 1) || math.IsInf(sf, 0):
		fe = append(fe, facilities.FieldError{Field: at(".safety_factor"), Message: fmt.Sprintf("must be at least 1, got %g", sf)})
	}
	rs := Ratings{SafetyFactor: sf, Fraction: 1, single: [6]int{-1, -1, -1, -1, -1, -1}, rows: buf[:0]}
	if cap(buf) < 6+len(b.Combined) {
		rs.rows = make([]rating, 0, 6+len(b.Combined))
	}
	single := [6]*float64{b.Limits.Normal, b.Limits.Axial, b.Limits.Side,
		b.Limits.RollingMoment, b.Limits.PitchingMoment, b.Limits.YawingMoment}
	for i, l := range single {
		if l == nil {
			continue
		}
		if !(*l > 0) || math.IsInf(*l, 0) {
			fe = append(fe, facilities.FieldError{Field: at(".limits." + ComponentName(i)), Message: fmt.Sprintf("must be a positive finite load, got %g", *l)})
			continue
		}
		rs.single[i], rs.covered[i] = len(rs.rows), true
		rs.rows = append(rs.rows, rating{name: ComponentName(i), index: i, limit: *l, allowed: *l / sf})
	}
	for j, c := range b.Combined {
		p := func(field string) string { return at(fmt.Sprintf(".combined[%d]", j) + field) }
		r := rating{name: c.Name, index: -1, limit: c.Limit, allowed: c.Limit / sf}
		if r.name == "" {
			r.name = fmt.Sprintf("combined[%d]", j)
		}
		if !(c.Limit > 0) || math.IsInf(c.Limit, 0) {
			fe = append(fe, facilities.FieldError{Field: p(".limit"), Message: fmt.Sprintf("must be a positive finite load, got %g", c.Limit)})
		}
		keys := make([]string, 0, len(c.Coefficients))
		for k := range c.Coefficients {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			i := componentIndex(k)
			v := c.Coefficients[k]
			switch {
			case i < 0:
				fe = append(fe, facilities.FieldError{Field: p(".coefficients." + k), Message: "unknown component: want normal, axial, side, rolling_moment, pitching_moment or yawing_moment"})
			case math.IsNaN(v) || math.IsInf(v, 0):
				fe = append(fe, facilities.FieldError{Field: p(".coefficients." + k), Message: "must be finite"})
			default:
				r.coef[i] = v
				rs.covered[i] = rs.covered[i] || v != 0
			}
		}
		rs.rows = append(rs.rows, r)
	}
	if err := facilities.Invalid("balance limits are not usable", fe); err != nil {
		return Ratings{}, err
	}
	return rs, nil
}

// Utilization returns the largest |load|/rating over the components and combined
// rows, and the index of the row that gives it (−1 when nothing is limited).
func (rs *Ratings) Utilization(l *Vector) (u float64, row int) {
	row = -1
	for i := range rs.rows {
		r := &rs.rows[i]
		if v := math.Abs(r.value(l)) / r.limit; v > u || row < 0 {
			u, row = v, i
		}
	}
	return u, row
}

// countSingle returns how many rows are single-component ratings.
func countSingle(rs *Ratings) int {
	n := 0
	for _, i := range rs.single {
		if i >= 0 {
			n++
		}
	}
	return n
}

// fillRows writes the six components of load l and then every gauge row into
// rows (len 6 + gauge rows, every Row zero), and returns the load's
// utilisation and its row as Utilization does, marking that row as limiting:
// each row's value is computed once for both. over reports that a row's
// ShareOfAllowed is above 1 + 1e-12 (the check then lists the rows over).
//
// The rows are written field by field into the zero rows: a Row literal was
// built on the stack and copied, 64 bytes twice, for every row of every point.
func (rs *Ratings) fillRows(rows []Row, l *Vector) (u float64, limit int, over bool) {
	limit = -1
	k, at0 := 6, -1
	for i := range rs.rows {
		r := &rs.rows[i]
		at := k
		if r.index >= 0 {
			at = r.index
		} else {
			k++
		}
		v := r.value(l)
		x := &rows[at]
		x.Name, x.Load, x.Rated, x.Covered, x.Rating, x.Allowed = r.name, v, true, true, r.limit, r.allowed
		x.ShareOfAllowed = math.Abs(v) / r.allowed
		over = over || x.ShareOfAllowed > 1+1e-12
		if y := math.Abs(v) / r.limit; y > u || limit < 0 {
			u, limit, at0 = y, i, at
		}
	}
	if at0 >= 0 {
		rows[at0].Limiting = true
	}
	for c := range 6 {
		if rs.single[c] < 0 {
			x := &rows[c]
			x.Name, x.Load, x.Covered = ComponentName(c), l[c], rs.covered[c]
		}
	}
	return u, limit, over
}

// RowName returns the name of row i: a component name or a combined row's name.
func (rs *Ratings) RowName(i int) string {
	if i < 0 || i >= len(rs.rows) {
		return ""
	}
	return rs.rows[i].name
}

// Rows returns the number of rated rows: limited components, then combined rows.
func (rs *Ratings) Rows() int { return len(rs.rows) }

// Row returns row i's value of load l: the component, or Σ coefficient·load for a
// combined row.
func (rs *Ratings) Row(i int, l *Vector) float64 { return rs.rows[i].value(l) }

// Allowed returns row i's rated load divided by the safety factor (times the
// Derate fraction).
func (rs *Ratings) Allowed(i int) float64 { return rs.rows[i].allowed }

// SafeDynamicPressure returns the largest dynamic pressure q ≥ 0 with
// |q·u + w| ≤ allowed, for a load row that is affine in q (u per pascal, w the part
// that does not grow with q, such as weight):
//
//	q_max = (allowed − sign(u)·w)/|u|
//
// It returns 0 when |w| > allowed already, and +Inf when u = 0.
func SafeDynamicPressure(u, w, allowed float64) float64 {
	if math.Abs(w) > allowed {
		return 0
	}
	if u == 0 {
		return math.Inf(1)
	}
	return (allowed - math.Copysign(1, u)*w) / math.Abs(u)
}

// MaxDynamicPressure returns the largest free-stream dynamic pressure q in Pa at
// which the load q·perQ + weight stays within every rating over the safety factor,
// and the row that sets it; each row is solved exactly by SafeDynamicPressure. It
// returns 0 when the weight alone exceeds a row, and +Inf (row −1) when no row
// grows with q.
func (rs *Ratings) MaxDynamicPressure(perQ, weight *Vector) (q float64, row int) {
	q, row = math.Inf(1), -1
	for i := range rs.rows {
		r := &rs.rows[i]
		// SafeDynamicPressure, written out: the call a row was a fifth of
		// the check's time in it.
		u, w := r.value(perQ), r.value(weight)
		var qi float64
		switch {
		case math.Abs(w) > r.allowed:
			qi = 0
		case u == 0:
			qi = math.Inf(1)
		default:
			qi = (r.allowed - math.Copysign(1, u)*w) / math.Abs(u)
		}
		if qi < q {
			q, row = qi, i
		}
		if qi == 0 {
			break
		}
	}
	return q, row
}

// AccuracyOf returns the 2σ uncertainty of every component of balance b (N,
// N·m; facilities.Accuracy.Of) and which are known; none is known when the
// balance gives no accuracy.
func AccuracyOf(b *facilities.Balance) (d Vector, known [6]bool) {
	for k := range d {
		d[k], known[k] = b.Accuracy.Of(k, &b.Limits)
	}
	return d, known
}
