package similarity

import (
	"math"

	"scalematch/facilities"
)

// bindTol is the relative distance within which a plan counts as sitting on a limit.
const bindTol = 1e-6

// result builds the plan from the best candidate.
func (sv *solver) result(x candidate) *Result {
	f := sv.f
	set := facilities.Setting{StagnationPressure: x.p0, StagnationTemperature: x.t0}
	if sv.liquid {
		set.Speed = x.machOrSpeed
		if sv.held {
			// The facility sets its static pressure: the one chosen (cavitation
			// objective), else held at its maximum.
			set.StagnationPressure, set.StaticPressure = 0, x.ps
		}
	} else {
		set.Mach = x.machOrSpeed
	}
	st, err := f.State(set)
	sv.evals++
	if err != nil {
		// The search only returns settings it has evaluated; keep its figures.
		st = facilities.State{Mach: set.Mach, Speed: x.v, StagnationPressure: x.p0, StagnationTemperature: x.t0,
			DynamicPressure: x.q, ReynoldsPerMeter: x.r}
	}
	s, a := x.s, sv.art
	l := s * a.ReferenceLength
	res := &Result{
		Flight:   sv.fl,
		Model:    a.SizeAt(s, f.TestSection.CrossSection()),
		Setting:  set,
		Test:     TestOn(st, l),
		Warnings: append([]string{}, sv.warnings...),
	}
	if sv.liquid {
		pv := facilities.WaterVapourPressure(st.Static.Temperature)
		res.Test.VapourPressure = &pv
		if sig, ok := WaterCavitation(st); ok {
			res.Test.Cavitation = &sig
		}
	}
	res.Mismatch = Mismatch{
		ReynoldsRatio: res.Test.Reynolds / sv.fl.Reynolds,
	}
	if !sv.noMach {
		d := st.Mach - sv.fl.Mach
		res.Mismatch.MachDifference = &d
		basis := MachBasisFreeStream
		if r := sv.machRatio(st.Mach, s); r != 1 {
			basis = MachBasisCorrected
			dc := st.Mach*r - sv.fl.Mach
			res.Mismatch.CorrectedMachDifference = &dc
		}
		res.Mismatch.MachBasis = &basis
	}
	if sv.liquid || sv.froudeMatters() {
		res.Mismatch.FroudeRatio = res.Test.Froude / sv.fl.Froude
	}
	res.Mismatch.Decide(sv.obj.tol)
	if m := sv.fl.Marine; m != nil && res.Test.Cavitation != nil {
		d := *res.Test.Cavitation - m.Cavitation
		ok := math.Abs(d) <= sv.obj.cavTol*(1+machSlack)+1e-12*m.Cavitation
		res.Mismatch.CavitationDifference, res.Mismatch.CavitationMatched = &d, &ok
		res.Mismatch.CavitationTolerance = sv.obj.cavTol
	}
	res.Binding = sv.bindings(x, st)
	res.Warnings = append(res.Warnings, sv.notes(x, st, res)...)
	res.Cautions = facilities.Cautions(sv.f)
	return res
}

// bindings lists the limits the plan sits on.
func (sv *solver) bindings(x candidate, st facilities.State) []Binding {
	f := sv.f
	bs := make([]Binding, 0, 8)
	on := func(name string, v, lim float64) {
		if math.Abs(v-lim) <= bindTol*math.Abs(lim) {
			bs = append(bs, Binding{Constraint: name, Value: v, Limit: lim})
		}
	}
	if sv.kind == scaleRange {
		width := f.TestSection.Width
		on(facilities.ConstraintSpan, x.s*sv.art.Span/width, sv.spanFraction())
		if f.MaxBlockage != nil {
			on(facilities.ConstraintBlockage, x.s*x.s*sv.art.FrontalArea/f.TestSection.CrossSection(), *f.MaxBlockage)
		}
		if m := sv.p.Model; m.ScaleMax != nil {
			on(facilities.ConstraintScaleMax, x.s, *m.ScaleMax)
		}
		if m := sv.p.Model; m.ScaleMin != nil {
			on(facilities.ConstraintScaleMin, x.s, *m.ScaleMin)
		}
	}
	if f.Mach != nil && !sv.liquid {
		on(facilities.ConstraintMachMin, st.Mach, f.Mach.Min)
		on(facilities.ConstraintMachMax, st.Mach, f.Mach.Max)
	}
	if f.Speed != nil && f.Speed.Min < f.Speed.Max {
		on(facilities.ConstraintSpeedMin, st.Speed, f.Speed.Min)
		on(facilities.ConstraintSpeedMax, st.Speed, f.Speed.Max)
	}
	if sv.cav && sv.held && !f.StaticPressure.Fixed() {
		on(facilities.ConstraintStaticPressureMin, st.Static.Pressure, f.StaticPressure.Min)
		on(facilities.ConstraintStaticPressureMax, st.Static.Pressure, f.StaticPressure.Max)
	}
	if (!sv.liquid || sv.cav && !sv.held) && !f.StagnationPressure.Fixed() {
		on(facilities.ConstraintPressureMin, st.StagnationPressure, f.StagnationPressure.Min)
		on(facilities.ConstraintPressureMax, st.StagnationPressure, f.StagnationPressure.Max)
	}
	if !f.StagnationTemperature.Fixed() {
		on(facilities.ConstraintTempMin, st.StagnationTemperature, f.StagnationTemperature.Min)
		on(facilities.ConstraintTempMax, st.StagnationTemperature, f.StagnationTemperature.Max)
	}
	if f.MaxDynamicPressure != nil {
		on(facilities.ConstraintDynamic, st.DynamicPressure, *f.MaxDynamicPressure)
	}
	if f.MaxReynoldsPerMeter != nil {
		on(facilities.ConstraintReynoldsUnit, st.ReynoldsPerMeter, *f.MaxReynoldsPerMeter)
	}
	switch {
	case sv.floor != nil:
		sv.windowBindings(x.s, st, on)
	case sv.load != nil:
		if qb := sv.load.MaxDynamicPressure(x.s, st); !math.IsInf(qb, 1) {
			on(sv.loadName, st.DynamicPressure, qb)
		}
	}
	if m, near := f.CondensationNear(st, 1e-7); near {
		bs = append(bs, Binding{Constraint: facilities.ConstraintCondensation, Value: m, Limit: 0})
	}
	if m := f.BoilingMargin(st); !math.IsInf(m, 1) && math.Abs(m) <= 1e-7 {
		bs = append(bs, Binding{Constraint: facilities.ConstraintBoiling, Value: m, Limit: 0})
	}
	if m := f.CavitationMargin(st); !sv.cavAllowed && !math.IsInf(m, 1) && math.Abs(m) <= 1e-7 {
		bs = append(bs, Binding{Constraint: facilities.ConstraintCavitation, Value: m, Limit: 0})
	}
	sortBindings(bs)
	return bs
}

// windowBindings reports the load floor and ceiling the plan sits on under a
// load floor: of the load windows that hold the plan's q, the floor binds when
// each of them has it at its floor (none would let q fall), the ceiling when
// each has it at its ceiling; the limit given is the lowest floor or the highest
// ceiling among them.
func (sv *solver) windowBindings(s float64, st facilities.State, on func(name string, v, lim float64)) {
	q := st.DynamicPressure
	lo, hi := math.Inf(1), math.Inf(-1)
	atLo, atHi, any := true, true, false
	for _, w := range sv.floor.Windows(nil, s, st) {
		if q < w.Lo*(1-bindTol) || q > w.Hi*(1+bindTol) {
			continue
		}
		any = true
		lo, hi = math.Min(lo, w.Lo), math.Max(hi, w.Hi)
		atLo = atLo && math.Abs(q-w.Lo) <= bindTol*w.Lo
		atHi = atHi && math.Abs(q-w.Hi) <= bindTol*w.Hi
	}
	if !any {
		return
	}
	if atLo && lo > 0 {
		on(sv.floorName, q, lo)
	}
	if atHi && !math.IsInf(hi, 1) {
		on(sv.loadName, q, hi)
	}
}

// notes returns the plan's warnings.
func (sv *solver) notes(x candidate, st facilities.State, res *Result) []string {
	var w []string
	if !sv.noMach {
		if dc := res.Mismatch.CorrectedMachDifference; dc != nil {
			w = append(w, machCorrectedNote(st.Mach, sv.fl.Mach+*dc))
		}
		if !*res.Mismatch.MachMatched && !sv.obj.weighted && sv.obj.levels[0] == gMach {
			nearest := st.Mach
			if dc := res.Mismatch.CorrectedMachDifference; dc != nil {
				nearest = sv.fl.Mach + *dc
			}
			w = append(w, machReachNote(sv.fl.Mach, nearest))
		}
	}
	if r := res.Mismatch.ReynoldsRatio; r < 1-RatioMatchBand {
		w = append(w, reynoldsShortNote(r, res.Test.Reynolds, sv.fl.Reynolds))
	} else if r > 1+RatioMatchBand {
		w = append(w, reynoldsOverNote(r))
	}
	w = append(w, sv.marineNotes(st, res)...)
	if sv.liquid && !sv.cav {
		w = append(w, "water: the Mach number is not matched and cavitation is not checked; the stagnation pressure is held at its maximum")
	}
	w = append(w, sv.f.Warnings(st)...)
	return w
}
