package similarity

// PlanSearch runs the planner's search on p without the binding gains and the trade
// curve, with the joint refinement of a weighted objective on (refine) or off, so
// that the tests can compare the two.
func PlanSearch(p *Problem, refine bool) (*Result, error) {
	sv, err := newSolver(p)
	if err != nil {
		return nil, err
	}
	sv.noPolish = !refine
	best, err := sv.solve()
	if err != nil {
		return nil, err
	}
	if refine && sv.polishEvals == 0 {
		// The search skipped the refinement (its scales came exactly:
		// froudeScaled, rulesScaled): the tests of the refinement run it
		// all the same.
		best = sv.polish(best, sv.ivs)
	}
	res := sv.result(best)
	res.Stats.Solves = 1
	res.Stats.Evaluations = sv.evals
	res.Stats.RefineEvaluations = sv.polishEvals
	return res, nil
}

// RefineFrom runs the joint refinement alone on p from test Mach number (speed in
// water) u and scale s, and returns the plans at the start and after the
// refinement. A start that is not a feasible plan is an error.
func RefineFrom(p *Problem, u, s float64) (start, refined *Result, err error) {
	sv, err := newSolver(p)
	if err != nil {
		return nil, nil, err
	}
	ivs, fails := sv.feasibleMachOrSpeed()
	if len(ivs) == 0 {
		return nil, nil, unprocessable("no feasible Mach number or speed", fails...)
	}
	inside := false
	for _, iv := range ivs {
		inside = inside || u >= iv.a && u <= iv.b
	}
	if !inside || s < sv.sLo || s > sv.sHi {
		return nil, nil, unprocessable("the start is outside the facility's range or the scale range")
	}
	c := sv.prepare(u)
	x := sv.at(&c, s)
	if !x.ok {
		return nil, nil, unprocessable("the start is not a feasible plan", x.fail)
	}
	start = sv.result(x)
	refined = sv.result(sv.polish(x, ivs))
	refined.Stats.RefineEvaluations = sv.polishEvals
	return start, refined, nil
}
