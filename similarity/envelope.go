package similarity

import (
	"fmt"
	"math"

	"scalematch/facilities"
	"scalematch/internal/check"
)

// TradePoint is one point of a trade curve or envelope: the highest Reynolds number
// a given model reaches at one test Mach number (speed in water) within every limit,
// the setting that reaches it, and the limit that stops it going higher.
type TradePoint struct {
	// Mach is the test Mach number (0 in water).
	Mach float64 `json:"mach"`
	// Speed is the test speed in m/s.
	Speed float64 `json:"speed"`
	// Reynolds is the highest Reynolds number on the model's reference length; 0 when
	// no setting at this Mach number (speed) is within the limits.
	Reynolds float64 `json:"reynolds"`
	// ReynoldsPerMeter is the unit Reynolds number in 1/m at that setting.
	ReynoldsPerMeter float64 `json:"reynolds_per_meter"`
	// StagnationPressure in Pa at that setting.
	StagnationPressure float64 `json:"stagnation_pressure"`
	// StagnationTemperature in K at that setting.
	StagnationTemperature float64 `json:"stagnation_temperature"`
	// DynamicPressure in Pa at that setting.
	DynamicPressure float64 `json:"dynamic_pressure"`
	// Limit names the constraint that caps the Reynolds number here, or, when
	// Reynolds is 0, the one that rules this Mach number (speed) out.
	Limit string `json:"limit"`
}

// trade returns the trade curve of the chosen model at scale s: n points evenly
// spread over the facility's Mach (speed) range. Where set-ups are kept
// (solver.setups, real-gas nitrogen), a point that the search's scan grid
// (feasibleMachOrSpeed) also visits is computed as the scan computes it, so
// that it is the same float64 and reuses the scan's set-up instead of
// preparing a Mach number one rounding away (0.47 and 0.47000000000000003).
func (sv *solver) trade(s float64, n int) []TradePoint {
	pts := make([]TradePoint, n)
	sv.slopeRoot, sv.topOnly = true, true
	sv.ceilHist.reset()
	defer func() { sv.slopeRoot, sv.topOnly = false, false }()
	for i := range pts {
		u := sv.machOrSpeedMin
		switch {
		case n > 1 && sv.setups != nil && i*(scanGrid-1)%(n-1) == 0:
			k := i * (scanGrid - 1) / (n - 1)
			u += (sv.machOrSpeedMax - sv.machOrSpeedMin) * float64(k) / (scanGrid - 1)
		case n > 1:
			u += (sv.machOrSpeedMax - sv.machOrSpeedMin) * float64(i) / float64(n-1)
		}
		pts[i] = sv.tradePoint(u, s)
	}
	return pts
}

// tradePoint is one point of trade.
func (sv *solver) tradePoint(u, s float64) TradePoint {
	tp := TradePoint{Mach: u}
	if sv.liquid {
		tp.Mach, tp.Speed = 0, u
	}
	var c machSetup
	sv.prepareIn(&c, u)
	if c.partial && sv.load != nil && !(sv.loadQ(s, &c.stRef) >= sv.top(&c).q) {
		// The load limit caps q under the top setting here: the candidate
		// reads the whole set-up.
		sv.topOnly = false
		sv.prepareIn(&c, u)
		sv.topOnly = true
	}
	if !sv.liquid && sv.f.Medium.Kind == facilities.MediumNitrogen {
		// The q-ceiling roots kept for topPartial, which only a real-gas
		// nitrogen set-up asks (prepareNitrogen).
		if t := sv.top(&c); c.ok && t.cap == facilities.ConstraintDynamic && !t.edge && !t.fail {
			sv.ceilHist.add(u, sv.qmax, t.p, t.t, sv.joints.at(sv, u, sv.qmax, t.p))
		}
	}
	x := sv.atTarget(&c, s, math.Inf(1))
	if !x.ok {
		tp.Limit = x.fail
		if sv.liquid {
			return tp
		}
		if st, err := sv.state(u, sv.f.StagnationPressure.Min, sv.f.StagnationTemperature.Max); err == nil {
			tp.Speed = st.Speed
		}
		return tp
	}
	tp.Speed = x.v
	tp.Reynolds = x.r * s * sv.L
	tp.ReynoldsPerMeter = x.r
	tp.StagnationPressure = x.p0
	if sv.f.StaticPressure != nil {
		// The facility holds its static pressure; p0 follows, p + q.
		tp.StagnationPressure = sv.f.HeldStaticPressure() + x.q
	}
	tp.StagnationTemperature = x.t0
	tp.DynamicPressure = x.q
	_, tp.Limit = sv.hiOf(&c, x)
	return tp
}

// Envelope returns the highest Reynolds number the facility reaches on a model of
// reference length referenceLength (m) at each of n test Mach numbers (speeds in
// water) evenly spread over its range, within every facility limit (no model-size
// or balance limit), with the limit that caps each. n below 2 means 41. Errors are
// *check.Error: CodeInvalid for a bad facility or length, CodeUnprocessable
// when the facility's Mach and speed ranges do not overlap.
func Envelope(f *facilities.Facility, referenceLength float64, n int) ([]TradePoint, error) {
	if f == nil {
		return nil, check.Invalid("no facility", []check.FieldError{{Field: "facility", Message: "a facility is required"}})
	}
	if !(referenceLength > 0) || math.IsInf(referenceLength, 0) {
		return nil, check.Invalid("invalid reference length", []check.FieldError{{Field: "reference_length",
			Message: fmt.Sprintf("%g m must be a positive, finite length", referenceLength)}})
	}
	if err := f.Validate(); err != nil {
		return nil, err
	}
	if n < 2 {
		n = 41
	}
	sv := &solver{f: f, L: referenceLength, liquid: f.Medium.IsLiquid(), loadScale: 1,
		art: &Article{ReferenceLength: referenceLength}}
	sv.qmax, sv.remax = math.Inf(1), math.Inf(1)
	if f.MaxDynamicPressure != nil {
		sv.qmax = *f.MaxDynamicPressure
	}
	if f.MaxReynoldsPerMeter != nil {
		sv.remax = *f.MaxReynoldsPerMeter
	}
	if err := sv.setURange(); err != nil {
		return nil, err
	}
	return sv.trade(1, n), nil
}

// LowestStagnationTemperature returns the lowest stagnation temperature in K the
// facility can use at free-stream Mach number mach and stagnation pressure p0 (Pa),
// and the limit that sets it: the facility's floor (ConstraintTempMin), the speed
// range (ConstraintSpeedMin), or the condensation rule (ConstraintCondensation) of a
// condensable medium. Cooling a gas raises its Reynolds number per metre, so this is
// the temperature a Reynolds-hungry plan runs at. Gas media only; errors are
// *check.Error (CodeUnprocessable when no temperature in range is usable).
func LowestStagnationTemperature(f *facilities.Facility, mach, p0 float64) (float64, string, error) {
	if f == nil || f.Medium.IsLiquid() {
		return 0, "", check.Invalid("not a gas facility", []check.FieldError{{Field: "facility.medium", Message: "a gas facility is required"}})
	}
	if err := f.Validate(); err != nil {
		return 0, "", err
	}
	if !(mach > 0 && mach <= facilities.MaxSettingMach) || !(p0 > 0) || math.IsInf(p0, 0) {
		return 0, "", check.Invalid("invalid setting", []check.FieldError{{Field: "mach",
			Message: fmt.Sprintf("Mach %g and p0 %g Pa: need 0 < M ≤ %g and a positive pressure", mach, p0, facilities.MaxSettingMach)}})
	}
	fc := *f
	fc.StagnationPressure = facilities.Range{Min: p0, Max: p0}
	sv := &solver{f: &fc, loadScale: 1, qmax: math.Inf(1), remax: math.Inf(1)}
	c := sv.prepare(mach)
	if !c.ok && c.fail != facilities.ConstraintDynamic && c.fail != facilities.ConstraintReynoldsUnit {
		return 0, "", unprocessable(fmt.Sprintf("no stagnation temperature is usable at Mach %g and %g Pa", mach, p0), c.fail)
	}
	t := sv.tfloor(&c, p0)
	switch {
	case c.cond && t > c.ta:
		_, name := sv.floorMargin(&c, p0, t)
		return t, name, nil
	case c.ta > f.StagnationTemperature.Min:
		return t, facilities.ConstraintSpeedMin, nil
	}
	return t, facilities.ConstraintTempMin, nil
}

// topPredicted is the top setting of a trade point's nitrogen set-up c on
// the q ceiling, its p0 the joint step's root started from the curve's last
// q-ceiling roots (ceilingHistory.predict); ok is false when there is no
// prediction inside (pa, pTop) or the step from it fails. q at pTop is not
// asked: it lies above the ceiling when a root lies under pTop, q rising
// with p0 along the T0 floor (TestQAlongFloorRises).
func (sv *solver) topPredicted(c *machSetup) (topSetting, bool) {
	qc := sv.qmax
	if p, t, ok := sv.ceilHist.predict(c.machOrSpeed, qc); ok && p > c.pa && p < c.pTop {
		if pf, ok := sv.ceilingJointFrom(c, qc, p, t, nil); ok {
			return sv.topFinish(c, topSetting{p: pf, cap: facilities.ConstraintDynamic}, qc), true
		}
	}
	return topSetting{}, false
}

// topPartial is the top setting of a trade point's nitrogen set-up c
// (solver.topOnly) without the state at (pa, the T0 floor), which a trade
// point reads only for the start of the q ceiling's root: its p0 comes from
// the curve's last q-ceiling roots instead (ceilingHistory.predict), or the
// top lies on p0 max. Along the T0 floor q rises with p0
// (TestQAlongFloorRises), so either way q at (pa, the floor) lies at or under
// the ceiling and the set-up is usable there: on p0 max, q there is at most
// q at pTop, itself at most the ceiling; on the ceiling, at most q at the
// root found above pa, which its own state puts at or under the ceiling
// (ceilingJointFrom). ok is false when neither holds (the caller then
// completes the set-up as any other).
func (sv *solver) topPartial(c *machSetup) (topSetting, bool) {
	qc := sv.qmax
	if t, ok := sv.topPredicted(c); ok {
		return t, !t.fail
	}
	if sv.qcurve(c, c.pTop) <= qc {
		t := sv.highestSetting(c, qc, facilities.ConstraintDynamic)
		return t, !t.fail
	}
	return topSetting{}, false
}

// ceilingHistory is the trade curve's last q-ceiling roots (p0, T0), at
// rising Mach numbers, from which predict extrapolates the next. p0 is kept
// as y = ln p0 less the logarithm of the p0 at which an ideal gas (γ = 1.4)
// has the ceiling's q at that Mach number, a slowly varying remainder (the
// real gas, the T0 floor), with its derivative in the Mach number where the
// root's joint step is known (jointMemo: from its Jacobian and q's
// derivative in the Mach number, by the implicit function theorem; NaN
// elsewhere). T0 is kept as ln T0 against ln p0 with the condensation
// line's slope there (−MP/MT): on the q ceiling the point lies on the line,
// which does not depend on the Mach number, so T0 is a function of p0.
type ceilingHistory struct {
	n int
	// m the Mach numbers, y and yd the remainder and its derivative in m;
	// lp, lt and lts ln p0, ln T0 and d ln T0 / d ln p0 along the line.
	m, y, yd, lp, lt, lts [ceilingNodes]float64
}

// ceilingNodes is how many roots a ceilingHistory keeps. With three, at the
// trade curve's spacing (Mach 0.018), the prediction lies 1e-10 to 1e-8
// relative from the root in cn2-05's curves (TestCeilingHistoryPredicts; the
// parabola through three roots' ln T0 before: 1e-7 to 1e-5), within the
// joint step's stop (1e-8), so that the step converges in one iteration
// instead of two; farther where the roots before lack derivatives (a scan's
// set-up whose joint point is no longer kept). With two, 1e-8 to 1e-7;
// with four no closer in the plans (the derivatives come from the last
// iteration, up to 1e-8 from its root) at twice the arithmetic.
const ceilingNodes = 3

// idealCeilingLog returns ln p0 at which an ideal gas with γ = 1.4 has the
// dynamic pressure qc at Mach number m: q = 0.7·p0·M²·(1 + 0.2·M²)^−3.5.
func idealCeilingLog(m, qc float64) float64 {
	return math.Log(qc/(0.7*m*m)) + 3.5*math.Log1p(0.2*m*m)
}

// idealCeilingLogSlope is idealCeilingLog's derivative in m.
func idealCeilingLogSlope(m float64) float64 {
	return -2/m + 1.4*m/(1+0.2*m*m)
}

// reset empties h.
func (h *ceilingHistory) reset() { *h = ceilingHistory{} }

// add keeps the q-ceiling root (p0, t0) at Mach number m (ceiling qc), the
// oldest of ceilingNodes dropped; j is the joint step's point found there
// (its figures give the derivatives), or nil.
func (h *ceilingHistory) add(m, qc, p0, t0 float64, j *jointMemo) {
	if h.n > 0 && !(m > h.m[h.n-1]) {
		h.reset()
	}
	if h.n == len(h.m) {
		copy(h.m[:], h.m[1:])
		copy(h.y[:], h.y[1:])
		copy(h.yd[:], h.yd[1:])
		copy(h.lp[:], h.lp[1:])
		copy(h.lt[:], h.lt[1:])
		copy(h.lts[:], h.lts[1:])
		h.n--
	}
	k := h.n
	lp := math.Log(p0)
	h.m[k], h.y[k], h.lp[k], h.lt[k] = m, lp-idealCeilingLog(m, qc), lp, math.Log(t0)
	h.yd[k], h.lts[k] = math.NaN(), math.NaN()
	if j != nil && j.fs.OK {
		fs := &j.fs
		// On the root: QP·dp + QT·dT = −QM·dM and MP·dp + MT·dT = 0.
		dp := -fs.QM * fs.MT / (fs.QP*fs.MT - fs.QT*fs.MP)
		if yd := dp/j.p - idealCeilingLogSlope(m); !math.IsNaN(yd) && !math.IsInf(yd, 0) {
			h.yd[k] = yd
		}
		if s := -fs.MP / fs.MT * j.p / j.t; !math.IsNaN(s) && !math.IsInf(s, 0) {
			h.lts[k] = s
		}
	}
	h.n++
}

// predict returns the q-ceiling root (p0, t0) at Mach number m beyond the
// roots kept: y extrapolated in m, then ln T0 in ln p0, each by the Hermite
// polynomial through the roots kept (their values, and their derivatives
// where known); ok false with fewer than two.
func (h *ceilingHistory) predict(m, qc float64) (p0, t0 float64, ok bool) {
	if h.n < 2 || !(m > h.m[h.n-1]) {
		return 0, 0, false
	}
	y, ok := hermiteAt(h.m[:h.n], h.y[:h.n], h.yd[:h.n], m)
	if !ok {
		return 0, 0, false
	}
	lp := y + idealCeilingLog(m, qc)
	z, ok := hermiteAt(h.lp[:h.n], h.lt[:h.n], h.lts[:h.n], lp)
	if !ok {
		return 0, 0, false
	}
	p0, t0 = math.Exp(lp), math.Exp(z)
	return p0, t0, p0 > 0 && t0 > 0 && !math.IsInf(p0, 0) && !math.IsInf(t0, 0)
}

// hermiteAt returns at x the Hermite interpolating polynomial through the
// nodes xs with values fs and, where ds is not NaN, derivatives ds, by
// Newton's divided differences with each node that has a derivative taken
// twice (Burden & Faires, Numerical Analysis, §3.4); ok false when two nodes
// coincide or the result is not finite, or with more than ceilingNodes nodes.
func hermiteAt(xs, fs, ds []float64, x float64) (float64, bool) {
	if len(xs) > ceilingNodes || len(fs) < len(xs) || len(ds) < len(xs) {
		return 0, false
	}
	// z the nodes, each with a derivative twice; v their values; c the
	// divided differences, first the first ones (a node's derivative
	// between its two copies).
	var z, v, c [2 * ceilingNodes]float64
	n := 0
	for i, xi := range xs {
		z[n], v[n] = xi, fs[i]
		if n > 0 {
			c[n] = (v[n] - v[n-1]) / (xi - z[n-1])
		}
		n++
		if d := ds[i]; d == d {
			z[n], v[n], c[n] = xi, fs[i], d
			n++
		}
	}
	c[0] = v[0]
	for k := 2; k < n; k++ {
		for i := n - 1; i >= k; i-- {
			c[i] = (c[i] - c[i-1]) / (z[i] - z[i-k])
		}
	}
	r := c[n-1]
	for i := n - 2; i >= 0; i-- {
		r = r*(x-z[i]) + c[i]
	}
	return r, !math.IsNaN(r) && !math.IsInf(r, 0)
}
