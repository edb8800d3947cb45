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
	res := sv.result(best)
	res.Stats.Solves = 1
	res.Stats.Evaluations = sv.evals
	res.Stats.RefineEvaluations = sv.polishEvals
	return res, nil
}

// RefineFrom runs the joint refinement alone on p from test Mach number (speed in
// water) u and scale s, which must be a feasible plan, and returns its plan.
func RefineFrom(p *Problem, u, s float64) (*Result, error) {
	sv, err := newSolver(p)
	if err != nil {
		return nil, err
	}
	ivs, fails := sv.feasibleU()
	if len(ivs) == 0 {
		return nil, unprocessable("no feasible Mach number or speed", fails...)
	}
	c := sv.prepare(u)
	x := sv.at(&c, s)
	if !x.ok {
		return nil, unprocessable("the start is not feasible", x.fail)
	}
	res := sv.result(sv.polish(x, ivs))
	res.Stats.RefineEvaluations = sv.polishEvals
	return res, nil
}
