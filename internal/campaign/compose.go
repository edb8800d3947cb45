package campaign

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"sync/atomic"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// final is a condition's final plan in its facility.
type final struct {
	pt  point
	res *similarity.Result
	// before is the closeness and ratio before level sharing.
	beforeRatio float64
	shared      bool
	excluded    []Exclusion
}

// compose makes every condition's final plan at the chosen scales, shares
// levels, orders the runs and assembles the Result.
func (e *engine) compose(scales []float64, origins []string, progress func(int)) (*Result, error) {
	pr := e.pr
	n, nf := len(pr.conds), len(pr.facs)
	fin := make([]final, n)
	var done atomic.Int64
	each(n, func(ci int) {
		if e.ctx.Err() != nil {
			return
		}
		b := final{pt: point{fi: -1}}
		for fi := range nf {
			var res *similarity.Result
			var err error
			switch {
			case scales[fi] == 0:
				err = e.ownErr[ci][fi]
				if err == nil {
					err = &check.Error{Code: check.CodeUnprocessable, Message: "the facility has no model scale in the campaign", Limits: []string{"model.scale"}}
				}
			case !e.own[ci][fi].ok:
				err = e.ownErr[ci][fi]
			default:
				s := scales[fi]
				res, err = e.solve(ci, fi, similarity.Model{Scale: &s}, nil)
			}
			p := e.pointOf(ci, fi, res, err)
			if err != nil {
				b.excluded = append(b.excluded, exclusion(pr.facs[fi].f, fi, err))
				continue
			}
			if p.better(b.pt) {
				b.pt, b.res = p, res
			}
		}
		if b.res != nil {
			b.beforeRatio = b.pt.ratio
		}
		fin[ci] = b
		progress(int(done.Add(1)))
	})
	if err := e.check(); err != nil {
		return nil, err
	}
	out := &Result{Policy: pr.policy, Aim: pr.aim, Facilities: make([]FacilityPlan, nf), Conditions: make([]ConditionPlan, n),
		Warnings: []string{}, Cautions: []string{}}
	out.Search = SearchStats{OwnPlans: n * nf, CandidateScales: e.candidateCount, FixedScalePlans: int(e.plans.Load())}

	// Level sharing, run order and schedule, facility by facility.
	for fi := range nf {
		pts := make([]point, n)
		for ci := range fin {
			pts[ci] = fin[ci].pt
		}
		sets, idx := e.runSets(fi, pts)
		fp := &out.Facilities[fi]
		f := pr.facs[fi].f
		fp.FacilityID, fp.FacilityVersion, fp.Scale, fp.LargestScale = f.ID, f.Version, scales[fi], pr.facs[fi].geom
		fp.BalanceIDs, fp.RunOrder = []string{}, []string{}
		fp.ConditionsServed = len(idx)
		if len(idx) == 0 {
			if scales[fi] == 0 || pr.facs[fi].fixed == nil {
				fp.Scale = 0
			}
			fp.ScaleReason = ScaleReason{Kind: "none", Note: "the facility serves no condition: every condition is served better elsewhere or cannot be served here"}
			if pr.facs[fi].fixed != nil {
				fp.ScaleReason.Kind, fp.ScaleReason.Note = "fixed", "the request fixes the scale; the facility serves no condition"
			}
			continue
		}
		_, before := bestOrder(f, sets)
		fp.HoursCallerOrder = hoursOf(f, sets)
		fp.HoursWithoutSharing = before.Hours
		if pr.share > 0 {
			// Temperature levels, then pressure levels; a step that does not
			// cut the hours is undone.
			orig := map[int]point{}
			for _, ci := range idx {
				orig[ci] = fin[ci].pt
			}
			keep := func() []final {
				out := make([]final, len(idx))
				for k, ci := range idx {
					out[k] = fin[ci]
				}
				return out
			}
			kept := keep()
			_, bestCost := bestOrderCost(f, sets)
			for _, temperature := range []bool{true, false} {
				e.share(fi, scales[fi], idx, fin, orig, temperature)
				for k, ci := range idx {
					sets[k].StagnationPressure = fin[ci].pt.p0
					sets[k].StagnationTemperature = fin[ci].pt.t0
				}
				if _, c := bestOrderCost(f, sets); c < bestCost {
					kept, bestCost = keep(), c
					continue
				}
				for k, ci := range idx {
					fin[ci] = kept[k]
					sets[k].StagnationPressure = fin[ci].pt.p0
					sets[k].StagnationTemperature = fin[ci].pt.t0
				}
			}
		}
		order, sch := bestOrder(f, sets)
		if f.Operations != nil {
			fp.Schedule = &sch
		}
		for pos, k := range order {
			ci := idx[k]
			fp.RunOrder = append(fp.RunOrder, pr.conds[ci].label)
			out.Conditions[ci].RunPosition = pos + 1
		}
	}
	if err := e.check(); err != nil {
		return nil, err
	}

	// The conditions' answers, with the load checks at their final settings.
	caut := newCautions()
	var firstErr atomic.Value
	each(n, func(ci int) {
		cp := &out.Conditions[ci]
		c := &pr.conds[ci]
		cp.Label, cp.FlightMach, cp.FlightReynolds = c.label, c.flight.Mach, c.flight.Reynolds
		cp.Altitude = c.flight.Atmosphere.Altitude
		cp.FacilityIndex = -1
		cp.Excluded = fin[ci].excluded
		if cp.Excluded == nil {
			cp.Excluded = []Exclusion{}
		}
		// The price of one model: the best own-scale plan over the facilities.
		own := point{fi: -1}
		for fi := range nf {
			if p := e.own[ci][fi]; p.better(own) {
				own = p
			}
		}
		if own.ok {
			cp.OwnScale, cp.OwnReynoldsRatio, cp.OwnFacilityID = e.ownScale[ci][own.fi], own.ratio, pr.facs[own.fi].f.ID
		}
		fn := fin[ci]
		if fn.res == nil {
			return
		}
		fi := fn.pt.fi
		cp.Served, cp.FacilityID, cp.FacilityIndex = true, pr.facs[fi].f.ID, fi
		ps, lr, err := e.summarize(ci, fi, scales[fi], fn.res)
		if err != nil {
			firstErr.CompareAndSwap(nil, err)
			return
		}
		if fn.shared {
			ps.SharedLevel, ps.ReynoldsRatioBeforeSharing = true, fn.beforeRatio
		}
		cp.Plan = ps
		caut.add(pr.facs[fi].f, fi, ci, &lr)
	})
	if err, _ := firstErr.Load().(error); err != nil {
		return nil, err
	}
	e.sumUp(out, scales, origins, caut)
	return out, nil
}

// exclusion says why facility f (index fi) cannot serve a condition.
func exclusion(f *facilities.Facility, fi int, err error) Exclusion {
	ex := Exclusion{FacilityID: f.ID, FacilityIndex: fi, Limits: []string{}, Message: err.Error()}
	var de *check.Error
	if e, ok := err.(*check.Error); ok {
		de = e
		ex.Message = de.Message
		if de.Limits != nil {
			ex.Limits = append([]string{}, de.Limits...)
		}
	}
	return ex
}

// summarize makes a condition's plan summary, with the load check at its
// final settings.
func (e *engine) summarize(ci, fi int, s float64, res *similarity.Result) (*PlanSummary, loads.Result, error) {
	c, fc := &e.pr.conds[ci], &e.pr.facs[fi]
	lr, err := loads.Check(&loads.Case{Facility: fc.f, Article: &e.pr.req.Article, Installation: fc.in, Matrix: *c.mx,
		Scale: s, State: res.Test.State})
	if err != nil {
		return nil, loads.Result{}, err
	}
	t := res.Test
	ps := &PlanSummary{Scale: s, Mach: t.Mach, Speed: t.Speed, StagnationPressure: t.StagnationPressure,
		StagnationTemperature: t.StagnationTemperature, DynamicPressure: t.DynamicPressure, Reynolds: t.Reynolds,
		ReynoldsRatio: res.Mismatch.ReynoldsRatio, MachDifference: res.Mismatch.MachDifference,
		MachMatched: res.Mismatch.MachMatched, Binding: make([]Limit, len(res.Binding)), Verdict: lr.Verdict,
		Hours: e.minutes(ci, fi) / 60}
	if d := res.Mismatch.CorrectedMachDifference; d != nil {
		ps.MachDifference = d
	}
	if e.pr.facs[fi].f.Medium.IsLiquid() {
		ps.Mach = 0
	}
	for i, b := range res.Binding {
		ps.Binding[i] = Limit{Constraint: b.Constraint, Value: b.Value, Limit: b.Limit}
	}
	ps.Warnings = append(ps.Warnings, res.Warnings...)
	if len(lr.Reports) > 0 {
		r := &lr.Reports[0]
		ps.BalanceID, ps.MaxUtilization, ps.AllowedUtilization = r.BalanceID, r.MaxUtilization, r.AllowedUtilization
		ps.Points = make([]PointLoad, len(r.Points))
		for i, p := range r.Points {
			ps.Points[i] = PointLoad{Alpha: p.Alpha, Beta: p.Beta, Utilization: p.Utilization}
		}
		ps.Warnings = append(ps.Warnings, r.Warnings...)
	} else {
		ps.Points = make([]PointLoad, len(c.mx.Points))
		for i, p := range c.mx.Points {
			ps.Points[i] = PointLoad{Alpha: p.Alpha, Beta: p.Beta}
		}
	}
	return ps, lr, nil
}

// sumUp fills the facilities' scale reasons, balances and ratios, the summary,
// the warnings and the cautions.
func (e *engine) sumUp(out *Result, scales []float64, origins []string, caut *cautions) {
	pr := e.pr
	sm := &out.Summary
	sm.Conditions = len(out.Conditions)
	sm.ModelScales = []float64{}
	lowest, sum := math.Inf(1), 0.0
	aimLow, aimSum := math.Inf(1), 0.0
	for _, cp := range out.Conditions {
		if !cp.Served {
			continue
		}
		ps := cp.Plan
		sm.ConditionsServed++
		if ps.MachMatched == nil || *ps.MachMatched {
			sm.MachMatched++
		}
		r := ps.ReynoldsRatio
		lowest, sum = math.Min(lowest, r), sum+r
		cl := math.Min(r, 1/r)
		aimLow, aimSum = math.Min(aimLow, cl), aimSum+cl
		sm.WorstBalanceUtilization = math.Max(sm.WorstBalanceUtilization, ps.MaxUtilization)
	}
	if sm.ConditionsServed > 0 {
		sm.LowestReynoldsRatio, sm.MeanReynoldsRatio = lowest, sum/float64(sm.ConditionsServed)
		sm.AimValue = aimLow
		if pr.aim == AimMean {
			sm.AimValue = aimSum / float64(sm.ConditionsServed)
		}
	}
	if u := sm.ConditionsServed; u < sm.Conditions {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%d of %d conditions cannot be served by any facility at the campaign's scales: each names the limits that exclude it", sm.Conditions-u, sm.Conditions))
	}
	for fi := range out.Facilities {
		fp := &out.Facilities[fi]
		f := pr.facs[fi].f
		if fp.Schedule != nil {
			sm.Hours += fp.Schedule.Hours
			sm.HoursSavedBySharing += fp.HoursWithoutSharing - fp.Schedule.Hours
		}
		if fp.ConditionsServed == 0 {
			continue
		}
		if !slices.Contains(sm.ModelScales, fp.Scale) {
			sm.ModelScales = append(sm.ModelScales, fp.Scale)
		}
		if f.Operations == nil {
			out.Warnings = append(out.Warnings, fmt.Sprintf("facility %s gives no operations figures: no schedule", f.ID))
		}
		// The facility's ratios, balances and the condition that limits it.
		count := map[string]int{}
		lo, s, worst := math.Inf(1), 0.0, -1
		for ci, cp := range out.Conditions {
			if !cp.Served || cp.FacilityIndex != fi {
				continue
			}
			r := cp.Plan.ReynoldsRatio
			s += r
			if cl := math.Min(r, 1/r); cl < lo {
				lo, worst = cl, ci
			}
			if cp.Plan.BalanceID != "" {
				count[cp.Plan.BalanceID]++
			}
		}
		fp.LowestReynoldsRatio = out.Conditions[worst].Plan.ReynoldsRatio
		fp.MeanReynoldsRatio = s / float64(fp.ConditionsServed)
		for id := range count {
			fp.BalanceIDs = append(fp.BalanceIDs, id)
		}
		sort.Slice(fp.BalanceIDs, func(i, j int) bool {
			a, b := fp.BalanceIDs[i], fp.BalanceIDs[j]
			if count[a] != count[b] {
				return count[a] > count[b]
			}
			return a < b
		})
		if len(fp.BalanceIDs) > 1 {
			out.Warnings = append(out.Warnings, fmt.Sprintf("facility %s uses %d balances (%v): a balance change between runs; name one in the facility's installation to keep one", f.ID, len(fp.BalanceIDs), fp.BalanceIDs))
		}
		fp.ScaleReason = e.reason(fi, fp.Scale, origins[fi], out.Conditions[worst])
	}
	slices.Sort(sm.ModelScales)
	if pr.policy == PolicyOneModel && len(sm.ModelScales) > 1 {
		out.Warnings = append(out.Warnings, "the facilities fix different scales: more than one model")
	}
	out.Cautions = caut.list(pr)
}

// reason says why facility fi's scale s is what it is; worst is the condition
// with the lowest Reynolds closeness served there.
func (e *engine) reason(fi int, s float64, origin string, worst ConditionPlan) ScaleReason {
	fc := &e.pr.facs[fi]
	r := ScaleReason{Kind: origin, Condition: worst.Label, Limits: []string{}}
	for _, b := range worst.Plan.Binding {
		r.Limits = append(r.Limits, b.Constraint)
	}
	near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Max(a, b) }
	geomS, geomName := similarity.GeometricScale(fc.f, &e.pr.req.Article)
	switch {
	case origin == "fixed":
		r.Note = fmt.Sprintf("the request fixes the scale at %.4g", s)
	case origin == "existing_model":
		r.Note = fmt.Sprintf("of the existing models, the one of scale %.4g serves the campaign best here; %s limits it (%s)", s, worst.Label, joinOr(r.Limits))
	case near(s, geomS):
		r.Kind = "test_section"
		r.Limits = appendUniq(r.Limits, geomName)
		r.Note = fmt.Sprintf("the largest model the test section takes (%s); %s is the condition with the lowest Reynolds ratio here", geomName, worst.Label)
	case e.pr.req.Model.ScaleMax != nil && near(s, *e.pr.req.Model.ScaleMax), e.pr.req.Model.ScaleMin != nil && near(s, *e.pr.req.Model.ScaleMin):
		r.Kind = "scale_bound"
		r.Note = fmt.Sprintf("the campaign's scale bound; %s is the condition with the lowest Reynolds ratio here (%s)", worst.Label, joinOr(r.Limits))
	default:
		for ci := range e.pr.conds {
			if e.own[ci][fi].ok && near(e.ownScale[ci][fi], s) {
				r.Kind, r.Condition = "condition_best", e.pr.conds[ci].label
				r.Note = fmt.Sprintf("the best scale of %s alone: a larger or smaller model lowers its Reynolds ratio, and it limits the campaign", r.Condition)
				return r
			}
		}
		r.Kind = "crossing"
		r.Note = fmt.Sprintf("where the Reynolds ratio of %s (%s) meets that of a condition whose ratio moves the other way with scale: a larger or smaller model lowers one of them", worst.Label, joinOr(r.Limits))
	}
	return r
}

// joinOr lists limits, or says there are none.
func joinOr(ls []string) string {
	if len(ls) == 0 {
		return "no limit binds"
	}
	s := ls[0]
	for _, l := range ls[1:] {
		s += ", " + l
	}
	return s
}

// appendUniq appends the strings of add that list does not hold yet.
func appendUniq(list []string, add ...string) []string {
	for _, s := range add {
		if !slices.Contains(list, s) {
			list = append(list, s)
		}
	}
	return list
}
