package similarity

import (
	"math"

	"scalematch/facilities"
)

// cavGrid is the number of water temperatures atWaterCav samples before refining.
const cavGrid = 17

// staticRange returns the test-section static pressures in Pa a water facility can
// hold at dynamic pressure q in Pa with the vapour pressure pv in Pa, [lo, hi]
// (empty when hi < lo). A facility with a static-pressure range sets it
// independently of speed; any other has p = p0 − q with p0 in its
// stagnation-pressure range. lo is at least pv unless the problem allows
// cavitation: the planner does not set a static pressure below the vapour
// pressure (a negative cavitation number; the free stream itself would boil).
func (sv *solver) staticRange(q, pv float64) (lo, hi float64) {
	if sv.held {
		lo, hi = sv.f.StaticPressure.Min, sv.f.StaticPressure.Max
	} else {
		lo, hi = sv.f.StagnationPressure.Min-q, sv.f.StagnationPressure.Max-q
	}
	if !sv.cavAllowed {
		lo = max(lo, pv)
	}
	return lo, hi
}

// cavPressures returns the lowest and highest pressures lo and hi in Pa that
// bound σ at any speed and temperature, and c: σ_lo = 2(lo − p_v)/(ρV²) − c
// and σ_hi = 2(hi − p_v)/(ρV²) − c, the stagnation-pressure range with c = 1,
// or the static-pressure range where the facility holds it, with c = 0
// (staticRange).
func (sv *solver) cavPressures() (lo, hi, c float64) {
	if sv.held {
		return sv.f.StaticPressure.Min, sv.f.StaticPressure.Max, 0
	}
	return sv.f.StagnationPressure.Min, sv.f.StagnationPressure.Max, 1
}

// waterProps are the properties of water at one temperature that the
// cavitation search reads: density in kg/m³, viscosity in Pa·s and vapour
// pressure in Pa.
type waterProps struct{ rho, mu, pv float64 }

// waterPropsAt returns the properties of water at temperature t in K, as
// facilities.Facility.State and the cavitation search compute them.
func waterPropsAt(t float64) waterProps {
	rho, mu := waterDensityViscosity(t)
	return waterProps{rho: rho, mu: mu, pv: facilities.WaterVapourPressure(t)}
}

// waterDensityViscosity returns the density in kg/m³ and the viscosity in Pa·s
// of water at temperature t in K, as facilities.Facility.State computes them.
func waterDensityViscosity(t float64) (rho, mu float64) {
	rho = facilities.WaterDensity(t)
	return rho, facilities.WaterViscosity(t, rho)
}

// waterState returns the dynamic pressure q in Pa and Re/m of the water state at
// speed machOrSpeed, p0 and T0 t, the water's density and viscosity at t being rho
// and mu (waterDensityViscosity), and
// whether the state is usable: facilities.Facility.State for water without its
// State built, q = ½ρV², Re/m = ρV/μ, usable where the static pressure p0 − q
// (p + q − q where the facility holds its static pressure p) is positive. A setting
// State would refuse on its face (a temperature outside the water model, a
// pressure or speed that is not positive and finite, a stagnation pressure
// given to a facility that holds its static pressure) is left to State.
// TestWaterStateMatchesFacility holds the two equal to the bit.
func (sv *solver) waterState(machOrSpeed, p0, t, rho, mu float64) (q, r float64, ok bool) {
	given := p0
	if sv.held {
		p0 = sv.f.HeldStaticPressure()
	}
	if !(t >= facilities.WaterMinTemperature && t <= facilities.WaterMaxTemperature) ||
		!(machOrSpeed >= 0) || math.IsInf(machOrSpeed, 1) || !(p0 > 0) || math.IsInf(p0, 1) || (sv.held && given != 0) {
		st, err := sv.state(machOrSpeed, given, t)
		if err != nil {
			return 0, 0, false
		}
		return st.DynamicPressure, st.ReynoldsPerMeter, true
	}
	sv.evals++
	v := machOrSpeed
	q = 0.5 * rho * v * v
	if sv.held {
		p0 += q
	}
	if !(p0-q > 0) {
		return 0, 0, false
	}
	return q, rho * v / mu, true
}

// waterGrid holds the water's properties on one temperature grid of
// atWaterCav, cavGrid points over [ta, tb]: the usable T0 range is the same at
// most speeds and scales of a plan, and these properties cost more than the
// rest of a state.
type waterGrid struct {
	ta, tb float64
	wp     [cavGrid]waterProps
	// dRho, dMu and dPv are the slopes dρ/dT in kg/m³/K, dμ/dT in Pa·s/K and
	// dp_v/dT in Pa/K there (facilities.WaterPropertiesAndSlopes); dMu only
	// where dMuSet has its bit (viscositySlope), at the ends from the start.
	dRho, dMu, dPv [cavGrid]float64
	dMuSet         uint32
	// dRe0 and dRe1 are d ln(ρ/μ)/dT in 1/K, the rise of Re/m with T, at the
	// grid's coldest and warmest temperatures (facilities.WaterViscositySlope).
	dRe0, dRe1 float64
	// fallsK and fallsV are the pressures falls was asked about on this grid
	// and its answers, fallsN of them kept: a plan asks about two (the
	// lowest and highest pressures, cavPressures) at every search.
	fallsK [2]float64
	fallsV [2]bool
	fallsN int
}

// falls reports whether (k − p_v(T))/ρ(T), k a pressure in Pa, falls strictly
// with the temperature T over the grid's whole range, shown cell by cell from
// the slopes at the cell's ends. Its slope has the sign of
// −(p_v′·ρ + (k − p_v)·ρ′); over a cell [T1, T2] with k > p_v(T2), p_v′ ≥
// p_v′(T1) > 0 (p_v rises and is convex), ρ ≥ min(ρ(T1), ρ(T2)) and ρ′ ≥
// ρ′(T2) (ρ is concave), k − p_v ≤ k − p_v(T1), so
//
//	p_v′·ρ + (k − p_v)·ρ′ ≥ p_v′(T1)·min(ρ(T1), ρ(T2)) + (k − p_v(T1))·min(ρ′(T2), 0)
//
// and where that is positive in every cell the ratio falls over the range
// (facilities.TestWaterSlopesMonotone holds the slopes' monotony over the
// water model's range, outside which falls reports false). Each cell's bound
// keeps a relative margin of 1e-9 for its own rounding.
func (g *waterGrid) falls(k float64) bool {
	for i := range g.fallsN {
		if g.fallsK[i] == k {
			return g.fallsV[i]
		}
	}
	v := g.fallsNow(k)
	i := g.fallsN
	if i == len(g.fallsK) {
		i = 0
		g.fallsK[1], g.fallsV[1] = g.fallsK[0], g.fallsV[0]
	} else {
		g.fallsN++
	}
	g.fallsK[i], g.fallsV[i] = k, v
	return v
}

// fallsNow is falls computed, not looked up.
func (g *waterGrid) fallsNow(k float64) bool {
	if !(g.ta >= facilities.WaterMinTemperature && g.tb <= facilities.WaterMaxTemperature) {
		return false
	}
	for i := 0; i+1 < cavGrid; i++ {
		a, b := &g.wp[i], &g.wp[i+1]
		if !(k > b.pv) {
			return false
		}
		up := g.dPv[i] * min(a.rho, b.rho)
		if !(up+(k-a.pv)*min(g.dRho[i+1], 0) > 1e-9*up) {
			return false
		}
	}
	return true
}

// waterGrids are the temperature grids atWaterCav used last (solver.grids),
// next the one to replace. Water's properties depend on the temperature alone,
// so the re-solves of the binding gains share them.
type waterGrids struct {
	g    [4]waterGrid
	set  [4]bool
	next int
}

// grid returns the water's properties on the grid of cavGrid temperatures
// over [ta, tb], computing them when they are not kept.
func (gs *waterGrids) grid(ta, tb float64) *waterGrid {
	for i := range gs.g {
		if g := &gs.g[i]; gs.set[i] && g.ta == ta && g.tb == tb {
			return g
		}
	}
	g := &gs.g[gs.next]
	gs.set[gs.next] = true
	gs.next = (gs.next + 1) % len(gs.g)
	g.ta, g.tb = ta, tb
	g.fallsN = 0
	for i := range g.wp {
		t := cavGridT(ta, tb, i)
		if i == 0 || i == cavGrid-1 {
			w := &g.wp[i]
			w.rho, g.dRho[i], w.mu, g.dMu[i], w.pv, g.dPv[i] = facilities.WaterPropertiesAndSlopes(t)
			continue
		}
		g.wp[i] = waterPropsAt(t)
		g.dRho[i], g.dPv[i] = facilities.WaterDensitySlope(t), facilities.WaterVapourPressureSlope(t)
	}
	g.dMuSet = 1 | 1<<(cavGrid-1)
	dRe := func(i int) float64 {
		w := &g.wp[i]
		return g.dRho[i]/w.rho - g.dMu[i]/w.mu
	}
	g.dRe0, g.dRe1 = dRe(0), dRe(cavGrid-1)
	return g
}

// viscositySlope returns dμ/dT in Pa·s/K at the grid's i-th temperature,
// computed once (facilities.WaterViscositySlope, as
// facilities.WaterPropertiesAndSlopes gives it).
func (g *waterGrid) viscositySlope(i int) float64 {
	if g.dMuSet&(1<<i) == 0 {
		g.dMu[i] = facilities.WaterViscositySlope(cavGridT(g.ta, g.tb, i), g.wp[i].rho, g.dRho[i])
		g.dMuSet |= 1 << i
	}
	return g.dMu[i]
}

// cavGridT is the i-th temperature of atWaterCav's grid over [ta, tb].
func cavGridT(ta, tb float64, i int) float64 {
	t := ta
	if cavGrid > 1 && tb > ta {
		t = ta + (tb-ta)*float64(i)/(cavGrid-1)
	}
	return t
}

// cavEval is atWaterCav's evaluation of a candidate at one water
// temperature, at a set-up's speed u and stagnation pressure pa and the scale
// s. Its method at writes the candidate into its caller's (a grid's cell, the
// search's ends), where a closure returning the 208-byte candidate copied it
// out and again into place (about 150 instructions a candidate, some 200
// candidates a vessel plan). The searches below atWaterCav (cavBand, cavEdge,
// cavCrossing, cavTopWeighted) take it by pointer and call at directly: a
// pointer handed to a function value would move the candidate to the heap.
type cavEval struct {
	sv    *solver
	u, pa float64
	s     float64
	capHi string
	sf    float64
	// lazy and lazyAbove: while the grid runs with the priority of the
	// cavitation number first, a candidate farther outside the band than
	// lazyAbove (the grid's best so far) gets a key of the cavitation level
	// alone (atWaterCav).
	lazy      bool
	lazyAbove float64
	// keyless: at leaves the candidate's key unset (the warmest water's
	// state, whose key a priority plan reads only where that state is the
	// answer; atWaterCav's keyTop sets it).
	keyless bool
	// ln: with a weighted objective, the logarithms of the Reynolds and
	// cavitation ratios the last key read (cavKey).
	ln [2]float64
}

// at sets *y to the candidate at temperature t, the water's properties there
// being wp, and returns the room between the static pressures the facility
// can hold there, hi − lo in Pa (NaN where the state fails).
func (e *cavEval) at(y *candidate, t float64, wp waterProps) float64 {
	sv, s := e.sv, e.s
	// Zeroed, then set: a composite literal is built on the stack and
	// copied into *y (about 50 instructions more a candidate).
	*y = candidate{}
	y.machOrSpeed, y.s, y.t0, y.v, y.capHi = e.u, s, t, e.u, e.capHi
	q, r, ok := sv.waterState(e.u, e.pa, t, wp.rho, wp.mu)
	room := math.NaN()
	if ok {
		lo, hi := sv.staticRange(q, wp.pv)
		room = hi - lo
		if !(hi >= lo && q > 0) {
			ok = false
		} else {
			sf := e.sf
			y.ps = min(max(wp.pv+sf*q, lo), hi)
			y.sig = (y.ps - wp.pv) / q
			y.band = sv.bandDepth(lo, hi, wp.pv, q)
			y.bandLo = (hi-wp.pv)/q - (sf - sv.obj.cavTol)
			y.q, y.r, y.p0 = q, r, y.ps+q
		}
	}
	if !ok {
		y.fail, y.k = facilities.ConstraintStaticPressureMin, worst
		if !sv.held {
			y.fail = facilities.ConstraintPressureMin
		}
		return room
	}
	y.ok = true
	if e.keyless {
		return room
	}
	if e.lazy {
		if d := sv.cavDistance(y.sig); d > e.lazyAbove {
			y.k = key{q: q}
			y.k.v[0] = d
			for j := 1; j < len(y.k.v); j++ {
				y.k.v[j] = math.Inf(1)
			}
			return room
		}
	}
	if sv.obj.weighted {
		y.k, e.ln[0], e.ln[1] = sv.cavKey(e.u, s, r, q, e.u, y.sig)
		return room
	}
	y.k = sv.keyOf(e.u, s, r, q, e.u, false, y.sig)
	return room
}

// atNew returns the candidate at temperature t (at, the water's properties
// computed there) and the room there.
func (e *cavEval) atNew(t float64) (candidate, float64) {
	var y candidate
	room := e.at(&y, t, waterPropsAt(t))
	return y, room
}

// atWaterCav is atWater when the objective looks at the cavitation number: at speed
// c.u and scale s it chooses the water temperature T (which moves ν, ρ and the
// vapour pressure p_v) and the test-section static pressure p, and returns the best
// candidate by the objective's key. At each T the static pressure is the one whose
// σ = (p − p_v)/(½ρV²) comes closest to the full scale's, p = p_v + σ_full·q
// clamped to the pressures the facility can hold (staticRange); T is searched
// over the usable range (as atWater: the T0 range, narrowed by a Re/m ceiling and
// by the balance's dynamic-pressure ceiling at this scale) on a grid of cavGrid
// points (the water's properties there kept, waterGrids), the edges where the
// cavitation band becomes reachable or a pressure becomes available (cavEdge, to
// 1e-12 relative), with a priority objective the band where it lies wholly
// between two grid points (cavCrossing), the temperature that meets the target
// Re/m exactly, and a golden-section refinement around the best grid point,
// which a priority of the cavitation number, then the Reynolds number, settled
// inside the band does not need. The feasibility scan (solver.feasOnly) takes
// the first usable grid point.
func (sv *solver) atWaterCav(c *machSetup, s, target float64, w Window) candidate {
	ta, tb := c.ta, c.tb
	capHi := c.capWaterTop
	// q and Re/m at temperature t, as waterQ and waterR give them; q at the
	// ends of the usable T0 range from the set-up, which computed their
	// states (waterQAt: the same q, TestWaterStateMatchesFacility).
	wq := func(t float64) float64 {
		for i, ti := range c.qWaterT {
			if ti == t && ti != 0 {
				return c.qWater[i]
			}
		}
		rho, mu := waterDensityViscosity(t)
		q, _, ok := sv.waterState(c.machOrSpeed, c.pa, t, rho, mu)
		if !ok {
			return math.Inf(1)
		}
		return q
	}
	wr := func(t float64) float64 {
		rho, mu := waterDensityViscosity(t)
		_, r, ok := sv.waterState(c.machOrSpeed, c.pa, t, rho, mu)
		if !ok {
			return math.Inf(1)
		}
		return r
	}
	if c.capWaterTop == facilities.ConstraintReynoldsUnit {
		tb = sv.rootHi(func(t float64) float64 { return sv.remax - wr(t) }, ta, tb, false)
	}
	if sv.load != nil {
		qb := w.Hi
		if qb < wq(tb)*(1-limitSlack) {
			return candidate{machOrSpeed: c.machOrSpeed, s: s, fail: sv.loadName, k: worst}
		}
		if wq(ta) > qb {
			ta = sv.rootHi(func(t float64) float64 { return qb - wq(t) }, ta, tb, true)
		}
	}
	if lo := w.Lo; lo > 0 {
		// The resolution floor caps T0 (q falls as the water warms).
		if wq(ta) < lo*(1-limitSlack) {
			return candidate{machOrSpeed: c.machOrSpeed, s: s, fail: sv.floorName, k: worst}
		}
		if wq(tb) < lo {
			tb = sv.rootHi(func(t float64) float64 { return wq(t) - lo }, ta, tb, false)
			capHi = sv.floorName
		}
	}
	sf := sv.fl.Marine.Cavitation
	// e evaluates the candidates at temperatures into the caller's candidate
	// (cavEval.at). lazy: while the grid runs with the priority of the
	// cavitation number first, a candidate farther outside the band than the
	// grid's best so far (e.lazyAbove) cannot become the best, and its key
	// keeps the cavitation level alone (the later levels +Inf), without the
	// Reynolds number's logarithm.
	lazy := sv.cavFirst()
	e := &cavEval{sv: sv, u: c.machOrSpeed, pa: c.pa, s: s, capHi: capHi, sf: sf, lazy: lazy, lazyAbove: math.Inf(1)}
	eval := func(t float64) candidate { y, _ := e.atNew(t); return y }
	// top is the candidate at the grid's warmest temperature, once known.
	var top candidate
	topRoom, haveTop := 0.0, false
	// topKeyless: top is usable and its key not yet set (keyless); keyTop
	// sets it, as e.at would have (no lazy key yet, and not weighted).
	topKeyless := false
	keyTop := func() {
		if topKeyless {
			top.k = sv.keyOf(c.machOrSpeed, s, top.r, top.q, c.machOrSpeed, false, top.sig)
			topKeyless = false
		}
	}
	if sv.cavThenReynolds() && !sv.feasOnly && sv.water != nil {
		// The warmest usable water inside the cavitation band, short of the
		// flight's Reynolds number, is the best temperature: none is better on
		// the cavitation level (0 there), and Re/m rises with T, so every
		// colder one lies farther from the flight's Reynolds number. The
		// search below would keep Re/m reachable at this level down to the
		// coldest temperature in the band, which only the shrink rule reads,
		// and it has nothing to shrink here (Re ≤ the flight's).
		m := sv.water
		i := m.slot(tb)
		wp := waterProps{rho: m.rho[i], mu: m.mu[i], pv: m.vapourPressure(tb)}
		e.keyless = true
		room := e.at(&top, tb, wp)
		e.keyless = false
		if y := &top; y.ok && sv.cavDistance(y.sig) == 0 &&
			y.r*s*sv.L <= sv.fl.Reynolds && s*sv.L*y.r/sv.fl.Reynolds <= 1 {
			y.k = sv.keyOf(c.machOrSpeed, s, y.r, y.q, c.machOrSpeed, false, y.sig)
			y.rlo, y.rhi, y.capHi = y.r, y.r, capHi
			y.top, y.bandOK = true, true
			return *y
		}
		// The same state as the grid's warmest, where that is tb itself.
		topRoom, haveTop, topKeyless = room, cavGridT(ta, tb, cavGrid-1) == tb, top.ok
	}
	if sv.grids == nil {
		if sv.scratch != nil {
			sv.grids = &sv.scratch.grids
		} else {
			sv.grids = &waterGrids{}
		}
	}
	wg := sv.grids.grid(ta, tb)
	// The candidate at the grid's coldest temperature, once asked for.
	var cold candidate
	coldRoom, haveCold := 0.0, false
	if (sv.cavFirst() || sv.obj.weighted) && !sv.feasOnly && !sv.noCavEnd {
		// The logarithms the ends' keys read (weighted: e.ln).
		topLn, coldLn := [2]float64{math.NaN(), math.NaN()}, [2]float64{math.NaN(), math.NaN()}
		if !haveTop {
			e.ln = [2]float64{math.NaN(), math.NaN()}
			topRoom = e.at(&top, cavGridT(ta, tb, cavGrid-1), wg.wp[cavGrid-1])
			haveTop, topLn, topKeyless = true, e.ln, false
		}
		needCold := func() {
			if !haveCold {
				e.ln = [2]float64{math.NaN(), math.NaN()}
				coldRoom = e.at(&cold, cavGridT(ta, tb, 0), wg.wp[0])
				haveCold, coldLn = true, e.ln
			}
		}
		// y is the answer where an end or the band settles the search: top
		// or cold themselves, or res, not copied on the way.
		var y *candidate
		if sv.obj.weighted {
			if y = sv.cavEndWeighted(wg, &top, &cold, needCold, s, &topLn, &coldLn); y == nil {
				needCold()
				if sv.cavTopWeighted(e, wg, &top, topRoom, &cold, coldRoom, s) {
					y = &top
				}
			}
		} else {
			// cavEnd: the warmest or the coldest water, where shown.
			if sv.cavEndTop(wg, &top) {
				keyTop()
				y = &top
			} else {
				needCold()
			}
			if y == nil && sv.cavEndCold(wg, &cold) {
				y = &cold
			}
			if y != nil {
				y.rlo, y.rhi = y.r, y.r
			}
		}
		if y == nil && !sv.obj.weighted && sv.cavThenReynolds() {
			keyTop()
			// The search's own targets inside the band, where σ falls with T.
			root := func() (candidate, bool) {
				if needCold(); target > cold.r && target < top.r {
					t := sv.rootHi(func(t float64) float64 { return wr(t) - target }, ta, tb, true)
					return eval(t), true
				}
				return candidate{}, false
			}
			needCold()
			if res, ok := sv.cavBand(e, wg, &top, topRoom, &cold, coldRoom, s, root); ok {
				y = &res
			}
		}
		if y != nil {
			if y.r <= y.rlo*(1+limitSlack) {
				y.rlo = y.r
			}
			if y.t0 >= tb*(1-limitSlack) {
				y.capHi = capHi
			}
			if top.ok {
				y.band, y.bandLo, y.bandOK = top.band, top.bandLo, true
			}
			return *y
		}
	}
	// The grid reads top only without lazy keys (a keyless top comes with the
	// priority of the cavitation number first, whose keys are lazy): set
	// anyway, as e.at would.
	keyTop()
	best := candidate{k: worst, fail: facilities.ConstraintStaticPressureMin}
	// seen are Re/m and the distance outside the cavitation band of every
	// usable candidate considered.
	type rd struct{ r, d float64 }
	var seenArr [4 * cavGrid]rd
	seen := seenArr[:0]
	// consider reads the candidate through a pointer (a 208-byte copy a
	// call by value).
	consider := func(y *candidate) {
		if y.ok {
			seen = append(seen, rd{y.r, sv.cavDistance(y.sig)})
		}
		if y.ok && (!best.ok || y.k.less(best.k)) {
			best = *y
		}
	}
	var grid [cavGrid]candidate
	var rooms [cavGrid]float64
	ibest := -1
	for i := range grid {
		// The grid's ends where the certificates asked for them already: the
		// same states (at the first, nothing is lazy yet; at the last, a
		// lazy key and the full one compare alike with the grid's best).
		switch {
		case i == 0 && haveCold:
			grid[i], rooms[i] = cold, coldRoom
		case i == cavGrid-1 && haveTop && !lazy:
			grid[i], rooms[i] = top, topRoom
		default:
			rooms[i] = e.at(&grid[i], cavGridT(ta, tb, i), wg.wp[i])
		}
		if grid[i].ok && (ibest < 0 || grid[i].k.less(grid[ibest].k)) {
			ibest = i
			if lazy {
				e.lazyAbove = grid[i].k.v[0]
			}
		}
		consider(&grid[i])
		if !best.ok && grid[i].fail != "" {
			best.fail = grid[i].fail
		}
		if best.ok && sv.feasOnly {
			return best
		}
	}
	e.lazyAbove = math.Inf(1)
	if ibest < 0 {
		return candidate{machOrSpeed: c.machOrSpeed, s: s, fail: best.fail, k: worst}
	}
	// The cavitation level (0 inside the band) and feasibility change at edges
	// between grid points: find each to 1e-12 relative, keeping the better side
	// (cavEdge).
	zero := func(y *candidate) bool { return y.ok && sv.cavDistance(y.sig) == 0 }
	var zs [cavGrid]bool
	for i := range grid {
		zs[i] = zero(&grid[i])
	}
	for i := 0; i+1 < len(grid); i++ {
		a, b := &grid[i], &grid[i+1]
		if a.ok == b.ok && zs[i] == zs[i+1] {
			if !sv.obj.weighted && a.ok && !zs[i] && (a.sig < sf) != (b.sig < sf) {
				// The cavitation number crosses its whole band between two grid
				// points (a band narrower than a grid cell): a point inside it,
				// then both its ends.
				if m, room, ok := sv.cavCrossing(e, *a, *b); ok {
					consider(&m)
					y := sv.cavEdge(e, m, *a, room, rooms[i])
					consider(&y)
					y = sv.cavEdge(e, m, *b, room, rooms[i+1])
					consider(&y)
				}
			}
			continue
		}
		good, bad, rg, rb := a, b, rooms[i], rooms[i+1]
		if !(a.ok && (zs[i] || !zs[i+1])) {
			good, bad, rg, rb = b, a, rb, rg
		}
		y := sv.cavEdge(e, *good, *bad, rg, rb)
		consider(&y)
	}
	// The temperature that meets the target Re/m (Re/m rises with T).
	if grid[0].ok && grid[len(grid)-1].ok {
		if r0, r1 := grid[0].r, grid[len(grid)-1].r; target > r0 && target < r1 {
			t := sv.rootHi(func(t float64) float64 { return wr(t) - target }, ta, tb, true)
			var y candidate
			e.at(&y, t, waterPropsAt(t))
			consider(&y)
		}
	}
	// Refine around the best grid point (a smooth weighted objective, or a
	// cavitation band out of reach). Inside the band a priority of the
	// cavitation number, then the Reynolds number, has its best at the
	// temperature that meets the target Re/m or at an end of the band's stretch
	// that holds it (|ln(Re_test/Re_flight)| falls toward that temperature, since
	// Re/m rises with T), each considered already when both ends of the range
	// are usable: no refinement then.
	settled := sv.cavThenReynolds() && zero(&best) && grid[0].ok && grid[len(grid)-1].ok
	if lo, hi := max(0, float64(ibest-1)), min(float64(len(grid)-1), float64(ibest+1)); hi > lo && tb > ta && !settled {
		a, b := ta+(tb-ta)*lo/(cavGrid-1), ta+(tb-ta)*hi/(cavGrid-1)
		var y candidate
		if t, ok := sv.cavSlopeRoot(wg, &grid[int(lo)], s, int(lo), int(hi)); ok && ibest > 0 && ibest < cavGrid-1 {
			e.at(&y, t, waterPropsAt(t))
		} else {
			y = sv.gridMin(eval, a, b, 3, 1e-12, sv.obj.weighted, false, false)
		}
		consider(&y)
	}
	if !best.ok {
		return candidate{machOrSpeed: c.machOrSpeed, s: s, fail: best.fail, k: worst}
	}
	// Re/m reachable at this level of the cavitation number: the shrink and knee
	// rules of the scale search read it.
	best.rlo, best.rhi = best.r, best.r
	dBest := sv.cavDistance(best.sig)
	for _, y := range seen {
		if y.d <= dBest {
			best.rhi = max(best.rhi, y.r)
			best.rlo = min(best.rlo, y.r)
		}
	}
	if best.r <= best.rlo*(1+limitSlack) {
		best.rlo = best.r
	}
	if best.t0 >= tb*(1-limitSlack) {
		best.capHi = capHi
	}
	if top := grid[len(grid)-1]; top.ok {
		best.band, best.bandLo, best.bandOK = top.band, top.bandLo, true
	}
	return best
}

// cavEndTop and cavEndCold are cavEnd, the ends' certificate: they report,
// with the cavitation number first in a priority, which end of the grid g is
// shown to be the best, where the cavitation band lies
// out of reach over the whole range and that end comes nearest it: the
// warmest water (cavEndTop, top being atWaterCav's candidate at g's warmest
// temperature), or else the coldest (cavEndCold, cold the one at its
// coldest). The candidates are read through pointers, not copied (a 208-byte
// candidate passed and returned by value cost more than the test), and the
// coldest is computed only where the warmest is not shown.
//
// At each temperature T the chosen σ lies between σ_lo = (lo − p_v)/q and
// σ_hi = (hi − p_v)/q, the static pressures lo and hi the facility can hold
// (staticRange), and q = ½ρV². With k the highest pressure (p0 max, or the
// static pressure's maximum where the facility holds it), σ_hi =
// 2(k − p_v)/(ρV²) − c (c = 1 with a stagnation-pressure range, 0 otherwise),
// and likewise σ_lo ≥ 2(k′ − p_v)/(ρV²) − c with k′ the lowest: both fall with
// T where (k − p_v)/ρ does (waterGrid.falls), at every speed. Then where σ at
// the coldest water, σ_hi there, lies below the band, every warmer σ lies
// lower still, farther from it; and where σ at the warmest, σ_lo there, lies
// above the band, every colder σ lies higher: that end is strictly the best on
// the first level, whatever the later levels.
func (sv *solver) cavEndTop(g *waterGrid, top *candidate) bool {
	lo, _, _ := sv.cavPressures()
	return top.ok && top.sig > sv.fl.Marine.Cavitation+sv.obj.cavTol && g.falls(lo)
}

// cavEndCold is cavEnd's test of the coldest water (cavEndTop).
func (sv *solver) cavEndCold(g *waterGrid, cold *candidate) bool {
	_, hi, _ := sv.cavPressures()
	return cold.ok && cold.sig < sv.fl.Marine.Cavitation-sv.obj.cavTol && g.falls(hi)
}

// cavEndWeighted is cavEnd for a weighted objective: the candidate at the
// coldest or the warmest water of the grid g where that end is shown to be the
// best, with the Re/m reachable at its cavitation level (rlo, rhi, as
// atWaterCav's search would find them, set in it): top or cold itself; nil
// where that is not shown. top is atWaterCav's candidate at g's warmest
// temperature, cold the one at its coldest once needCold has run (it
// computes it where not yet known); s is the scale. topLn and coldLn are the
// logarithms their keys read (cavKey's lnRe and lnSig, NaN where not read;
// coldLn filled by needCold), taken here instead of computed again. The
// candidates are read and answered through pointers, not copied.
//
// Of the weighted sum only wc·a² + wr·b² moves with the temperature, a =
// ln(σ/σ_full) and b = ln(Re/Re_full) (the Froude term moves with the speed
// and scale alone; a Mach term in water is not allowed here). Where
// (k − p_v)/ρ falls for both the lowest and the highest pressure k
// (waterGrid.falls), σ_lo and σ_hi fall with T, so the chosen σ (σ_full
// clamped between them) never rises, and Re/m rises with T. Then:
//
//   - σ above σ_full at the warmest water (so at every T) and Re below the
//     flight's at the warmest (so at every T): both terms fall as T rises;
//     the warmest is the best.
//   - σ below σ_full at the coldest water (so σ = σ_hi at every T), and Re
//     above the flight's at the coldest: both terms rise with T; the coldest
//     is the best.
//   - σ below σ_full at the coldest and Re below the flight's at the coldest:
//     the terms pull apart where b < 0, W′/2 = wc·a·a′ + wr·b·b′ with a, a′ ≤
//     0 < b′. With a = ln((k − p_v − c·q)/q) − ln σ_full (q = ½ρV², c = 1 with a
//     stagnation-pressure range, 0 where the static pressure is held),
//     |a′| = (p_v′ + c·½V²·ρ′)/(k − p_v − c·q) + ρ′/ρ, bounded over the range
//     from the slopes at its ends (p_v′ rises, ρ′ and ρ′/ρ fall, ρ ≤ ρ(ta) +
//     max(ρ′(ta), 0)·(tb − ta) and ρ ≥ min(ρ(ta), ρ(tb)) as ρ is concave), and
//     b′ = d ln(ρ/μ)/dT between its values at the ends (it falls with T:
//     facilities.TestWaterSlopesMonotone). |a| rises with T and |b| falls, so
//     where Re stays below the flight's up to the warmest and wc·|a(tb)|·max|a′|
//     < wr·|b(tb)|·min b′, W′ < 0 over the whole range and the warmest is the
//     best; where wc·|a(ta)|·min|a′| > wr·|b(ta)|·max b′ (b′·b > 0 where Re
//     has passed the flight's), W′ > 0 and the coldest is.
//
// Each test keeps a margin (1e-9 on σ, 1e-6 on the slopes' products) for
// rounding. The search's other candidates, the temperature that meets a
// target Re/m among them, then lie strictly behind the end on the weighted
// sum, and where they reach the end's cavitation level (the Re/m it keeps)
// between the ends' Re/m.
func (sv *solver) cavEndWeighted(g *waterGrid, top, cold *candidate, needCold func(), s float64, topLn, coldLn *[2]float64) *candidate {
	wc, wr := sv.obj.w[gCavitation], sv.obj.w[gReynolds]
	if !(wc > 0) || !(wr >= 0) || (sv.obj.w[gMach] > 0 && !sv.noMach) || !top.ok {
		return nil
	}
	sf := sv.fl.Marine.Cavitation
	lo, hi, cq := sv.cavPressures()
	if !g.falls(lo) || !g.falls(hi) {
		return nil
	}
	needCold()
	if !cold.ok {
		return nil
	}
	lnRe := func(y *candidate, ln *[2]float64) float64 {
		if l := ln[0]; l == l {
			return l // the same logarithm (cavKey)
		}
		return math.Log(s * sv.L * y.r / sv.fl.Reynolds)
	}
	bC, bT := lnRe(cold, coldLn), lnRe(top, topLn)
	// Where the end found lies outside the cavitation band, no other
	// temperature reaches its cavitation level (σ moves strictly away from
	// the band), and the Re/m reachable there is its own.
	outside := func(y *candidate) bool { return sv.cavDistance(y.sig) > 0 }
	switch {
	case top.sig > sf*(1+1e-9) && bT < 0 && outside(top):
		top.rlo, top.rhi = top.r, top.r
		return top
	case !(cold.sig < sf*(1-1e-9)) || !(top.sig > 1e-6*sf):
		return nil
	case bC > 0 && outside(cold):
		cold.rlo, cold.rhi = cold.r, cold.r
		return cold
	}
	v := cold.machOrSpeed
	kq := 0.5 * v * v
	w0, w1 := &g.wp[0], &g.wp[cavGrid-1]
	r0, r1 := g.dRho[0], g.dRho[cavGrid-1]
	rhoMin, rhoMax := min(w0.rho, w1.rho), w0.rho+max(r0, 0)*(cavGridT(g.ta, g.tb, cavGrid-1)-g.ta)
	nLo, nHi := g.dPv[0]+cq*kq*r1, g.dPv[cavGrid-1]+cq*kq*r0
	gLo, gHi := hi-w1.pv-cq*kq*rhoMax, hi-w0.pv-cq*kq*rhoMin
	if !(gLo > 0) || !(g.dRe1 > 0) {
		return nil
	}
	aLo := max(0, min(nLo/gLo, nLo/gHi)+r1/w1.rho)
	aHi := max(nHi/gLo, nHi/gHi) + r0/w0.rho
	// −ln(σ/σ_full), from the keys' ln(max(σ, 1e-9·σ_full)/σ_full) where σ
	// is at least 1e-9·σ_full (the same logarithm).
	lnSig := func(y *candidate, ln *[2]float64) float64 {
		if l := ln[1]; l == l && y.sig >= 1e-9*sf {
			return -l
		}
		return -math.Log(y.sig / sf)
	}
	aC, aT := lnSig(cold, coldLn), lnSig(top, topLn)
	const m = 1 + 1e-6
	switch {
	case bT < 0 && wc*aT*aHi*m < wr*-bT*g.dRe1:
		// W falls over the range: the warmest is the best, and every
		// colder state lies nearer the band (σ falls with T).
		top.rlo, top.rhi = cold.r, top.r
		return top
	case wc*aC*aLo > m*wr*max(-bC, 0)*g.dRe0 && outside(cold):
		cold.rlo, cold.rhi = cold.r, cold.r
		return cold
	}
	return nil
}

// cavTopWeighted is cavEndWeighted where the warmest water lies inside the
// cavitation band with σ at σ_full or above it (so at every colder
// temperature too, σ_hi and σ_lo falling with T: waterGrid.falls) and the
// Reynolds number below the flight's there (so at every temperature): the
// cavitation term, ln²(σ/σ_full), never rises with T and the Reynolds term
// falls, so the warmest is the best, strictly (wr > 0). The Re/m the full
// search keeps at its cavitation level, 0, run from the band's colder end to
// the warmest: the coldest grid temperature where it lies in the band, else
// the edge the full search finds in the grid cell where σ enters the band
// (bisection on the grid's indices, then cavEdge). It sets that range in top
// and reports true where top is the answer; false otherwise, top unchanged.
// Arguments as cavBand's and cavEndWeighted's.
func (sv *solver) cavTopWeighted(e *cavEval, g *waterGrid, top *candidate, topRoom float64,
	cold *candidate, coldRoom, s float64) bool {
	wc, wr := sv.obj.w[gCavitation], sv.obj.w[gReynolds]
	sf, tol := sv.fl.Marine.Cavitation, sv.obj.cavTol
	if !(wc > 0) || !(wr > 0) || (sv.obj.w[gMach] > 0 && !sv.noMach) || !top.ok || !cold.ok ||
		sv.cavDistance(top.sig) != 0 || !(top.sig >= sf*(1-1e-12)) || !(s*sv.L*top.r < sv.fl.Reynolds) {
		return false
	}
	lo, hi, _ := sv.cavPressures()
	if !g.falls(lo) || !g.falls(hi) {
		return false
	}
	top.rlo, top.rhi = cold.r, top.r
	if sv.cavDistance(cold.sig) == 0 {
		return true
	}
	// The first grid index at or below the band's upper end (σ falls with
	// the index), as cavDistance tests it; the warmest is one.
	a, b := 0, cavGrid-1
	ya, ra, yb, rb := *cold, coldRoom, *top, topRoom
	for b-a > 1 {
		m := (a + b) / 2
		var y candidate
		if room := e.at(&y, cavGridT(g.ta, g.tb, m), g.wp[m]); y.sig-(sf+tol) > 0 {
			a, ya, ra = m, y, room
		} else {
			b, yb, rb = m, y, room
		}
	}
	top.rlo = sv.cavEdge(e, yb, ya, rb, ra).r
	return true
}

// cavSlopeRoot returns the temperature in [a, b] where the weighted sum's
// slope in T is 0, and true, where a weighted cavitation search's best grid
// temperature lies inside [a, b] (its neighbours) with σ below σ_full at a
// (so σ = σ_hi over [a, b], σ_hi falling with T: waterGrid.falls) and the
// slope changes sign from a to b (the grid's temperatures ia and ib, whose
// properties and slopes g keeps); false otherwise (the search then refines by
// Brent's method, gridMin) or the solver does not ask for it (slopeRoot:
// the trade curve's points). ya is the grid's candidate at a; s the scale.
// Of the weighted sum only W = wc·A² + wr·B² moves with T, A = ln(σ_hi/σ_full),
// B = ln(Re/Re_full), so
//
//	W′/2 = wc·A·A′ + wr·B·B′
//	A′ = −(p_v′ + c·½V²·ρ′)/(k − p_v − c·½V²·ρ) − ρ′/ρ, B′ = ρ′/ρ − μ′/μ
//
// (k the highest pressure, c = 1 with a stagnation-pressure range and 0
// where the static pressure is held), from the water's slopes
// (facilities.WaterDensitySlope, WaterVapourPressureSlope,
// WaterViscositySlope). Its root is found by regula falsi with the Illinois
// modification to 1e-13 relative (or to a point whose secant step, at the
// bracket's slope, lies within that: where W′ there is down to its rounding,
// the steps land on it again, and only halvings would close the bracket's far
// end, some 20 of them): W′ is computed to about 1e-15 relative
// where W itself, flat at its minimum, places the minimum only to about 1e-8
// (the square root of the rounding), which Brent's method on W spent some 30
// states to reach.
func (sv *solver) cavSlopeRoot(g *waterGrid, ya *candidate, s float64, ia, ib int) (float64, bool) {
	wc, wr := sv.obj.w[gCavitation], sv.obj.w[gReynolds]
	sf := sv.fl.Marine.Cavitation
	a, b := cavGridT(g.ta, g.tb, ia), cavGridT(g.ta, g.tb, ib)
	if !sv.obj.weighted || !sv.slopeRoot || !(wc > 0) || !(wr >= 0) || (sv.obj.w[gMach] > 0 && !sv.noMach) ||
		!ya.ok || !(ya.sig < sf*(1-1e-9)) || !(b > a) {
		return 0, false
	}
	lo, k, cq := sv.cavPressures()
	if !g.falls(k) || !g.falls(lo) {
		return 0, false
	}
	v := ya.machOrSpeed
	kq := 0.5 * v * v
	re := s * sv.L * v / sv.fl.Reynolds
	// slopeOf is W′/2 from the water's properties and slopes at a
	// temperature; NaN where σ_hi is not positive.
	slopeOf := func(rho, dRho, mu, dMu, pv, dPv float64) float64 {
		room := k - pv - cq*kq*rho
		sig := room / (kq * rho)
		if !(room > 0) || !(sig > 1e-9*sf) {
			return math.NaN()
		}
		dA := -(dPv+cq*kq*dRho)/room - dRho/rho
		return wc*math.Log(sig/sf)*dA + wr*math.Log(re*rho/mu)*(dRho/rho-dMu/mu)
	}
	slope := func(t float64) float64 {
		sv.evals++ // the water's properties and slopes at t, counted as a state
		return slopeOf(facilities.WaterPropertiesAndSlopes(t))
	}
	// At the bracket's ends, grid temperatures, the grid keeps them.
	slopeAt := func(i int) float64 {
		w := &g.wp[i]
		return slopeOf(w.rho, g.dRho[i], w.mu, g.viscositySlope(i), w.pv, g.dPv[i])
	}
	fa, fb := slopeAt(ia), slopeAt(ib)
	if !(fa < 0) || !(fb > 0) {
		return 0, false
	}
	side := 0
	for j := 0; j < 100 && b-a > 1e-13*b; j++ {
		t := a - fa*(b-a)/(fb-fa)
		if !(t > a && t < b) {
			t = 0.5 * (a + b)
		}
		f := slope(t)
		switch {
		case math.Abs(f)*(b-a) <= 1e-13*t*math.Abs(fb-fa):
			// The secant step from t, at the bracket's slope, lies within
			// the tolerance: t is the root to it. (Where W′ at t is down to
			// its rounding, the steps would land on t again, and the
			// bracket's far end would close in by halvings alone.)
			return t, true
		case !(f == f):
			return 0, false
		case f < 0:
			a, fa = t, f
			if side == -1 {
				fb *= 0.5
			}
			side = -1
		default:
			b, fb = t, f
			if side == 1 {
				fa *= 0.5
			}
			side = 1
		}
	}
	return a - fa*(b-a)/(fb-fa), true
}

// cavBand is atWaterCav's search with the priority of the cavitation number,
// then the Reynolds number, where σ falls with T over the whole range
// (waterGrid.falls for both pressure limits) and the range's ends are
// usable, so that every temperature is: the grid's temperatures inside the
// band are then those from the first at or below its upper end, ia, to the
// last at or above its lower end, ib − 1, found by bisection on the grid's
// indices. The full search's edges lie in the cells (ia − 1, ia) and
// (ib − 1, ib) (cavEdge), or, where no grid temperature lies in the band,
// its crossing in the cell (ia − 1, ia) (cavCrossing); with the target Re/m
// (root) they are its only candidates that can be the best, since Re/m rises
// with T and the band's level is 0 on the whole stretch between them: where
// the flight's Re/m lies outside the stretch's, |ln(Re/Re_full)| is least at
// one of its ends, and every other grid temperature inside the band lies
// farther from the flight's Reynolds number, every one outside it out of the
// band. It returns the candidate the full search finds at scale s, with the
// Re/m it keeps at the band's level (rlo, rhi: the stretch's ends), and true;
// false where no candidate lands in the band or the flight's Re/m lies inside
// the stretch (the full search then runs). top and cold are atWaterCav's
// candidates at g's warmest and coldest temperatures, with their rooms
// (cavEdge).
func (sv *solver) cavBand(e *cavEval, g *waterGrid, top *candidate, topRoom float64,
	cold *candidate, coldRoom, s float64, root func() (candidate, bool)) (candidate, bool) {
	sf, tol := sv.fl.Marine.Cavitation, sv.obj.cavTol
	lo, hi, _ := sv.cavPressures()
	if !top.ok || !cold.ok || !g.falls(lo) || !g.falls(hi) {
		return candidate{}, false
	}
	var pts [cavGrid]candidate
	var rooms [cavGrid]float64
	var have [cavGrid]bool
	pts[0], rooms[0], have[0] = *cold, coldRoom, true
	pts[cavGrid-1], rooms[cavGrid-1], have[cavGrid-1] = *top, topRoom, true
	// at returns the grid's i-th candidate, in pts (not copied out).
	at := func(i int) *candidate {
		if !have[i] {
			rooms[i] = e.at(&pts[i], cavGridT(g.ta, g.tb, i), g.wp[i])
			have[i] = true
		}
		return &pts[i]
	}
	// first returns the least grid index whose candidate lies at or below
	// the band's upper end (lower false) or below its lower end (lower
	// true), as cavDistance tests them, each of which holds from some index
	// on (σ falls with the index); cavGrid for none.
	first := func(lower bool) int {
		a, b := -1, cavGrid
		for b-a > 1 {
			m := (a + b) / 2
			y := at(m)
			in := !(y.sig-(sf+tol) > 0)
			if lower {
				in = sf-tol-y.sig > 0
			}
			if in {
				b = m
			} else {
				a = m
			}
		}
		return b
	}
	// The band's ends as cavDistance tests them.
	ia := first(false)
	ib := first(true)
	best := candidate{k: worst}
	rlo, rhi := math.Inf(1), math.Inf(-1)
	consider := func(y *candidate) {
		if !y.ok || sv.cavDistance(y.sig) != 0 {
			return
		}
		rlo, rhi = min(rlo, y.r), max(rhi, y.r)
		if !best.ok || y.k.less(best.k) {
			best = *y
		}
	}
	switch {
	case ia < ib:
		if ia == 0 {
			consider(cold)
		}
		if ib == cavGrid {
			consider(top)
		}
		if ia > 0 {
			y := sv.cavEdge(e, *at(ia), *at(ia - 1), rooms[ia], rooms[ia-1])
			consider(&y)
		}
		if ib < cavGrid {
			y := sv.cavEdge(e, *at(ib - 1), *at(ib), rooms[ib-1], rooms[ib])
			consider(&y)
		}
	case ia > 0 && ia < cavGrid:
		if a, b := at(ia-1), at(ia); (a.sig < sf) != (b.sig < sf) {
			if m, room, ok := sv.cavCrossing(e, *a, *b); ok {
				consider(&m)
				y := sv.cavEdge(e, m, *a, room, rooms[ia-1])
				consider(&y)
				y = sv.cavEdge(e, m, *b, room, rooms[ia])
				consider(&y)
			}
		}
	}
	if y, ok := root(); ok {
		consider(&y)
	}
	// Where the flight's Re/m lies inside the stretch, a grid temperature
	// nearer it than the target's may be the best: the full search decides.
	if re := sv.fl.Reynolds / (s * sv.L); !best.ok || (re > rlo && re < rhi) {
		return candidate{}, false
	}
	best.rlo, best.rhi = rlo, rhi
	return best, true
}

// cavEdge narrows the bracket [good, bad] of temperatures (either order) across
// which a cavitation candidate's feasibility or its cavitation level changes
// (good is feasible; bad differs in either) to 1e-12 relative and returns the
// candidate at its good end. e gives the candidate at a temperature (cavEval.at) and the
// room hi − lo between the static pressures the facility can hold there (NaN
// where the state fails); rg and rb are good's and bad's. The step is regula
// falsi with the Illinois modification on a margin that changes sign at the edge
// (the room for a feasibility edge, the distance into the cavitation band for a
// band edge), which is continuous in the temperature, and a halving where the margin is not
// defined, disagrees in sign with the candidate's side, or the last step took
// less than half the bracket away: every point tested keeps the bracket's
// ends on their sides exactly, as a bisection does, in about a quarter of its
// steps.
func (sv *solver) cavEdge(e *cavEval, good, bad candidate, rg, rb float64) candidate {
	sf, tol := sv.fl.Marine.Cavitation, sv.obj.cavTol
	inBand := func(y candidate) bool { return y.ok && sv.cavDistance(y.sig) == 0 }
	band := inBand(good)
	same := func(y candidate) bool { return y.ok && inBand(y) == band }
	// margin is ≥ 0 on good's side and < 0 on the other, or NaN: the room
	// where bad is not usable, else the distance from the band's end between
	// them, σ_full ± cavTol, toward good.
	byRoom := !bad.ok
	out := bad.sig // the side of the band the one out of it is on
	if !band {
		out = good.sig
	}
	edge, dir := sf-tol, 1.0
	if out > sf {
		edge, dir = sf+tol, -1
	}
	if !band {
		dir = -dir
	}
	margin := func(y candidate, room float64) float64 {
		m := room
		if !byRoom {
			m = math.NaN()
			if y.ok {
				m = dir * (y.sig - edge)
			}
		}
		if same(y) != (m >= 0) {
			return math.NaN()
		}
		return m
	}
	fg, fb := margin(good, rg), margin(bad, rb)
	side, w0 := 0, math.Abs(good.t0-bad.t0)
	for j := 1; j <= 100 && math.Abs(good.t0-bad.t0) > 1e-12*good.t0; j++ {
		t := 0.5 * (good.t0 + bad.t0)
		if j%4 == 0 && math.Abs(good.t0-bad.t0) > 0.5*w0 {
			// The last three steps did not halve the bracket: a halving.
		} else if fg-fb > 0 {
			// At least 0.4e-12 relative from either end: once an end is as close
			// to the edge as the margin resolves, the next point falls past it
			// and closes the bracket.
			d := 0.4e-12 * good.t0
			lo, hi := min(good.t0, bad.t0)+d, max(good.t0, bad.t0)-d
			if x := good.t0 + fg/(fg-fb)*(bad.t0-good.t0); x >= lo-d && x <= hi+d {
				t = min(max(x, lo), hi)
			}
		}
		var m candidate
		room := e.at(&m, t, waterPropsAt(t))
		f := margin(m, room)
		if same(m) {
			good, fg = m, f
			if side == 1 {
				fb *= 0.5
			}
			side = 1
		} else {
			bad, fb = m, f
			if side == -1 {
				fg *= 0.5
			}
			side = -1
		}
		if j%4 == 0 {
			w0 = math.Abs(good.t0 - bad.t0)
		}
	}
	return good
}

// cavCrossing returns a candidate inside the cavitation band between a and b,
// feasible candidates on either side of the band at neighbouring temperatures,
// with the room hi − lo at it (see cavEdge), or false when the search meets an
// unusable state or narrows [a, b] to 1e-12 relative without landing in the band:
// regula falsi with the Illinois modification on σ − σ_full, continuous in T.
func (sv *solver) cavCrossing(e *cavEval, a, b candidate) (candidate, float64, bool) {
	sf := sv.fl.Marine.Cavitation
	fa, fb := a.sig-sf, b.sig-sf
	side := 0
	for j := 0; j < 100 && math.Abs(a.t0-b.t0) > 1e-12*math.Abs(a.t0); j++ {
		t := 0.5 * (a.t0 + b.t0)
		if x := a.t0 + fa/(fa-fb)*(b.t0-a.t0); x > min(a.t0, b.t0) && x < max(a.t0, b.t0) {
			t = x
		}
		var m candidate
		room := e.at(&m, t, waterPropsAt(t))
		if !m.ok {
			return m, room, false
		}
		if sv.cavDistance(m.sig) == 0 {
			return m, room, true
		}
		if f := m.sig - sf; (f < 0) == (fa < 0) {
			a, fa = m, f
			if side == -1 {
				fb *= 0.5
			}
			side = -1
		} else {
			b, fb = m, f
			if side == 1 {
				fa *= 0.5
			}
			side = 1
		}
	}
	return a, 0, false
}

// bandDepth is how far the cavitation number can come inside the band
// σ_full ± cavTol with the static pressures lo to hi in Pa the facility can
// hold at dynamic pressure q in Pa and vapour pressure pv in Pa: the lesser of
// σ at hi above the band's lower end and σ at lo below its upper end, ≥ 0
// where the chosen σ lies in the band and < 0 where it does not. Unlike the
// chosen σ, which stays at σ_full while the pressure is free, it moves with
// the speed and the temperature on both sides of a band's end.
func (sv *solver) bandDepth(lo, hi, pv, q float64) float64 {
	sf, tol := sv.fl.Marine.Cavitation, sv.obj.cavTol
	return min((hi-pv)/q-(sf-tol), sf+tol-(lo-pv)/q)
}

// cavDistance is the distance of a test cavitation number sig outside the band
// σ_full ± cavTol: 0 inside it.
func (sv *solver) cavDistance(sig float64) float64 {
	sf := sv.fl.Marine.Cavitation
	return max(0, max(sf-sv.obj.cavTol-sig, sig-(sf+sv.obj.cavTol)))
}

// marineNotes returns the plan's notes on a marine condition: the cavitation number
// reached, the Froude number a closed test section cannot match, and what a gas
// facility leaves out.
func (sv *solver) marineNotes(st facilities.State, res *Result) []string {
	m := sv.fl.Marine
	if m == nil {
		return nil
	}
	var w []string
	switch {
	case !sv.liquid:
		w = append(w, gasVesselNote(m.Cavitation))
	case res.Mismatch.CavitationMatched != nil && !*res.Mismatch.CavitationMatched:
		what := "the facility's pressure range cannot hold it at any usable speed and temperature"
		if !sv.held && sv.f.StagnationPressure.Fixed() {
			what = "the facility does not set its test-section pressure: σ follows from the speed"
		}
		w = append(w, cavUnmatchedNote(*res.Test.Cavitation, m.Cavitation, what))
	case res.Test.Cavitation != nil && !sv.cav:
		w = append(w, cavOutsideObjectiveNote(*res.Test.Cavitation, m.Cavitation))
	}
	if sv.liquid && m.FreeSurface != SurfaceSubmerged {
		var verb string // "" for any other surface, as the lookup it replaces gave
		switch m.FreeSurface {
		case SurfaceNear:
			verb = "runs near"
		case SurfacePiercing:
			verb = "pierces"
		}
		w = append(w, freeSurfaceNote(verb, sv.fl.Froude, m.FroudeDepth))
	}
	return w
}

// cavFirst reports whether the objective is a priority whose first level is
// the cavitation number.
func (sv *solver) cavFirst() bool {
	return sv.cav && !sv.obj.weighted && len(sv.obj.levels) > 0 && sv.obj.levels[0] == gCavitation
}

// cavThenReynolds reports whether the objective is the priority of the
// cavitation number, then the Reynolds number (a vessel's default).
func (sv *solver) cavThenReynolds() bool {
	return sv.cav && !sv.obj.weighted && len(sv.obj.levels) > 1 && sv.obj.levels[0] == gCavitation && sv.obj.levels[1] == gReynolds
}

// cavSpeedCut is the weighted speed search's evaluation of a vessel's grid
// speed u (solver.gridCut): bestOverScales, unless a lower bound on the
// weighted sum of every candidate at u (cavSpeedBound) lies above best's, the
// grid's best so far; the speed then cannot be the grid's best, and it is
// returned unsearched, not usable, its key the bound. Every later step of the
// search reads only the grid's best and its neighbours' speeds, so the answer
// is the same.
func (sv *solver) cavSpeedCut(u float64, best candidate) candidate {
	c := sv.prepare(u)
	if best.ok && c.ok {
		if lb := sv.cavSpeedBound(&c); lb > best.k.v[0] {
			x := candidate{machOrSpeed: u, fail: facilities.ConstraintStaticPressureMax, k: key{q: math.Inf(1)}}
			x.k.v[0] = lb
			return x
		}
	}
	return sv.bestOverScalesAt(&c, true)
}

// cavSpeedBound returns a lower bound on the weighted sum of every candidate
// of a vessel's weighted cavitation search at the set-up c, at any
// temperature in its usable range [ta, tb] and any scale up to sHi; 0 where
// none is shown. Of the sum's terms (each ≥ 0) it bounds two:
//
//   - the cavitation number. The chosen σ is at most σ_hi = (k − p_v)/q − c
//     (k the highest pressure, c = 1 with a stagnation-pressure range, 0
//     where the static pressure is held; staticRange); p_v rises with T and
//     q = ½ρV² is least at an end of the range (ρ concave), so σ_hi ≤
//     (k − p_v(ta))/min(q(ta), q(tb)) − c over the range, and where that lies
//     below σ_full the term is at least wc·ln²(that/σ_full);
//   - the Reynolds number. Re/m = ρV/μ rises with T, so it is at most its
//     value at tb (or the Re/m ceiling, rWaterTop), and the Reynolds number
//     at most that on the largest model; where it falls short of the
//     flight's the term is at least wr·ln²(Re/Re_full).
//
// The water model's monotony and concavity over its range are held by
// facilities.TestWaterSlopesMonotone; outside that range the bound is 0. The
// bound keeps a relative margin of 1e-9 for its rounding, and a term counts
// only where it is above the rounding of a target met (exactTol).
func (sv *solver) cavSpeedBound(c *machSetup) float64 {
	if !sv.obj.weighted || sv.water == nil || !(c.ta >= facilities.WaterMinTemperature && c.tb <= facilities.WaterMaxTemperature) ||
		c.qWaterT[0] != c.ta || c.qWaterT[1] != c.tb || !(c.qWater[0] > 0) || !(c.qWater[1] > 0) {
		return 0
	}
	lb := 0.0
	if wc := sv.obj.w[gCavitation]; wc > 0 {
		sf := sv.fl.Marine.Cavitation
		_, k, cq := sv.cavPressures()
		if pv := sv.water.vapourPressure(c.ta); k > pv {
			if sig := (k-pv)/min(c.qWater[0], c.qWater[1]) - cq; sig < sf {
				if l := math.Log(math.Max(sig, 1e-9*sf) / sf); -l > 2*exactTol {
					lb += wc * l * l
				}
			}
		}
	}
	if wr := sv.obj.w[gReynolds]; wr > 0 {
		if re := c.rWaterTop * sv.sHi * sv.L; re > 0 && re < sv.fl.Reynolds*(1-1e-9) {
			l := math.Log(re / sv.fl.Reynolds)
			lb += wr * l * l
		}
	}
	return lb * (1 - 1e-9)
}

// cavKey is keyOf's weighted key at a water state of the cavitation search
// (met false) with the logarithms its Reynolds and cavitation terms read
// (weightedKey), for cavEndWeighted (TestCavKeyMatchesKeyOf).
func (sv *solver) cavKey(machOrSpeed, s, r, q, v, sig float64) (k key, lnRe, lnSig float64) {
	return sv.weightedKey(machOrSpeed, s, r, q, v, false, sig)
}
