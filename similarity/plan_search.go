package similarity

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"scalematch/facilities"
)

// invPhi is 1/φ, the golden-section ratio.
var invPhi = (math.Sqrt(5) - 1) / 2

// maxGrid is the most grid points golden takes.
const maxGrid = 17

// scanGrid is the number of points of the feasibility scan's grid.
const scanGrid = 9

// interval is a closed range of the test Mach number (speed in water).
type interval struct{ a, b float64 }

// bestOverScales returns the best candidate over the model scales at Mach number (speed) machOrSpeed.
func (sv *solver) bestOverScales(machOrSpeed float64) candidate {
	if sv.kept != nil {
		if x, g, ok := sv.kept.get(sv, machOrSpeed); ok {
			sv.scaleGolden += g
			return x
		}
	}
	var c machSetup
	sv.prepareIn(&c, machOrSpeed)
	g := sv.scaleGolden
	x := sv.bestOverScalesAt(&c, true)
	if sv.kept != nil {
		sv.kept.put(sv, machOrSpeed, &x, sv.scaleGolden-g)
	}
	return x
}

// bestOverScalesAt is bestOverScales on the set-up c. With probe, a
// Froude-weighted water problem first tries the scale that matches the Froude
// number (exactAt): where it meets every target, it is the best at this speed
// (docs/planner.md, Objectives: the tie rule).
func (sv *solver) bestOverScalesAt(c *machSetup, probe bool) candidate {
	if !c.ok {
		return candidate{machOrSpeed: c.machOrSpeed, fail: c.fail, k: worst}
	}
	switch sv.kind {
	case scaleFixed:
		return sv.at(c, sv.scales[0])
	case scaleList:
		var best candidate
		best.k = worst
		for _, s := range sv.scales {
			if x := sv.at(c, s); x.ok && (!best.ok || x.k.less(best.k)) {
				best = x
			} else if !best.ok && best.fail == "" {
				best.fail = x.fail
			}
		}
		return best
	}
	if sv.froudeMatters() {
		if probe && sv.froudePlateau() {
			if x, ok := sv.exactAt(c); ok {
				return x
			}
		}
		if x, ok := sv.froudeScale(c); ok {
			return x
		}
		sv.scaleGolden++
		return sv.golden(func(ls float64) candidate { return sv.at(c, math.Exp(ls)) },
			math.Log(sv.sLo), math.Log(sv.sHi), 9, 1e-10)
	}
	return sv.bestInScaleRange(c)
}

// bestInScaleRange finds the best scale in [sLo, sHi] at one Mach number when only the
// Reynolds number depends on the scale. Without a load limit the dynamic pressure
// does not depend on the scale and Re ∝ scale, so the largest model is best (and
// the same Re costs the least q on it). A load limit lowers the q ceiling as the
// model grows (forces ∝ q·s², moments ∝ q·s³): Re then rises with s up to the
// knee where the load limit starts to cap Re/m and, past it, falls as s·q_max(s)
// falls; the search finds the knee by a root on the load limit alone.
func (sv *solver) bestInScaleRange(c *machSetup) candidate {
	x := sv.bestInScaleRangeRules(c)
	if sv.floor == nil {
		return x
	}
	// A load floor makes the least Re/m at each scale grow as the model
	// shrinks (q_min ∝ 1/s²), so the rules above, which shrink a model that
	// overshoots the flight's Reynolds number, can miss: a golden-section
	// search over the scales that reach the floor decides between them.
	sv.scaleGolden++
	g := sv.golden(func(ls float64) candidate { return sv.at(c, math.Exp(ls)) },
		math.Log(sv.lowestScale(c)), math.Log(sv.sHi), 9, 1e-10)
	if g.ok && (!x.ok || g.k.less(x.k)) {
		return g
	}
	return x
}

// bestInScaleRangeRules is bestInScaleRange by the rules of a problem without a
// load floor.
func (sv *solver) bestInScaleRangeRules(c *machSetup) candidate {
	x := sv.at(c, sv.sHi)
	if x.ok && (sv.load == nil || x.capHi != sv.loadName) {
		return sv.shrink(c, x)
	}
	sLo := sv.lowestScale(c)
	lo := sv.at(c, sLo)
	if !lo.ok {
		return lo
	}
	sk := sLo
	if lo.capHi != sv.loadName {
		// The knee: the load limit's q ceiling falls to the q of the best setting
		// within the facility's own limits.
		qNeed := sv.top(c).q
		if sv.cav {
			// Water with the cavitation number in the objective: the model's
			// loads must fit at this speed at the lowest q (warmest water).
			qNeed = sv.waterQ(c.machOrSpeed, c.pa, c.tb)
		}
		sk = sv.rootHi(func(s float64) float64 { return sv.loadQ(s, &c.stRef) - qNeed }, sLo, sv.sHi, false)
	}
	xk := sv.at(c, sk)
	if !xk.ok {
		return lo
	}
	re := func(x candidate) float64 { rhi, _ := sv.hiOf(c, x); return rhi * x.s * sv.L }
	if re(xk) >= sv.fl.Reynolds*(1-limitSlack) {
		// The flight's Re is reachable at the knee: the largest model that still
		// reaches it needs the least q.
		s := sv.rootHi(func(s float64) float64 {
			y := sv.at(c, s)
			if !y.ok {
				return -1
			}
			return re(y)/sv.fl.Reynolds - 1
		}, sk, sv.sHi, false)
		return sv.shrink(c, sv.at(c, s))
	}
	if x2 := sv.at(c, sk*(1+1e-7)); x2.ok && x2.k.less(xk.k) {
		// Unusual load limit: Re still rises past the knee.
		sv.scaleGolden++
		g := sv.golden(func(ls float64) candidate { return sv.at(c, math.Exp(ls)) }, math.Log(sk), math.Log(sv.sHi), 5, 1e-10)
		if g.ok && g.k.less(xk.k) {
			return g
		}
	}
	return xk
}

// shrink returns a smaller model when x overshoots the flight's Reynolds number even
// at the lowest Re/m: the scale that meets it exactly.
func (sv *solver) shrink(c *machSetup, x candidate) candidate {
	if !x.ok || x.rlo < 0 || x.r > x.rlo || x.rlo*x.s*sv.L <= sv.fl.Reynolds {
		return x
	}
	s := sv.fl.Reynolds / (sv.L * x.rlo)
	// The target Re/m there, Re/(s·l), may round to just below the lowest Re/m:
	// the next smaller scale meets the flight's Re exactly by construction.
	for i := 0; i < 4 && sv.fl.Reynolds/(s*sv.L) < x.rlo; i++ {
		s = math.Nextafter(s, 0)
	}
	s = math.Max(s, sv.sLo)
	if y := sv.at(c, s); y.ok && !x.k.less(y.k) {
		return y
	}
	return x
}

// golden minimises the key of eval over [a, b]: a grid of n points, then a
// golden-section search in the bracket around the best of them, to tol relative of
// the interval's scale. It returns the best candidate seen.
func (sv *solver) golden(eval func(float64) candidate, a, b float64, n int, tol float64) candidate {
	return sv.gridMin(eval, a, b, n, tol, false, false, false)
}

// gridMin is golden, with Brent's method (brentMin) instead of the golden
// section in the bracket when brent is set (a weighted objective: one level);
// with seed too, the grid's neighbours of its best point seed Brent's
// parabola (a re-solve's warm grid, whose points lie near the optimum).
//
// With edge (a vessel's speed search with the priority of the cavitation
// number, then the Reynolds number), once the golden section's two inner
// points lie either side of the speed where the warmest usable water leaves
// the cavitation band (candidate.top, candidate.band) and the one inside is
// the better, the optimum is that speed: speedEdge finds it.
func (sv *solver) gridMin(eval func(float64) candidate, a, b float64, n int, tol float64, brent, seed, edge bool) candidate {
	cut := sv.gridCut
	sv.gridCut = nil
	best := eval(a)
	if b <= a {
		return best
	}
	var xsArr [maxGrid]float64
	var ksArr [maxGrid]candidate
	n = min(max(n, 3), maxGrid)
	xs, ks := xsArr[:n], ksArr[:n]
	ibest := 0
	for i := range xs {
		xs[i] = a + (b-a)*float64(i)/float64(n-1)
		if i == 0 {
			ks[i] = best
			continue
		}
		if cut != nil {
			ks[i] = cut(xs[i], ks[ibest])
		} else {
			ks[i] = eval(xs[i])
		}
		if ks[i].k.less(ks[ibest].k) {
			ibest = i
		}
	}
	best = ks[ibest]
	eps := tol * math.Max(math.Max(math.Abs(a), math.Abs(b)), b-a)
	if edge && best.top {
		// The grid's best lies inside the cavitation band at the warmest
		// water and a neighbour outside it, the other neighbour (if any)
		// inside: the optimum is the speed between them where the band ends.
		for _, j := range [...]int{ibest + 1, ibest - 1} {
			o := 2*ibest - j
			if j < 0 || j >= n || ks[j].top || !ks[j].bandOK || !(ks[j].band < 0) || (o >= 0 && o < n && !ks[o].top) {
				continue
			}
			if e := sv.speedEdge(eval, xs[ibest], best, xs[j], ks[j], eps); e.k.less(best.k) {
				best = e
			}
			return best
		}
	}
	if edge {
		// The warmest water's σ at the highest static pressure reaches the
		// band's lower end between the grid's best and a neighbour: where
		// that speed's candidate is the warmest water in the band, the
		// optimum is there (speedEdge); otherwise the search goes on.
		for _, j := range [...]int{ibest + 1, ibest - 1} {
			if j < 0 || j >= n {
				continue
			}
			a, b := ibest, j
			if xs[a] > xs[b] {
				a, b = b, a
			}
			if !ks[a].bandOK || !ks[b].bandOK || !(ks[a].bandLo >= 0) || !(ks[b].bandLo < 0) {
				continue
			}
			e, g := speedRoot(eval, xs[a], ks[a], xs[b], ks[b], eps, func(f candidate) (bool, float64) {
				return f.bandOK && f.bandLo >= 0, sv.bandLoMargin(f)
			})
			if e.k.less(best.k) {
				best = e
			}
			if g.top {
				return best
			}
			break
		}
	}
	// At an end of the interval, one step inside tells: for a unimodal key, no
	// improvement there means the end is the optimum.
	start, fStart := xs[ibest], best
	switch ibest {
	case 0:
		e := eval(a + eps)
		if !e.k.less(best.k) {
			return best
		}
		start, fStart = a+eps, e
	case n - 1:
		e := eval(b - eps)
		if !e.k.less(best.k) {
			return best
		}
		start, fStart = b-eps, e
	}
	lo, hi := xs[max(ibest-1, 0)], xs[min(ibest+1, n-1)]
	if brent {
		if seed && ibest > 0 && ibest < n-1 {
			// The first step is the vertex of the parabola through the
			// three, not a golden one.
			return brentSeeded(eval, lo, hi, start, fStart, hi, ks[ibest+1], lo, ks[ibest-1], eps)
		}
		return brentMin(eval, lo, hi, start, fStart, eps)
	}
	x1 := hi - invPhi*(hi-lo)
	x2 := lo + invPhi*(hi-lo)
	f1, f2 := eval(x1), eval(x2)
	for hi-lo > eps {
		if edge {
			xg, fg, xb, fb := x1, f1, x2, f2
			if f2.top {
				xg, fg, xb, fb = x2, f2, x1, f1
			}
			if fg.top && !fb.top && fb.bandOK && fb.band < 0 && fg.k.less(fb.k) {
				if e := sv.speedEdge(eval, xg, fg, xb, fb, eps); e.k.less(best.k) {
					best = e
				}
				return best
			}
		}
		if f1.k.less(f2.k) {
			if f1.k.less(best.k) {
				best = f1
			}
			hi, x2, f2 = x2, x1, f1
			x1 = hi - invPhi*(hi-lo)
			f1 = eval(x1)
		} else {
			if f2.k.less(best.k) {
				best = f2
			}
			lo, x1, f1 = x1, x2, f2
			x2 = lo + invPhi*(hi-lo)
			f2 = eval(x2)
		}
	}
	for _, f := range [...]candidate{f1, f2} {
		if f.k.less(best.k) {
			best = f
		}
	}
	return best
}

// brentMin minimises the key of eval over [lo, hi] from x, an interior point
// already evaluated (fx), to eps: Brent's method (Brent, R.P. (1973) Algorithms
// for Minimization without Derivatives, ch. 5), parabolic interpolation through
// the three best points where it steps inside the bracket and shrinks, golden-
// section steps elsewhere. The parabola reads the first level of the key (a
// weighted objective has one; +Inf where infeasible, when a golden step is
// taken), every comparison the whole key (key.less). It stops when the bracket
// around the best point is within about eps, and returns the best candidate seen.
func brentMin(eval func(float64) candidate, lo, hi, x float64, fx candidate, eps float64) candidate {
	return brentSeeded(eval, lo, hi, x, fx, x, fx, x, fx, eps)
}

// brentSeeded is brentMin with w and v, Brent's second and third best points,
// given (fw and fv evaluated): when they differ from x, the first step may be
// the parabola's vertex through the three.
func brentSeeded(eval func(float64) candidate, lo, hi, x float64, fx candidate, w float64, fw candidate, v float64, fv candidate, eps float64) candidate {
	const cg = 1 - 0.6180339887498949 // 1 − 1/φ
	a, b := lo, hi
	var d, e float64
	if w != x && v != x && w != v {
		d, e = 0.5*(hi-lo), 0.5*(hi-lo)
	}
	tol1 := 0.25 * eps
	for range 200 {
		m := 0.5 * (a + b)
		tol2 := 2 * tol1
		if math.Abs(x-m) <= tol2-0.5*(b-a) {
			break
		}
		parabolic := false
		if math.Abs(e) > tol1 {
			r := (x - w) * (fx.k.v[0] - fv.k.v[0])
			q := (x - v) * (fx.k.v[0] - fw.k.v[0])
			p := (x-v)*q - (x-w)*r
			q = 2 * (q - r)
			if q > 0 {
				p = -p
			} else {
				q = -q
			}
			if math.Abs(p) < math.Abs(0.5*q*e) && p > q*(a-x) && p < q*(b-x) {
				e, d = d, p/q
				parabolic = true
				if u := x + d; u-a < tol2 || b-u < tol2 {
					d = math.Copysign(tol1, m-x)
				}
			}
		}
		if !parabolic {
			if x >= m {
				e = a - x
			} else {
				e = b - x
			}
			d = cg * e
		}
		u := x + d
		if math.Abs(d) < tol1 {
			u = x + math.Copysign(tol1, d)
		}
		fu := eval(u)
		if !fx.k.less(fu.k) {
			if u < x {
				b = x
			} else {
				a = x
			}
			v, fv, w, fw, x, fx = w, fw, x, fx, u, fu
			continue
		}
		if u < x {
			a = u
		} else {
			b = u
		}
		switch {
		case !fw.k.less(fu.k) || w == x:
			v, fv, w, fw = w, fw, u, fu
		case !fv.k.less(fu.k) || v == x || v == w:
			v, fv = u, fu
		}
	}
	return fx
}

// feasibleMachOrSpeed returns the intervals of test Mach number (speed) at which some model
// of the allowed scales can run, and the limits that rule out the rest.
func (sv *solver) feasibleMachOrSpeed() ([]interval, []string) {
	var fails []string
	sv.feasOnly = true
	defer func() { sv.feasOnly = false }()
	ok := func(machOrSpeed float64) bool {
		var c machSetup
		sv.prepareIn(&c, machOrSpeed)
		if !c.ok {
			fails = append(fails, c.fail)
			return false
		}
		x := sv.at(&c, sv.lowestScale(&c))
		if sv.kept != nil && sv.kind == scaleFixed && sv.floor == nil {
			// bestOverScales' candidate at this Mach number: the one scale's
			// (the scan's feasOnly changes nothing in an ideal gas).
			sv.kept.put(sv, machOrSpeed, &x, 0)
		}
		if !x.ok && sv.floor != nil && sv.kind == scaleRange {
			// A load floor in real-gas nitrogen may be reached only by the
			// larger models: try the largest.
			if y := sv.at(&c, sv.sHi); y.ok {
				x = y
			}
		}
		if !x.ok {
			fails = append(fails, x.fail)
		}
		return x.ok
	}
	if sv.machOrSpeedMax <= sv.machOrSpeedMin {
		if ok(sv.machOrSpeedMin) {
			return []interval{{sv.machOrSpeedMin, sv.machOrSpeedMin}}, nil
		}
		return nil, fails
	}
	const n = scanGrid
	var xs [n]float64
	var oks [n]bool
	for i := range xs {
		xs[i] = sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*float64(i)/(n-1)
		oks[i] = ok(xs[i])
	}
	edge := func(good, bad float64) float64 {
		for i := 0; i < 60 && math.Abs(good-bad) > 1e-12*sv.machOrSpeedMax; i++ {
			m := 0.5 * (good + bad)
			if ok(m) {
				good = m
			} else {
				bad = m
			}
		}
		return good
	}
	var ivs []interval
	for i := 0; i < n; i++ {
		if !oks[i] {
			continue
		}
		j := i
		for j+1 < n && oks[j+1] {
			j++
		}
		a, b := xs[i], xs[j]
		if i > 0 {
			a = edge(xs[i], xs[i-1])
		}
		if j < n-1 {
			b = edge(xs[j], xs[j+1])
		}
		ivs = append(ivs, interval{a, b})
		i = j
	}
	return ivs, fails
}

// solve finds the best plan.
func (sv *solver) solve() (candidate, error) {
	if !sv.ivsKnown {
		sv.ivs, sv.ivsFails = sv.feasibleMachOrSpeed()
	}
	ivs, fails := sv.ivs, sv.ivsFails
	if len(ivs) == 0 {
		what := "Mach number"
		if sv.liquid {
			what = "speed"
		}
		return candidate{}, unprocessable(fmt.Sprintf("no %s in the facility's range can run a model of the allowed size within its limits", what), fails...)
	}
	tolU := 1e-9
	sv.scaleGolden = 0
	best := candidate{k: worst}
	consider := func(x candidate) {
		if x.ok && (!best.ok || x.k.less(best.k)) {
			best = x
		}
	}
	if sv.machFirst() {
		lo, hi := sv.machBand()
		var band []interval
		for _, iv := range ivs {
			if a, b := math.Max(iv.a, lo), math.Min(iv.b, hi); a <= b {
				band = append(band, interval{a, b})
			}
		}
		if len(band) == 0 {
			// The band is out of reach: the nearest reachable Mach number.
			d := math.Inf(1)
			var near []float64
			for _, iv := range ivs {
				for _, machOrSpeed := range [...]float64{iv.a, iv.b} {
					du := math.Max(0, math.Max(lo-machOrSpeed, machOrSpeed-hi))
					switch {
					case du < d-1e-12:
						d, near = du, []float64{machOrSpeed}
					case du <= d+1e-12:
						near = append(near, machOrSpeed)
					}
				}
			}
			for _, machOrSpeed := range near {
				consider(sv.bestOverScales(machOrSpeed))
			}
		}
		for _, iv := range band {
			consider(sv.golden(sv.bestOverScales, iv.a, iv.b, 3, tolU))
		}
	} else {
		// A weighted objective has one level, which Brent's method reads:
		// in real-gas nitrogen, whose set-up costs tens of states, it needs a
		// third of the golden section's Mach numbers, and it is cheaper for the
		// ideal gases and water too (docs/performance.md, Planner).
		brent := sv.obj.weighted
		edge := sv.liquid && sv.cavThenReynolds()
		for _, iv := range ivs {
			// Froude-weighted water: the plan that meets every target at
			// the lowest speed, where one exists (plateauMin).
			plateau := sv.froudePlateau()
			search := func(a, b float64, n int, seed bool) candidate {
				if plateau {
					return sv.plateauMin(sv.bestOverScales, a, b, n, tolU, brent, seed)
				}
				if brent && sv.cav && sv.liquid && !sv.noSpeedCut {
					// A speed whose weighted sum is bounded above the
					// grid's best so far is not searched (cavSpeedCut).
					sv.gridCut = sv.cavSpeedCut
				}
				return sv.gridMin(sv.bestOverScales, a, b, n, tolU, brent, seed, edge)
			}
			if w := sv.warmAt; sv.warmCell > 0 && w >= iv.a && w <= iv.b {
				// A re-solve: the relaxed optimum lies near the one relaxed.
				a, b := math.Max(iv.a, w-sv.warmCell), math.Min(iv.b, w+sv.warmCell)
				// In a gas the grid's neighbours seed Brent's parabola
				// (tsw-1's re-solves 58 → 47 and 110 → 96 evaluations);
				// in water they cost more (wtn-04 marine 837 → 1161;
				// docs/performance.md, Planner).
				consider(search(a, b, 3, !sv.liquid))
			} else {
				consider(search(iv.a, iv.b, 17, false))
			}
			if !sv.liquid && sv.aim >= iv.a && sv.aim <= iv.b {
				consider(sv.bestOverScales(sv.aim))
			}
		}
	}
	if !best.ok {
		return candidate{}, unprocessable("no plan satisfies the facility's limits", fails...)
	}
	if sv.froudePlateau() && best.k.v[0] == 0 {
		// Every target is met: the sum cannot fall, and the tie rule has
		// chosen among the plans that meet them (plateauMin).
		return best, nil
	}
	if !sv.noExactScale && sv.scaleGolden == 0 && (sv.froudeScaled() || sv.rulesScaled(best)) {
		// Every speed's (Mach number's) best scale came exactly, not from a
		// golden section: the problem is one of the speed alone, which the
		// search has minimised to 1e-9, and the joint refinement would have
		// nothing to move (as with one free coordinate, refine).
		return best, nil
	}
	return sv.polish(best, ivs), nil
}

// relaxed returns a copy of the solver with the named limit relaxed by 1 %: a
// maximum raised, a minimum lowered. The copy, and its facility where the
// relaxation changes it, are sv's spares, which the next call overwrites: the
// binding gains re-solve one after another and keep none of a re-solve but
// its figures.
func (sv *solver) relaxed(name string) (*solver, bool) {
	switch {
	case sv.spare != nil:
	case sv.scratch != nil:
		sv.spare, sv.spareFacility = &sv.scratch.spare, &sv.scratch.facility
	default:
		sv.spare, sv.spareFacility = new(solver), new(facilities.Facility)
	}
	r, fc := sv.spare, sv.spareFacility
	*r = *sv
	r.spare, r.spareFacility, r.scratch = nil, nil, nil
	r.evals, r.warnings, r.polishEvals = 0, nil, 0
	// The facility and the problem are copied only where the relaxation
	// changes them.
	f, p := sv.f, sv.p
	switch name {
	case facilities.ConstraintScaleMin, facilities.ConstraintScaleMax:
		pc := *sv.p
		p, r.p = &pc, &pc
	case facilities.ConstraintCondensation, facilities.ConstraintBoiling, facilities.ConstraintCavitation, sv.loadName, sv.floorName:
	default:
		*fc = *sv.f
		f, r.f = fc, fc
	}
	if sv.kept != nil {
		// The relaxed limits move the candidates.
		if sv.scratch != nil {
			r.kept = &sv.scratch.kept[1]
			r.kept.reset()
		} else {
			r.kept = new(keptCandidates)
		}
	}
	if sv.memo != nil {
		// A relaxed facility may hold another static pressure (water).
		r.memo = &stateMemos{}
		if sv.scratch != nil {
			r.memo = &sv.scratch.spareMemo
			*r.memo = stateMemos{}
		}
	}
	r.ivs, r.ivsFails, r.ivsKnown = nil, nil, false
	switch name {
	case facilities.ConstraintTempMin, facilities.ConstraintTempMax, facilities.ConstraintCondensation:
		// The condensation line's bracket or level moves.
		if sv.cond != nil {
			r.cond = newCondLineCache()
			if sv.scratch != nil {
				r.cond = &sv.scratch.spareCond
				r.cond.reset()
			}
		}
	}
	switch name {
	case facilities.ConstraintSpan, facilities.ConstraintBlockage, facilities.ConstraintScaleMin, facilities.ConstraintScaleMax,
		facilities.ConstraintMachMin, facilities.ConstraintMachMax, sv.loadName, sv.floorName:
		// A set-up at one Mach number reads none of these: r shares sv's.
	default:
		if sv.setups != nil {
			r.setups = new(setupCache)
			if sv.scratch != nil {
				r.setups = &sv.scratch.spareSetups
				r.setups.reset()
			}
		}
	}
	// A set-up reads the q ceiling only in its check of q at p0 min and in
	// its top setting: the relaxed copy takes this solver's set-ups with
	// the top left to its readers (qSetupFrom) instead of preparing them
	// anew (cn2-05 priority cruise: the q gain's 66 nitrogenAt calls 56).
	r.qSetups = nil
	if name == facilities.ConstraintDynamic && !sv.noQSetups && sv.setups != nil && r.setups != sv.setups && sv.f.Medium.Kind == facilities.MediumNitrogen && !sv.liquid {
		r.qSetups = sv.setups
	}
	up := func(v float64) *float64 { v *= 1.01; return &v }
	rng := func(x *facilities.Range, lower bool) *facilities.Range {
		y := *x
		if lower {
			y.Min *= 0.99
		} else {
			y.Max *= 1.01
		}
		return &y
	}
	switch name {
	case facilities.ConstraintSpan:
		f.MaxSpanFraction = up(sv.spanFraction())
	case facilities.ConstraintBlockage:
		f.MaxBlockage = up(*sv.f.MaxBlockage)
	case facilities.ConstraintScaleMax:
		p.Model.ScaleMax = up(*sv.p.Model.ScaleMax)
	case facilities.ConstraintScaleMin:
		v := *sv.p.Model.ScaleMin * 0.99
		p.Model.ScaleMin = &v
	case facilities.ConstraintMachMin, facilities.ConstraintMachMax:
		f.Mach = rng(sv.f.Mach, name == facilities.ConstraintMachMin)
	case facilities.ConstraintSpeedMin, facilities.ConstraintSpeedMax:
		f.Speed = rng(sv.f.Speed, name == facilities.ConstraintSpeedMin)
	case facilities.ConstraintPressureMin, facilities.ConstraintPressureMax:
		f.StagnationPressure = *rng(&sv.f.StagnationPressure, name == facilities.ConstraintPressureMin)
	case facilities.ConstraintTempMin, facilities.ConstraintTempMax:
		f.StagnationTemperature = *rng(&sv.f.StagnationTemperature, name == facilities.ConstraintTempMin)
	case facilities.ConstraintStaticPressureMin, facilities.ConstraintStaticPressureMax:
		f.StaticPressure = rng(sv.f.StaticPressure, name == facilities.ConstraintStaticPressureMin)
	case facilities.ConstraintDynamic:
		f.MaxDynamicPressure = up(*sv.f.MaxDynamicPressure)
	case facilities.ConstraintReynoldsUnit:
		f.MaxReynoldsPerMeter = up(*sv.f.MaxReynoldsPerMeter)
	case facilities.ConstraintCondensation:
		r.condMin = sv.condMin - 0.01
	case facilities.ConstraintBoiling:
		r.boilMin = sv.boilMin - 0.01
	case facilities.ConstraintCavitation:
		r.cavMin = sv.cavMin - 0.01
	case sv.loadName:
		r.loadScale = sv.loadScale * 1.01
	case sv.floorName:
		r.floorScale = sv.floorScale * 0.99
	default:
		return nil, false
	}
	if err := r.setLimits(); err != nil {
		return nil, false
	}
	return r, true
}

// cellAt returns the width of one cell of the structured search's grid over
// the feasible interval (of the last solve) that holds machOrSpeed; 0 when none
// does.
func (sv *solver) cellAt(machOrSpeed float64) float64 {
	for _, iv := range sv.ivs {
		if machOrSpeed >= iv.a && machOrSpeed <= iv.b {
			return (iv.b - iv.a) / 16
		}
	}
	return 0
}

// reynoldsMet reports whether the candidate x meets the flight's Reynolds number
// exactly by the objective: its Reynolds level, and every level before it, is
// exactly 0 (priority), or the weighted sum with a Reynolds weight is exactly 0.
// Relaxing a limit only widens the feasible set, so the relaxed optimum is no
// worse by the objective and meets it too: every binding gain is then 0 with no
// re-solve.
func (sv *solver) reynoldsMet(x candidate) bool {
	if sv.obj.weighted {
		return sv.obj.w[gReynolds] > 0 && x.k.v[0] == 0
	}
	for i, g := range sv.obj.levels {
		if x.k.v[i] != 0 {
			return false
		}
		if g == gReynolds {
			return true
		}
	}
	return false
}

// gain re-solves with the named limit relaxed by 1 % and returns the change of the
// test Reynolds number in per cent, and the states computed.
func (sv *solver) gain(name string, best candidate) (float64, int, error) {
	r, ok := sv.relaxed(name)
	if !ok {
		return 0, 0, fmt.Errorf("similarity: limit %q cannot be relaxed", name)
	}
	// The re-solve starts from the plan found: its grid searches one cell
	// either side of it, and it refines only when the refinement improved the
	// plan itself (otherwise the structured search holds the optimum here,
	// and a 1 % relaxation keeps it so).
	r.warmAt, r.warmCell = best.machOrSpeed, sv.cellAt(best.machOrSpeed)
	r.noPolish = sv.noPolish || !sv.polishImproved
	if sv.bandFeasible() || sv.wholeRangeFeasible(r) {
		// The Mach band lies inside a feasible interval of the plan relaxed,
		// or the whole range searched is feasible and the relaxed range is the
		// same; relaxing a limit only widens the feasible set, so the
		// re-solve searches the same Mach numbers (speeds) and needs no
		// feasibility scan.
		r.ivs, r.ivsFails, r.ivsKnown = sv.ivs, sv.ivsFails, true
	}
	b2, err := r.solveCorrected()
	sv.polishEvals += r.polishEvals
	if err != nil {
		return 0, r.evals, err
	}
	re := best.r * best.s
	return 100 * (b2.r*b2.s/re - 1), r.evals, nil
}

// bandFeasible reports whether the Mach number comes first in the objective and
// its whole band lies inside one feasible interval of the last solve: the
// search then looks at the band alone, and no scan of the feasible set can
// change it.
func (sv *solver) bandFeasible() bool {
	if !sv.machFirst() {
		return false
	}
	lo, hi := sv.machBand()
	for _, iv := range sv.ivs {
		if iv.a <= lo && hi <= iv.b {
			return true
		}
	}
	return false
}

// wholeRangeFeasible reports whether every point of the last feasibility scan
// was feasible, so that its one interval is the whole grid, and r, a relaxed
// copy, searches the same range: r's scan would then find the same interval.
// In real-gas nitrogen r may find a condensation line of its own (a relaxed
// T0 range or condensation limit): its re-solve's first set-up then finds
// the line's first points by rootHi instead of from the scan's, fewer states
// than the scan's nine set-ups (cn2-05 weighted cruise, the condensation
// gain: 498 -> 311 nitrogenAt calls).
func (sv *solver) wholeRangeFeasible(r *solver) bool {
	if len(sv.ivs) != 1 || r.machOrSpeedMin != sv.machOrSpeedMin || r.machOrSpeedMax != sv.machOrSpeedMax {
		return false
	}
	lo, hi := sv.machOrSpeedMin, sv.machOrSpeedMax
	if hi > lo {
		// The scan's last grid point, computed as the scan computes it.
		hi = lo + (hi-lo)*float64(scanGrid-1)/(scanGrid-1)
	}
	return sv.ivs[0] == interval{lo, hi}
}

// sortBindings orders a binding list by constraint name for stable output.
func sortBindings(bs []Binding) {
	slices.SortFunc(bs, func(a, b Binding) int { return strings.Compare(a.Constraint, b.Constraint) })
}

// speedEdge returns the best candidate of eval seen while narrowing the
// bracket of speeds [xg, xb] (either order) to eps: at xg the warmest usable
// water lies inside the cavitation band (fg.top), at xb it lies outside
// (fb.band < 0). Inside, that water is the best temperature and the Reynolds
// number rises toward the band's end; past it, the band holds only colder
// water with a lower Reynolds number: the optimum is the speed where σ at the
// warmest water reaches the band's end, a root of candidate.band, continuous
// in the speed. The step is regula falsi with the Illinois modification
// (as cavEdge), a halving where band is unknown, disagrees in sign with the
// candidate's side, or three steps did not halve the bracket.
func (sv *solver) speedEdge(eval func(float64) candidate, xg float64, fg candidate, xb float64, fb candidate, eps float64) candidate {
	best, _ := speedRoot(eval, xg, fg, xb, fb, eps, func(f candidate) (bool, float64) { return f.top, sv.bandLoMargin(f) })
	return best
}

// bandLoMargin is ln((σ_hi + c)/(σ_full − cavTol + c)), σ_hi being σ at the
// warmest usable water and the highest static pressure (candidate.bandLo), c
// = 1 with a stagnation-pressure range and 0 where the static pressure is
// held: ≥ 0 where the band's lower end is reachable there, NaN where unknown.
// σ_hi + c = 2(k − p_v)/(ρV²) at that water (k the highest pressure), so the
// margin is exactly linear in ln V where the warmest water does not move with
// the speed, and speedRoot, which interpolates in ln V, lands on the band's
// end in one step.
func (sv *solver) bandLoMargin(f candidate) float64 {
	if !f.bandOK {
		return math.NaN()
	}
	lower := sv.fl.Marine.Cavitation - sv.obj.cavTol
	if !sv.held {
		lower++
	}
	if !(lower > 0) {
		return f.bandLo
	}
	return math.Log1p(f.bandLo / lower)
}

// speedRoot is speedEdge on the side and the margin side gives of each
// candidate (good: the margin is ≥ 0 there, NaN where unknown), and returns
// the best candidate seen and the bracket's last good end.
func speedRoot(eval func(float64) candidate, xg float64, fg candidate, xb float64, fb candidate, eps float64, side func(candidate) (bool, float64)) (candidate, candidate) {
	// The band's end to 1e-13 relative, finer than the search's tolerance,
	// so that the speed found hardly depends on the bracket it came from.
	eps = min(eps, 1e-13*max(math.Abs(xg), math.Abs(xb)))
	best := fg
	_, mg := side(fg)
	_, mb := side(fb)
	last, w0 := 0, math.Abs(xg-xb)
	for j := 1; j <= 100 && math.Abs(xg-xb) > eps; j++ {
		x := 0.5 * (xg + xb)
		if j%4 == 0 && math.Abs(xg-xb) > 0.5*w0 {
			// The last three steps did not halve the bracket: a halving.
		} else if mg-mb > 0 {
			// Regula falsi in ln x (the margin is nearly linear there).
			d := 0.05 * eps
			lo, hi := math.Min(xg, xb)+d, math.Max(xg, xb)-d
			if r := xg * math.Exp(mg/(mg-mb)*math.Log(xb/xg)); r >= lo-d && r <= hi+d {
				x = math.Min(math.Max(r, lo), hi)
			}
		}
		f := eval(x)
		if f.ok && f.k.less(best.k) {
			best = f
		}
		good, m := side(f)
		if good {
			if !(m >= 0) {
				m = math.NaN()
			}
			xg, fg, mg = x, f, m
			if last == 1 {
				mb *= 0.5
			}
			last = 1
		} else {
			if !(m < 0) {
				m = math.NaN()
			}
			xb, mb = x, m
			if last == -1 {
				mg *= 0.5
			}
			last = -1
		}
		if j%4 == 0 {
			w0 = math.Abs(xg - xb)
		}
	}
	return best, fg
}
