package similarity

import (
	"math"
	"slices"

	"scalematch/facilities"
)

// condLineCache is what a solver knows of the condensation line of the local
// expansion (facilities.Facility.LocalCondensationMargin) of real-gas
// nitrogen: the margins computed last, by (p0, T0), and the lowest usable T0
// found at each p0, sorted by p0, from which the next p0 starts.
type condLineCache struct {
	local [32]localPoint
	next  int // the entry of local to replace next
	// index holds, by a hash of (p0, T0) (localSlot), 1 + the entry of
	// local kept last at a point of that hash (0: none), and count how many
	// entries of local have that hash, so that a margin kept is mostly found,
	// and one not kept mostly known to be missing, without scanning local
	// (about 570 look-ups a cn2-05 priority plan, most of them hits deep in
	// the ring).
	index, count [localSlots]uint8
	line         []condPoint
	// lo and hi are the T0 range the line was found in.
	lo, hi float64
}

// localPoint is the local condensation margin m at (p0, T0) = (p, t); set:
// the entry holds a point, whose slot of condLineCache.index is h.
type localPoint struct {
	p, t, m float64
	h       uint8
	set     bool
}

// localSlots is the number of slots of condLineCache.index.
const localSlots = 256

// condPoint is the lowest usable T0 in K at p0 in Pa on the condensation line.
type condPoint struct{ p, t float64 }

func newCondLineCache() *condLineCache {
	cc := new(condLineCache)
	cc.reset()
	return cc
}

// reset empties cc, keeping the memory of its line.
func (cc *condLineCache) reset() {
	line := cc.line[:0]
	if cap(line) == 0 {
		line = make([]condPoint, 0, 64)
	}
	*cc = condLineCache{line: line}
}

// localMargin returns the facility's local condensation margin at (p0, T0)
// (facilities.Facility.LocalCondensationMargin), computed once per point.
func (sv *solver) localMargin(p0, t0 float64) float64 {
	if sv.cond == nil {
		return sv.f.LocalCondensationMargin(p0, t0)
	}
	cc := sv.cond
	h := localSlot(p0, t0)
	if p0 > 0 && cc.count[h] > 0 {
		// The entry the index names is the latest kept at (p0, T0) where it
		// holds that point: the one the scan below finds first. With no
		// entry of (p0, T0)'s hash there is none to find.
		if k := cc.index[h]; k > 0 {
			if e := &cc.local[k-1]; e.p == p0 && e.t == t0 {
				return e.m
			}
		}
		// The latest first: a point asked for again was mostly computed
		// lately. A point is kept once, so the order finds the same entry.
		for i := cc.next - 1; i >= 0; i-- {
			if e := &cc.local[i]; e.p == p0 && e.t == t0 {
				return e.m
			}
		}
		for i := len(cc.local) - 1; i >= cc.next; i-- {
			if e := &cc.local[i]; e.p == p0 && e.t == t0 {
				return e.m
			}
		}
	}
	var m float64
	if sv.stags != nil && t0 > 0 && p0 > 0 {
		m = sv.f.LocalCondensationMarginFrom(sv.stags.at(p0, t0))
	} else {
		m = sv.f.LocalCondensationMargin(p0, t0)
	}
	cc.keep(h, p0, t0, m)
	return m
}

// keep puts the margin m at (p0, T0), whose slot is h (localSlot), in place
// of the oldest local margin kept, and names it in the index.
func (cc *condLineCache) keep(h uint8, p0, t0, m float64) {
	e := &cc.local[cc.next]
	if e.set {
		cc.count[e.h]--
	}
	*e = localPoint{p: p0, t: t0, m: m, h: h, set: true}
	cc.count[h]++
	cc.index[h] = uint8(cc.next + 1)
	cc.next = (cc.next + 1) % len(cc.local)
}

// localSlot is the slot of condLineCache.index for the point (p0, T0): the
// high bits of a multiplicative hash of their bits.
func localSlot(p0, t0 float64) uint8 {
	x := math.Float64bits(p0)*0x9e3779b97f4a7c15 ^ math.Float64bits(t0)*0xc2b2ae3d27d4eb4f
	return uint8(x >> 56)
}

// localMarginSlope is localMargin with the margin's derivative in T0
// (facilities.Facility.LocalCondensationMarginSlope); the margin is kept as
// localMargin keeps it.
func (sv *solver) localMarginSlope(p0, t0 float64) (m, dm float64) {
	m, dm = sv.f.LocalCondensationMarginSlope(p0, t0)
	if cc := sv.cond; cc != nil {
		cc.keep(localSlot(p0, t0), p0, t0, m)
	}
	return m, dm
}

// condLine returns the lowest T0 in [lo, hi] at p0 at which the local
// expansion keeps the condensation margin allowed (sv.condMin), by rootHi's
// rule: lo when it is usable, hi when nothing is, else the usable side of the
// crossing within 1e-13 relative. It starts from the line found at the nearest
// p0 before (rootFrom), and keeps what it finds.
func (sv *solver) condLine(p0, lo, hi float64) float64 {
	cc := sv.cond
	g := func(t float64) float64 { return sv.localMargin(p0, t) - sv.condMin }
	if len(cc.line) > 0 && (cc.lo != lo || cc.hi != hi) {
		return sv.rootHi(g, lo, hi, true)
	}
	cc.lo, cc.hi = lo, hi
	i, found := cc.lineIndex(p0)
	if found {
		return cc.line[i].t
	}
	var t float64
	switch {
	case len(cc.line) == 0:
		t = sv.rootHi(g, lo, hi, true)
	default:
		t = sv.newtonFrom(g, p0, cc.guess(i, p0), lo, hi)
	}
	cc.line = slices.Insert(cc.line, i, condPoint{p0, t})
	return t
}

// guess returns the T0 of the line at p0, to be inserted at i, by linear
// inter- or extrapolation from the nearest two points found.
func (cc *condLineCache) guess(i int, p0 float64) float64 {
	n := len(cc.line)
	if n == 1 {
		return cc.line[0].t
	}
	j := min(max(i-1, 0), n-2)
	a, b := cc.line[j], cc.line[j+1]
	return a.t + (b.t-a.t)*(p0-a.p)/(b.p-a.p)
}

// newtonFrom is rootFrom for the condensation line at p0 (g the local margin
// less the allowed minimum): Newton steps with the margin's derivative in T0
// from the guess x0. Once a step is below 1e-8 relative the iterate is the
// crossing to within rounding (the error of a Newton step is of the order of its
// square); the point returned lies 2e-15 relative above it, on the usable side
// (checked: g ≥ 0 there), well within rootHi's 1e-13. Anything else (no
// derivative, a step out of [lo, hi], no convergence in 4 steps, the check
// failing) falls back to rootFrom from x0.
func (sv *solver) newtonFrom(g func(float64) float64, p0, x0, lo, hi float64) float64 {
	x := math.Min(math.Max(x0, lo), hi)
	for range 4 {
		m, dm := sv.localMarginSlope(p0, x)
		if !(dm > 0) || math.IsInf(dm, 0) {
			break
		}
		dx := -(m - sv.condMin) / dm
		xn := x + dx
		if !(xn > lo && xn < hi) {
			break
		}
		if math.Abs(dx) <= 1e-8*xn {
			xn *= 1 + 2e-15
			if xn < hi && g(xn) >= 0 {
				return xn
			}
			break
		}
		x = xn
	}
	return sv.rootFrom(g, x0, lo, hi)
}

// rootFrom is rootHi for an increasing g started from a guess x0 of the
// crossing: a step of 1e-4 relative toward it, and steps of half again the
// secant's distance past it, bracket the crossing; the Illinois iteration then
// narrows the bracket to 1e-13 relative. It returns what rootHi returns: lo
// when g(lo) ≥ 0, hi when g(hi) < 0, else the usable end of the final bracket.
// Without a bracket after 8 steps it falls back to rootHi over [lo, hi].
func (sv *solver) rootFrom(g func(float64) float64, x0, lo, hi float64) float64 {
	clamp := func(x float64) float64 { return math.Min(math.Max(x, lo), hi) }
	x0 = clamp(x0)
	f0 := g(x0)
	step := 1e-4 * math.Abs(x0)
	if step == 0 {
		step = 1e-4 * (hi - lo)
	}
	for range 8 {
		dir := 1.0
		if f0 >= 0 {
			if x0 == lo {
				return lo
			}
			dir = -1
		} else if x0 == hi {
			return hi
		}
		x1 := clamp(x0 + dir*step)
		f1 := g(x1)
		switch {
		case f0 < 0 && f1 >= 0:
			return illinois(g, x0, f0, x1, f1)
		case f0 >= 0 && f1 < 0:
			return illinois(g, x1, f1, x0, f0)
		}
		next := 2 * step
		if den := f1 - f0; den != 0 && !math.IsInf(den, 0) {
			if est := -f1 * (x1 - x0) / den; est*dir > 0 {
				next = 1.5 * math.Abs(est)
			}
		}
		step, x0, f0 = next, x1, f1
	}
	return sv.rootHi(g, lo, hi, true)
}

// lineIndex returns where p0 lies in the condensation line found so far: the
// index of its point, found, or where it would be inserted.
// It is slices.BinarySearchFunc with the order of p0 (a NaN equal to
// every p0) written out: the generic search's comparison through a function
// value cost about 30 instructions a probe, 29k a cn2-05 priority plan.
func (cc *condLineCache) lineIndex(p0 float64) (int, bool) {
	line := cc.line
	i, j := 0, len(line)
	for i < j {
		h := int(uint(i+j) >> 1)
		if line[h].p < p0 {
			i = h + 1
		} else {
			j = h
		}
	}
	return i, i < len(line) && !(line[i].p > p0)
}

// ceilingJoint returns the p0 at which q on the T0 floor at c's Mach number
// meets the ceiling qc (qa at p0 min below it, qTop at pTop above it), as
// highestSetting's root in p0 along the condensation line does, but by
// Newton's method in (p0, T0) on the two equations together: q(p0, T0) = qc
// and the local condensation margin = condMin (facilities.NitrogenFloorSlopes
// gives both with their derivatives), so that the p0 it passes through need
// no converged point of the line each. It starts from the secant across
// [pa, pTop] and the line interpolated there, and stops after a step below
// 1e-8 relative in both (the error is then of the order of its square). The
// p0 returned lies 4e-15 relative below the crossing, its T0 on the line
// there jointAbove relative above it; both are checked as the search checks
// them (the local margin, the free stream's floorMargin, q ≤ qc, each from
// its own state, whose expansions start from the last iterate's), and the
// point joins the line. ok is false where the T0 floor is not
// the condensation line alone (a speed range, no condensation, another T0
// range than the line's), when the iteration leaves [pa, pTop] × [ta, tb] or
// does not converge in 6 steps, or when a check fails: the caller then finds
// the root in p0 as before.
func (sv *solver) ceilingJoint(c *machSetup, qc, qa, qTop float64) (float64, bool) {
	if !(qa < qc && qc < qTop) {
		return 0, false
	}
	if j := sv.joints.near(sv, c.machOrSpeed, qc); j != nil {
		// A point found lately lies at a Mach number within 1e-6 relative:
		// its iterate is within about 3e-6 of this root, and its expansions
		// start this one's.
		if p, ok := sv.ceilingJointFrom(c, qc, j.p, j.t, &j.fs); ok {
			return p, true
		}
	}
	if sv.topOnly && !sv.noTopPredict {
		// A trade point whose set-up was not partial (a scan's set-up kept
		// with its top left to its readers, or one above the condensation
		// peak): the trade curve's last roots predict this one as they do
		// for topPartial, within the step's stop where they have their
		// derivatives, where the secant across [pa, pTop] is 1e-3 to 1e-2
		// off and takes two or three iterations.
		if p, t, ok := sv.ceilHist.predict(c.machOrSpeed, qc); ok && p > c.pa && p < c.pTop {
			if p, ok := sv.ceilingJointFrom(c, qc, p, t, nil); ok {
				return p, true
			}
		}
	}
	return sv.ceilingJointFrom(c, qc, c.pa+(c.pTop-c.pa)*(qc-qa)/(qTop-qa), math.NaN(), nil)
}

// jointAbove is how far, relative, ceilingJointFrom puts its point's T0
// above the condensation line: the check's local margin comes from an
// expansion started from the last iterate's (StagnationNearLocal), which
// agrees with LocalCondensationMargin's own start to within 2e-15
// (facilities' TestStagnationNearLocal; 1.3e-15 measured), so the point lies
// on the line's usable side by either; 2e-14 is inside the roots' 1e-13.
const jointAbove = 2e-14

// jointTradeStop is ceilingJointFrom's stop, the relative step after which
// it ends, on the trade curve (sv.topOnly; 1e-8 elsewhere). The curve is a
// chart of each Mach number's highest Reynolds number, read to a few
// figures: Newton's error after a step of 1e-6 is of the order of 1e-12,
// and its points lie within 1e-12 relative of those stopped at 1e-8
// (TestTradeJointStop; moved jointTradeInside inside), while a third of the curve's
// q-ceiling roots end an iteration sooner (those started from the secant
// across [pa, pTop] and from a prediction 1e-8 to 1e-6 off). The checks
// after the iteration (the local margin, the free stream's, q under the
// ceiling, each from its own state) are the same either way, so that
// every point stays usable.
const jointTradeStop = 1e-6

// jointTradeInside is how far, relative, a trade point's q-ceiling root
// stopped at jointTradeStop is moved inside (p0 below the root, T0 above
// the line), in place of 4e-15 and jointAbove: the root's error, up to
// about 1e-13 (5.5e-14 found), and the own-start expansions' of a reader's
// check (facilities.State), kept on the usable side.
const jointTradeInside = 1.5e-13

// jointNear is the largest relative distance in Mach number from the last
// q-ceiling point found at which ceilingJoint starts from it (jointMemo).
const jointNear = 1e-6

// jointMemos are the last q-ceiling points ceilingJointFrom found, next the
// one to replace.
type jointMemos struct {
	e    [4]jointMemo
	next int
}

// near returns the point kept nearest to Mach number m, for the ceiling qc
// and sv's condensation limit and line, within jointNear; nil for none.
func (js *jointMemos) near(sv *solver, m, qc float64) *jointMemo {
	var best *jointMemo
	for i := range js.e {
		j := &js.e[i]
		if j.ok && j.cond == sv.cond && j.qc == qc && j.condMin == sv.condMin && math.Abs(m-j.mach) <= jointNear*m &&
			(best == nil || math.Abs(m-j.mach) < math.Abs(m-best.mach)) {
			best = j
		}
	}
	return best
}

// at returns the point kept at Mach number m exactly, for the ceiling qc and
// sv's condensation limit and line, whose p0 is p within 1e-12 relative (the
// root a set-up's top setting holds); nil for none.
func (js *jointMemos) at(sv *solver, m, qc, p float64) *jointMemo {
	for i := range js.e {
		j := &js.e[i]
		if j.ok && j.mach == m && j.cond == sv.cond && j.qc == qc && j.condMin == sv.condMin && math.Abs(j.p-p) <= 1e-12*p {
			return j
		}
	}
	return nil
}

// put keeps j in place of the oldest.
func (js *jointMemos) put(j jointMemo) {
	js.e[js.next] = j
	js.next = (js.next + 1) % len(js.e)
}

// jointMemo is a q-ceiling point ceilingJointFrom found: the Mach
// number, ceiling, condensation limit and line it was found for, its last
// iterate (p, t) and the figures of its last iteration, from which the
// expansions of a start there begin (facilities.NitrogenFloorSlopes' prev).
type jointMemo struct {
	ok                bool
	mach, qc, condMin float64
	cond              *condLineCache
	p, t              float64
	fs                facilities.FloorSlopes
}

// ceilingJointFrom is ceilingJoint's Newton iteration and checks from the
// start (p, t) in (p0, T0) (t NaN: the line interpolated at p), the first
// iteration's expansions started from from's where given.
func (sv *solver) ceilingJointFrom(c *machSetup, qc, p, t float64, from *facilities.FloorSlopes) (float64, bool) {
	cc := sv.cond
	if !c.cond || c.vmin != 0 || cc == nil || len(cc.line) == 0 || cc.lo != c.ta || cc.hi != c.tb {
		return 0, false
	}
	i, found := cc.lineIndex(p)
	if found {
		return 0, false
	}
	if !(t > c.ta && t < c.tb) {
		t = cc.guess(i, p)
	}
	var fs, prev facilities.FloorSlopes
	converged := false
	loose := sv.topOnly && !sv.noTradeStop
	below, above := 4e-15, jointAbove
	var pk, tk, last float64 // where fs was found, and the last step
	for k := range 6 {
		pp := from
		if k > 0 {
			pp = &prev
		}
		fs = sv.f.NitrogenFloorSlopes(p, t, c.machOrSpeed, pp)
		sv.evals++
		if !fs.OK {
			return 0, false
		}
		f1, f2 := fs.Q-qc, fs.M-sv.condMin
		det := fs.QP*fs.MT - fs.QT*fs.MP
		dp := (f1*fs.MT - f2*fs.QT) / det
		dt := (fs.QP*f2 - fs.MP*f1) / det
		if !(det != 0) || math.IsNaN(dp) || math.IsNaN(dt) {
			return 0, false
		}
		pk, tk = p, t
		p, t = p-dp, t-dt
		last = max(math.Abs(dp)/p, math.Abs(dt)/t)
		if !(p > c.pa && p < c.pTop && t > c.ta && t < c.tb) {
			return 0, false
		}
		prev = fs
		stop := 1e-8
		if loose {
			stop = jointTradeStop
		}
		if math.Abs(dp) <= stop*p && math.Abs(dt) <= stop*t {
			converged = true
			break
		}
	}
	if !converged || !(fs.MT > 0) {
		return 0, false
	}
	if loose {
		// The root's error after the looser stop, up to about 1e-13, kept
		// on the usable side.
		below, above = jointTradeInside, jointTradeInside
	}
	pf := p * (1 - below)
	tf := (t - fs.MP/fs.MT*(pf-p)) * (1 + above)
	if sv.stags != nil && pf > 0 && tf > 0 {
		// The checks' expansions (the free stream and the local one) start
		// from the last iterate's, carried to (pf, tf): one Newton step each
		// instead of two or three.
		fs.StagnationNearLocalIn(sv.stags.slot(pf, tf), pf, tf)
	}
	if !(pf > c.pa && tf < c.tb) {
		return 0, false
	}
	if loose && last <= 1e-8 {
		// On the trade curve, after a last step the search's stop would also
		// have ended on, the local margin at the point is the iteration's
		// carried to it to first order (the error of the order of the
		// step's square, 1e-16, against the point's jointTradeInside on the
		// usable side), kept for the point's readers, instead of its own
		// expansion: one state a point.
		m := fs.M + fs.MP*(pf-pk) + fs.MT*(tf-tk)
		if !(m >= sv.condMin) {
			return 0, false
		}
		cc.keep(localSlot(pf, tf), pf, tf, m)
	} else if sv.localMargin(pf, tf) < sv.condMin {
		return 0, false
	}
	if m, _ := sv.floorMargin(c, pf, tf); m < 0 {
		return 0, false
	}
	st, err := sv.state(c.machOrSpeed, pf, tf)
	if err != nil || st.DynamicPressure > qc {
		return 0, false
	}
	if i, found = cc.lineIndex(pf); found {
		return 0, false
	}
	cc.line = slices.Insert(cc.line, i, condPoint{pf, tf})
	sv.joints.put(jointMemo{ok: true, mach: c.machOrSpeed, qc: qc, condMin: sv.condMin, cond: cc, p: p, t: t, fs: fs})
	return pf, true
}
