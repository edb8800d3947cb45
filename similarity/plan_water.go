package similarity

import (
	"math"

	"scalematch/facilities"
)

// waterMemo keeps the properties of water at the temperatures a plan met
// last, in a small table indexed by a hash of the temperature, two ways to a
// set: water's density, viscosity and vapour pressure depend on the
// temperature alone, and the planner asks for the same few temperatures (the
// ends of the usable T0 range) at every speed, in the search, the trade curve
// and every re-solve. A solver's relaxed copies share it.
type waterMemo struct {
	t    [waterMemoSize]float64 // 0: unset (no water state is at 0 K)
	rho  [waterMemoSize]float64 // kg/m³ (facilities.WaterDensity)
	mu   [waterMemoSize]float64 // Pa·s (facilities.WaterViscosity)
	pv   [waterMemoSize]float64 // Pa (facilities.WaterVapourPressure), once pvOK
	pvOK [waterMemoSize]bool
}

// waterMemoSize is the number of temperatures a waterMemo keeps.
const waterMemoSize = 16

// slot returns the index of temperature t in the table, computing the density
// and viscosity there when t is not kept. A temperature hashes to a set of two
// slots, 2h and 2h + 1: a new one takes the first, its former occupant moves
// to the second, so that two temperatures of one set asked for in turn (cvt-07's
// ends of the T0 range, 281.15 and 307.15 K) both stay kept.
func (m *waterMemo) slot(t float64) int {
	i := int((math.Float64bits(t)*0x9e3779b97f4a7c15)>>(64-3)) * 2
	switch t {
	case m.t[i]:
		return i
	case m.t[i+1]:
		return i + 1
	}
	j := i + 1
	m.t[j], m.rho[j], m.mu[j], m.pv[j], m.pvOK[j] = m.t[i], m.rho[i], m.mu[i], m.pv[i], m.pvOK[i]
	rho := facilities.WaterDensity(t)
	m.t[i], m.rho[i], m.mu[i], m.pvOK[i] = t, rho, facilities.WaterViscosity(t, rho), false
	return i
}

// vapourPressure returns facilities.WaterVapourPressure(t), kept.
func (m *waterMemo) vapourPressure(t float64) float64 {
	i := m.slot(t)
	if !m.pvOK[i] {
		m.pv[i], m.pvOK[i] = facilities.WaterVapourPressure(t), true
	}
	return m.pv[i]
}

// waterStateKept returns facilities.Facility.State of a water facility at
// speed v, stagnation pressure p0 and temperature t, with the water's
// properties from the memo, and true; false where State would refuse the
// setting or the facility holds its static pressure and p0 is given (the
// caller then asks State). Where the facility holds its static pressure p
// (HeldStaticPressure) and p0 is 0, p0 is p + q, as State sets it. The State
// is built by facilities.LiquidState, as State builds it
// (TestWaterStateKeptMatchesFacility).
func (sv *solver) waterStateKept(v, p0, t float64) (facilities.State, bool) {
	var st facilities.State
	ok := sv.waterStateKeptIn(&st, v, p0, t)
	return st, ok
}

// waterStateKeptIn is waterStateKept into *st (facilities.LiquidStateIn);
// where it returns false, *st is not the state (left as it was, or zero).
func (sv *solver) waterStateKeptIn(st *facilities.State, v, p0, t float64) bool {
	held := sv.f.StaticPressure != nil
	if held {
		if p0 != 0 {
			return false
		}
		p0 = sv.f.HeldStaticPressure()
	}
	if !(p0 > 0) || math.IsInf(p0, 1) || !(v >= 0) || math.IsInf(v, 1) ||
		!(t >= facilities.WaterMinTemperature && t <= facilities.WaterMaxTemperature) {
		return false
	}
	m := sv.water
	i := m.slot(t)
	if held {
		p0 += 0.5 * m.rho[i] * v * v
	}
	return facilities.LiquidStateIn(st, v, p0, t, m.rho[i], m.mu[i])
}

// boilingMargin is facilities.Facility.BoilingMargin of a water state st, with
// the vapour pressure from the memo when the solver keeps one (st read
// through a pointer: a State passed by value is twelve numbers copied).
func (sv *solver) boilingMargin(st *facilities.State) float64 {
	if sv.water == nil || !(st.StagnationTemperature > 0) {
		return sv.f.BoilingMargin(*st)
	}
	return st.StagnationPressure/sv.water.vapourPressure(st.StagnationTemperature) - 1
}

// cavitationMargin is facilities.Facility.CavitationMargin of a water state
// st, with the vapour pressure from the memo when the solver keeps one.
func (sv *solver) cavitationMargin(st *facilities.State) float64 {
	if sv.water == nil || !(st.Static.Temperature > 0) {
		return sv.f.CavitationMargin(*st)
	}
	return st.Static.Pressure/sv.water.vapourPressure(st.Static.Temperature) - 1
}
