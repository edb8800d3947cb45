package similarity

import "math"

// A Froude-weighted plan in water can meet every target exactly: at speed V the
// scale s = (V/V_flight)² matches the Froude number, and where the water's
// usable temperatures reach the Re/m that scale needs, the Reynolds number is
// met too. Over a band of speeds (one temperature each) the weighted sum is
// then 0, a plateau of exact plans. keyOf makes that sum exactly 0 when every
// target is met within exactTol, so that the lowest q decides among them, and
// the functions below find that plan directly instead of running the nested
// searches over speed and scale across the plateau (docs/planner.md,
// Objectives: the tie rule).

// froudePlateau reports whether the problem can have a plateau of exact plans
// searched by plateauMin: water, a weighted objective with a Froude weight, a
// range of scales, and a flight that moves.
func (sv *solver) froudePlateau() bool {
	return sv.liquid && sv.obj.weighted && sv.obj.w[gFroude] > 0 && sv.kind == scaleRange && sv.fl.Speed() > 0
}

// exactAt returns the candidate at c's speed on the scale that matches the
// flight's Froude number, s = (V/V_flight)², and true when it meets every
// weighted target (its key's sum is exactly 0, keyOf); false otherwise. At
// that speed every plan meeting every target lies within exactTol of that
// scale, and their dynamic pressures differ by a few parts in 1e12: the tie
// rule takes the Froude scale itself.
func (sv *solver) exactAt(c *machSetup) (candidate, bool) {
	if !c.ok {
		return candidate{}, false
	}
	s := sq(c.machOrSpeed / sv.fl.Speed())
	if !(s >= sv.sLo && s <= sv.sHi) {
		return candidate{}, false
	}
	if sv.obj.w[gReynolds] > 0 && !sv.cav {
		// The flight's Re/m at this scale must lie within the Re/m this speed
		// reaches in the usable temperatures (atWater meets a target only
		// there; a load limit or floor narrows that range further).
		if t := sv.fl.Reynolds / (s * sv.L); t < c.rlo || t > c.rWaterTop {
			return candidate{}, false
		}
	}
	x := sv.at(c, s)
	return x, x.ok && x.k.v[0] == 0
}

// plateauMin is gridMin (same arguments) for a Froude-weighted water problem
// (froudePlateau): it first asks at each of the grid's speeds, from the
// lowest, whether a plan meets every target there (exactAt, one candidate
// instead of a golden section over the scales). At the first that does, the
// plateau of exact plans is known to reach this grid point, and the lowest
// speed that still meets every target is found by bisection from the grid
// point below (plateauEdge): there q = ½ρV² is lowest (along the plateau the
// speed falls as the water warms, and with it its density), so that plan wins
// every tie by the key. Where no grid speed meets every target, the grid's
// set-ups are kept and gridMin searches as before; should its best plan
// meet every target (a plateau narrower than a grid cell), it is moved to
// that plateau's lowest speed the same way.
func (sv *solver) plateauMin(eval func(float64) candidate, a, b float64, n int, tol float64, brent, seed bool) candidate {
	n = min(max(n, 3), maxGrid)
	if b <= a {
		n = 1
	}
	eps := tol * math.Max(math.Max(math.Abs(a), math.Abs(b)), b-a)
	// The set-ups escape to the heap (at keeps its set-up's address), as
	// bestOverScales's do: one allocation of n instead of one each.
	cs := make([]machSetup, n)
	for i := range n {
		// The grid's speeds as gridMin computes them.
		u := a
		if n > 1 {
			u = a + (b-a)*float64(i)/float64(n-1)
		}
		cs[i] = sv.prepare(u)
		if x, ok := sv.exactAt(&cs[i]); ok {
			if i == 0 {
				return x
			}
			return sv.plateauEdge(cs[i-1].machOrSpeed, x, eps)
		}
	}
	kept := func(u float64) candidate {
		for i := range n {
			if cs[i].machOrSpeed == u {
				return sv.bestOverScalesAt(&cs[i], false)
			}
		}
		return eval(u)
	}
	best := sv.gridMin(kept, a, b, n, tol, brent, seed, false)
	if !best.ok || best.k.v[0] != 0 {
		return best
	}
	lo := a
	for i := range n {
		if u := cs[i].machOrSpeed; u < best.machOrSpeed {
			lo = math.Max(lo, u)
		}
	}
	return sv.plateauEdge(lo, best, eps)
}

// plateauEdge returns the plan that meets every target at the lowest speed in
// (lo, hi.machOrSpeed], hi being such a plan and lo a speed that has none:
// bisection on whether a speed has one (exactAt), to eps.
func (sv *solver) plateauEdge(lo float64, hi candidate, eps float64) candidate {
	for hi.machOrSpeed-lo > eps {
		m := 0.5 * (lo + hi.machOrSpeed)
		if m <= lo || m >= hi.machOrSpeed {
			break
		}
		c := sv.prepare(m)
		if x, ok := sv.exactAt(&c); ok {
			hi = x
		} else {
			lo = m
		}
	}
	return hi
}

// froudeScaled reports whether the best scale at a speed can come from
// froudeScale: water, a weighted objective whose terms are the Reynolds and
// Froude numbers alone (the Mach number is no target in water), both
// weighted, a range of scales, no load floor, a flight that moves.
func (sv *solver) froudeScaled() bool {
	return sv.liquid && !sv.cav && sv.obj.weighted && sv.obj.w[gReynolds] > 0 && sv.obj.w[gFroude] > 0 &&
		sv.floor == nil && sv.kind == scaleRange && sv.fl.Speed() > 0 && !sv.noExactScale
}

// rulesScaled reports whether, in a gas (an ideal gas or real-gas nitrogen)
// with a weighted objective that has no Froude term, over a range of scales,
// the best scale at each Mach number came exactly from bestInScaleRange's
// rules (where no golden section ran, solve's scaleGolden), and x, the
// search's best, misses the flight's Reynolds number by more than 1e-9 in ln
// Re. The Mach term does not depend on the scale (the aim is held through a
// search), so at one Mach number the best scale by the weighted sum is the
// best by the Reynolds number, then q, which the rules find; and where x
// misses the Reynolds number, it is the one scale that comes closest there,
// no tie on the sum that a lower q could win elsewhere (where the flight's Re
// is met, a band of scales can meet it and the refinement looks along it for
// a lower q: TestRefinePlateau; in nitrogen q is not even monotone along
// that band, warming at p0 min raising it slightly). In nitrogen too the
// set-up at a Mach number does not depend on the scale, and the highest Re/m
// at a scale is its top setting, lowered only by a load limit as the model
// grows: the rules' scale is where s·Re/m is highest, as in an ideal gas
// (TestRulesScaledSkipsRefinementNitrogen).
func (sv *solver) rulesScaled(x candidate) bool {
	return !sv.liquid && sv.obj.weighted && !sv.froudeMatters() &&
		sv.kind == scaleRange && x.ok && math.Abs(math.Log(x.s*sv.L*x.r/sv.fl.Reynolds)) > 1e-9
}

// froudeScale returns the best candidate over the scales at c's speed for a
// water problem weighted on the Reynolds and Froude numbers alone (no
// cavitation term, no load floor), and true; false where it cannot tell, and
// bestOverScalesAt's golden section decides.
//
// With λ = ln s, the Froude term is w_F·(a − λ/2)², a = ln(V/V_f). The
// Reynolds term is w_R·d(λ)², d the signed distance of λ from [λ1, λ2], the
// scales whose flight Re/m, Re/(s·l), the speed reaches in its usable water
// (λ1 = ln(Re/(l·Re/m_top)), λ2 = ln(Re/(l·Re/m_low)); atWater meets the
// target there and caps it at the nearer end outside). Both terms are convex
// in λ, the Froude term strictly: the sum has one minimum, at λ = 2a (the
// Froude scale) where that lies in [λ1, λ2], else at the root of the slope on
// the side it lies, (2·w_R·λi + w_F·a)/(2·w_R + w_F/2), and over [ln sLo,
// ln sHi] at that point moved into the range. A load ceiling can only raise
// the lowest usable Re/m at a scale (warmer water, ρ/μ rising) or rule the
// scale out, so it never lowers the sum: where it leaves the candidate at
// that scale as it is (the ceiling at or above q in the coolest usable
// water), that candidate is the best over the scales with the limit too.
func (sv *solver) froudeScale(c *machSetup) (candidate, bool) {
	if !sv.froudeScaled() || !c.ok || !(c.rlo > 0) || !(c.rlo < c.rWaterTop) {
		return candidate{}, false
	}
	wR, wF, vf := sv.obj.w[gReynolds], sv.obj.w[gFroude], sv.fl.Speed()
	v := c.machOrSpeed
	a := math.Log(v / vf)
	l1 := math.Log(sv.fl.Reynolds / (sv.L * c.rWaterTop))
	l2 := math.Log(sv.fl.Reynolds / (sv.L * c.rlo))
	var s float64
	switch lf := 2 * a; {
	case lf < l1:
		s = math.Exp((2*wR*l1 + wF*a) / (2*wR + wF/2))
	case lf > l2:
		s = math.Exp((2*wR*l2 + wF*a) / (2*wR + wF/2))
	default:
		// The Froude scale, as exactAt takes it.
		s = sq(v / vf)
	}
	s = math.Min(math.Max(s, sv.sLo), sv.sHi)
	qb := sv.loadQ(s, &c.stRef)
	if qb < sv.waterQAt(c, c.ta) {
		return candidate{}, false
	}
	x := sv.atWindow(c, s, sv.fl.Reynolds/(s*sv.L), Window{Lo: 0, Hi: qb})
	return x, x.ok
}
