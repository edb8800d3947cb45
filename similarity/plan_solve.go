package similarity

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"sync"

	"scalematch/facilities"
	"scalematch/internal/check"
)

// Scale choices.
const (
	scaleFixed = iota
	scaleList
	scaleRange
)

// Objective group indices.
const (
	gReynolds = iota
	gMach
	gFroude
	gCavitation
	nGroups
)

var groupIndex = map[string]int{GroupReynolds: gReynolds, GroupMach: gMach, GroupFroude: gFroude, GroupCavitation: gCavitation}

// objective is the validated objective in index form.
type objective struct {
	weighted bool
	levels   []int            // priority order
	w        [nGroups]float64 // weights
	tol      float64          // Mach band half-width
	cavTol   float64          // cavitation band half-width
}

// key orders candidate plans: lexicographically by the objective levels v (each
// ≥ 0, 0 when matched), then by the dynamic pressure q in Pa. The levels and q are
// never NaN (keyOf), so less is a strict weak ordering.
type key struct {
	v [nGroups]float64
	q float64
}

// less reports whether a is a strictly better plan than b: the first level that
// differs decides, and when all levels are equal the lower q does. Every
// comparison is exact, which makes less a strict weak ordering (irreflexive and
// transitive, with transitive ties), as the golden-section search and the
// best-so-far selections need. A tolerance on a level would not be: a chain of
// candidates, each within the tolerance of the previous one and each with a lower
// q, would count every step as a tie won on q while the level crept past the
// tolerance, so that the last of them was "better" than the first by the chain
// and worse by a direct comparison. The places where the objective is flat by
// construction, and where the order must fall through to q, are exact zeros
// instead (keyOf): the Mach band (|ΔM| within the tolerance), and a Reynolds
// number that meets the flight's because the setting was solved for it.
func (a key) less(b key) bool {
	for i := range a.v {
		if a.v[i] != b.v[i] {
			return a.v[i] < b.v[i]
		}
	}
	return a.q < b.q
}

// limitSlack is the relative slack, 1e-12, with which the set-up and the search
// test a limit before they rule a Mach number (speed), a scale or a load ceiling
// out: x > limit·(1 + limitSlack). It absorbs the rounding of a state computed at a
// limit's own value (a model on the span limit, a q ceiling reached at the top of
// p0), so that a setting placed on a limit is not refused for its own rounding. The
// answer itself is checked against the facility's limits as they are stated
// (facilities.Violations).
const limitSlack = 1e-12

// worst is the key of an infeasible point.
var worst = key{v: [nGroups]float64{math.Inf(1), math.Inf(1), math.Inf(1), math.Inf(1)}, q: math.Inf(1)}

// machSetup is what the planner knows at one test Mach number (speed in water),
// independent of the model scale.
type machSetup struct {
	ok   bool
	fail string // the limit that makes this Mach number infeasible
	// machOrSpeed is the test Mach number (gas) or speed in m/s (water).
	machOrSpeed float64

	ta, tb      float64          // usable stagnation-temperature range, K
	pa          float64          // lowest stagnation pressure, Pa
	pTop        float64          // highest usable p0 before any q ceiling, Pa
	capTop      string           // the limit that sets pTop
	k           float64          // dynamic pressure per Pa of p0 (ideal gas) or q itself (water)
	stRef       facilities.State // a usable state at (pa, tRef); ideal gas: its speed scales as √T0
	tRef        float64
	rlo         float64 // lowest Re/m, at (pa, tb), once rloOK
	rloOK       bool
	ra          float64 // Re/m at (pa, ta)
	qLow        float64 // the lowest q at this Mach number (at pa), Pa
	qa          float64 // real-gas nitrogen with a T0 range: q at pa on the T0 floor, once qaOK (qcurve)
	qaOK        bool
	linear      bool       // q and Re/m ∝ p0 along the T0 floor (ideal gas, no condensation)
	cond        bool       // condensation (or vmin) sets the T0 floor somewhere in [pa, pTop]
	vmin        float64    // nitrogen: the facility's lowest speed, held in the T0 floor, m/s; 0 for none
	facilityTop topSetting // the highest usable Re/m within the facility's own limits
	// topLazy: facilityTop is not computed yet (real-gas nitrogen); the
	// solver's top computes it where a reader asks for it.
	topLazy bool
	// partial: a trade point's set-up (solver.topOnly) that holds its top
	// setting and reference state but not the state at (pa, the T0 floor):
	// qa, ra and qLow are unset (topPartial).
	partial bool
	// floorP and floorT: the T0 floor at p0 floorP, found (tfloor) where the
	// set-up computed its state at (pa, the floor): real-gas nitrogen with a
	// T0 range; floorP 0 otherwise. raFloor: ra is Re/m on the T0 floor at pa
	// (rcurve at pa), from that state. Every candidate's Re/m root asks for
	// both again (solveR), about 250 times a weighted cn2-05 plan.
	floorP, floorT float64
	raFloor        bool

	// Water only.
	rWaterTop   float64
	capWaterTop string
	// qWater holds q at pa at the temperatures qWaterT (the ends of the
	// usable T0 range, whose states prepareWater computed; 0: unset), for
	// waterQAt: every candidate at this speed asks for them again.
	qWater, qWaterT [2]float64
}

// topSetting is the setting of the highest usable Re/m at one Mach number under a
// dynamic-pressure ceiling.
type topSetting struct {
	p, t float64 // p0 in Pa, T0 in K
	r    float64 // Re/m
	q    float64 // dynamic pressure in Pa
	cap  string  // the limit that stops Re/m rising
	// edge: even p0 at its minimum needs T0 above the floor to keep q under the
	// ceiling (real-gas nitrogen where q falls as it warms, near a high T0 floor);
	// p0 is then pinned at its minimum and T0 is the free variable from t up.
	edge bool
	v    float64 // speed, m/s
	// fail: no setting meets both the q ceiling and the Re/m ceiling (real-gas
	// nitrogen warmed at p0 min).
	fail bool
}

// candidate is a full candidate at (machOrSpeed, s): the test setting and its figures.
type candidate struct {
	ok             bool
	fail           string
	machOrSpeed, s float64
	p0             float64
	t0             float64
	r              float64 // Re/m
	rhi            float64 // highest Re/m usable at this scale
	rlo            float64
	q              float64
	v              float64 // speed, m/s
	capHi          string  // what limits rhi
	// hiLazy: rhi and capHi are the set-up's top setting, not computed
	// (machSetup.topLazy; the solver's hiOf gives them). The load limit does
	// not cap them (capHi is not its name).
	hiLazy bool
	k      key
	// Water with the cavitation number in the objective: the chosen test-section
	// static pressure in Pa and the cavitation number there.
	ps, sig float64
	// With the priority of the cavitation number, then the Reynolds number
	// (atWaterCav): top says the candidate is the warmest usable water, inside
	// the cavitation band and short of the flight's Reynolds number; band is
	// how far σ at the warmest usable water lies inside the band (< 0 outside
	// it), bandOK that it is known. The speed search finds the speed where
	// top ends as a root of band (speedEdge).
	top    bool
	band   float64
	bandOK bool
	// bandLo is σ at the highest static pressure at the warmest usable water
	// less the band's lower end (known with band): it falls as the speed
	// rises, and the speed where it reaches 0 ends the warmest water's stretch
	// in the band.
	bandLo float64
}

// solver holds one planning problem in the form the search needs. Relaxed copies
// of it give the binding gains.
type solver struct {
	// The problem as given, and the figures read from it most.
	p      *Problem
	f      *facilities.Facility
	fl     FlightState
	art    *Article
	L      float64 // full-scale reference length, m
	liquid bool
	obj    objective
	// marine: the full-scale condition is a vessel in water (Flight.Marine);
	// noMach: the Mach number is no target (water facility or marine condition);
	// held: a water facility that sets its test-section static pressure; cav: the
	// objective looks at the cavitation number (marine condition, water facility).
	marine, noMach, held, cav bool

	// The limits that do not depend on the scale: the load limit (scaled by
	// loadScale when a binding gain relaxes it), the lowest condensation margin
	// allowed, and the ceilings on q (Pa) and Re/m (1/m); +Inf when absent.
	load      LoadLimit
	loadName  string
	loadScale float64
	// floor is the lower limit on q (Problem.LoadFloor), scaled by floorScale
	// when a binding gain relaxes it.
	floor      LoadFloor
	floorName  string
	floorScale float64
	condMin    float64
	// boilMin and cavMin are the lowest boiling and cavitation margins allowed
	// (water; 0, or −0.01 when a binding gain relaxes them).
	boilMin, cavMin float64
	// cavAllowed: the problem allows a cavitating test section (CavitationAllowed).
	cavAllowed bool
	qmax       float64
	remax      float64

	// The model scales searched: fixed, a list or a range (kind), from sLo to sHi,
	// with the limits that set the ends of a range ("" for none).
	kind     int
	scales   []float64
	sLo, sHi float64
	sLoName  string
	sHiName  string

	// The search range of the test Mach number (speed in m/s in water).
	machOrSpeedMin, machOrSpeedMax float64

	// aim is the free-stream Mach number aimed at: the flight's over aimRatio, the
	// wall correction's M_c/M at the plan when the corrected Mach number is matched
	// (solveCorrected), else 1.
	aim, aimRatio float64

	// The search's count of state evaluations, and the warnings for the answer.
	evals    int
	warnings []string

	// noPolish skips the joint refinement of a weighted objective (polish), for
	// the tests that compare the structured search alone with it.
	noPolish bool
	// noCavEnd skips the cavitation search's certificates of an end
	// temperature (cavEnd, cavEndWeighted), for the test that compares the
	// full search with them.
	noCavEnd bool
	// loadMemo keeps the load limit's last answers (loadQ); a relaxed copy
	// shares the limit, and so the answers, and scales its own.
	loadMemo loadMemo
	// slopeRoot: a weighted cavitation search refines an interior grid
	// temperature by the root of the weighted sum's slope (cavSlopeRoot)
	// instead of Brent's method: set while the trade curve is computed,
	// whose points stand alone (in the search, the refinement's figure at
	// one speed is compared with others' to the rounding of a flat minimum,
	// and where a continuum of settings meets every target, which the
	// rounding picks moves the plan).
	slopeRoot bool
	// topOnly: set while the trade curve is computed (trade), whose points
	// read a new set-up for its top setting alone (atTarget with no target
	// Re/m): a nitrogen set-up there may be partial (topPartial).
	topOnly bool
	// ceilHist holds the trade curve's last q-ceiling roots, from which
	// topPartial predicts the next one.
	ceilHist ceilingHistory
	// joints are the last q-ceiling points of the joint step (ceilingJoint),
	// which start the next one at a Mach number within jointNear.
	joints jointMemos
	// noPartial keeps every set-up whole (no topPartial), for the test that
	// compares the trade curve with and without partial set-ups.
	noPartial bool
	// noTopPredict starts a trade point's q-ceiling root outside topPartial
	// (a scan's set-up with its top left to its readers, a whole set-up)
	// from the secant across [pa, pTop] instead of the curve's last roots,
	// for the test that compares the two.
	noTopPredict bool
	// noTradeStop stops the trade curve's q-ceiling roots as the search's
	// (ceilingJointFrom's 1e-8, not jointTradeStop): the reference of
	// TestTradeJointStop.
	noTradeStop bool
	// noLazyTop computes every nitrogen set-up's top setting in prepare (no
	// topLazy), for the test that compares candidates and plans both ways.
	noLazyTop bool
	// keepRef computes a trade point's reference state at (p0 min, the
	// warmest T0) where prepareNitrogen would leave it (noRef), for the test
	// that compares the trade curve both ways.
	keepRef bool
	// gridCut, where set, evaluates the grid of the next gridMin call, given
	// the grid's best candidate so far; gridMin takes it (and clears it, so
	// that the searches nested inside an evaluation do not see it). A
	// vessel's weighted speed search sets it (cavSpeedCut).
	gridCut func(machOrSpeed float64, best candidate) candidate
	// noSpeedCut keeps every speed of the weighted speed search's grid
	// (cavSpeedCut off), for the test that compares the search with it.
	noSpeedCut bool
	// noExactScale searches as before froudeScale and rulesScaled: the
	// scales at each speed by the golden section where froudeScale would
	// give the best directly, and the joint refinement always, for the tests
	// that compare the two.
	noExactScale bool
	// scaleGolden counts the golden sections over the scales the search ran
	// since its solve began (bestOverScalesAt, bestInScaleRange): none where
	// every speed's (Mach number's) best scale came exactly, from froudeScale
	// or the scale's rules.
	scaleGolden int
	// polishEvals counts the refinement's objective evaluations.
	polishEvals int
	// polishImproved: the refinement found a better plan than the structured
	// search (the binding gains' re-solves refine only then).
	polishImproved bool
	// warmAt is the Mach number (speed) of the plan a re-solve starts from,
	// and warmCell the width of one cell of the grid that found it (0 in a
	// first solve): the re-solve searches the interval that holds warmAt
	// from one cell either side of it (solve).
	warmAt, warmCell float64
	// ivs are the feasible Mach (speed) intervals of the last solve, ivsFails
	// the limits that rule out the rest; ivsKnown: the next solve reuses them
	// (the Mach aim moves, the limits do not).
	ivs      []interval
	ivsFails []string
	ivsKnown bool

	// memo holds the states computed last (state; real-gas nitrogen only).
	memo *stateMemos
	// st is the state stateAt computed last without a memo.
	st facilities.State
	// stags holds the stagnation states computed last (real-gas nitrogen
	// only), shared with the relaxed copies: a stagnation state does not
	// depend on any limit.
	stags *stagnations
	// cond holds the condensation line of the local expansion found so far
	// (nitrogen; nil otherwise): it does not depend on the Mach number, so
	// every set-up, and every re-solve that keeps the T0 range and the
	// condensation limit, shares it.
	cond *condLineCache
	// setups keeps the set-ups prepared, by Mach number (real-gas nitrogen;
	// nil otherwise): the search, the trade curve and the re-solves that relax
	// no limit a set-up reads share them.
	setups *setupCache
	// qSetups are the set-ups of the solver this one relaxes the q ceiling
	// of (nil otherwise): a set-up reads the ceiling only in its check of q
	// at p0 min and in its top setting, so one of them that the search
	// left to its readers (topLazy) is this solver's as it stands.
	qSetups *setupCache
	// noQSetups prepares a q ceiling's relaxed copy's set-ups anew (no
	// qSetups), for the test that compares the two.
	noQSetups bool
	// noSetupStates asks the solver's states for the T0 floor at p0 min,
	// Re/m on it and q and V at the reference state again where a nitrogen
	// set-up holds them (floorP, raFloor, stRef), for the test that compares
	// the two.
	noSetupStates bool
	// water keeps water's properties by temperature (a water facility's
	// plans; nil otherwise), shared with the relaxed copies.
	water *waterMemo
	// feasOnly: the search asks only whether a candidate exists
	// (feasibleMachOrSpeed), and the cavitation search (atWaterCav) returns
	// its first usable one.
	feasOnly bool
	// grids keeps the water's properties on the temperature grids of the
	// cavitation search (atWaterCav; nil until it runs).
	grids *waterGrids
	// spare and spareFacility are the relaxed copy of the solver and of its
	// facility that the binding gains' re-solves reuse (relaxed); nil until
	// the first, or the plan's scratch's.
	spare         *solver
	spareFacility *facilities.Facility
	// scratch is the plan's pooled scratch (Plan), nil outside Plan.
	scratch *planScratch
	// kept holds the best candidates over the scales found at the last Mach
	// numbers (bestOverScales; an ideal gas with a priority objective, nil
	// otherwise); a relaxed copy keeps its own.
	kept *keptCandidates
}

// planScratch is the memory of a plan's solver and of the relaxed copy its
// binding gains reuse: Plan takes it from scratchPool and returns it cleared
// but for the set-ups' memory, emptied, since nothing of a plan's answer
// points into a solver (the answer copies its figures, notes and lists).
type planScratch struct {
	sv, spare solver
	facility  facilities.Facility
	// The memory of a nitrogen plan's solver (sv.setups, cond, memo, stags)
	// and of the relaxed copies that keep their own (spare...): the set-ups'
	// and the condensation line's slices are emptied, not cleared, between
	// plans, so that their memory is reused.
	setups, spareSetups setupCache
	cond, spareCond     condLineCache
	memo, spareMemo     stateMemos
	stags               stagnations
	// The water's properties on a vessel plan's temperature grids
	// (solver.grids), shared by its relaxed copies.
	grids waterGrids
	// The best candidates kept by an ideal-gas plan's solver and by the
	// relaxed copy (solver.kept), allocated once: Plan's clearing of the
	// scratch keeps the pointer, the solvers empty them.
	kept *[2]keptCandidates
}

// setupCache keeps a solver's set-ups by Mach number (speed): keys sorted by
// it, each with the index of its set-up in kept, kept in the order prepared.
// A map from Mach number to set-up allocated every set-up apart (a value
// larger than 128 bytes is held out of line), 53 a nitrogen plan.
type setupCache struct {
	keys []setupKey
	kept []machSetup
}

// setupKey is where the set-up at Mach number (speed) u lies in
// setupCache.kept.
type setupKey struct {
	u float64
	i int
}

// reset empties sc, keeping its memory.
func (sc *setupCache) reset() { sc.keys, sc.kept = sc.keys[:0], sc.kept[:0] }

// find returns where u lies in sc.keys: its index, found, or where it would
// be inserted.
// It is slices.BinarySearchFunc by cmp.Compare written out (a NaN, never
// kept, is found nowhere and goes first).
func (sc *setupCache) find(u float64) (int, bool) {
	if u != u {
		return 0, false
	}
	keys := sc.keys
	i, j := 0, len(keys)
	for i < j {
		h := int(uint(i+j) >> 1)
		if keys[h].u < u {
			i = h + 1
		} else {
			j = h
		}
	}
	return i, i < len(keys) && keys[i].u == u
}

// get returns the set-up kept at u.
func (sc *setupCache) get(u float64) (*machSetup, bool) {
	if i, ok := sc.find(u); ok {
		return &sc.kept[sc.keys[i].i], true
	}
	return nil, false
}

// put keeps c as the set-up at u (not NaN, never found as a map's key).
func (sc *setupCache) put(u float64, c *machSetup) {
	if u != u {
		return
	}
	i, ok := sc.find(u)
	if ok {
		sc.kept[sc.keys[i].i] = *c
		return
	}
	sc.kept = append(sc.kept, *c)
	sc.keys = slices.Insert(sc.keys, i, setupKey{u, len(sc.kept) - 1})
}

var scratchPool = sync.Pool{New: func() any { return new(planScratch) }}

// newSolver validates the problem and sets up the search.
func newSolver(p *Problem) (*solver, error) { return newSolverIn(new(solver), p, nil) }

// newSolverIn is newSolver in sv, a zero solver, with the plan's scratch sc
// (nil outside Plan), whose memory keeps a nitrogen plan's states and
// set-ups.
func newSolverIn(sv *solver, p *Problem, sc *planScratch) (*solver, error) {
	if p == nil || p.Facility == nil || p.Article == nil {
		return nil, check.Invalid("incomplete problem", []check.FieldError{{Field: "facility", Message: "a problem needs a flight, an article and a facility"}})
	}
	*sv = solver{p: p, f: p.Facility, fl: p.Flight, art: p.Article, L: p.Article.ReferenceLength,
		loadScale: 1, load: p.LoadLimit, floor: p.LoadFloor, floorScale: 1, aim: p.Flight.Mach, aimRatio: 1, scratch: sc}
	if err := sv.checkInput(); err != nil {
		return nil, err
	}
	sv.liquid = sv.f.Medium.IsLiquid()
	if sv.load != nil {
		sv.loadName = sv.load.Name()
		if sv.loadName == "" {
			sv.loadName = facilities.ConstraintBalance
		}
	}
	if sv.floor != nil {
		sv.floorName = sv.floor.FloorName()
		if sv.floorName == "" {
			sv.floorName = facilities.ConstraintResolution
		}
	}
	sv.marine = sv.fl.Marine != nil
	sv.noMach = sv.liquid || sv.marine
	sv.held = sv.liquid && sv.f.StaticPressure != nil
	sv.cavAllowed = p.CavitationAllowed
	if err := sv.checkObjective(); err != nil {
		return nil, err
	}
	sv.setObjective()
	if err := sv.setLimits(); err != nil {
		return nil, err
	}
	if sv.f.Medium.Kind == facilities.MediumNitrogen {
		// A set-up of real-gas nitrogen costs tens of states; one of an ideal
		// gas or water a few, less than keeping it.
		if sc != nil {
			sc.cond.reset()
			sc.setups.reset()
			sc.memo, sc.stags = stateMemos{}, stagnations{}
			sv.cond, sv.setups, sv.memo, sv.stags = &sc.cond, &sc.setups, &sc.memo, &sc.stags
		} else {
			sv.cond = newCondLineCache()
			sv.setups = new(setupCache)
			sv.memo = &stateMemos{}
			sv.stags = &stagnations{}
		}
	}
	if sv.liquid {
		sv.water = &waterMemo{}
	}
	if sv.keepsCandidates() {
		if sc != nil {
			if sc.kept == nil {
				sc.kept = new([2]keptCandidates)
			}
			sv.kept = &sc.kept[0]
			sv.kept.reset()
		} else {
			sv.kept = new(keptCandidates)
		}
	}
	return sv, nil
}

// keepsCandidates reports whether the solver keeps its best candidates over
// the scales by Mach number (kept): in an ideal gas with a priority
// objective that does not name the Froude number, where the search meets a
// Mach number again: a fixed scale without a load floor (the search's grid
// holds the feasibility scan's nine Mach numbers, whose candidates are the
// scan's), or closed walls and a test matrix's drag range (the wall
// correction moves the Mach aim, and the re-solve looks again at the cells
// and the end the solve before it looked at last; solveCorrected). There a
// candidate's setting depends on the solver's limits alone, not on the
// Mach aim, and so does the best over the scales at one Mach number (its
// Mach level is the same at every scale); only its key reads the aim (the
// Mach band), and a candidate kept from an earlier aim gets its key again
// (keptCandidates.get). In nitrogen a set-up starts roots from the states
// found before it (jointMemos, the condensation line), so one computed again
// may differ in rounding, and a weighted sum adds the Mach term to the
// others before they are compared.
func (sv *solver) keepsCandidates() bool {
	if sv.liquid || sv.f.Medium.Kind == facilities.MediumNitrogen || sv.obj.weighted || sv.froudeMatters() {
		return false
	}
	return sv.kind == scaleFixed && sv.floor == nil ||
		sv.p.MatrixDrag != nil && sv.f.TestSection.Walls == facilities.WallsClosed && !sv.noMach
}

// keptCandidates are the best candidates over the scales a solver found at
// its first Mach numbers (bestOverScales, and the feasibility scan's with a
// fixed scale), with the Mach aim their keys were computed at and the
// golden sections over the scales that found them.
type keptCandidates struct {
	n int
	u [keptSize]float64 // the Mach numbers, apart for a quick look
	e [keptSize]keptCandidate
}

// keptSize is how many candidates keptCandidates holds: a fixed-scale
// solve's nine scan points, its seventeen grid points (eight of them new),
// the end's neighbour and the aim, and the re-solves' new points, with room.
const keptSize = 32

// keptCandidate is one entry of keptCandidates.
type keptCandidate struct {
	aim, aimRatio float64 // the solver's when x.k was computed
	golden        int     // the golden sections over the scales that found x
	x             candidate
}

// reset empties kc.
func (kc *keptCandidates) reset() { kc.n = 0 }

// put keeps x, the best candidate over the scales at Mach number u found
// with golden sections over the scales, whose key sv computed; once kc is
// full, nothing more.
func (kc *keptCandidates) put(sv *solver, u float64, x *candidate, golden int) {
	if kc.n == keptSize {
		return
	}
	kc.u[kc.n] = u
	e := &kc.e[kc.n]
	e.aim, e.aimRatio, e.golden, e.x = sv.aim, sv.aimRatio, golden, *x
	kc.n++
}

// get returns the candidate kept at Mach number u, with its key computed
// again where the solver's Mach aim has moved since (keyOf, as atWindow
// computes it: the flight's Re/m at the candidate's scale met where the
// setting reached it), and the golden sections that found it.
func (kc *keptCandidates) get(sv *solver, u float64) (candidate, int, bool) {
	for i := kc.n - 1; i >= 0; i-- {
		if kc.u[i] != u {
			continue
		}
		e := &kc.e[i]
		if e.x.ok && (e.aim != sv.aim || e.aimRatio != sv.aimRatio) {
			x := &e.x
			met := x.r == sv.fl.Reynolds/(x.s*sv.L)
			x.k = sv.keyOf(x.machOrSpeed, x.s, x.r, x.q, x.v, met, 0)
			e.aim, e.aimRatio = sv.aim, sv.aimRatio
		}
		return e.x, e.golden, true
	}
	return candidate{}, 0, false
}

// checkInput validates the parts of the problem the planner reads.
func (sv *solver) checkInput() error {
	if !plannable(sv.f) {
		// Validate names every bad field; it is only called when something the
		// planner relies on is off, since it is the costlier check.
		if err := sv.f.Validate(); err != nil {
			return err
		}
		return check.Invalid("invalid facility", []check.FieldError{{Field: "facility",
			Message: "the facility lacks a usable test section, pressure or temperature range"}})
	}
	if err := check.Invalid("invalid article", sv.art.geometryErrors("reference_length", "span", "frontal_area", "reference_area")); err != nil {
		return err
	}
	full := sv.fl.Mach > 0 && sv.fl.TrueAirspeed > 0
	if m := sv.fl.Marine; m != nil {
		full = m.Speed > 0 && m.Cavitation > 0 && !math.IsInf(m.Cavitation, 0)
	}
	if !(sv.fl.Reynolds > 0 && full) || sv.fl.ReferenceLength != sv.L {
		return check.Invalid("invalid flight condition", []check.FieldError{{Field: "flight",
			Message: "the flight must be resolved (Flight.Resolve) on the article's reference length"}})
	}
	if err := sv.p.Model.Validate(); err != nil {
		return err
	}
	return sv.p.Objective.Validate()
}

// plannable reports whether the facility has what the planner divides by and
// searches over: a test section of positive size, positive ordered stagnation
// ranges, ordered Mach and speed ranges, positive optional limits, and a known
// medium with positive constants.
func plannable(f *facilities.Facility) bool {
	pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 1) }
	rng := func(r *facilities.Range, strict bool) bool {
		return r == nil || (r.Min >= 0 && r.Min <= r.Max && !math.IsInf(r.Max, 1) && (!strict || r.Min > 0))
	}
	opt := func(v *float64) bool { return v == nil || pos(*v) }
	m := f.Medium
	switch m.Kind {
	case facilities.MediumAir, facilities.MediumNitrogen, facilities.MediumWater:
	case facilities.MediumGas:
		if g := m.Gas; g == nil || !pos(g.MolarMass) || !pos(g.Gamma) || g.Gamma <= 1 || !pos(g.ViscosityReference) ||
			!pos(g.TemperatureReference) || !(g.SutherlandConstant >= 0) {
			return false
		}
	default:
		return false
	}
	ts := f.TestSection
	return pos(ts.Width) && pos(ts.Height) && pos(ts.CrossSection()) &&
		(rng(&f.StagnationPressure, true) || f.StaticPressure != nil && rng(f.StaticPressure, true)) && rng(&f.StagnationTemperature, true) &&
		rng(f.Mach, false) && rng(f.Speed, false) && (f.Mach != nil || f.Speed != nil) &&
		opt(f.MaxDynamicPressure) && opt(f.MaxReynoldsPerMeter) && opt(f.MaxSpanFraction) && opt(f.MaxBlockage)
}

// checkObjective refuses a cavitation target without a marine condition: an
// aircraft has no cavitation number.
func (sv *solver) checkObjective() error {
	if sv.marine {
		return nil
	}
	o := sv.p.Objective
	var fe []check.FieldError
	for i, g := range o.Priority {
		if g == GroupCavitation {
			fe = append(fe, check.FieldError{Field: fmt.Sprintf("objective.priority[%d]", i),
				Message: "the cavitation number needs a full-scale condition in water: give marine instead of flight"})
		}
	}
	if w, ok := o.Weights[GroupCavitation]; ok && w > 0 {
		fe = append(fe, check.FieldError{Field: "objective.weights.cavitation",
			Message: "the cavitation number needs a full-scale condition in water: give marine instead of flight"})
	}
	return check.Invalid("invalid objective", fe)
}

// setObjective turns the request's objective into index form and notes what it
// cannot honour.
func (sv *solver) setObjective() {
	o := sv.p.Objective
	sv.obj.tol = DefaultMachTolerance
	if o.MachTolerance != nil {
		sv.obj.tol = *o.MachTolerance
	}
	sv.obj.cavTol = DefaultCavitationTolerance
	if o.CavitationTolerance != nil {
		sv.obj.cavTol = *o.CavitationTolerance
	}
	noMachWhy := "the Mach number is not a target in a water facility"
	if sv.marine {
		noMachWhy = "the Mach number is not a target for a vessel in water"
	}
	const noCavWhy = "the cavitation number is not a target in a gas facility"
	if len(o.Weights) > 0 {
		sv.obj.weighted = true
		for g, w := range o.Weights {
			sv.obj.w[groupIndex[g]] = w
		}
		if sv.noMach && sv.obj.w[gMach] > 0 {
			sv.obj.w[gMach] = 0
			sv.warnings = append(sv.warnings, noMachWhy+": its weight is ignored")
		}
		if !sv.liquid && sv.obj.w[gCavitation] > 0 {
			sv.obj.w[gCavitation] = 0
			sv.warnings = append(sv.warnings, noCavWhy+": its weight is ignored")
		}
		if sv.obj.w == [nGroups]float64{} {
			sv.obj.w[gReynolds] = 1
		}
		sv.cav = sv.obj.w[gCavitation] > 0
		return
	}
	prio := o.Priority
	if prio == nil {
		switch {
		case sv.marine && sv.liquid:
			prio = []string{GroupCavitation, GroupReynolds}
		case sv.noMach:
			prio = []string{GroupReynolds}
		default:
			prio = []string{GroupMach, GroupReynolds}
		}
	}
	for _, g := range prio {
		if sv.noMach && g == GroupMach {
			if o.Priority != nil {
				sv.warnings = append(sv.warnings, noMachWhy+": it is left out of the priority list")
			}
			continue
		}
		if !sv.liquid && g == GroupCavitation {
			sv.warnings = append(sv.warnings, noCavWhy+": it is left out of the priority list")
			continue
		}
		if g == GroupCavitation {
			sv.cav = true
		}
		sv.obj.levels = append(sv.obj.levels, groupIndex[g])
	}
	if len(sv.obj.levels) == 0 {
		sv.obj.levels = []int{gReynolds}
	}
}

// froudeMatters reports whether the objective looks at the Froude number.
func (sv *solver) froudeMatters() bool {
	if sv.obj.weighted {
		return sv.obj.w[gFroude] > 0
	}
	for _, g := range sv.obj.levels {
		if g == gFroude {
			return true
		}
	}
	return false
}

// machBand returns the ends of the Mach band that counts as matched, M ± tol.
// The search and the key both take the band from here, so that they agree to the
// bit on its ends.
func (sv *solver) machBand() (lo, hi float64) {
	return (sv.fl.Mach - sv.obj.tol) / sv.aimRatio, (sv.fl.Mach + sv.obj.tol) / sv.aimRatio
}

// machRatio returns M_c/M, the wall-corrected over the free-stream Mach number, of
// a model of scale s at free-stream Mach number machOrSpeed, with the blockage at the middle
// of the matrix's drag range (facilities.MachRatio); 1 when no correction applies
// (no matrix, a liquid, walls other than closed, M ≥ 1).
func (sv *solver) machRatio(machOrSpeed, s float64) float64 {
	d := sv.p.MatrixDrag
	if d == nil || sv.noMach {
		return 1
	}
	s2 := s * s
	solid, wake, ok := facilities.BlockageFactors(sv.f, sv.art.FrontalArea*s2, sv.art.ReferenceArea*s2, machOrSpeed)
	if !ok {
		return 1
	}
	return facilities.MachRatio(machOrSpeed, solid+wake*0.5*(d.Min+d.Max))
}

// maxAimSteps is the most re-solves that move the Mach aim (solveCorrected).
const maxAimSteps = 8

// solveCorrected solves and, when the walls take a blockage correction, divides the
// Mach band [M − tol, M + tol] and the aim by r = machRatio at the plan found, and
// solves again until r moves by less than 1e-14: a fixed point at which the band
// holds the corrected Mach number of the plan's own scale and Mach number. The
// scale and Mach number are searched with r held at the plan's value, so a plan at
// another scale is judged with the plan's blockage, not its own (a difference of
// the order of the change of ε between the scales times the Mach tolerance).
//
// Each solve after the first keeps the feasible intervals and searches from the
// plan before it, one grid cell either side (a warm start: the aim moves by the
// change of r, 1e-4 relative at most after the first solve).
func (sv *solver) solveCorrected() (candidate, error) {
	best, err := sv.solve()
	warm, cell := sv.warmAt, sv.warmCell
	for i := 0; err == nil && i < maxAimSteps; i++ {
		r := sv.machRatio(best.machOrSpeed, best.s)
		if math.Abs(r-sv.aimRatio) <= 1e-14 {
			break
		}
		sv.aimRatio, sv.aim = r, sv.fl.Mach/r
		sv.warmAt, sv.warmCell, sv.ivsKnown = best.machOrSpeed, sv.cellAt(best.machOrSpeed), true
		best, err = sv.solve()
	}
	sv.warmAt, sv.warmCell, sv.ivsKnown = warm, cell, false
	return best, err
}

// machFirst reports whether the first priority is the Mach number.
func (sv *solver) machFirst() bool {
	return !sv.obj.weighted && !sv.noMach && sv.obj.levels[0] == gMach
}

// unprocessable returns the 422 error of an infeasible problem.
func unprocessable(msg string, limits ...string) error {
	seen := map[string]bool{}
	var ls []string
	for _, l := range limits {
		if l != "" && !seen[l] {
			seen[l] = true
			ls = append(ls, l)
		}
	}
	sort.Strings(ls)
	return &check.Error{Code: check.CodeUnprocessable, Message: msg, Limits: ls}
}

// spanFraction returns the facility's span limit as a fraction of the width; a
// model wider than the test section never fits, so nil is 1.
func (sv *solver) spanFraction() float64 { return spanFraction(sv.f) }

// spanFraction returns f's max_span_fraction, 1 when absent.
func spanFraction(f *facilities.Facility) float64 {
	if f.MaxSpanFraction != nil {
		return *f.MaxSpanFraction
	}
	return 1
}

// geomScale returns the largest scale the test section takes and the limit that
// sets it (GeometricScale).
func (sv *solver) geomScale() (float64, string) { return GeometricScale(sv.f, sv.art) }

// GeometricScale returns the largest model scale facility f's test section takes
// for article a, and the limit that sets it: the span at most max_span_fraction
// of the width (a model wider than the test section never fits, so an absent
// fraction is 1) and the frontal area at most max_blockage of the section's
// cross-section.
func GeometricScale(f *facilities.Facility, a *Article) (float64, string) {
	s := spanFraction(f) * f.TestSection.Width / a.Span
	name := facilities.ConstraintSpan
	if b := f.MaxBlockage; b != nil {
		if sb := math.Sqrt(*b * f.TestSection.CrossSection() / a.FrontalArea); sb < s {
			s, name = sb, facilities.ConstraintBlockage
		}
	}
	return s, name
}

// setLimits fixes the scale set, the dynamic-pressure and Re/m ceilings and the
// range of the test Mach number (speed in water).
func (sv *solver) setLimits() error {
	f := sv.f
	sv.qmax, sv.remax = math.Inf(1), math.Inf(1)
	if f.MaxDynamicPressure != nil {
		sv.qmax = *f.MaxDynamicPressure
	}
	if f.MaxReynoldsPerMeter != nil {
		sv.remax = *f.MaxReynoldsPerMeter
	}
	sg, gname := sv.geomScale()
	m := sv.p.Model
	switch {
	case m.Scale != nil:
		sv.kind = scaleFixed
		if *m.Scale > sg*(1+limitSlack) {
			return unprocessable(fmt.Sprintf("a model at scale %.4g does not fit the test section: the largest is %.4g", *m.Scale, sg),
				gname, "model.scale")
		}
		sv.scales = []float64{*m.Scale}
		sv.sLo, sv.sHi = *m.Scale, *m.Scale
	case len(m.Scales) > 0:
		sv.kind = scaleList
		for _, s := range m.Scales {
			if s > sg*(1+limitSlack) {
				sv.warnings = append(sv.warnings, fmt.Sprintf("the model at scale %.4g does not fit the test section (%s allows up to %.4g): left out", s, gname, sg))
				continue
			}
			sv.scales = append(sv.scales, s)
		}
		if len(sv.scales) == 0 {
			return unprocessable(fmt.Sprintf("none of the listed models fits the test section: the largest scale is %.4g", sg), gname, "model.scales")
		}
		sort.Float64s(sv.scales)
		sv.sLo, sv.sHi = sv.scales[0], sv.scales[len(sv.scales)-1]
	default:
		sv.kind = scaleRange
		sv.sLo, sv.sLoName = DefaultScaleMin, ""
		if m.ScaleMin != nil {
			sv.sLo, sv.sLoName = *m.ScaleMin, facilities.ConstraintScaleMin
		} else if sv.sLo > sg {
			sv.sLo = 1e-3 * sg
		}
		sv.sHi, sv.sHiName = sg, gname
		if m.ScaleMax != nil && *m.ScaleMax < sg {
			sv.sHi, sv.sHiName = *m.ScaleMax, facilities.ConstraintScaleMax
		}
		if sv.sLo > sv.sHi {
			return unprocessable(fmt.Sprintf("no model between scale %.4g and %.4g fits the test section: the largest is %.4g", sv.sLo, sv.sHi, sg),
				gname, facilities.ConstraintScaleMin)
		}
	}
	return sv.setURange()
}

// setURange sets the search range of the test Mach number (gas) or speed (water).
func (sv *solver) setURange() error {
	f := sv.f
	if sv.liquid {
		if f.Speed == nil {
			return unprocessable("a water facility needs a speed range", facilities.ConstraintSpeedMin, facilities.ConstraintSpeedMax)
		}
		sv.machOrSpeedMin, sv.machOrSpeedMax = f.Speed.Min, f.Speed.Max
		return nil
	}
	lo, hi := 0.0, facilities.MaxSettingMach
	if f.Mach != nil {
		lo, hi = f.Mach.Min, f.Mach.Max
	}
	if f.Speed != nil {
		// The lowest Mach number comes with the lowest speed at the highest T0, the
		// highest with the highest speed at the lowest T0; for real-gas nitrogen
		// the speed of sound also depends on p0 (it falls as p0 rises when cold,
		// rises slightly when warm), so both ends of the p0 range are tried (an
		// ideal gas gives the same at both).
		mlo, mhi := math.Inf(1), 0.0
		for _, p0 := range []float64{f.StagnationPressure.Min, f.StagnationPressure.Max} {
			if st, err := f.State(facilities.Setting{Speed: f.Speed.Min, StagnationPressure: p0, StagnationTemperature: f.StagnationTemperature.Max}); err == nil {
				mlo = min(mlo, st.Mach)
			}
			if st, err := f.State(facilities.Setting{Speed: f.Speed.Max, StagnationPressure: p0, StagnationTemperature: f.StagnationTemperature.Min}); err == nil {
				mhi = max(mhi, st.Mach)
			}
			sv.evals += 2
		}
		if !math.IsInf(mlo, 1) {
			lo = max(lo, mlo)
		}
		if mhi > 0 {
			hi = min(hi, mhi)
		}
	}
	if !(lo <= hi) || hi <= 0 {
		return unprocessable("the facility's Mach and speed ranges do not overlap at any stagnation temperature",
			facilities.ConstraintMachMin, facilities.ConstraintMachMax, facilities.ConstraintSpeedMin, facilities.ConstraintSpeedMax)
	}
	sv.machOrSpeedMin, sv.machOrSpeedMax = max(lo, 1e-6), hi
	return nil
}

// state returns the facility state at machOrSpeed, p0, T0; err reports an unusable setting
// (for nitrogen: the free stream at saturation).
func (sv *solver) state(machOrSpeed, p0, t0 float64) (facilities.State, error) {
	if sv.memo == nil {
		// An ideal gas's or water's state costs less than keeping it.
		return sv.stateNow(machOrSpeed, p0, t0)
	}
	st, err := sv.stateAt(machOrSpeed, p0, t0)
	return *st, err
}

// stateAt is state read in place: the state kept in the solver's memo
// (sv.stateNow's, in sv.st, without one), valid until the solver's next
// state. A real-gas nitrogen state is computed straight into the memo
// (stateNowIn); state copied the 96-byte State and its error out of the
// memo on every call, and into it on every miss after its way back through
// stateNow and the facility's state (about 240 misses and 250 hits a
// weighted cn2-05 plan).
func (sv *solver) stateAt(machOrSpeed, p0, t0 float64) (*facilities.State, error) {
	ms := sv.memo
	if ms == nil {
		var err error
		sv.st, err = sv.stateNow(machOrSpeed, p0, t0)
		return &sv.st, err
	}
	for i := range ms.e {
		if m := &ms.e[i]; m.set && m.u == machOrSpeed && m.p == p0 && m.t == t0 {
			return &m.st, m.err
		}
	}
	m := &ms.e[ms.next]
	ms.next = (ms.next + 1) % len(ms.e)
	m.set, m.u, m.p, m.t = true, machOrSpeed, p0, t0
	m.err = sv.stateNowIn(&m.st, machOrSpeed, p0, t0)
	return &m.st, m.err
}

// stateMemos are the states a solver computed last, next the one to replace.
type stateMemos struct {
	e    [2]stateMemo
	next int
}

// stateMemo is one state the solver computed last (solver.memo): the search asks
// for the state it has just computed again (the T0 floor found, then its state).
type stateMemo struct {
	set     bool
	u, p, t float64
	st      facilities.State
	err     error
}

// stateNow computes the facility state at machOrSpeed, p0, T0 (state).
func (sv *solver) stateNow(machOrSpeed, p0, t0 float64) (facilities.State, error) {
	sv.evals++
	if sv.water != nil {
		if st, ok := sv.waterStateKept(machOrSpeed, p0, t0); ok {
			return st, nil
		}
	}
	set := facilities.Setting{StagnationPressure: p0, StagnationTemperature: t0}
	if sv.liquid {
		set.Speed = machOrSpeed
	} else {
		set.Mach = machOrSpeed
	}
	if sv.stags != nil {
		return sv.f.StateFrom(sv.stags.at(p0, t0), set)
	}
	return sv.f.State(set)
}

// stateNowIn is stateNow into *st: a real-gas nitrogen state from its
// stagnation state kept (stagnations) is written there in place
// (facilities.Facility.StateFromIn).
func (sv *solver) stateNowIn(st *facilities.State, machOrSpeed, p0, t0 float64) error {
	if sv.stags == nil || sv.liquid || sv.water != nil {
		var err error
		*st, err = sv.stateNow(machOrSpeed, p0, t0)
		return err
	}
	sv.evals++
	return sv.f.StateFromIn(st, sv.stags.at(p0, t0), facilities.Setting{Mach: machOrSpeed, StagnationPressure: p0, StagnationTemperature: t0})
}

// stateIn is state into *st, for a water facility without the solver's
// states kept (solver.memo nil) straight from the water's properties kept
// (waterStateKeptIn), without the three copies of the 96-byte State on
// its way back through state, stateNow and waterStateKept.
func (sv *solver) stateIn(st *facilities.State, machOrSpeed, p0, t0 float64) error {
	if sv.memo == nil && sv.water != nil && sv.waterStateKeptIn(st, machOrSpeed, p0, t0) {
		sv.evals++ // stateNow's count
		return nil
	}
	// Refused (State decides) or kept states: the general path, which asks
	// waterStateKept again where it applies.
	var err error
	*st, err = sv.state(machOrSpeed, p0, t0)
	return err
}

// stagnations are the nitrogen stagnation states a solver computed last, by
// (p0, T0): every set-up expands the same few (p0 min and max at the ends of
// the T0 range and on its floor) to its Mach number, and the local expansion
// of a setting starts where its free stream does.
type stagnations struct {
	e    [8]facilities.Stagnation
	next int
}

// at returns the stagnation state at (p0, t0), computed once while it is
// among the last ones kept.
func (ss *stagnations) at(p0, t0 float64) *facilities.Stagnation {
	for i := range ss.e {
		if g := &ss.e[i]; g.P0 == p0 && g.T0 == t0 && p0 > 0 {
			return g
		}
	}
	g := &ss.e[ss.next]
	facilities.NitrogenStagnationIn(g, p0, t0)
	ss.next = (ss.next + 1) % len(ss.e)
	return g
}

// slot returns where to keep a stagnation state at (p0, t0) computed
// elsewhere (as at computes it, or with starts for its expansions:
// facilities.FloorSlopes.StagnationNearLocalIn), written there in place: the
// one kept at the same (p0, T0), else the next to replace.
func (ss *stagnations) slot(p0, t0 float64) *facilities.Stagnation {
	for i := range ss.e {
		if e := &ss.e[i]; e.P0 == p0 && e.T0 == t0 {
			return e
		}
	}
	e := &ss.e[ss.next]
	ss.next = (ss.next + 1) % len(ss.e)
	return e
}

// floorMargin returns how far the setting (p0, T0) at c's Mach number is above the
// T0 floor, ≥ 0 where it is usable, and the limit that sets the floor there: the
// condensation margin less the allowed minimum (condensation), or, for nitrogen
// with a speed range (c.vmin > 0), V/vmin − 1 (speed_min), whichever is lower. An
// unusable state counts as −1 (condensation).
func (sv *solver) floorMargin(c *machSetup, p0, t0 float64) (float64, string) {
	st, err := sv.stateAt(c.machOrSpeed, p0, t0)
	if err != nil {
		return -1, facilities.ConstraintCondensation
	}
	m, name := sv.condMargin(c.machOrSpeed, st, p0, t0)-sv.condMin, facilities.ConstraintCondensation
	if c.vmin > 0 {
		if v := st.Speed/c.vmin - 1; v < m {
			m, name = v, facilities.ConstraintSpeedMin
		}
	}
	return m, name
}

// condMargin returns the condensation margin of the state st at Mach number
// (speed) u from (p0, T0): the lower of the free stream's and the local
// expansion's (kept by localMargin). In nitrogen up to the local peak Mach
// number it is the local one, the free stream's not computed: along a
// nitrogen isentrope T/T_sat(p) falls as the gas expands, so the free stream,
// on the same isentrope short of the peak, has at least the local margin
// (TestFreeStreamMarginAboveLocal; warmMargin below).
func (sv *solver) condMargin(u float64, st *facilities.State, p0, t0 float64) float64 {
	local := sv.localMargin(p0, t0)
	if sv.f.Medium.Kind == facilities.MediumNitrogen && !sv.liquid && u <= sv.f.CondensationPeak() {
		return local
	}
	return min(sv.f.FreeStreamCondensationMargin(*st), local)
}

// warmMargin is floorMargin where only its sign is read (is the warmest T0
// usable at p0?), without the free stream's state where the local expansion
// decides: with no speed range, at a test Mach number up to the local peak
// Mach number, and a local margin of at least the allowed minimum and 0. The
// free stream then lies on the same isentrope short of the local peak, and
// along a nitrogen isentrope T/T_sat(p) falls as the gas expands (d ln T/d ln p
// at constant entropy is about 0.28, d ln T_sat/d ln p = T_sat/B at most 0.18
// below the critical point), so its margin is at least the local one: usable
// (TestFreeStreamMarginAboveLocal). It returns the local margin less the
// minimum there, else floorMargin's.
func (sv *solver) warmMargin(c *machSetup, p0, t0 float64) (float64, string) {
	if c.vmin == 0 && sv.f.Medium.Kind == facilities.MediumNitrogen && c.machOrSpeed <= sv.f.CondensationPeak() {
		if m := sv.localMargin(p0, t0); m >= sv.condMin && m >= 0 {
			return m - sv.condMin, facilities.ConstraintCondensation
		}
	}
	return sv.floorMargin(c, p0, t0)
}

// loadQ returns the load limit's dynamic-pressure ceiling at scale s and state st.
// The limit's answers at the last two scales and Mach numbers asked are kept
// (loadMemo): LoadLimit reads the state's Mach number and medium alone, and
// the medium is the facility's, so the same scale and Mach number give the
// same answer; a plan asks at few of them (a vessel's 80 to 120 calls a plan
// at 2 to 8 scales). st is read through a pointer, and copied only to ask the
// limit: a State passed by value is twelve numbers loaded at every call.
func (sv *solver) loadQ(s float64, st *facilities.State) float64 {
	if sv.load == nil {
		return math.Inf(1)
	}
	m := &sv.loadMemo
	for i := range m.n {
		if e := &m.e[i]; e.s == s && e.mach == st.Mach {
			return sv.loadScale * e.q
		}
	}
	q := sv.load.MaxDynamicPressure(s, *st)
	m.e[1] = m.e[0]
	m.e[0] = loadMemoEntry{s: s, mach: st.Mach, q: q}
	m.n = min(m.n+1, len(m.e))
	return sv.loadScale * q
}

// loadMemo keeps the load limit's last answers for loadQ, the latest first.
type loadMemo struct {
	e [2]loadMemoEntry
	n int
}

// loadMemoEntry is LoadLimit.MaxDynamicPressure's answer q in Pa at scale s
// and Mach number mach.
type loadMemoEntry struct{ s, mach, q float64 }

// windows returns the load windows at scale s and state st: with a load floor,
// each balance's (LoadFloor.Windows, the floor scaled by floorScale and the
// ceiling by loadScale); without one, a single window from 0 up to the load
// ceiling (+Inf without a load limit).
func (sv *solver) windows(s float64, st facilities.State) []Window {
	if sv.floor == nil {
		return []Window{{Lo: 0, Hi: sv.loadQ(s, &st)}}
	}
	ws := sv.floor.Windows(nil, s, st)
	for i := range ws {
		ws[i].Lo *= sv.floorScale
		ws[i].Hi *= sv.loadScale
	}
	return ws
}

// floorQ returns the least floor of the usable load windows at scale s and
// state st: 0 without a floor, +Inf when no window is usable.
func (sv *solver) floorQ(s float64, st facilities.State) float64 {
	if sv.floor == nil {
		return 0
	}
	lo := math.Inf(1)
	for _, w := range sv.windows(s, st) {
		if w.Lo <= w.Hi*(1+limitSlack) {
			lo = min(lo, w.Lo)
		}
	}
	return lo
}

// bestOfWindows returns the best candidate of at over the load windows at
// scale s (one window without a load floor).
func (sv *solver) bestOfWindows(c *machSetup, s float64, at func(Window) candidate) candidate {
	if sv.floor == nil {
		return at(Window{Lo: 0, Hi: sv.loadQ(s, &c.stRef)})
	}
	best := candidate{machOrSpeed: c.machOrSpeed, s: s, k: worst, fail: sv.floorName}
	for _, w := range sv.windows(s, c.stRef) {
		if !(w.Lo <= w.Hi*(1+limitSlack)) {
			continue
		}
		if x := at(w); x.ok && (!best.ok || x.k.less(best.k)) {
			best = x
		} else if !best.ok && x.fail != "" {
			best.fail = x.fail
		}
	}
	return best
}

// raiseFloor returns c with its lowest stagnation pressure raised to where the
// dynamic pressure at the warmest usable T0 reaches the floor lo (Pa): at any p0
// the least q is there, since q does not depend on T0 in an ideal gas and falls
// as real-gas nitrogen warms. tp is the highest setting under the ceilings; ok is
// false when no p0 up to tp's meets the floor at the warmest T0.
func (sv *solver) raiseFloor(c *machSetup, lo float64, tp topSetting) (machSetup, bool) {
	c2 := *c
	if c.linear {
		p := lo / c.k
		c2.ra = c.ra * p / c.pa
		if c.rloOK {
			c2.rlo = c.rlo * p / c.pa
		}
		c2.pa = p
		return c2, true
	}
	// Real-gas nitrogen: the lowest q at a p0 is at one end of the T0 range (the
	// floor, usually, or the warmest T0), so both ends must reach the floor.
	qLowAt := func(p float64) float64 {
		st, err := sv.state(c.machOrSpeed, p, c.tb)
		if err != nil {
			return -1
		}
		return min(st.DynamicPressure, sv.qcurve(c, p)) - lo
	}
	p := sv.rootHi(qLowAt, c.pa, tp.p, true)
	st, err := sv.state(c.machOrSpeed, p, c.tb)
	if err != nil || qLowAt(p) < -lo*limitSlack {
		return c2, false
	}
	c2.pa, c2.stRef, c2.tRef, c2.k = p, st, c.tb, st.DynamicPressure/p
	c2.qLow = lo + qLowAt(p)
	c2.rlo, c2.rloOK = st.ReynoldsPerMeter, true
	// qa was q at the old pa: qcurve must not answer it for the new one.
	c2.qa, c2.qaOK = 0, false
	c2.raFloor = false // ra is at the old pa until rcurve's below
	c2.ra = sv.rcurve(&c2, p)
	c2.raFloor = !sv.noSetupStates
	return c2, true
}

// topQ returns the highest dynamic pressure in Pa the facility and the load
// limit allow at c's Mach number (speed) and scale s, the Re/m ceiling aside.
func (sv *solver) topQ(c *machSetup, s float64) float64 {
	q := sv.top(c).q
	if sv.liquid {
		q = sv.waterQAt(c, c.ta)
	}
	if sv.load != nil {
		q = min(q, sv.loadQ(s, &c.stRef))
	}
	return q
}

// lowestScale returns the smallest scale in [sLo, sHi] at c's Mach number
// (speed) from which the load floor is within reach of the highest q allowed
// (topQ): sLo without a floor or when it is within reach there, else where the
// two meet (the floor falls as the model grows). At() decides each candidate.
func (sv *solver) lowestScale(c *machSetup) float64 {
	if sv.floor == nil {
		return sv.sLo
	}
	return sv.rootHi(func(s float64) float64 { return sv.topQ(c, s) - sv.floorQ(s, c.stRef) }, sv.sLo, sv.sHi, true)
}

// prepare works out everything at test Mach number (speed) machOrSpeed that does not depend
// on the model scale.
func (sv *solver) prepare(machOrSpeed float64) (c machSetup) {
	sv.prepareIn(&c, machOrSpeed)
	return c
}

// prepareIn is prepare into c. A set-up is 384 bytes: the planner's hot
// callers (the feasibility scan, the search's Mach numbers, the trade curve)
// keep it in their own frame, and an ideal gas's and water's are built there, instead of
// copying it out of each of three calls (about 400 instructions a set-up,
// 112 set-ups an lsw-2 priority plan).
func (sv *solver) prepareIn(c *machSetup, machOrSpeed float64) {
	if sv.setups != nil {
		if k, ok := sv.setups.get(machOrSpeed); ok {
			*c = *k
			return
		}
		if sv.qSetups != nil && sv.qSetupFrom(c, machOrSpeed) {
			sv.setups.put(machOrSpeed, c)
			return
		}
	}
	sv.prepareNowIn(c, machOrSpeed)
	if sv.setups != nil && !c.partial {
		sv.setups.put(machOrSpeed, c)
	}
}

// qSetupFrom sets *c to the set-up at machOrSpeed of the solver whose q
// ceiling sv relaxes (qSetups), with its top setting left to its readers
// (topLazy), where prepareNitrogen would leave it so: without an Re/m
// ceiling, with q at (p0 min, the T0 floor) under sv's ceiling. Its states,
// T0 floor and other limits do not read the ceiling, and its check of q at
// p0 min passed under a lower one, so the rest is sv's set-up as prepare
// computes it. false where the solver relaxed holds none usable there:
// prepare then computes it.
func (sv *solver) qSetupFrom(c *machSetup, machOrSpeed float64) bool {
	if sv.topOnly || sv.noLazyTop || !math.IsInf(sv.remax, 1) {
		return false
	}
	k, ok := sv.qSetups.get(machOrSpeed)
	if !ok || !k.ok || k.partial || !k.qaOK || !(k.qa <= sv.qmax*(1+limitSlack)) {
		return false
	}
	*c = *k
	c.facilityTop, c.topLazy = topSetting{}, true
	return true
}

// prepareNow is prepare without the solver's set-ups kept.
func (sv *solver) prepareNow(machOrSpeed float64) (c machSetup) {
	sv.prepareNowIn(&c, machOrSpeed)
	return c
}

// prepareNowIn is prepareNow into c.
func (sv *solver) prepareNowIn(c *machSetup, machOrSpeed float64) {
	switch {
	case sv.liquid:
		sv.prepareWater(c, machOrSpeed)
	case sv.f.Medium.Kind == facilities.MediumNitrogen:
		sv.prepareNitrogenIn(c, machOrSpeed)
	default:
		sv.prepareIdeal(c, machOrSpeed)
	}
}

// prepareNitrogen is prepareNitrogenIn into a set-up of its own.
func (sv *solver) prepareNitrogen(machOrSpeed float64) (c machSetup) {
	sv.prepareNitrogenIn(&c, machOrSpeed)
	return c
}

// prepareNitrogenIn is prepare for nitrogen into c (its caller's set-up:
// built in its own frame and returned by value, the set-up was copied on
// its way back into prepareNowIn's, about 270 instructions of each of a
// weighted cn2-05 plan's 80 set-ups), a real gas that can condense: its
// speed of sound, q and Re/m come from its equation of state along the real-gas
// isentrope, so nothing is proportional to p0 or √T0 and the floor and the q and
// Re/m curves are evaluated state by state. At a fixed Mach number q falls slightly
// (under 0.5 %) as the gas cools at the T0 floor's end of the range and is nearly flat
// warm, so the lowest q at p0 min is the smaller of its two ends (qLow). The speed
// at a fixed Mach number rises with T0 and, cold, falls with p0 (warm, it rises
// slightly): a facility's highest speed gives the top T0 at p0 min by root-finding,
// held at every p0 (warm settings are used at p0 min only); the lowest speed joins
// the condensation rule in the T0 floor at each p0 (floorMargin), and raises p0 min
// when even the warmest T0 is too slow there.
func (sv *solver) prepareNitrogenIn(c *machSetup, machOrSpeed float64) {
	f := sv.f
	*c = machSetup{machOrSpeed: machOrSpeed}
	ta, tb := f.StagnationTemperature.Min, f.StagnationTemperature.Max
	pa, pb := f.StagnationPressure.Min, f.StagnationPressure.Max
	c.pa = pa
	// noRef: a trade point's set-up that may be partial (topPartial) without
	// an Re/m ceiling leaves its reference state at (pa, tb) uncomputed
	// (about 2.6 nitrogenAt calls of a trade point's 4 on p0 max): its top
	// setting alone is read, and its reference state's Mach number (the load
	// limit's, which reads the state's Mach number alone: LoadLimit). Where
	// the local margin at (pa, tb) is at least 0 and the allowed minimum, the
	// free stream there is usable at any Mach number up to the local peak
	// (TestFreeStreamMarginAboveLocal), so the set-up cannot fail on it.
	noRef := sv.topOnly && !sv.noPartial && !sv.keepRef && ta != tb && f.Speed == nil && sv.floor == nil && sv.cond != nil &&
		math.IsInf(sv.remax, 1) && machOrSpeed <= f.CondensationPeak() && f.Medium.Kind == facilities.MediumNitrogen
	if noRef {
		m := sv.localMargin(pa, tb)
		noRef = m >= 0 && m >= sv.condMin
	}
	var stB facilities.State
	if noRef {
		stB = facilities.State{Mach: machOrSpeed}
	} else if st, err := sv.state(machOrSpeed, pa, tb); err == nil {
		stB = st
	} else {
		c.fail = facilities.ConstraintCondensation
		return
	}
	var err error
	if sp := f.Speed; sp != nil {
		vAt := func(p, t float64) float64 {
			st, err := sv.state(machOrSpeed, p, t)
			if err != nil {
				return 0 // the free stream condenses: below every speed of the range
			}
			return st.Speed
		}
		if stB.Speed < sp.Min*(1-limitSlack) {
			// Too slow at p0 min even at the warmest T0; warm nitrogen's speed of
			// sound rises with p0, so a higher p0 may do: p0 min moves up to it.
			if vAt(pb, tb) < sp.Min*(1-limitSlack) {
				c.fail = facilities.ConstraintSpeedMin
				return
			}
			pa = sv.rootHi(func(p float64) float64 { return vAt(p, tb) - sp.Min }, pa, pb, true)
			c.pa = pa
			if stB, err = sv.state(machOrSpeed, pa, tb); err != nil {
				c.fail = facilities.ConstraintCondensation
				return
			}
		}
		if vAt(pa, ta) > sp.Max*(1+limitSlack) {
			c.fail = facilities.ConstraintSpeedMax
			return
		}
		if stB.Speed > sp.Max {
			tb = sv.rootHi(func(t float64) float64 { return sp.Max - vAt(pa, t) }, ta, tb, false)
			if stB, err = sv.state(machOrSpeed, pa, tb); err != nil {
				c.fail = facilities.ConstraintCondensation
				return
			}
		}
		c.vmin = sp.Min
	}
	c.ta, c.tb, c.stRef, c.tRef = ta, tb, stB, tb
	c.k = stB.DynamicPressure / pa
	c.rlo, c.rloOK = stB.ReynoldsPerMeter, !noRef
	if c.rlo > sv.remax*(1+limitSlack) {
		c.fail = facilities.ConstraintReynoldsUnit
		return
	}
	c.pTop, c.capTop = pb, facilities.ConstraintPressureMax
	// CondensationMargin(stB), with the local expansion (the same at every
	// Mach number) kept by localMargin instead of computed again.
	if sv.condMargin(machOrSpeed, &stB, pa, tb) < sv.condMin {
		c.fail = facilities.ConstraintCondensation
		return
	}
	// below: (p0, T0) is below the T0 floor; the local expansion alone (the
	// same at every Mach number) tells when it condenses, before any state,
	// and, where it decides (warmMargin), that it does not: the state at
	// (pa, ta), whose free stream is then usable, is computed only where the
	// set-up reads it (stA), not by a trade point's partial set-up.
	below := func(p, t float64) bool {
		if sv.localMargin(p, t) < sv.condMin {
			return true
		}
		m, _ := sv.warmMargin(c, p, t)
		return m < 0
	}
	if below(pa, ta) || below(pb, ta) {
		c.cond = true
		if m, name := sv.warmMargin(c, pb, tb); m < 0 {
			// Above some p0 even the warmest usable T0 condenses (or is too slow).
			c.pTop = sv.rootHi(func(p float64) float64 { m, _ := sv.floorMargin(c, p, tb); return m }, pa, pb, false)
			c.capTop = name
		}
	}
	if sv.topOnly && !sv.noPartial && c.cond && ta != tb && c.vmin == 0 && sv.floor == nil && sv.cond != nil && machOrSpeed <= f.CondensationPeak() {
		if top, ok := sv.topPartial(c); ok {
			c.facilityTop, c.partial, c.ok = top, true, true
			return
		}
	}
	if noRef {
		// The whole set-up after all: its reference state, as above.
		if stB, err = sv.state(machOrSpeed, pa, tb); err != nil {
			c.fail = facilities.ConstraintCondensation
			return
		}
		c.stRef, c.k = stB, stB.DynamicPressure/pa
		c.rlo, c.rloOK = stB.ReynoldsPerMeter, true
	}
	stA := stB
	if ta != tb {
		tf := sv.tfloor(c, pa)
		if stA, err = sv.state(machOrSpeed, pa, tf); err != nil {
			c.fail = facilities.ConstraintCondensation
			return
		}
		c.qa, c.qaOK = stA.DynamicPressure, true
		c.floorP, c.floorT, c.raFloor = pa, tf, !sv.noSetupStates
	}
	c.ra = stA.ReynoldsPerMeter
	c.qLow = min(stA.DynamicPressure, stB.DynamicPressure)
	if c.qLow > sv.qmax*(1+limitSlack) {
		c.fail = facilities.ConstraintDynamic
		return
	}
	if math.IsInf(sv.remax, 1) && c.qaOK && c.qa <= sv.qmax*(1+limitSlack) && !sv.topOnly && !sv.noLazyTop {
		// The top setting (the q ceiling's joint step, about 17 states) is
		// computed where a candidate reads it (top): a candidate under Re/m
		// at (p0 min, the T0 floor) does not (atWindow). Without an Re/m
		// ceiling it cannot fail, and with q at (p0 min, the floor) under
		// the ceiling it lies on the floor at p0 min or above.
		c.topLazy, c.ok = true, true
		return
	}
	c.facilityTop = sv.highestSetting(c, sv.qmax, facilities.ConstraintDynamic)
	if c.facilityTop.fail {
		c.fail = facilities.ConstraintReynoldsUnit
		return
	}
	c.ok = true
}

// top returns c's top setting, facilityTop, computed here where prepare
// left it to its readers (topLazy), and then kept in the solver's set-up at
// c's Mach number too.
func (sv *solver) top(c *machSetup) topSetting {
	if c.topLazy {
		sv.topNow(c)
	}
	return c.facilityTop
}

// topNow is top's computation, apart so that top's own path, taken by
// every candidate, stays short.
func (sv *solver) topNow(c *machSetup) {
	ok := false
	if sv.topOnly && !sv.noTopPredict && c.cond && c.qaOK && c.qa < sv.qmax {
		// A trade point at a scan's set-up: its top from the curve's last
		// roots as a partial set-up's (topPartial), without q at pTop and
		// the secant's two or three iterations.
		c.facilityTop, ok = sv.topPredicted(c)
	}
	if !ok {
		c.facilityTop = sv.highestSetting(c, sv.qmax, facilities.ConstraintDynamic)
	}
	c.topLazy = false
	if sv.setups != nil {
		if k, ok := sv.setups.get(c.machOrSpeed); ok && k.topLazy {
			k.facilityTop, k.topLazy = c.facilityTop, false
		}
	}
}

// underTop reports whether the candidate at target Re/m in load window w on
// c, a set-up whose top setting is not computed (topLazy), lies under it
// without reading it: no load floor above q at p0 min, no load ceiling
// under the q ceiling (the top's q is at most the ceiling), and Re/m, the
// target or the lowest at p0 min and the warmest T0 (rlo), under Re/m at
// (p0 min, the T0 floor), which the top's is at least (it lies on the floor
// at p0 min or above, and Re/m rises with p0 along the floor; no Re/m
// ceiling, no edge: prepareNitrogen). solveR then finds the setting at p0 min
// by its root in T0 without the top, and the q ceiling's warming in atWindow
// reads the ceiling alone.
func (sv *solver) underTop(c *machSetup, target float64, w Window) bool {
	if w.Lo > c.qLow || sv.load != nil && !(w.Hi > sv.qmax*(1+limitSlack)) {
		return false
	}
	ra := c.ra
	if c.cond {
		ra = sv.rcurve(c, c.pa) // as solveR reads it
	}
	return max(target, sv.lowR(c)) < ra
}

// hiOf returns x's rhi and capHi, from the top setting of its set-up c where
// atWindow left them (hiLazy).
func (sv *solver) hiOf(c *machSetup, x candidate) (rhi float64, capHi string) {
	if x.hiLazy {
		return sv.lazyHi(c)
	}
	return x.rhi, x.capHi
}

// lazyHi is hiOf's reading of the top setting, out of line: with top
// inlined here hiOf was no longer inlined in its callers (about 0.6k
// instructions a tsw-1 plan, which never reads a lazy top).
//
//go:noinline
func (sv *solver) lazyHi(c *machSetup) (float64, string) {
	t := sv.top(c)
	return t.r, t.cap
}

// prepareIdeal is prepare for an ideal gas (Z = 1): at a fixed Mach number q and
// Re/m are proportional to p0, q does not depend on T0, and Re/m is highest at the
// lowest T0, so one state at (pa, ta) gives the rest in closed form. The state at
// (pa, tb), the lowest Re/m, is computed only when needed (lowR). It writes
// the set-up into c.
func (sv *solver) prepareIdeal(c *machSetup, machOrSpeed float64) {
	f := sv.f
	ta, tb := f.StagnationTemperature.Min, f.StagnationTemperature.Max
	pa, pb := f.StagnationPressure.Min, f.StagnationPressure.Max
	*c = machSetup{machOrSpeed: machOrSpeed, pa: pa}
	stA, err := sv.state(machOrSpeed, pa, ta)
	if err != nil {
		c.fail = facilities.ConstraintMachMax
		return
	}
	if f.Speed != nil {
		tlo, thi, fail := speedWindow(f.Speed, stA.Speed, ta, ta, tb)
		if fail != "" {
			c.fail = fail
			return
		}
		tb = min(tb, thi)
		if tlo > ta {
			ta = tlo
			if stA, err = sv.state(machOrSpeed, pa, ta); err != nil {
				c.fail = facilities.ConstraintSpeedMin
				return
			}
		}
	}
	c.ta, c.tb, c.stRef, c.tRef = ta, tb, stA, ta
	c.k = stA.DynamicPressure / pa
	c.qLow = stA.DynamicPressure
	if stA.DynamicPressure > sv.qmax*(1+limitSlack) {
		c.fail = facilities.ConstraintDynamic
		return
	}
	c.ra = stA.ReynoldsPerMeter
	if !math.IsInf(sv.remax, 1) && sv.lowR(c) > sv.remax*(1+limitSlack) {
		c.fail = facilities.ConstraintReynoldsUnit
		return
	}
	c.pTop, c.capTop = pb, facilities.ConstraintPressureMax
	c.linear = true
	c.facilityTop = sv.highestSetting(c, sv.qmax, facilities.ConstraintDynamic)
	c.ok = true
	return
}

// lowR returns the lowest Re/m at c's Mach number, at (pa, tb).
func (sv *solver) lowR(c *machSetup) float64 {
	if !c.rloOK {
		c.rlo, c.rloOK = c.ra, true
		if c.tb != c.ta {
			if st, err := sv.state(c.machOrSpeed, c.pa, c.tb); err == nil {
				c.rlo = st.ReynoldsPerMeter
			}
		}
	}
	return c.rlo
}

// qcurve returns the dynamic pressure at p0 on the T0 floor.
func (sv *solver) qcurve(c *machSetup, p0 float64) float64 {
	if c.linear {
		return c.k * p0
	}
	if c.qaOK && p0 == c.pa {
		// The set-up's state at pa; by the time the q ceiling's root asks
		// for it, the solver's last two states have moved on to pTop.
		return c.qa
	}
	st, err := sv.stateAt(c.machOrSpeed, p0, sv.tfloor(c, p0))
	if err != nil {
		return math.Inf(1)
	}
	return st.DynamicPressure
}

// highestSetting returns the setting of the highest Re/m at c's Mach number with the dynamic
// pressure at most qc (the ceiling named name). Re/m rises with p0 and falls with
// T0, so it lies on the T0 floor at the highest p0 the limits allow; and on a q
// ceiling Re/m = 2q/(V·μ) is highest at the lowest T0. The caller has checked that
// q at (pa, tb) is within qc.
func (sv *solver) highestSetting(c *machSetup, qc float64, name string) topSetting {
	t := topSetting{p: c.pTop, cap: c.capTop}
	if qTop := sv.qcurve(c, c.pTop); qTop > qc {
		switch {
		case c.linear:
			t.p, t.cap = qc/c.k, name
		case sv.qcurve(c, c.pa) <= qc*(1+limitSlack):
			p, ok := sv.ceilingJoint(c, qc, sv.qcurve(c, c.pa), qTop)
			if !ok {
				p = sv.rootHiSmooth(func(p float64) float64 { return qc - sv.qcurve(c, p) }, c.pa, c.pTop, false)
			}
			t.p, t.cap = p, name
		default:
			t.p, t.cap, t.edge = c.pa, name, true
			t.t = sv.rootHi(func(x float64) float64 {
				st, err := sv.state(c.machOrSpeed, c.pa, x)
				if err != nil {
					return -1
				}
				return qc - st.DynamicPressure
			}, sv.tfloor(c, c.pa), c.tb, true)
		}
	}
	return sv.topFinish(c, t, qc)
}

// topFinish completes the top setting t whose p0 (and, on an edge, T0)
// highestSetting has found under the q ceiling qc: its T0 on the floor, its
// Re/m, q and speed, and the Re/m ceiling.
func (sv *solver) topFinish(c *machSetup, t topSetting, qc float64) topSetting {
	if !t.edge {
		t.t = sv.tfloor(c, t.p)
	}
	if c.linear {
		t.r, t.q, t.v = c.ra*t.p/c.pa, c.k*t.p, c.stRef.Speed*math.Sqrt(t.t/c.tRef)
	} else {
		st, err := sv.stateAt(c.machOrSpeed, t.p, t.t)
		if err != nil {
			t.r, t.q = 0, math.Inf(1)
			return t
		}
		t.r, t.q, t.v = st.ReynoldsPerMeter, st.DynamicPressure, st.Speed
	}
	if t.r > sv.remax {
		// The Re/m ceiling: the lowest p0 (then T0) that reaches it.
		t.p, t.t = sv.solveR(c, t, sv.remax)
		t.cap, t.r = facilities.ConstraintReynoldsUnit, sv.remax
		t.q, t.v = sv.qAt(c, t.p, t.t)
		// Real-gas nitrogen warmed at p0 min to meet the Re/m ceiling may have
		// raised q past the q ceiling (its speed of sound): no setting here meets
		// both.
		t.fail = !c.linear && t.q > qc*(1+limitSlack)
	}
	return t
}

// qAt returns the dynamic pressure in Pa and the speed in m/s at c's Mach number,
// p0 and T0: in closed form for an ideal gas (q ∝ p0, V ∝ √T0), else from the
// state.
func (sv *solver) qAt(c *machSetup, p0, t0 float64) (q, v float64) {
	if c.linear {
		return c.k * p0, c.stRef.Speed * math.Sqrt(t0/c.tRef)
	}
	if st := &c.stRef; p0 == st.StagnationPressure && t0 == st.StagnationTemperature && !sv.noSetupStates {
		// The set-up's reference state (at pa and the warmest T0, where a
		// candidate's Re/m root ends at the set-up's lowest Re/m), whose
		// state the solver's last two have mostly let go; a reference
		// state left uncomputed (prepareNitrogen's noRef) holds p0 0.
		return st.DynamicPressure, st.Speed
	}
	st, err := sv.stateAt(c.machOrSpeed, p0, t0)
	if err != nil {
		return math.Inf(1), 0
	}
	return st.DynamicPressure, st.Speed
}

// solveR returns the lowest-q setting with Re/m = r (≤ tp.r) at c's Mach number:
// p0 as low as possible on the T0 floor, then T0 raised at the lowest p0. With
// q = ½·Re/m·μ·V, at a fixed Re/m the coolest gas needs the least q.
func (sv *solver) solveR(c *machSetup, tp topSetting, r float64) (p0, t0 float64) {
	rAt := func(p, t float64) float64 {
		st, err := sv.stateAt(c.machOrSpeed, p, t)
		if err != nil {
			return 0
		}
		return st.ReynoldsPerMeter
	}
	warm := func(lo float64) float64 {
		if c.rloOK && (r == c.rlo || !c.linear && r > c.rlo && r <= c.rlo*(1+1e-14)) {
			// The lowest Re/m is the warmest T0's own, or (real-gas nitrogen,
			// whose roots cost the most) a rounding above it (a model shrunk to
			// meet the flight's Reynolds number there): no root to find. Re/m falls at least as T0^-0.5 in a gas (ρV ∝
			// T^-0.5 at a fixed Mach number and p0, μ rising), so the crossing
			// lies within 2e-14 relative of tb, and g ≥ 0 at tb; the root
			// finder would only narrow its bracket down to tb.
			return c.tb
		}
		g := func(t float64) float64 { return r - rAt(c.pa, t) }
		if !c.linear {
			// Real-gas nitrogen: Re/m is smooth in T0, and secant steps
			// take fewer of its costly states than the Illinois rule. Re/m at
			// tb is the set-up's lowest, rlo, once known: the same state's,
			// which the solver's last two states have mostly let go.
			if c.rloOK {
				return usableRootPower(g, lo, c.tb, r, c.rlo)
			}
			return sv.rootHiSmooth(g, lo, c.tb, true)
		}
		return sv.rootHi(g, lo, c.tb, true)
	}
	if tp.edge {
		return c.pa, warm(tp.t)
	}
	ra := c.ra
	if c.cond {
		ra = sv.rcurve(c, c.pa)
	}
	if r < ra {
		return c.pa, warm(sv.tfloor(c, c.pa))
	}
	switch {
	case r >= tp.r:
		p0 = tp.p
	case c.linear:
		p0 = min(c.pa*r/c.ra, tp.p)
	default:
		p0 = sv.rootHi(func(p float64) float64 { return sv.rcurve(c, p) - r }, c.pa, tp.p, true)
	}
	return p0, sv.tfloor(c, p0)
}

// prepareWater is prepare for water, into c (its caller's set-up: building
// the 384-byte set-up and returning it by value copied it twice on the way,
// about 170 instructions of a set-up's 1100, 84 set-ups a vessel plan):
// machOrSpeed is the speed, p0 is held at its maximum
// (the most margin against cavitation; nothing else depends on it), and the
// stagnation temperature is the free variable: warmer water is less viscous, so
// Re/m rises with T0, and slightly lighter, so q falls.
func (sv *solver) prepareWater(c *machSetup, machOrSpeed float64) {
	f := sv.f
	// Zeroed, then set: a composite literal is built on the stack and
	// copied into *c.
	*c = machSetup{}
	c.machOrSpeed, c.pa, c.pTop = machOrSpeed, f.StagnationPressure.Max, f.StagnationPressure.Max
	ta, tb := f.StagnationTemperature.Min, f.StagnationTemperature.Max
	// Boiling at p0 and cavitation in the test section set a T0 ceiling: warmer
	// water has a higher vapour pressure (waterMargin). The states at the
	// range's ends serve both the margins and the set-up.
	top := facilities.ConstraintTempMax
	var stA, stB facilities.State
	errA := sv.stateIn(&stA, machOrSpeed, c.pa, ta)
	if m, name := sv.waterMarginOf(&stA, errA); m < 0 {
		c.fail = name
		return
	}
	err := sv.stateIn(&stB, machOrSpeed, c.pa, tb)
	if m, name := sv.waterMarginOf(&stB, err); m < 0 {
		tb = sv.rootHi(func(t float64) float64 { m, _ := sv.waterMargin(machOrSpeed, c.pa, t); return m }, ta, tb, false)
		top = name
		err = sv.stateIn(&stB, machOrSpeed, c.pa, tb)
	}
	if err != nil {
		c.fail = facilities.ConstraintSpeedMax
		return
	}
	c.ta, c.tb, c.stRef, c.tRef = ta, tb, stB, tb
	c.rloOK = true
	c.k = stB.DynamicPressure
	if stB.DynamicPressure > sv.qmax*(1+limitSlack) {
		c.fail = facilities.ConstraintDynamic
		return
	}
	if stA.DynamicPressure > sv.qmax {
		c.ta = sv.rootHi(func(t float64) float64 { return sv.qmax - sv.waterQ(machOrSpeed, c.pa, t) }, ta, tb, true)
		if err = sv.stateIn(&stA, machOrSpeed, c.pa, c.ta); err != nil {
			c.fail = facilities.ConstraintSpeedMax
			return
		}
	}
	c.ra, c.rlo = stA.ReynoldsPerMeter, stA.ReynoldsPerMeter
	c.qWater, c.qWaterT = [2]float64{stA.DynamicPressure, stB.DynamicPressure}, [2]float64{c.ta, c.tb}
	if c.rlo > sv.remax*(1+limitSlack) {
		c.fail = facilities.ConstraintReynoldsUnit
		return
	}
	c.rWaterTop, c.capWaterTop = stB.ReynoldsPerMeter, top
	if c.rWaterTop > sv.remax {
		c.rWaterTop, c.capWaterTop = sv.remax, facilities.ConstraintReynoldsUnit
	}
	c.ok = true
}

// waterMargin returns how far water at speed machOrSpeed, p0 and T0 t stays from
// the water model's named limits, ≥ 0 where usable, and the limit nearest: boiling
// at the stagnation pressure (facilities.Facility.BoilingMargin less boilMin) and,
// unless the problem allows it, cavitation in the test section (CavitationMargin
// less cavMin). Both fall as the water warms. An unusable state counts as −1
// (boiling).
func (sv *solver) waterMargin(machOrSpeed, p0, t float64) (float64, string) {
	var st facilities.State
	err := sv.stateIn(&st, machOrSpeed, p0, t)
	return sv.waterMarginOf(&st, err)
}

// waterMarginOf is waterMargin of the state st that sv.state returned with
// err.
func (sv *solver) waterMarginOf(st *facilities.State, err error) (float64, string) {
	if err != nil {
		return -1, facilities.ConstraintBoiling
	}
	if w := sv.water; w != nil && st.StagnationTemperature > 0 && st.Static.Temperature == st.StagnationTemperature {
		// A water state's static and stagnation temperatures are one
		// (facilities.LiquidState): boilingMargin's and cavitationMargin's
		// vapour pressure looked up once (TestWaterMarginOfMatchesMargins).
		pv := w.vapourPressure(st.StagnationTemperature)
		m, name := st.StagnationPressure/pv-1-sv.boilMin, facilities.ConstraintBoiling
		if !sv.cavAllowed {
			if c := st.Static.Pressure/pv - 1 - sv.cavMin; c < m {
				m, name = c, facilities.ConstraintCavitation
			}
		}
		return m, name
	}
	m, name := sv.boilingMargin(st)-sv.boilMin, facilities.ConstraintBoiling
	if !sv.cavAllowed {
		if c := sv.cavitationMargin(st) - sv.cavMin; c < m {
			m, name = c, facilities.ConstraintCavitation
		}
	}
	return m, name
}

// waterQ is the dynamic pressure of water at speed machOrSpeed and T0 t.
func (sv *solver) waterQ(machOrSpeed, p0, t float64) float64 {
	st, err := sv.state(machOrSpeed, p0, t)
	if err != nil {
		return math.Inf(1)
	}
	return st.DynamicPressure
}

// waterQAt is waterQ at c's speed and stagnation pressure (a water set-up's p0
// never changes), from the set-up where t is an end of its usable T0 range
// whose state prepareWater computed: the same state, so the same q.
func (sv *solver) waterQAt(c *machSetup, t float64) float64 {
	for i, ti := range c.qWaterT {
		if ti == t && ti != 0 {
			return c.qWater[i]
		}
	}
	return sv.waterQ(c.machOrSpeed, c.pa, t)
}

// waterR is Re/m of water at speed machOrSpeed and T0 t.
func (sv *solver) waterR(machOrSpeed, p0, t float64) float64 {
	st, err := sv.state(machOrSpeed, p0, t)
	if err != nil {
		return math.Inf(1)
	}
	return st.ReynoldsPerMeter
}

// tfloor returns the lowest usable stagnation temperature at p0: the facility's (or
// the speed range's) floor, or the condensation line (or nitrogen's lowest speed)
// above it (floorMargin).
func (sv *solver) tfloor(c *machSetup, p0 float64) float64 {
	if !c.cond {
		return c.ta
	}
	if p0 == c.floorP && !sv.noSetupStates {
		return c.floorT
	}
	if c.vmin == 0 && sv.cond != nil {
		// The condensation line of the local expansion does not depend on the
		// Mach number: found once per p0 for every set-up, from the nearest p0
		// found before. It is the floor when the free stream there is usable
		// too (always, in practice: the local peak Mach number is the higher).
		t := sv.condLine(p0, c.ta, c.tb)
		if m, _ := sv.floorMargin(c, p0, t); m >= 0 {
			return t
		}
	}
	if m, _ := sv.floorMargin(c, p0, c.ta); m >= 0 {
		return c.ta
	}
	return sv.rootHi(func(t float64) float64 { m, _ := sv.floorMargin(c, p0, t); return m }, c.ta, c.tb, true)
}

// rcurve returns Re/m at p0 on the T0 floor (gas), the highest Re/m at that p0.
func (sv *solver) rcurve(c *machSetup, p0 float64) float64 {
	if c.linear {
		return c.ra * p0 / c.pa
	}
	if c.raFloor && p0 == c.pa {
		return c.ra
	}
	st, err := sv.stateAt(c.machOrSpeed, p0, sv.tfloor(c, p0))
	if err != nil {
		return 0
	}
	return st.ReynoldsPerMeter
}

// at returns the candidate at Mach number (speed) machOrSpeed and scale s whose Reynolds
// number comes closest to the flight's, at the lowest dynamic pressure.
func (sv *solver) at(c *machSetup, s float64) candidate {
	return sv.atTarget(c, s, sv.fl.Reynolds/(s*sv.L))
}

// atTarget is at for a target Re/m: the candidate closest to it (in ratio) at the
// lowest q.
func (sv *solver) atTarget(c *machSetup, s, target float64) candidate {
	if !c.ok {
		return candidate{machOrSpeed: c.machOrSpeed, s: s, fail: c.fail, k: worst}
	}
	if sv.floor == nil {
		if sv.liquid && sv.cav {
			// bestOfWindows' one window, atWindow and atWater straight to the
			// cavitation search: each level copied the 208-byte candidate on
			// its way back (about 450 instructions a call, 96 calls a vessel
			// plan).
			return sv.atWaterCav(c, s, target, Window{Lo: 0, Hi: sv.loadQ(s, &c.stRef)})
		}
		// One window, as bestOfWindows takes it, without its closure.
		return sv.atWindow(c, s, target, Window{Lo: 0, Hi: sv.loadQ(s, &c.stRef)})
	}
	return sv.bestOfWindows(c, s, func(w Window) candidate { return sv.atWindow(c, s, target, w) })
}

// atWindow is atTarget within one load window w: q at most w.Hi (the load
// ceiling, +Inf without a load limit) and at least w.Lo (the load floor, 0
// without one).
func (sv *solver) atWindow(c *machSetup, s, target float64, w Window) candidate {
	x := candidate{machOrSpeed: c.machOrSpeed, s: s}
	if sv.liquid {
		return sv.atWater(c, s, target, w)
	}
	// lazy: the candidate does not read the set-up's top setting, which is
	// then left uncomputed (underTop).
	lazy := c.topLazy && sv.underTop(c, target, w)
	if c.topLazy && !lazy {
		sv.top(c)
	}
	tp := c.facilityTop
	qc := sv.qmax // the q ceiling at this scale
	if sv.load != nil {
		qb := w.Hi
		qc = min(qc, qb)
		if qb < tp.q {
			if qb < c.qLow*(1-limitSlack) {
				x.fail, x.k = sv.loadName, worst
				return x
			}
			tp = sv.highestSetting(c, qb, sv.loadName)
			if tp.fail {
				x.fail, x.k = sv.loadName, worst
				return x
			}
		}
	}
	// pinned: under a load floor in real-gas nitrogen where no p0 at the warmest
	// T0 reaches it, the top setting is the one setting known to (q is highest
	// there), and the candidate keeps to it.
	pinned := false
	if lo := w.Lo; lo > c.qLow {
		// The resolution floor: the lowest p0 rises to where q reaches it.
		if !(lo <= tp.q*(1+limitSlack)) {
			x.fail, x.k = sv.floorName, worst
			return x
		}
		if c2, ok := sv.raiseFloor(c, min(lo, tp.q), tp); ok && !tp.edge {
			c = &c2
		} else {
			pinned = true
		}
	}
	x.rhi, x.rlo, x.capHi, x.hiLazy = tp.r, -1, tp.cap, lazy
	r := target
	if pinned {
		x.rlo, r = tp.r, tp.r
	} else if c.partial && !c.rloOK && math.IsInf(target, 1) {
		// A trade point's partial set-up without its reference state
		// (prepareNitrogen's noRef): with no target the candidate is the
		// top setting, below, and its lowest Re/m is not read (rlo unknown).
	} else if target < c.ra || !c.linear {
		x.rlo = sv.lowR(c)
		r = max(r, x.rlo)
	}
	if !lazy {
		r = min(r, tp.r)
	}
	x.r = r
	switch {
	case !lazy && r >= tp.r:
		x.p0, x.t0, x.q, x.v = tp.p, tp.t, tp.q, tp.v
	case sv.feasOnly && !c.linear:
		// Real-gas nitrogen in the feasibility scan, which reads only that a
		// candidate exists: solveR's setting for an Re/m under the top's lies
		// on the T0 floor between p0 min and the top's p0, or at p0 min
		// between the floor and the warmest T0 (the top's T0 on an edge),
		// and the q ceiling's warming below keeps to [the floor, that T0]:
		// each a state no colder than the floor at its p0, where the gas is
		// usable, so the candidate exists and the roots that place it (about
		// 15 states where a small model's target lies under Re/m at p0 min, as
		// at 45 km) are not found. Its setting is left unsolved (zero).
		x.ok, x.k = true, worst
		return x
	default:
		x.p0, x.t0 = sv.solveR(c, tp, r)
		x.q, x.v = sv.qAt(c, x.p0, x.t0)
		if !c.linear && x.q > qc*(1+limitSlack) {
			// Real-gas nitrogen: warming at p0 min to lower Re/m raises q slightly
			// (its speed of sound), and here past the ceiling: warm only up to it,
			// the lowest Re/m under the ceiling.
			lo := sv.tfloor(c, x.p0)
			x.t0 = sv.rootHi(func(t float64) float64 { q, _ := sv.qAt(c, x.p0, t); return qc - q }, lo, x.t0, false)
			st, err := sv.state(c.machOrSpeed, x.p0, x.t0)
			if err != nil {
				x.fail, x.k = facilities.ConstraintDynamic, worst
				return x
			}
			x.q, x.v, x.r = st.DynamicPressure, st.Speed, st.ReynoldsPerMeter
			x.rlo, r = x.r, -1 // the target is not met
		}
	}
	x.ok = true
	if !sv.topOnly || sv.floor != nil {
		// A trade point (topOnly) reads the setting and its figures, not
		// the key; only the choice among load windows would.
		x.k = sv.keyOf(c.machOrSpeed, s, x.r, x.q, x.v, r == target, 0)
	}
	return x
}

// atWater is atTarget for water.
func (sv *solver) atWater(c *machSetup, s, target float64, w Window) candidate {
	if sv.cav {
		return sv.atWaterCav(c, s, target, w)
	}
	x := candidate{machOrSpeed: c.machOrSpeed, s: s, p0: c.pa}
	rhi, capHi, tHi := c.rWaterTop, c.capWaterTop, c.tb
	if rhi < math.Inf(1) && capHi == facilities.ConstraintReynoldsUnit {
		tHi = sv.rootHi(func(t float64) float64 { return sv.remax - sv.waterR(c.machOrSpeed, c.pa, t) }, c.ta, c.tb, false)
	}
	if sv.load != nil {
		qb := w.Hi
		qt := sv.waterQAt(c, tHi)
		if qb < qt*(1-limitSlack) {
			x.fail, x.k = sv.loadName, worst
			return x
		}
		if qa := sv.waterQAt(c, c.ta); qb < qa {
			lo := sv.rootHi(func(t float64) float64 { return qb - sv.waterQ(c.machOrSpeed, c.pa, t) }, c.ta, tHi, true)
			c2 := *c
			c2.ta = lo
			c2.ra = sv.waterR(c.machOrSpeed, c.pa, lo)
			c2.rlo = c2.ra
			c = &c2
		}
	}
	if lo := w.Lo; lo > 0 {
		// The resolution floor: q falls as the water warms, so it caps T0.
		if sv.waterQAt(c, c.ta) < lo*(1-limitSlack) {
			x.fail, x.k = sv.floorName, worst
			return x
		}
		if sv.waterQAt(c, tHi) < lo {
			tHi = sv.rootHi(func(t float64) float64 { return sv.waterQ(c.machOrSpeed, c.pa, t) - lo }, c.ta, tHi, false)
			rhi, capHi = sv.waterR(c.machOrSpeed, c.pa, tHi), sv.floorName
		}
	}
	x.rhi, x.rlo, x.capHi = rhi, c.rlo, capHi
	r := min(max(target, c.rlo), rhi)
	switch {
	case r <= c.rlo:
		x.t0 = c.ta
	case r >= rhi:
		x.t0 = tHi
	default:
		// rootHi on waterR − r, from the ends' Re/m where they are known (c.ra
		// at ta; rhi at tHi unless the Re/m ceiling set tHi), keeping q at the
		// last temperature tried on the usable side: the root is that one.
		tq, qq := math.NaN(), 0.0
		g := func(t float64) float64 {
			rho, mu := waterDensityViscosity(t)
			q, re, ok := sv.waterState(c.machOrSpeed, c.pa, t, rho, mu)
			if !ok {
				return math.Inf(1)
			}
			if d := re - r; d < 0 {
				return d
			}
			tq, qq = t, q
			return re - r
		}
		fa, fb := c.ra-r, rhi-r
		if capHi == facilities.ConstraintReynoldsUnit {
			fb = g(tHi)
		}
		switch {
		case fa >= 0:
			x.t0 = c.ta
		case fb < 0:
			x.t0 = tHi
		default:
			x.t0 = illinois(g, c.ta, fa, tHi, fb)
		}
		if x.t0 > tHi {
			x.t0 = tHi
		}
		if x.t0 == tq {
			x.q = qq
		}
	}
	x.r = r
	if x.q == 0 {
		x.q = sv.waterQAt(c, x.t0)
	}
	x.v = c.machOrSpeed
	x.ok = true
	x.k = sv.keyOf(c.machOrSpeed, s, x.r, x.q, x.v, r == target, 0)
	return x
}

// keyOf returns the objective key of a candidate at machOrSpeed and scale s with Re/m r,
// dynamic pressure q and speed v in m/s. met says that r is the flight's Re/m at
// this scale by construction (the setting was solved for the target, not capped
// by a limit): the Reynolds term is then exactly 0, so that every such candidate
// ties on it and the next level, finally q, decides. Computed, ln(s·l·r/Re) would
// be a rounding error of about 1e-16 of either sign instead. Terms of zero weight
// are left out, so that an infinite logarithm (Re/m 0 at a failed state) never
// makes a NaN.
//
// sig is the test's cavitation number when the objective looks at it (sv.cav);
// its level is the distance of sig outside the band σ_full ± cavTol (0 inside),
// its weighted term (ln(sig/σ_full))².
func (sv *solver) keyOf(machOrSpeed, s, r, q, v float64, met bool, sig float64) key {
	// Each logarithm is computed only where the objective reads it: a level of
	// the priority list or a term of positive weight.
	lnRe := func() float64 {
		if met {
			return 0
		}
		return math.Log(s * sv.L * r / sv.fl.Reynolds)
	}
	// Fr_test/Fr_flight = (V/√(g·s·L))/(V_f/√(g·L)) = V/(V_f·√s).
	lnFr := func() float64 { return math.Log(v / (sv.fl.Speed() * math.Sqrt(s))) }
	if sv.obj.weighted {
		k, _, _ := sv.weightedKey(machOrSpeed, s, r, q, v, met, sig)
		return k
	}
	k := key{q: q}
	for i, g := range sv.obj.levels {
		switch g {
		case gMach:
			// The distance of machOrSpeed outside the Mach band [M−tol, M+tol], with the
			// band's ends computed as solve computes them, so that machOrSpeed on an end
			// (where the search puts it) is inside by construction and scores exactly 0:
			// |machOrSpeed − M| − tol would leave a rounding error of either sign there.
			if lo, hi := sv.machBand(); !sv.noMach {
				k.v[i] = max(0, max(lo-machOrSpeed, machOrSpeed-hi))
			}
		case gReynolds:
			k.v[i] = math.Abs(lnRe())
		case gFroude:
			k.v[i] = math.Abs(lnFr())
		case gCavitation:
			if sv.cav {
				k.v[i] = sv.cavDistance(sig)
			}
		}
	}
	return k
}

// weightedKey is keyOf for a weighted objective, with the logarithms its
// Reynolds and cavitation terms read (for cavEndWeighted, which reads them
// again at the range's ends): lnRe = ln(Re/Re_full) (0 where met) and lnSig =
// ln(max(σ, 1e-9·σ_full)/σ_full), each NaN where the objective does not read
// it (no weight). exact: the Reynolds term, where weighted, is 0 (met: the
// setting was solved for it), and every other term of positive weight is
// within exactTol; the sum is then exactly 0, so that all plans meeting every
// target tie and the lowest q decides (docs/planner.md, Objectives).
func (sv *solver) weightedKey(machOrSpeed, s, r, q, v float64, met bool, sig float64) (k key, lnRe, lnSig float64) {
	lnRe, lnSig = math.NaN(), math.NaN()
	k = key{q: q}
	exact := true
	for i := range nGroups {
		w := sv.obj.w[i]
		if !(w > 0) {
			continue
		}
		l := 0.0
		switch i {
		case gReynolds:
			if !met {
				l = math.Log(s * sv.L * r / sv.fl.Reynolds)
			}
			lnRe = l
		case gMach:
			if !sv.noMach {
				l = math.Log(machOrSpeed / sv.aim)
			}
		case gFroude:
			// Fr_test/Fr_flight = V/(V_f·√s), as keyOf's lnFr.
			l = math.Log(v / (sv.fl.Speed() * math.Sqrt(s)))
		case gCavitation:
			if sv.cav {
				sf := sv.fl.Marine.Cavitation
				l = math.Log(max(sig, 1e-9*sf) / sf)
				lnSig = l
			}
		}
		if i == gReynolds && l != 0 || math.Abs(l) > exactTol {
			exact = false
		}
		k.v[0] += w * l * l
	}
	if exact {
		k.v[0] = 0
	}
	return k, lnRe, lnSig
}

// exactTol is the tolerance within which a weighted Froude, Mach or
// cavitation target counts as met: when |ln(test/flight)| ≤ 1e-9 for each of
// positive weight (each ratio within about 1e-9 of 1) and the Reynolds number,
// where weighted, is met (by construction: its term is then exactly 0), the
// weighted sum is exactly 0 (keyOf). Such plans meet every target; among them
// the lowest q wins, as in every tie. The Reynolds term has no tolerance: the
// planner meets it exactly wherever it is reachable, and a plan a rounding
// short of it at a limit must not win on q.
const exactTol = 1e-9

// rootHi finds where a monotone g changes sign in [lo, hi] by the Illinois variant
// of regula falsi and returns a point on the usable side g ≥ 0 within 1e-13 relative
// of the crossing. increasing says g rises with x (the usable side lies toward hi);
// otherwise it lies toward lo. When g does not change sign, the usable endpoint is
// returned, or, when neither is usable, the endpoint nearer to being usable.
func (sv *solver) rootHi(g func(float64) float64, lo, hi float64, increasing bool) float64 {
	return usableRoot(g, lo, hi, increasing, false)
}

// usableRoot is rootHi with the bracketed root finder illinois, or
// secantBracket when smooth, called with both ends' values once g changes
// sign between them. The finders are called directly, not through a function
// value, so that g does not escape: the callers' closures, and the set-ups
// and candidates they capture, stay on the stack.
func usableRoot(g func(float64) float64, lo, hi float64, increasing, smooth bool) float64 {
	if !increasing {
		flip := func(x float64) float64 { return g(lo + hi - x) }
		x := usableRootUp(flip, lo, hi, smooth)
		return min(max(lo+hi-x, lo), hi)
	}
	return usableRootUp(g, lo, hi, smooth)
}

// usableRootUp is usableRoot for an increasing g.
func usableRootUp(g func(float64) float64, lo, hi float64, smooth bool) float64 {
	fa := g(lo)
	if fa >= 0 {
		return lo
	}
	return usableRootBracket(g, lo, fa, hi, g(hi), smooth)
}

// usableRootUpHi is usableRootUp with g(hi) = fb known.
func usableRootUpHi(g func(float64) float64, lo, hi, fb float64, smooth bool) float64 {
	fa := g(lo)
	if fa >= 0 {
		return lo
	}
	return usableRootBracket(g, lo, fa, hi, fb, smooth)
}

// usableRootPower is usableRootUpHi for g(t) = r − R(t), R > 0 falling with
// t and R(hi) = rhi known (nitrogen's Re/m along T0 at one p0, solveR): the
// secant's steps are taken in ln t and ln(r/R) (secantBracket with r), where Re/m, which
// falls about as T0^−1.7 there, is nearly a straight line, instead of in t
// and R, where the first step from the T0 floor (100 K) toward the warmest T0
// landed several kelvin off a root near the top of the range. The root is
// found to the same 1e-13, on the same usable side.
func usableRootPower(g func(float64) float64, lo, hi, r, rhi float64) float64 {
	fa := g(lo)
	if fa >= 0 {
		return lo
	}
	fb := r - rhi
	if fb < 0 {
		return hi
	}
	return secantBracket(g, lo, fa, hi, fb, r)
}

// usableRootBracket is usableRootUp once g(lo) = fa < 0 and g(hi) = fb are
// known.
func usableRootBracket(g func(float64) float64, lo, fa, hi, fb float64, smooth bool) float64 {
	if fb < 0 {
		return hi
	}
	if smooth {
		return secantBracket(g, lo, fa, hi, fb, 0)
	}
	return illinois(g, lo, fa, hi, fb)
}

// rootHiSmooth is rootHi for a smooth g (nitrogen's q along the T0 floor,
// nearly proportional to p0): secant steps through the last two points where
// they fall inside the bracket (regula falsi where they do not, and a halving
// after three steps that neither halve the bracket nor cut |g| tenfold), and a
// step of half the tolerance across the crossing once a point lies that near
// an end of the bracket, so that the bracket closes to 1e-13 relative in one
// more step. On the q ceiling that is four points inside the bracket where the
// Illinois rule took five (its halved end overshoots once). It returns what
// rootHi returns.
func (sv *solver) rootHiSmooth(g func(float64) float64, lo, hi float64, increasing bool) float64 {
	return usableRoot(g, lo, hi, increasing, true)
}

// secantBracket is illinois by secant steps (rootHiSmooth). With r > 0, for
// g(t) = r − R(t) with R > 0 and t > 0 (usableRootPower), each secant step
// through the last two points is taken in (ln t, ln(r/R)) instead of (t, g):
// ln(r/R) has g's sign, so the bracket, the fallbacks (regula falsi, then a
// halving), the slow-step rule and the last step across the crossing are
// the same.
func secantBracket(g func(float64) float64, a, fa, b, fb, r float64) float64 {
	// (u0, v0) and (u1, v1) are the secant's last two points, in (t, g) or
	// with r > 0 in (ln t, ln(r/R)); f1 is g at the last.
	u0, v0, u1, v1, f1 := a, fa, b, fb, fb
	if r > 0 {
		u0, v0, u1, v1 = math.Log(a), math.Log(r/(r-fa)), math.Log(b), math.Log(r/(r-fb))
	}
	slow := 0
	for i := 0; i < 200; i++ {
		tol := 1e-13 * max(math.Abs(a), math.Abs(b))
		w := b - a
		if w <= tol {
			break
		}
		x := u1 - v1*(u1-u0)/(v1-v0)
		if r > 0 {
			x = math.Exp(x)
		}
		if !(x > a && x < b) {
			x = (a*fb - b*fa) / (fb - fa)
		}
		if !(x > a && x < b) || slow >= 3 {
			x, slow = 0.5*(a+b), 0
		}
		if h := 0.5 * tol; x-a < h {
			x = a + h
		} else if b-x < h {
			x = b - h
		}
		fx := g(x)
		if fx == 0 {
			return x
		}
		if fx < 0 {
			a, fa = x, fx
		} else {
			b, fb = x, fx
		}
		if b-a > 0.5*w && !(math.Abs(fx) <= 0.1*math.Abs(f1)) {
			slow++
		} else {
			slow = 0
		}
		u0, v0, u1, v1, f1 = u1, v1, x, fx, fx
		if r > 0 {
			u1, v1 = math.Log(x), math.Log(r/(r-fx))
		}
	}
	return b
}

// illinois narrows the bracket [a, b] of an increasing g, g(a) = fa < 0 ≤ fb =
// g(b), by the Illinois variant of regula falsi to 1e-13 relative and returns
// its usable end (rootHi).
func illinois(g func(float64) float64, a, fa, b, fb float64) float64 {
	side := 0
	for i := 0; i < 200 && b-a > 1e-13*max(math.Abs(a), math.Abs(b)); i++ {
		x := (a*fb - b*fa) / (fb - fa)
		if !(x > a && x < b) {
			x = 0.5 * (a + b)
		}
		fx := g(x)
		if fx == 0 {
			return x
		}
		if fx < 0 {
			a, fa = x, fx
			if side == -1 {
				fb *= 0.5
			}
			side = -1
		} else {
			b, fb = x, fx
			if side == 1 {
				fa *= 0.5
			}
			side = 1
		}
	}
	return b
}

// sq returns x².
func sq(x float64) float64 { return x * x }

// speedWindow returns the stagnation temperatures [tlo, thi] between which the
// facility's speed range holds at a fixed Mach number, given the speed v reached at
// stagnation temperature tref: V ∝ √T0 there (a = √(γRT), T = T0/(1+(γ−1)/2·M²)).
// It names the speed limit that no T0 in [ta, tb] can meet, or "".
func speedWindow(speed *facilities.Range, v, tref, ta, tb float64) (tlo, thi float64, fail string) {
	tlo = tref * sq(speed.Min/v)
	thi = tref * sq(speed.Max/v)
	switch {
	case tlo > tb*(1+limitSlack):
		fail = facilities.ConstraintSpeedMin
	case thi < ta*(1-limitSlack):
		fail = facilities.ConstraintSpeedMax
	}
	return tlo, thi, fail
}
