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
