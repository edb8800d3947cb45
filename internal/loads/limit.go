package loads

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// Limit is the planner's similarity.LoadLimit for an article on a facility's balances
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
// largest q that some balance can carry, which is the balance Choose will
// then pick among those that are safe.
//
// The coefficients and their body-axis projections onto every rated row are
// computed once by NewLimit; MaxDynamicPressure allocates nothing.
//
// A Limit is never written once NewLimit (or Resolved) has returned it, and it
// keeps no pointer into its inputs (the facility's test section and balance
// accuracies are copied in), so one limit may serve any number of concurrent
// plans (LimitCache).
type Limit struct {
	balances []balanceRows
	cd       []float64 // drag coefficient per point, for the wake blockage
	// section holds the facility's test section alone (its area copied too),
	// which is all of the facility the blockage factors read.
	section facilities.Facility
	// Full-scale geometry of the article.
	refArea, refLength, frontalArea float64
	// alpha are the points' angles of attack in degrees; floor is set when a
	// required resolution bounds q from below (Resolved).
	alpha []float64
	floor bool
}

// balanceRows holds one balance's rows projected on the points: the elements
// (point i, row j) that can set the ceiling at some scale and Mach number
// (prune), in point-major order, each with its point in livePoint.
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
	// accuracy and known are the 2σ uncertainties of the balance's
	// components (AccuracyOf; none known without an accuracy), which
	// Resolved reads.
	accuracy Vector
	known    [6]bool
	// needForce and needMoment are, per point, the least q_c·S (N) and
	// q_c·S·c (N·m) the required resolution asks of this balance
	// (Resolution.Need; +Inf when its accuracy is not known); nil
	// when no resolution is asked.
	needForce, needMoment []float64
	// livePoint is the point i of each element kept; maxQ visits only these.
	livePoint []int32
}

var (
	_ similarity.LoadLimit = (*Limit)(nil)
	_ similarity.LoadFloor = (*Limit)(nil)
)

// NewLimit returns the load limit of article art on facility f with
// installation in, over the test matrix mx (from similarity.Aero.Matrix). It returns an error
// naming the field for bad input or an unknown balance, and ErrNoBalance
// when the facility has no balance.
func NewLimit(art *similarity.Article, f *facilities.Facility, in Installation, mx similarity.Matrix) (*Limit, error) {
	return newLimit(art, f, in, mx, true)
}

// newLimit is NewLimit, keeping every element of the balances' tables when
// prune is false (the reference the pruned tables are tested against).
func newLimit(art *similarity.Article, f *facilities.Facility, in Installation, mx similarity.Matrix, prune bool) (*Limit, error) {
	fe := art.GeometryErrors("reference_area", "reference_length", "frontal_area")
	if len(mx.Points) == 0 {
		fe = append(fe, check.FieldError{Field: "alpha", Message: "the test matrix has no points"})
	}
	if err := in.Validate(); err != nil {
		var e *check.Error
		if errors.As(err, &e) {
			fe = append(fe, e.Fields...)
		}
	}
	if err := check.Invalid("invalid load-limit input", fe); err != nil {
		return nil, err
	}
	if len(f.Balances) == 0 {
		return nil, ErrNoBalance
	}
	np := len(mx.Points)
	pts := make([]float64, 2*np) // cd and alpha in one allocation
	l := &Limit{refArea: art.ReferenceArea, refLength: art.ReferenceLength,
		frontalArea: art.FrontalArea, cd: pts[:np:np], alpha: pts[np:]}
	l.section.TestSection = f.TestSection
	if a := f.TestSection.Area; a != nil {
		area := *a
		l.section.TestSection.Area = &area
	}
	for i, p := range mx.Points {
		l.cd[i], l.alpha[i] = p.CD, p.Alpha
	}
	found := false
	for k := range f.Balances {
		b := &f.Balances[k]
		if in.BalanceID != "" && b.ID != in.BalanceID {
			continue
		}
		found = true
		var rbuf [10]rating
		rs, err := compileIn(rbuf[:], b, k)
		if err != nil {
			return nil, err
		}
		rs.Derate(in.Fraction())
		br := balanceRows{id: b.ID, rows: rs.Rows(), allowed: make([]float64, rs.Rows())}
		// The accuracy of the first balance of this id, as the floor always
		// took it (ids are unique in a valid facility).
		if a := &f.Balances[slices.IndexFunc(f.Balances, func(a facilities.Balance) bool { return a.ID == b.ID })]; a.Accuracy != nil {
			br.accuracy, br.known = AccuracyOf(a)
		}
		for j := range br.allowed {
			br.allowed[j] = rs.Allowed(j)
		}
		n := len(mx.Points) * br.rows
		// The four tables of every element in pooled scratch; prune keeps
		// those of the live elements in one allocation of their final size.
		buf := tableScratch.Get().(*[]float64)
		if cap(*buf) < 4*n {
			*buf = make([]float64, 4*n)
		}
		tab := (*buf)[:4*n]
		br.force, br.moment = tab[:n:n], tab[n:2*n:2*n]
		br.up, br.down = tab[2*n:3*n:3*n], tab[3*n:]
		for i, p := range mx.Points {
			body := Body(p)
			force := Aerodynamic(body, 1, 0, in.BalanceOffset)
			moment := Aerodynamic(body, 0, 1, in.BalanceOffset)
			weight := in.Weight(p.Alpha)
			for j := range br.rows {
				k := i*br.rows + j
				w := rs.Row(j, &weight)
				br.force[k] = rs.Row(j, &force)
				br.moment[k] = rs.Row(j, &moment)
				br.up[k], br.down[k] = br.allowed[j]-w, br.allowed[j]+w
				br.weightBreaks = br.weightBreaks || SafeDynamicPressure(0, w, br.allowed[j]) == 0
			}
		}
		br.prune(l.cd, prune)
		tableScratch.Put(buf)
		l.balances = append(l.balances, br)
	}
	if !found {
		return nil, check.Invalid("unknown balance", []check.FieldError{{Field: "installation.balance_id",
			Message: fmt.Sprintf("facility %s has no balance %q", f.ID, in.BalanceID)}})
	}
	return l, nil
}

// Name returns facilities.ConstraintBalance, the constraint's name in a plan.
func (l *Limit) Name() string { return facilities.ConstraintBalance }

// Resolved returns the limit as a LoadFloor as well: the least dynamic pressure at
// which a balance resolves the coefficients to res (Resolution.Need at every
// point of the matrix), which with its load ceiling gives each balance a window
// of dynamic pressure (Windows). With a floor, MaxDynamicPressure is the highest
// ceiling of the balances whose floor is at or under their ceiling (of all when
// none is). A nil or empty res gives the limit without a floor.
//
// l itself is not changed: the new limit shares its tables, which neither
// writes, so a limit in use by other plans may be resolved.
func (l *Limit) Resolved(res *Resolution) *Limit {
	r := *l
	r.balances = slices.Clone(l.balances)
	empty := res.Empty()
	for k := range r.balances {
		br := &r.balances[k]
		br.needForce, br.needMoment = nil, nil
		if empty {
			continue
		}
		br.needForce, br.needMoment = make([]float64, len(l.alpha)), make([]float64, len(l.alpha))
		for i, a := range l.alpha {
			br.needForce[i], br.needMoment[i], _ = res.Need(br.accuracy, br.known, a)
		}
	}
	r.floor = !empty
	return &r
}

// FloorName returns facilities.ConstraintResolution, the floor's name in a plan.
func (l *Limit) FloorName() string { return facilities.ConstraintResolution }

// Windows appends, per balance (the named one, or every balance of the
// facility), its window [MinDynamicPressure, MaxDynamicPressure] in Pa at this
// scale and st.Mach: the floor of the required resolution (0 without one) and
// the load ceiling.
func (l *Limit) Windows(dst []similarity.Window, scale float64, st facilities.State) []similarity.Window {
	if !(scale > 0) || math.IsInf(scale, 0) {
		return dst
	}
	g := l.geometry(scale, st.Mach)
	for b := range l.balances {
		br := &l.balances[b]
		w := similarity.Window{Hi: br.maxQ(l.cd, g.mach, g.solid, g.wake, g.qS, g.qSc)}
		if br.needForce != nil {
			w.Lo = br.floorQ(l.cd, g.mach, g.solid, g.wake, g.qS, g.qSc)
		}
		dst = append(dst, w)
	}
	return dst
}

// scaled is the geometry of the load formulas at one scale and Mach number.
type scaled struct{ mach, solid, wake, qS, qSc float64 }

// geometry returns the blockage factors and q·S, q·S·c per pascal at scale
// and Mach number mach.
func (l *Limit) geometry(scale, mach float64) scaled {
	s2 := scale * scale
	area := l.refArea * s2
	solid, wake, _ := facilities.BlockageFactors(&l.section, l.frontalArea*s2, area, mach)
	return scaled{mach: mach, solid: solid, wake: wake, qS: area, qSc: area * l.refLength * scale}
}

// MinDynamicPressure returns the least free-stream dynamic pressure in Pa at which
// a balance that can carry the loads there (its floor at or under its ceiling)
// resolves the required resolution at every point, wall corrections included
// (+Inf when none can): for each balance the largest over the points i of
//
//	q = max(need_F,i/(f_i·S), need_M,i/(f_i·S·c)),
//
// with f_i = q_c/q the point's blockage correction; 0 without a resolution; +Inf
// when the balance's accuracy is not known for an asked coefficient.
func (l *Limit) MinDynamicPressure(scale float64, st facilities.State) float64 {
	lo, _, _ := l.window(scale, st.Mach)
	return lo
}

// floorQ is balance br's least q for the required resolution.
func (br *balanceRows) floorQ(cd []float64, mach, solid, wake, qS, qSc float64) float64 {
	q := 0.0
	for i := range br.needForce {
		f := facilities.DynamicPressureRatio(mach, solid+wake*cd[i])
		q = math.Max(q, math.Max(br.needForce[i]/(f*qS), br.needMoment[i]/(f*qSc)))
	}
	return q
}

// MaxDynamicPressure returns the largest free-stream dynamic pressure in Pa at which
// a model of the given scale at st.Mach keeps every point of the test matrix at or
// under 1/safety factor on the balance (the best balance when none is named); 0
// when the weight alone breaks a limit or the scale is not positive; +Inf when no
// rated load grows with q.
func (l *Limit) MaxDynamicPressure(scale float64, st facilities.State) float64 {
	_, q := l.best(scale, st.Mach)
	return q
}

// Balance returns the balance that carries the most at the given scale and test
// state, and the dynamic pressure it allows (as MaxDynamicPressure).
func (l *Limit) Balance(scale float64, st facilities.State) (id string, q float64) {
	k, q := l.best(scale, st.Mach)
	if k < 0 {
		return "", q
	}
	return l.balances[k].id, q
}

func (l *Limit) best(scale, mach float64) (k int, q float64) {
	if l.floor {
		_, q, k = l.window(scale, mach)
		return k, q
	}
	if !(scale > 0) || math.IsInf(scale, 0) {
		return -1, 0
	}
	s2 := scale * scale
	area := l.refArea * s2
	solid, wake, _ := facilities.BlockageFactors(&l.section, l.frontalArea*s2, area, mach)
	qS := area
	qSc := area * l.refLength * scale
	k = -1
	for b := range l.balances {
		qb := l.balances[b].maxQ(l.cd, mach, solid, wake, qS, qSc)
		if k < 0 || qb > q {
			k, q = b, qb
		}
	}
	return k, q
}

// window returns, under a required resolution (Resolved), the least floor lo of
// the balances whose floor is at or under their ceiling (+Inf when none is), and
// the highest ceiling hi with its balance k: of those balances, or, when there
// is none, of all.
func (l *Limit) window(scale, mach float64) (lo, hi float64, k int) {
	if !(scale > 0) || math.IsInf(scale, 0) {
		return math.Inf(1), 0, -1
	}
	g := l.geometry(scale, mach)
	k, lo = -1, math.Inf(1)
	okK := false
	for b := range l.balances {
		br := &l.balances[b]
		hb := br.maxQ(l.cd, g.mach, g.solid, g.wake, g.qS, g.qSc)
		lb := 0.0
		if br.needForce != nil {
			lb = br.floorQ(l.cd, g.mach, g.solid, g.wake, g.qS, g.qSc)
		}
		ok := lb <= hb*(1+1e-12)
		if ok {
			lo = math.Min(lo, lb)
		}
		if k < 0 || (ok && !okK) || (ok == okK && hb > hi) {
			k, hi, okK = b, hb, ok
		}
	}
	return lo, hi, k
}

// maxQ is the largest q keeping every point and row of one balance within its
// allowance. Each row is affine in q and solved exactly as in
// SafeDynamicPressure, q = (allowed − sign(u)·w)/|u|; the minimum over
// rows is found by comparing the fractions crosswise, with one division per call.
//
// Only the live elements are kept, in their order and with the same
// arithmetic as a visit of every element, so the result is the same to the bit
// (prune explains why).
func (br *balanceRows) maxQ(cd []float64, mach, solid, wake, qS, qSc float64) float64 {
	if br.weightBreaks {
		return 0
	}
	num, den := 1.0, 0.0 // +Inf
	pt := int32(-1)
	var a, m float64
	for x, i := range br.livePoint {
		if i != pt {
			pt = i
			f := facilities.DynamicPressureRatio(mach, solid+wake*cd[i])
			a, m = f*qS, f*qSc
		}
		u := a*br.force[x] + m*br.moment[x]
		r := br.up[x]
		if u < 0 {
			u, r = -u, br.down[x]
		}
		if r*den < num*u {
			num, den = r, u
		}
	}
	if den == 0 {
		return math.Inf(1)
	}
	return num / den
}

// pruneMargin is the relative margin, in units of the elements' load scale, by
// which an element must fall below another at every scale before prune drops it:
// a thousand times the rounding of maxQ's arithmetic (a few units in 1e-16), so
// that the dropped element is never the minimum, nor within rounding of it.
const pruneMargin = 2e-12

// pruneSamples are the values of t = c·s (reference length times scale, m) at
// which prune takes the strongest elements as the candidates that may dominate
// the others; they only choose candidates, the dominance itself is proved for
// every t > 0.
var pruneSamples = [...]float64{0, 0.01, 0.1, 1}

// prune keeps the live elements: those that can set the ceiling. Element k's load per
// unit of q is f_i·q·S·(F_k + t·M_k) with F_k = force[k], M_k = moment[k],
// t = c·s > 0, and f_i = 1 + (2 − M²)·(ε_sb + ε_wb/C_D·C_D,i) the wall correction of its
// point i; its ceiling is r_k/|load|, r_k = up[k] or down[k] by the load's sign.
// So k never sets the ceiling when another element d has, for every t > 0,
//
//	g_d(t) − g_k(t) > pruneMargin·(h_d(t) + h_k(t)),   g = |F + t·M|/r,
//	h = (|F| + t·|M|)/min(up, down) ≥ g,
//
// and f_d ≥ f_k at every scale and Mach number: the same point, or C_D,d ≥ C_D,k
// ≥ 0 (both blockage factors are ≥ 0 and 2 − M² > 1 below M 1, where alone they
// are not 0, so f grows with C_D, and rounding keeps that
// order). Both sides are piecewise linear in t with their kinks where F + t·M
// changes sign, so checking the kinks, t = 0 and the slope beyond the last kink
// proves it for all t. Rounding in maxQ (and in this check) moves each g by at
// most about 1e-15·h, far inside the margin, so d's computed ceiling is below k's
// by at least 1e-12 relative, and the scan over the remaining elements picks the
// same element, with the same arithmetic, as the scan over all. Elements whose r
// is not positive (a weight exactly at a rating) are always kept and never used to
// drop others.
//
// The tables then hold the live elements alone, in their order (setLive); with
// drop false every element is kept.
func (br *balanceRows) prune(cd []float64, drop bool) {
	n := len(br.force)
	keepAll := br.weightBreaks || !drop
	for k := 0; k < n && !keepAll; k++ {
		keepAll = math.IsNaN(br.force[k]) || math.IsNaN(br.moment[k])
	}
	// ks collects the live elements in a pooled buffer; setLive then keeps
	// them in one allocation of their final size.
	kbuf := liveScratch.Get().(*[]int32)
	defer liveScratch.Put(kbuf)
	ks := (*kbuf)[:0]
	if keepAll {
		for k := range n {
			ks = append(ks, int32(k))
		}
		*kbuf = ks
		br.setLive(ks)
		return
	}
	// inv is prune's scratch: a pooled buffer, since every load limit (every
	// plan) prunes once and drops it.
	buf := pruneScratch.Get().(*[]float64)
	defer pruneScratch.Put(buf)
	if cap(*buf) < 3*n {
		*buf = make([]float64, 3*n)
	}
	inv := (*buf)[:3*n]
	pr := pruner{f: br.force, m: br.moment, inv: inv}
	for k := range n {
		if up, down := br.up[k], br.down[k]; up > 0 && down > 0 {
			// 1/min(up, down) is the reciprocal of one of the two, the
			// same division: it is taken, not computed again.
			iu, id := 1/up, 1/down
			im := id
			if up <= down {
				im = iu
			}
			inv[3*k], inv[3*k+1], inv[3*k+2] = iu, id, im
		} else {
			inv[3*k], inv[3*k+1], inv[3*k+2] = 0, 0, 0
		}
	}
	// The candidates: the usable element with the largest g at each sample t and
	// the one with the steepest rise in t (the first such in element order), all
	// found in one pass over the elements.
	var bestAt [len(pruneSamples) + 1]int
	var bgAt [len(pruneSamples) + 1]float64
	for s := range bestAt {
		bestAt[s] = -1
	}
	for k := range n {
		if !(inv[3*k] > 0) {
			continue // not usable
		}
		for s, t := range pruneSamples {
			if g := pr.g(k, t); g > bgAt[s] {
				bestAt[s], bgAt[s] = k, g
			}
		}
		if sl := pr.slope(k); sl > bgAt[len(pruneSamples)] {
			bestAt[len(pruneSamples)], bgAt[len(pruneSamples)] = k, sl
		}
	}
	var cands [len(pruneSamples) + 1]pruneCand
	nc := 0
	for _, d := range bestAt {
		if d < 0 || slices.ContainsFunc(cands[:nc], func(c pruneCand) bool { return c.d == d }) {
			continue
		}
		cands[nc] = pr.cand(d, d/br.rows)
		nc++
	}
	for i := range n / br.rows {
		for k := i * br.rows; k < (i+1)*br.rows; k++ {
			dropped := false
			if inv[3*k] > 0 {
				for c := range cands[:nc] {
					if d := &cands[c]; d.d != k && (i == d.j || (cd[d.j] >= cd[i] && cd[i] >= 0)) && pr.dominates(d, k) {
						dropped = true
						break
					}
				}
			}
			if !dropped {
				ks = append(ks, int32(k))
			}
		}
	}
	*kbuf = ks
	br.setLive(ks)
}

// setLive keeps the tables' elements ks (in increasing order) and sets
// livePoint to their points, in two allocations of their final size: the
// tables of every element are scratch that NewLimit reuses.
func (br *balanceRows) setLive(ks []int32) {
	m := len(ks)
	tab := make([]float64, 4*m)
	force, moment := tab[:m:m], tab[m:2*m:2*m]
	up, down := tab[2*m:3*m:3*m], tab[3*m:]
	br.livePoint = make([]int32, m)
	for x, k := range ks {
		force[x], moment[x], up[x], down[x] = br.force[k], br.moment[k], br.up[k], br.down[k]
		br.livePoint[x] = k / int32(br.rows)
	}
	br.force, br.moment, br.up, br.down = force, moment, up, down
}

// liveScratch holds prune's buffers of live elements (*[]int32).
var liveScratch = sync.Pool{New: func() any { return new([]int32) }}

// tableScratch holds NewLimit's tables of every element (*[]float64).
var tableScratch = sync.Pool{New: func() any { return new([]float64) }}

// pruneScratch holds prune's scratch buffers (*[]float64).
var pruneScratch = sync.Pool{New: func() any { return new([]float64) }}

// pruner holds prune's figures per element k: F and M, and in inv[3k:3k+3] the
// reciprocals of up, down and min(up, down) (0: not usable).
type pruner struct {
	f, m, inv []float64
}

// g returns element k's |F + t·M|/r at t.
func (p *pruner) g(k int, t float64) float64 {
	v := p.f[k] + t*p.m[k]
	if v < 0 {
		return -v * p.inv[3*k+1]
	}
	return v * p.inv[3*k]
}

// h returns element k's (|F| + t·|M|)/min(up, down) at t.
func (p *pruner) h(k int, t float64) float64 {
	return (math.Abs(p.f[k]) + t*math.Abs(p.m[k])) * p.inv[3*k+2]
}

// slope returns the rate of rise in t of element k's g for large t.
func (p *pruner) slope(k int) float64 {
	m := p.m[k]
	switch {
	case m > 0:
		return m * p.inv[3*k]
	case m < 0:
		return -m * p.inv[3*k+1]
	}
	return 0
}

// pruneCand is a candidate element d of prune with the figures dominates
// reads of it for every element k, computed once: they are the same numbers,
// computed with the same arithmetic, as computed afresh for each k.
type pruneCand struct {
	d, j   int     // the element and its point
	f, m   float64 // F_d and M_d
	g0, h0 float64 // g_d(0) and h_d(0)
	slope  float64 // slope(d)
	hm     float64 // |M_d|/min(up, down)
	// kink is set when d's F + t·M changes sign at some t > 0: at that t,
	// gk and hk are g_d(t) and h_d(t).
	kink       bool
	tk, gk, hk float64
}

// cand returns candidate d (of point j) with its figures.
func (p *pruner) cand(d, j int) pruneCand {
	c := pruneCand{d: d, j: j, f: p.f[d], m: p.m[d], g0: p.g(d, 0), h0: p.h(d, 0), slope: p.slope(d),
		hm: math.Abs(p.m[d]) * p.inv[3*d+2]}
	if c.m != 0 {
		if t := -c.f / c.m; t > 0 {
			c.kink, c.tk, c.gk, c.hk = true, t, p.g(d, t), p.h(d, t)
		}
	}
	return c
}

// dominates reports whether candidate d's g exceeds element k's by more than
// pruneMargin·(h_d + h_k) at every t > 0: the gap g_d − g_k − pruneMargin·(h_d
// + h_k) is checked at t = 0, at both elements' kinks and beyond the last.
func (p *pruner) dominates(d *pruneCand, k int) bool {
	// At t = 0 the gap must be positive, or exactly 0 because neither element has a
	// part that does not grow with t (then the slope decides near 0).
	g0 := d.g0 - p.g(k, 0) - pruneMargin*(d.h0+p.h(k, 0))
	if !(g0 > 0) && !(d.f == 0 && p.f[k] == 0) {
		return false
	}
	// Beyond the last kink both sides are linear: the gap must not fall.
	rise := 0.0
	if d.m != 0 || p.m[k] != 0 {
		rise = d.slope - p.slope(k) - pruneMargin*(d.hm+math.Abs(p.m[k])*p.inv[3*k+2])
		if !(rise >= 0) {
			return false
		}
	}
	kinked := false
	if d.kink {
		if t := d.tk; !(d.gk-p.g(k, t)-pruneMargin*(d.hk+p.h(k, t)) > 0) {
			return false
		}
		kinked = true
	}
	if f, m := p.f[k], p.m[k]; m != 0 {
		if t := -f / m; t > 0 {
			if !(p.g(d.d, t)-p.g(k, t)-pruneMargin*(p.h(d.d, t)+p.h(k, t)) > 0) {
				return false
			}
			kinked = true
		}
	}
	// Without a kink the gap is linear from t = 0: it must start positive or rise.
	return kinked || g0 > 0 || rise > 0
}
