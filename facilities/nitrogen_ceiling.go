package facilities

import "math"

// FloorSlopes is what the planner's joint Newton step on the q ceiling along
// nitrogen's condensation line needs at one stagnation state (p0, T0) and test
// Mach number (NitrogenFloorSlopes): the free stream's dynamic pressure and the
// local condensation margin, each with its derivatives in p0 and T0, and the two
// static states found, from which the next stagnation state's expansions start.
type FloorSlopes struct {
	// Q is the free stream's dynamic pressure in Pa, QP its derivative in p0
	// (Pa/Pa) and QT in T0 (Pa/K).
	Q, QP, QT float64
	// QM is the free stream's dynamic pressure's derivative in the test Mach
	// number at fixed p0 and T0 (Pa).
	QM float64
	// M is LocalCondensationMargin, MP its derivative in p0 (1/Pa) and MT in
	// T0 (1/K).
	M, MP, MT float64
	// OK is false when an expansion left the gas phase (or the medium is not
	// nitrogen): the figures above are then 0.
	OK bool

	p0, t0     float64
	mach, peak float64      // the test Mach number and the condensation peak Mach number
	free       staticSlopes // the free stream at the test Mach number
	local      staticSlopes // the local expansion to the condensation peak Mach number
}

// StagnationNear returns the stagnation state at (p0, t0) (NitrogenStagnation)
// with fs's free-stream static state carried to it to first order as the
// start of its expansion to fs's Mach number: StateFrom at that Mach number
// from it then takes one Newton step where (p0, t0) is within about 1e-8
// relative of fs's stagnation state (the first-order start is then within
// about 1e-16), against two or three from the start of nitrogenExpand, and
// gives State's figures to the expansion's convergence (a few 1e-15
// relative: the isentrope's resolution in ρ), not to the bit. The local
// expansion (LocalCondensationMarginFrom) starts as from NitrogenStagnation,
// and so does the free stream at 0.99 of the condensation peak Mach number
// and above: a planner puts a setting on the condensation line 2e-15 above
// the crossing and checks it by its local margin, which must be State's to
// the bit; up to 0.99 of the peak the free stream's margin lies above the
// local one by far more than a few 1e-15 (TestFreeStreamMarginAboveLocal).
// Without fs's figures (not OK) it is NitrogenStagnation.
func (fs *FloorSlopes) StagnationNear(p0, t0 float64) Stagnation {
	var g Stagnation
	fs.stagnationNearIn(&g, p0, t0)
	return g
}

// stagnationNearIn sets *g to StagnationNear(p0, t0), in place.
func (fs *FloorSlopes) stagnationNearIn(g *Stagnation, p0, t0 float64) {
	NitrogenStagnationIn(g, p0, t0)
	if !fs.OK || !(fs.mach < 0.99*fs.peak) {
		return
	}
	if T, rho, ok := fs.free.start(p0-fs.p0, t0-fs.t0); ok {
		g.start = expansionStart{mach: fs.mach, T: T, rho: rho}
	}
}

// StagnationNearLocal is StagnationNear with the local expansion's static
// state of fs carried to (p0, t0) to first order as well, the start of the
// expansion to the condensation peak Mach number: LocalCondensationMarginFrom
// from it takes one Newton step where (p0, t0) is within about 1e-8 relative
// of fs's stagnation state, against two or three from its own start, and
// gives LocalCondensationMargin's figure to the expansion's convergence
// (within 2e-15: TestStagnationNearLocal), not to the bit. A planner that
// checks a setting by it puts the setting further above the condensation
// line than that (similarity's ceilingJointFrom: 2e-14 relative in T0).
func (fs *FloorSlopes) StagnationNearLocal(p0, t0 float64) Stagnation {
	var g Stagnation
	fs.StagnationNearLocalIn(&g, p0, t0)
	return g
}

// StagnationNearLocalIn sets *g to StagnationNearLocal(p0, t0), in place
// (NitrogenStagnationIn).
func (fs *FloorSlopes) StagnationNearLocalIn(g *Stagnation, p0, t0 float64) {
	fs.stagnationNearIn(g, p0, t0)
	if !fs.OK {
		return
	}
	if T, rho, ok := fs.local.start(p0-fs.p0, t0-fs.t0); ok {
		g.local = expansionStart{mach: fs.peak, T: T, rho: rho}
	}
}

// staticSlopes is a static state (T in K, ρ in kg/m³) of an expansion from
// (p0, T0) and its derivatives in p0 (…P) and T0 (…T).
type staticSlopes struct {
	T, rho, TP, rhoP, TT, rhoT float64
}

// start returns the start of the next expansion from (p0, t0): the state of s
// carried to first order, or ok false when there is none.
func (s *staticSlopes) start(dp, dt float64) (T, rho float64, ok bool) {
	if !(s.T > 0) {
		return 0, 0, false
	}
	T = s.T + s.TP*dp + s.TT*dt
	rho = s.rho + s.rhoP*dp + s.rhoT*dt
	return T, rho, T > 0 && rho > 0
}

// NitrogenFloorSlopes returns, for nitrogen at stagnation pressure p0 in Pa and
// temperature t0 in K, the free stream's dynamic pressure at Mach number mach
// and the local condensation margin (LocalCondensationMargin), each with its
// derivatives in p0 and t0: the residuals and the Jacobian of a Newton step on
// the q ceiling along the condensation line. The derivatives follow from the
// real-gas isentrope by implicit differentiation (as nitrogenExpandSlope's):
// the stagnation density moves with p0 as 1/(∂p/∂ρ)_T and with T0 as
// −(∂p/∂T)_ρ/(∂p/∂ρ)_T, the entropy and enthalpy with it, and the static
// (T, ρ) as the Jacobian of the expansion's equations solved for that change;
// q = ½·M²·ρ·a². q's derivative in the Mach number (QM) follows the same way
// from the energy equation's ½M²a² (the trade curve's prediction of its next
// q-ceiling root uses it). When prev holds the figures of a nearby stagnation state,
// each expansion starts from prev's static state carried to (p0, t0) to first
// order, which saves Newton steps; the figures are the same to the expansion's
// convergence (about 1e-16 relative) either way, not to the bit.
func (f *Facility) NitrogenFloorSlopes(p0, t0, mach float64, prev *FloorSlopes) FloorSlopes {
	out := FloorSlopes{p0: p0, t0: t0}
	if f.Medium.Kind != MediumNitrogen || !(t0 > 0 && p0 > 0 && mach > 0) {
		return out
	}
	rho0 := nitrogenDensity(t0, p0)
	var n0 n2Props
	n0.at(t0, rho0)
	if !n0.valid {
		return out
	}
	// The stagnation entropy and enthalpy's derivatives in p0 (at fixed T0) and
	// in T0 (at fixed p0).
	hRho0 := (n0.pRho - t0*n0.pT/rho0) / rho0
	drP := 1 / n0.pRho
	dsP, dhP := -n0.pT/(rho0*rho0)*drP, hRho0*drP
	drT := -n0.pT / n0.pRho
	dsT, dhT := n0.cv/t0-n0.pT/(rho0*rho0)*drT, n0.cv+n0.pT/rho0+hRho0*drT

	// expand writes the static state at Mach number m and its slopes into
	// ss, its properties into n (both the caller's: a 48-byte staticSlopes
	// and an 88-byte n2Props returned by value were copied on the way).
	expand := func(m float64, last *staticSlopes, ss *staticSlopes, n *n2Props) bool {
		var T, rho float64
		var ok bool
		if prev != nil && prev.OK {
			if T, rho, ok = last.start(p0-prev.p0, t0-prev.t0); ok {
				T, rho, ok = nitrogenNewton(&n0, m, 0, T, rho, nitrogenMaxSteps, n)
			}
		}
		if !ok {
			T, rho, ok = nitrogenExpand(t0, rho0, &n0, m, 0, nitrogenMaxSteps, n)
		}
		if !ok {
			return false
		}
		m2 := m * m
		j11, j12 := n.cv/T, -n.pT/(rho*rho)
		j21, j22 := n.cv+n.pT/rho+0.5*m2*n.a2T, (n.pRho-T*n.pT/rho)/rho+0.5*m2*n.a2Rho
		det := j11*j22 - j12*j21
		if det == 0 || math.IsNaN(det) {
			return false
		}
		ss.T, ss.rho = T, rho
		ss.TP = (dsP*j22 - dhP*j12) / det
		ss.rhoP = (j11*dhP - j21*dsP) / det
		ss.TT = (dsT*j22 - dhT*j12) / det
		ss.rhoT = (j11*dhT - j21*dsT) / det
		return true
	}
	var lastFree, lastLocal *staticSlopes
	if prev != nil {
		lastFree, lastLocal = &prev.free, &prev.local
	}
	// The static states are written in place, in out (as failed, without
	// them, where an expansion fails).
	var nf, nl n2Props
	free, local := &out.free, &out.local
	if !expand(mach, lastFree, free, &nf) {
		return FloorSlopes{p0: p0, t0: t0}
	}
	peak := f.condensationPeakMach()
	if !expand(peak, lastLocal, local, &nl) || !(nl.p > 0) {
		return FloorSlopes{p0: p0, t0: t0}
	}
	// q = ½·M²·ρ·a², a² = a²(T, ρ).
	hm2 := 0.5 * mach * mach
	dq := func(dT, dr float64) float64 {
		return hm2 * (nf.a2*dr + free.rho*(nf.a2T*dT+nf.a2Rho*dr))
	}
	out.Q = hm2 * free.rho * nf.a2
	out.QP, out.QT = dq(free.TP, free.rhoP), dq(free.TT, free.rhoT)
	// In the Mach number at fixed (s0, h0) the energy equation's ½M²a² moves
	// by M·a²: the free stream's (T, ρ) by the expansion's Jacobian (as in
	// expand) solved for that.
	{
		T, rho := free.T, free.rho
		j11, j12 := nf.cv/T, -nf.pT/(rho*rho)
		j21, j22 := nf.cv+nf.pT/rho+hm2*nf.a2T, (nf.pRho-T*nf.pT/rho)/rho+hm2*nf.a2Rho
		ma2 := mach * nf.a2 / (j11*j22 - j12*j21)
		out.QM = 2*out.Q/mach + dq(ma2*j12, -j11*ma2)
	}
	// m = T/T_sat(p) − 1, dT_sat/dp = T_sat²/(B·p) below the critical pressure.
	tsat, below := f.Medium.SaturationTemperature(nl.p)
	dm := func(dT, dr float64) float64 {
		d := dT / tsat
		if below {
			d -= local.T * (nl.pT*dT + nl.pRho*dr) / (nitrogenClausiusB * nl.p)
		}
		return d
	}
	out.M = local.T/tsat - 1
	out.MP, out.MT = dm(local.TP, local.rhoP), dm(local.TT, local.rhoT)
	out.OK = true
	out.mach, out.peak = mach, peak
	return out
}
