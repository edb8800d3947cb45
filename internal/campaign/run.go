package campaign

import (
	"context"
	"encoding/json"
	"math"
	"runtime"
	"slices"
	"sort"
	"sync"
	"sync/atomic"

	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// boundSlack widens each condition's own best closeness when it bounds what the
// condition can reach at another scale: the planner is optimal to within 0.1 %
// (docs/planner.md), so a bound without slack could rule out a scale that is
// better by less than that.
const boundSlack = 2e-3

// nearBest is how close to the best candidate's aim value another candidate
// must come to be scored in full, and another local maximum to be refined too.
const nearBest = 0.95

// quick are the planner settings of the scale search: one solve, no gains, no
// trade curve.
var quick = similarity.Settings{NoGains: true, TradePoints: -1}

// point is one condition's plan in one facility at one scale, as the search
// compares them.
type point struct {
	ok      bool
	machOK  bool
	close   float64 // min(r, 1/r) of the Reynolds ratio r
	ratio   float64
	p0, t0  float64
	minutes float64 // points and runs of this condition in this facility
	fi      int     // facility index; -1 for none
}

// better reports whether a is strictly better than b: served, Mach matched,
// closer in Reynolds number, then fewer minutes.
func (a point) better(b point) bool {
	switch {
	case a.ok != b.ok:
		return a.ok
	case !a.ok:
		return false
	case a.machOK != b.machOK:
		return a.machOK
	case a.close != b.close:
		return a.close > b.close
	}
	return a.minutes < b.minutes
}

// score is a campaign's standing at some scales: conditions served, Mach
// matched, and the aim's value over the conditions served.
type score struct {
	served, matched int
	value           float64
}

// less reports whether a ranks strictly below b.
func (a score) less(b score) bool {
	switch {
	case a.served != b.served:
		return a.served < b.served
	case a.matched != b.matched:
		return a.matched < b.matched
	}
	return a.value < b.value
}

// engine holds a campaign's state while it runs.
type engine struct {
	ctx context.Context
	pr  *prepared

	own       [][]point // [condition][facility] at the condition's own best scale
	ownScale  [][]float64
	ownErr    [][]error
	ub        []float64 // bound on each condition's closeness at any scale (boundSlack)
	servable  []bool
	matchable []bool

	plans          atomic.Int64 // fixed-scale plans of the search
	candidateCount int

	mu  sync.Mutex
	err error // the first error that is not a condition's infeasibility
}

// fail records an error that stops the campaign (not a 422 of one condition).
func (e *engine) fail(err error) {
	e.mu.Lock()
	if e.err == nil {
		e.err = err
	}
	e.mu.Unlock()
}

// problem is the planning problem of condition ci in facility fi with model m.
func (e *engine) problem(ci, fi int, m similarity.Model, f *facilities.Facility) *similarity.Problem {
	c, fc := &e.pr.conds[ci], &e.pr.facs[fi]
	if f == nil {
		f = fc.f
	}
	p := &similarity.Problem{Flight: c.flight, Article: &e.pr.req.Article, Facility: f, Model: m, Objective: c.obj, MatrixDrag: c.drag}
	if ll := fc.limits[c.sweep]; ll != nil {
		p.LoadLimit = ll
	}
	return p
}

// solve plans condition ci in facility fi with model m (f, when not nil,
// replaces the facility's record: level sharing fixes its ranges).
func (e *engine) solve(ci, fi int, m similarity.Model, f *facilities.Facility) (*similarity.Result, error) {
	return similarity.Plan(e.problem(ci, fi, m, f), &quick)
}

// pointOf turns a plan (or its error) into a point; an error other than an
// infeasible problem is recorded and stops the campaign.
func (e *engine) pointOf(ci, fi int, res *similarity.Result, err error) point {
	if err != nil {
		if check.ErrorCode(err) != check.CodeUnprocessable {
			e.fail(err)
		}
		return point{fi: -1}
	}
	r := res.Mismatch.ReynoldsRatio
	pt := point{ok: true, machOK: res.Mismatch.MachMatched == nil || *res.Mismatch.MachMatched,
		ratio: r, close: math.Min(r, 1/r), p0: res.Test.StagnationPressure, t0: res.Test.StagnationTemperature,
		minutes: e.minutes(ci, fi), fi: fi}
	if !(pt.close > 0) {
		pt.close = 0
	}
	return pt
}

// minutes is condition ci's time in facility fi without condition changes:
// its points and runs (0 without operations figures).
func (e *engine) minutes(ci, fi int) float64 {
	op := e.pr.facs[fi].f.Operations
	if op == nil {
		return 0
	}
	mx := e.pr.conds[ci].mx
	runs := max(mx.BetaValues, 1)
	return op.Minutes(facilities.Schedule{Points: runs * mx.AlphaPoints, Runs: runs})
}

// at plans condition ci in facility fi at scale s.
func (e *engine) at(ci, fi int, s float64) point {
	e.plans.Add(1)
	res, err := e.solve(ci, fi, similarity.Model{Scale: &s}, nil)
	return e.pointOf(ci, fi, res, err)
}

// ownModel is the model of a condition's own best plan in facility fi: the
// fixed scale, the existing models, or the campaign's scale range.
func (e *engine) ownModel(fi int) similarity.Model {
	fc := &e.pr.facs[fi]
	switch {
	case fc.fixed != nil:
		return similarity.Model{Scale: fc.fixed}
	case e.pr.policy == PolicyExistingModels:
		return similarity.Model{Scales: e.pr.req.Model.Scales}
	}
	lo, hi := e.pr.lo, math.Min(e.pr.hi, fc.geom)
	if lo > hi {
		lo = hi
	}
	return similarity.Model{ScaleMin: &lo, ScaleMax: &hi}
}

// ownPlans plans every condition in every facility at its own best scale.
func (e *engine) ownPlans(progress func(int)) {
	n, nf := len(e.pr.conds), len(e.pr.facs)
	e.own = make([][]point, n)
	e.ownScale = make([][]float64, n)
	e.ownErr = make([][]error, n)
	e.ub = make([]float64, n)
	e.servable = make([]bool, n)
	e.matchable = make([]bool, n)
	var done atomic.Int64
	each(n, func(ci int) {
		if e.ctx.Err() != nil {
			return
		}
		e.own[ci] = make([]point, nf)
		e.ownScale[ci] = make([]float64, nf)
		e.ownErr[ci] = make([]error, nf)
		for fi := range nf {
			res, err := e.solve(ci, fi, e.ownModel(fi), nil)
			e.own[ci][fi] = e.pointOf(ci, fi, res, err)
			e.ownErr[ci][fi] = err
			if err == nil {
				e.ownScale[ci][fi] = res.Model.Scale
			}
		}
		ub := 0.0
		for _, p := range e.own[ci] {
			if p.ok {
				e.servable[ci] = true
				e.matchable[ci] = e.matchable[ci] || p.machOK
			}
		}
		for _, p := range e.own[ci] {
			if p.ok && (p.machOK || !e.matchable[ci]) {
				ub = math.Max(ub, p.close)
			}
		}
		if !e.matchable[ci] {
			ub = 1 // an unmatched Mach number may be traded for Reynolds at other scales
		}
		e.ub[ci] = math.Min(1, ub*(1+boundSlack))
		progress(int(done.Add(1)))
	})
}

// search is one scale search: facilities vary share one scale, every other
// condition-facility pair is summed up in base (the best point of each
// condition in the facilities held at their scales).
type search struct {
	e     *engine
	vary  []int
	base  []point
	order []int // conditions, most likely worst first
	// suffix bounds over order: servable, matchable, least and summed ub.
	sufServe, sufMatch []int
	sufMin, sufSum     []float64
}

// newSearch prepares a search over vary with base points.
func (e *engine) newSearch(vary []int, base []point) *search {
	n := len(e.pr.conds)
	sr := &search{e: e, vary: vary, base: base, order: make([]int, n)}
	for i := range sr.order {
		sr.order[i] = i
	}
	key := make([]float64, n)
	for ci := range key {
		key[ci] = e.ub[ci]
	}
	sr.reorder(key)
	return sr
}

// reorder sorts the conditions by key, lowest first (ties by index), and
// rebuilds the suffix bounds.
func (sr *search) reorder(key []float64) {
	e := sr.e
	sort.SliceStable(sr.order, func(i, j int) bool { return key[sr.order[i]] < key[sr.order[j]] })
	n := len(sr.order)
	sr.sufServe = make([]int, n+1)
	sr.sufMatch = make([]int, n+1)
	sr.sufMin = make([]float64, n+1)
	sr.sufSum = make([]float64, n+1)
	sr.sufMin[n] = math.Inf(1)
	for k := n - 1; k >= 0; k-- {
		ci := sr.order[k]
		sr.sufServe[k], sr.sufMatch[k], sr.sufMin[k], sr.sufSum[k] = sr.sufServe[k+1], sr.sufMatch[k+1], sr.sufMin[k+1], sr.sufSum[k+1]
		if e.servable[ci] || sr.base[ci].ok {
			sr.sufServe[k]++
			sr.sufMin[k] = math.Min(sr.sufMin[k], math.Max(e.ub[ci], sr.base[ci].close))
			sr.sufSum[k] += math.Max(e.ub[ci], sr.base[ci].close)
		}
		if e.matchable[ci] || sr.base[ci].ok && sr.base[ci].machOK {
			sr.sufMatch[k]++
		}
	}
}

// best returns condition ci's best point: base, or a varying facility at s.
func (sr *search) best(ci int, s float64) point {
	e := sr.e
	b := sr.base[ci]
	// The facilities in the order of the condition's own best plans, best
	// first, so that the bound below skips the others more often.
	var buf [MaxFacilities]int
	vary := append(buf[:0], sr.vary...)
	for i := 1; i < len(vary); i++ {
		for j := i; j > 0 && e.own[ci][vary[j]].better(e.own[ci][vary[j-1]]); j-- {
			vary[j], vary[j-1] = vary[j-1], vary[j]
		}
	}
	for _, fi := range vary {
		own := e.own[ci][fi]
		if !own.ok || s > e.pr.facs[fi].geom*(1+1e-12) {
			continue
		}
		// A facility that cannot beat the best found even at the condition's
		// own best scale is not planned.
		if b.ok && b.machOK && (own.machOK || !e.matchable[ci]) && b.close > math.Min(1, own.close*(1+boundSlack)) {
			continue
		}
		if p := e.at(ci, fi, s); p.better(b) {
			b = p
		}
	}
	return b
}

// eval scores the campaign with the varying facilities at scale s. With a
// bound it stops as soon as the score cannot reach it (complete false); pts,
// when not nil, receives each condition's best point (complete evaluations
// only).
func (sr *search) eval(s float64, bound *score, pts []point) (sc score, complete bool) {
	e := sr.e
	e.candidateCount++
	aimMin := e.pr.aim == AimLowest
	lowest, sum := math.Inf(1), 0.0
	for k, ci := range sr.order {
		if k&63 == 0 && e.ctx.Err() != nil {
			return score{}, false
		}
		p := sr.best(ci, s)
		if pts != nil {
			pts[ci] = p
		}
		if p.ok {
			sc.served++
			if p.machOK {
				sc.matched++
			}
			lowest = math.Min(lowest, p.close)
			sum += p.close
		}
		if bound == nil {
			continue
		}
		servedUB := sc.served + sr.sufServe[k+1]
		if servedUB < bound.served {
			return sc, false
		}
		if servedUB > bound.served {
			continue
		}
		matchedUB := sc.matched + sr.sufMatch[k+1]
		if matchedUB < bound.matched {
			return sc, false
		}
		if matchedUB > bound.matched {
			continue
		}
		var vUB float64
		if aimMin {
			vUB = math.Min(lowest, sr.sufMin[k+1])
		} else if servedUB > 0 {
			vUB = (sum + sr.sufSum[k+1]) / float64(servedUB)
		}
		if vUB < bound.value {
			return sc, false
		}
	}
	switch {
	case sc.served == 0:
	case aimMin:
		sc.value = lowest
	default:
		sc.value = sum / float64(sc.served)
	}
	return sc, true
}

// found is a scale the search scored completely.
type found struct {
	s      float64
	sc     score
	origin string // how the scale came to be a candidate (ScaleReason kinds)
}

// run searches the varying facilities' shared scale among cands (each with its
// origin) and, when refine, around the best of them by golden sections. It
// returns the best scale found and every scale tied with it.
func (sr *search) run(cands []found, refine bool) (best found, ties []found) {
	e := sr.e
	sort.SliceStable(cands, func(i, j int) bool { return cands[i].s < cands[j].s })
	cands = slices.CompactFunc(cands, func(a, b found) bool { return math.Abs(a.s-b.s) <= 1e-12*b.s })
	n := len(cands)
	if n == 0 {
		return found{}, nil
	}
	// The largest scales each test section takes come first, then the
	// conditions' own best scales, then the grid, each kind largest first: in
	// a facility whose dynamic pressure limit binds, the Reynolds number grows
	// with the model, and a good first bound lets the other scales stop early.
	pts := make([]point, len(e.pr.conds))
	scored := make([]bool, n)
	var bestI int = -1
	try := func(i int) {
		var bound *score
		if bestI >= 0 {
			// Scales within nearBest of the best are scored in full, so that
			// their local maxima can be refined too.
			b := best.sc
			b.value *= nearBest
			bound = &b
		}
		sc, ok := sr.eval(cands[i].s, bound, pts)
		if !ok {
			return
		}
		cands[i].sc, scored[i] = sc, true
		if bestI < 0 || best.sc.less(sc) {
			best, bestI = cands[i], i
			key := make([]float64, len(pts))
			for ci, p := range pts {
				key[ci] = p.close
				if !p.ok {
					key[ci] = -2
				} else if !p.machOK {
					key[ci] = -1 + p.close
				}
			}
			sr.reorder(key)
		}
	}
	rank := map[string]int{"test_section": 0, "scale_bound": 0, "existing_model": 0, "condition_best": 1}
	first := make([]int, n)
	for i := range first {
		first[i] = n - 1 - i
	}
	sort.SliceStable(first, func(a, b int) bool {
		ra, ok := rank[cands[first[a]].origin]
		if !ok {
			ra = 2
		}
		rb, ok := rank[cands[first[b]].origin]
		if !ok {
			rb = 2
		}
		return ra < rb
	})
	for _, i := range first {
		try(i)
	}
	if e.ctx.Err() != nil {
		return best, nil
	}
	if refine {
		// Golden sections between the neighbours of the best candidate, and of
		// up to two others that are local maxima apart from it within nearBest
		// of its value (a scale that stopped early, further below, counts as
		// lower than its neighbours).
		best = sr.golden(cands[max(bestI-1, 0)].s, best, cands[min(bestI+1, n-1)].s)
		var idx []int
		for i := range n {
			if !scored[i] || i == bestI || abs(i-bestI) <= 2 {
				continue
			}
			if i > 0 && scored[i-1] && cands[i].sc.less(cands[i-1].sc) || i < n-1 && scored[i+1] && cands[i].sc.less(cands[i+1].sc) {
				continue
			}
			if c := cands[i].sc; c.served != best.sc.served || c.matched != best.sc.matched || c.value < nearBest*best.sc.value {
				continue
			}
			idx = append(idx, i)
		}
		sort.SliceStable(idx, func(a, b int) bool { return cands[idx[b]].sc.less(cands[idx[a]].sc) })
		for _, i := range idx[:min(2, len(idx))] {
			if f := sr.golden(cands[max(i-1, 0)].s, cands[i], cands[min(i+1, n-1)].s); best.sc.less(f.sc) {
				best = f
			}
		}
	}
	for i := range n {
		if scored[i] && !cands[i].sc.less(best.sc) && !best.sc.less(cands[i].sc) {
			ties = append(ties, cands[i])
		}
	}
	if len(ties) == 0 {
		ties = []found{best}
	}
	return best, ties
}

// golden refines the bracket [a, b] around x, the best of the three, by golden
// sections on the campaign's score: each new scale is compared with the best
// so far (so it can stop as soon as it falls short), and the bracket keeps the
// better side, until it is 1e-8 of the scale wide.
func (sr *search) golden(a float64, x found, b float64) found {
	const r = 0.3819660112501051 // 2 − φ
	for range 60 {
		if b-a <= 1e-8*x.s || sr.e.ctx.Err() != nil {
			break
		}
		var u float64
		if b-x.s > x.s-a {
			u = x.s + r*(b-x.s)
		} else {
			u = x.s - r*(x.s-a)
		}
		sc, ok := sr.eval(u, &x.sc, nil)
		if ok && x.sc.less(sc) {
			if u > x.s {
				a = x.s
			} else {
				b = x.s
			}
			x = found{s: u, sc: sc, origin: "crossing"}
			continue
		}
		if u > x.s {
			b = u
		} else {
			a = u
		}
	}
	return x
}

// candidates returns the scales worth comparing for the facilities vary: the
// existing models, or each condition's own best scale in them, their test
// sections' largest scales, the campaign's bounds and a 24-point geometric
// grid between the smallest and largest of those.
func (e *engine) candidates(vary []int) []found {
	if e.pr.policy == PolicyExistingModels {
		var out []found
		for _, s := range e.pr.req.Model.Scales {
			out = append(out, found{s: s, origin: "existing_model"})
		}
		return out
	}
	var out []found
	lo, hi := math.Inf(1), 0.0
	add := func(s float64, origin string) {
		if !(s >= e.pr.lo*(1-1e-12) && s <= e.pr.hi*(1+1e-12)) {
			return
		}
		out = append(out, found{s: s, origin: origin})
		lo, hi = math.Min(lo, s), math.Max(hi, s)
	}
	inRange := func(s float64) float64 { return math.Min(math.Max(s, e.pr.lo), e.pr.hi) }
	for _, fi := range vary {
		add(math.Min(e.pr.facs[fi].geom, e.pr.hi), "test_section")
		for ci := range e.pr.conds {
			if e.own[ci][fi].ok {
				add(e.ownScale[ci][fi], "condition_best")
			}
		}
	}
	if e.pr.req.Model.ScaleMin != nil {
		add(e.pr.lo, "scale_bound")
	}
	if e.pr.req.Model.ScaleMax != nil {
		add(e.pr.hi, "scale_bound")
	}
	if len(out) == 0 {
		return nil
	}
	// The grid reaches a quarter of the smallest candidate further down: a
	// condition's own best plan is the planner's, optimal to about 0.1 %, and
	// the Reynolds ratio can be nearly flat in scale past a balance's knee.
	lo = inRange(lo / 4)
	add(lo, "crossing")
	const grid = 32
	for k := 1; k < grid; k++ {
		add(lo*math.Pow(hi/lo, float64(k)/grid), "crossing")
	}
	return out
}

// Validate checks req as Run does before it plans anything: every bad field, a
// facility id that names nothing among them, is a *check.Error with CodeInvalid.
// The service calls it before it stores a campaign to run as a job, so that bad
// input is refused at once (400) rather than found in the background.
func Validate(ctx context.Context, p *app.Planner, req Request) error {
	if p == nil {
		p = &app.Planner{}
	}
	_, err := prepare(ctx, p, &req)
	return err
}

// Run plans the campaign req with planner p (its catalog resolves facility
// ids; the zero Planner plans against the demo facilities). progress, when not
// nil, is told the work done of the total as it goes: each condition counts
// twice, once when it has been planned at its own best scale in every
// facility and once when its final plan is made (the scale search between
// the two is not counted). Cancelling ctx stops the run with ctx's error.
// Bad input, a facility id that names nothing among it, is a
// *check.Error with CodeInvalid naming every bad field. A campaign in which no
// condition can be served is still a Result, with every exclusion named.
func Run(ctx context.Context, p *app.Planner, req Request, progress func(done, total int)) (*Result, error) {
	if p == nil {
		p = &app.Planner{}
	}
	pr, err := prepare(ctx, p, &req)
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	n := len(pr.conds)
	total := 2 * n
	var mu sync.Mutex
	// The workers count in any order; progress is told each new highest count
	// only, so that it never goes back.
	last := -1
	report := func(done int) {
		if progress == nil {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		if done > last {
			last = done
			progress(done, total)
		}
	}
	report(0)
	e := &engine{ctx: ctx, pr: pr}
	e.ownPlans(report)
	if err := e.check(); err != nil {
		return nil, err
	}
	scales, origins := e.chooseScales()
	if err := e.check(); err != nil {
		return nil, err
	}
	res, err := e.compose(scales, origins, func(k int) { report(n + k) })
	if err != nil {
		return nil, err
	}
	if err := e.check(); err != nil {
		return nil, err
	}
	return res, nil
}

// check returns the context's error or the first error recorded.
func (e *engine) check() error {
	if err := e.ctx.Err(); err != nil {
		return err
	}
	e.mu.Lock()
	defer e.mu.Unlock()
	return e.err
}

// chooseScales finds each facility's model scale under the policy, and how
// each came to be (a ScaleReason kind).
func (e *engine) chooseScales() ([]float64, []string) {
	nf := len(e.pr.facs)
	scales := make([]float64, nf)
	origins := make([]string, nf)
	var vary []int
	for fi, fc := range e.pr.facs {
		if fc.fixed != nil {
			scales[fi], origins[fi] = *fc.fixed, "fixed"
			continue
		}
		vary = append(vary, fi)
	}
	if e.pr.policy == PolicyOneModel && len(vary) < nf {
		// One model and a facility fixes its scale: every facility tests it.
		var s float64
		for _, fc := range e.pr.facs {
			if fc.fixed != nil {
				s = *fc.fixed
			}
		}
		for _, fi := range vary {
			scales[fi], origins[fi] = s, "fixed"
		}
		return scales, origins
	}
	if len(vary) == 0 {
		return scales, origins
	}
	// One shared scale over every free facility (the policy one_model, and the
	// start of the others).
	base := e.baseFor(vary, scales)
	sr := e.newSearch(vary, base)
	best, ties := sr.run(e.candidates(vary), e.pr.policy != PolicyExistingModels)
	if len(ties) > 1 {
		best = e.fewestHours(vary, scales, ties)
	}
	for _, fi := range vary {
		scales[fi], origins[fi] = best.s, best.origin
	}
	if e.pr.policy == PolicyOneModel || len(vary) == 1 {
		return scales, origins
	}
	// A scale per facility: coordinate ascent, each facility's scale searched
	// with the others held, until a round changes nothing (at most 4 rounds).
	cur := best.sc
	for range 4 {
		changed := false
		for _, fi := range vary {
			if e.ctx.Err() != nil {
				return scales, origins
			}
			others := make([]float64, nf)
			copy(others, scales)
			base := e.baseFor([]int{fi}, others)
			sr := e.newSearch([]int{fi}, base)
			b, ties := sr.run(e.candidates([]int{fi}), e.pr.policy != PolicyExistingModels)
			if len(ties) > 1 {
				b = e.fewestHours([]int{fi}, others, ties)
			}
			if cur.less(b.sc) {
				cur, changed = b.sc, true
				scales[fi], origins[fi] = b.s, b.origin
			}
		}
		if !changed {
			break
		}
	}
	return scales, origins
}

// baseFor returns each condition's best point in the facilities outside vary
// at their scales (0: the facility takes no part).
func (e *engine) baseFor(vary []int, scales []float64) []point {
	base := make([]point, len(e.pr.conds))
	each(len(base), func(ci int) {
		b := point{fi: -1}
		for fi := range e.pr.facs {
			if slices.Contains(vary, fi) || scales[fi] == 0 || !e.own[ci][fi].ok {
				continue
			}
			if p := e.at(ci, fi, scales[fi]); p.better(b) {
				b = p
			}
		}
		base[ci] = b
	})
	return base
}

// fewestHours returns, among scales tied on the score, the one whose schedule
// (in the best run order, without level sharing) takes the fewest hours; then
// the largest scale.
func (e *engine) fewestHours(vary []int, scales []float64, ties []found) found {
	const most = 8
	if len(ties) > most {
		ties = ties[len(ties)-most:]
	}
	best, bestH := ties[len(ties)-1], math.Inf(1)
	for i := len(ties) - 1; i >= 0; i-- {
		sc := make([]float64, len(scales))
		copy(sc, scales)
		for _, fi := range vary {
			sc[fi] = ties[i].s
		}
		pts := e.assign(sc)
		h := 0.0
		for fi := range e.pr.facs {
			sets, _ := e.runSets(fi, pts)
			if len(sets) == 0 || e.pr.facs[fi].f.Operations == nil {
				continue
			}
			_, sch := bestOrder(e.pr.facs[fi].f, sets)
			h += sch.Hours
		}
		if h < bestH {
			best, bestH = ties[i], h
		}
	}
	return best
}

// assign returns each condition's best point over every facility at scales.
func (e *engine) assign(scales []float64) []point {
	pts := make([]point, len(e.pr.conds))
	each(len(pts), func(ci int) {
		b := point{fi: -1}
		for fi := range e.pr.facs {
			if scales[fi] == 0 || !e.own[ci][fi].ok {
				continue
			}
			if p := e.at(ci, fi, scales[fi]); p.better(b) {
				b = p
			}
		}
		pts[ci] = b
	})
	return pts
}

// runSets returns the run sets of the conditions assigned to facility fi, in
// the request's order, and their condition indexes.
func (e *engine) runSets(fi int, pts []point) ([]facilities.RunSet, []int) {
	var sets []facilities.RunSet
	var idx []int
	for ci, p := range pts {
		if p.ok && p.fi == fi {
			mx := e.pr.conds[ci].mx
			sets = append(sets, facilities.RunSet{Condition: facilities.Condition{StagnationPressure: p.p0, StagnationTemperature: p.t0},
				AlphaPoints: mx.AlphaPoints, BetaValues: mx.BetaValues})
			idx = append(idx, ci)
		}
	}
	return sets, idx
}

// each calls fn(i) for i in [0, n) on a bounded pool and returns when all have.
func each(n int, fn func(i int)) {
	workers := min(maxWorkers(), n)
	if workers <= 1 {
		for i := range n {
			fn(i)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for {
				i := int(next.Add(1)) - 1
				if i >= n {
					return
				}
				fn(i)
			}
		})
	}
	wg.Wait()
}

// maxWorkers is the size of the planning pool: one goroutine per processor.
func maxWorkers() int { return runtime.GOMAXPROCS(0) }

// abs is |i|.
func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// RunJSON runs the campaign request body (JSON as POST /v1/campaigns takes it,
// decoded with units by unitjson) and returns the Result as JSON: the shape of
// a stored job's request and result (internal/jobs). Errors are Run's, and a
// body that does not decode is a CodeInvalid error naming its fields.
func RunJSON(ctx context.Context, p *app.Planner, body []byte, progress func(done, total int)) ([]byte, error) {
	var req Request
	if err := unitjson.Decode(body, &req); err != nil {
		return nil, err
	}
	res, err := Run(ctx, p, req, progress)
	if err != nil {
		return nil, err
	}
	return json.Marshal(res)
}
