package similarity_test

import (
	"fmt"
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// weightedScenario draws a weighted-objective problem over a scale range with a
// Froude weight: in water (wtn-04) every other case, else in one of the gas
// facilities, with a random article, flight, weights and (a third of the time) a
// synthetic force-limited balance.
func weightedScenario(rng *rand.Rand, i int) (*scenario, error) {
	ids := []string{"wtn-04", "tsw-1", "wtn-04", "lsw-2", "wtn-04", "plp-3", "wtn-04", "cn2-05"}
	id := ids[i%len(ids)]
	f, _ := facilities.DemoFacility(id)
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	span := u(1, 30)
	art := &similarity.Article{ReferenceLength: span / u(4, 10), Span: span, ReferenceArea: span * span / u(6, 10),
		FrontalArea: span * span * u(0.005, 0.03), WettedArea: span * span * u(0.6, 1.2)}
	fl := similarity.Flight{Altitude: fp(u(0, 13000))}
	switch id {
	case "wtn-04":
		fl.TrueAirspeed = fp(u(5, 60))
	case "lsw-2", "plp-3":
		fl.Mach = fp(u(0.05, 0.5))
	default:
		fl.Mach = fp(u(0.15, 1.2))
	}
	fs, err := fl.Resolve(art.ReferenceLength)
	if err != nil {
		return nil, err
	}
	sc := &scenario{p: similarity.Problem{Flight: fs, Article: art, Facility: &f}}
	g := math.Min(0.65*f.TestSection.Width/span, math.Sqrt(0.01*f.TestSection.CrossSection()/art.FrontalArea))
	if rng.Intn(2) == 0 {
		sc.p.Model.ScaleMin, sc.p.Model.ScaleMax = fp(g*u(0.01, 0.3)), fp(g*u(0.4, 2))
	}
	w := map[string]float64{"reynolds": u(0.1, 2), "froude": u(0.1, 5)}
	if !f.Medium.IsLiquid() {
		w["mach"] = u(0, 20)
	}
	sc.p.Objective.Weights = w
	if rng.Intn(3) == 0 {
		sc.setLoad(&f, g, u(0.1, 1.2))
	}
	sc.name = fmt.Sprintf("%03d-%s", i, id)
	return sc, nil
}

// weightedSum is the weighted objective of a plan, from its definition in
// docs/planner.md (Objectives).
func weightedSum(sc *scenario, r *similarity.Result) float64 {
	return objectiveKey(sc, r.Test.Reynolds, r.Test.Mach, r.Test.Froude).levels[0]
}

// quillU5 is the Quill U5 survey drone of the demo world (docs/demo-world.md), full scale.
var quillU5 = similarity.Article{ReferenceLength: 0.41, ReferenceArea: 1.4, Span: 3.45, Length: 2.05, FrontalArea: 0.10, WettedArea: 3.9}

// waterFroudeProblem is the Quill U5 at 30 m/s at 1000 m in the water tunnel wtn-04
// with the weights reynolds 1, froude 4: the Froude term wants a small model, the
// Reynolds term a large one, so the optimum scale lies inside the range.
func waterFroudeProblem(t testing.TB) *similarity.Problem {
	fs := planFlight(t, &quillU5, 1000, 0, 30)
	return &similarity.Problem{Flight: fs, Article: &quillU5, Facility: planDemo(t, "wtn-04"),
		Objective: similarity.Objective{Weights: map[string]float64{"reynolds": 1, "froude": 4}}}
}

// refineTie is these tests' tolerance on the weighted sum recomputed from a plan's
// reported figures, which carry rounding the planner's own exact key does not see:
// two plans whose recomputed sums differ by less are ordered by their dynamic
// pressure.
const refineTie = 1e-11

// TestRefineNeverWorse runs the structured search alone and followed by the joint
// refinement on seeded weighted-objective problems with Froude weights, in water
// and in the gas facilities: the refined plan is never worse by the planner's own
// order (the weighted sum, then q within refineTie) and breaks no limit.
func TestRefineNeverWorse(t *testing.T) {
	t.Parallel()
	n := 64
	if testing.Short() {
		n = 16
	}
	rng := rand.New(rand.NewSource(11))
	planned, improved, refineEvals := 0, 0, 0
	for i := 0; i < n; i++ {
		sc, err := weightedScenario(rng, i)
		require.NoError(t, err, "scenario %d", i)
		t.Run(sc.name, func(t *testing.T) { // in turn: the cases add to counts read after the loop
			a, errA := similarity.PlanSearch(&sc.p, false)
			b, errB := similarity.PlanSearch(&sc.p, true)
			require.Equal(t, errA == nil, errB == nil, "structured: %v; refined: %v", errA, errB)
			if errA != nil {
				return
			}
			planned++
			refineEvals += b.Stats.RefineEvaluations
			assert.GreaterOrEqual(t, b.Stats.RefineEvaluations, 1, "refinement evaluations")
			assert.LessOrEqual(t, b.Stats.RefineEvaluations, 200, "refinement evaluations")
			checkLimits(t, sc, b)
			fa, fb := weightedSum(sc, a), weightedSum(sc, b)
			qa, qb := a.Test.DynamicPressure, b.Test.DynamicPressure
			require.LessOrEqual(t, fb, fa+refineTie, "refined sum above the structured %.12g", fa)
			if fb > fa-refineTie {
				require.LessOrEqual(t, qb, qa*(1+1e-12), "q, Pa, of a refined sum %.12g that ties the structured %.12g", fb, fa)
			}
			if fb < fa-refineTie || qb < qa*(1-1e-9) {
				improved++
			}
		})
	}
	t.Logf("%d scenarios: %d planned, %d improved, %.1f refinement evaluations a plan", n, planned, improved, float64(refineEvals)/float64(max(planned, 1)))
}

// TestRefineLimits runs the refinement alone from deliberately poor starts (the
// structured optimum moved in Mach number or speed and in scale) on the seeded
// Froude-weighted problems: whatever the simplex visits, the plan it returns breaks
// no limit by more than 1e-9 relative and is no worse than its start.
func TestRefineLimits(t *testing.T) {
	t.Parallel()
	n := 40
	if testing.Short() {
		n = 12
	}
	rng := rand.New(rand.NewSource(12))
	moves := []struct{ du, ds float64 }{{-0.2, 0.5}, {0.15, 0.8}, {-0.05, 0.3}}
	checked := 0
	for i := 0; i < n; i++ {
		sc, err := weightedScenario(rng, i)
		require.NoError(t, err, "scenario %d", i)
		t.Run(sc.name, func(t *testing.T) { // in turn: the cases add to counts read after the loop
			a, err := similarity.PlanSearch(&sc.p, false)
			if err != nil {
				return
			}
			u := a.Test.Mach
			if sc.p.Facility.Medium.IsLiquid() {
				u = a.Test.Speed
			}
			for _, m := range moves {
				u0, s0 := u*(1+m.du), a.Model.Scale*m.ds
				start, r, err := similarity.RefineFrom(&sc.p, u0, s0)
				if err != nil {
					continue // the moved start is not a feasible plan
				}
				checkLimits(t, sc, r)
				f0 := weightedSum(sc, start)
				assert.LessOrEqual(t, weightedSum(sc, r), f0+refineTie, "from u %.6g, s %.6g: refined sum above the start's %.12g", u0, s0, f0)
				checked++
			}
		})
	}
	require.GreaterOrEqual(t, checked, n/2, "refinements from feasible starts checked")
	t.Logf("%d refinements checked", checked)
}

// TestRefinePlateau is a weighted objective whose optimum is a plateau: the Pellin
// P3 at 50 m/s at sea level (a point invented for this test) in plp-3 with the
// weight reynolds 1 alone. The flight's
// Reynolds number is reachable over a band of Mach numbers, so the sum is zero
// across it and the dynamic pressure decides. With q = ½ρV² and Re/m = ρV/μ,
//
//	q = ½·(Re/m)·μ·V
//
// (an identity of the definitions): at the Re/m the largest model needs, q is lowest
// for the coldest gas at the lowest speed, so the answer is the span-limited model
// (0.8·2.8 m / 9.6 m) at T0 = 288 K, p0 = 340 kPa, and the lowest Mach number at
// which that setting still reaches the flight's Re/m. The structured search alone
// lands elsewhere on the plateau, at a higher q; the refinement walks to this end.
func TestRefinePlateau(t *testing.T) {
	t.Parallel()
	f := planDemo(t, "plp-3")
	fs := planFlight(t, &pellinP3, 0, 0, 50)
	p := &similarity.Problem{Flight: fs, Article: &pellinP3, Facility: f,
		Objective: similarity.Objective{Weights: map[string]float64{"reynolds": 1}}}
	r, err := similarity.Plan(p, nil)
	require.NoError(t, err)
	s := 0.8 * f.TestSection.Width / pellinP3.Span
	want := plateauEnd(t, f, fs, s)
	// The refinement starts at the plateau's end (the structured search finds
	// it, TestSearchPlateauLowestQ) and keeps the best point by the exact key;
	// these tolerances leave room for its convergence tolerance.
	checkPlateauEnd(t, f, r, want, s, plateauTolerances{scale: 1e-6, mach: 1e-5, p0: 1e-5, t0: 1e-9, q: 2e-5, reynolds: 1e-5})
	assert.NotZero(t, r.Stats.RefineEvaluations, "refinement evaluations: the refinement did not run")
	a, err := similarity.PlanSearch(p, false)
	require.NoError(t, err)
	t.Logf("structured search alone: M %.5g, q %.5g Pa; refined: M %.5g, q %.5g Pa (%d evaluations)",
		a.Test.Mach, a.Test.DynamicPressure, r.Test.Mach, r.Test.DynamicPressure, r.Stats.RefineEvaluations)
}

// TestRefineConverges runs the refinement alone from starts far from the optimum
// and checks that it reaches the structured search's optimum: evidence that the
// simplex is a working local method on these problems, not only a no-op kept
// behind the structured answer.
func TestRefineConverges(t *testing.T) {
	t.Parallel()
	jet := func(t testing.TB) *similarity.Problem {
		fs := planFlight(t, &orrinJ16, 12000, 0.78, 0)
		return &similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: planDemo(t, "tsw-1"),
			Objective: similarity.Objective{Weights: map[string]float64{"reynolds": 1, "mach": 4, "froude": 0.5}}}
	}
	cases := []struct {
		name string
		p    func(testing.TB) *similarity.Problem
		u, s float64 // the start: Mach number (speed in m/s in water) and scale
		tol  float64 // on the weighted sum, relative
	}{
		{"water, Froude weight 4, from 1.2 m/s and scale 0.02", waterFroudeProblem, 1.2, 0.02, 1e-6},
		{"water, Froude weight 4, from 0.5 m/s and scale 0.09", waterFroudeProblem, 0.5, 0.09, 1e-6},
		{"tsw-1, Orrin J16, Froude weight 0.5, from M 0.6 and scale 0.02", jet, 0.6, 0.02, 1e-6},
		{"tsw-1, Orrin J16, Froude weight 0.5, from M 0.95 and scale 0.035", jet, 0.95, 0.035, 1e-6},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			p := c.p(t)
			sc := &scenario{name: c.name, p: *p}
			a, err := similarity.PlanSearch(p, false)
			require.NoError(t, err)
			start, r, err := similarity.RefineFrom(p, c.u, c.s)
			require.NoError(t, err)
			f0, fa, fr := weightedSum(sc, start), weightedSum(sc, a), weightedSum(sc, r)
			assert.InEpsilon(t, fa, fr, c.tol, "weighted sum refined from %.6g in %d evaluations, against the structured optimum",
				f0, r.Stats.RefineEvaluations)
			checkLimits(t, sc, r)
		})
	}
}

// BenchmarkPlanWeighted times weighted-objective plans in water with a Froude
// weight (waterFroudeProblem): the structured search, the joint refinement, and for
// the full plan the binding gains (each a re-solve with its own refinement) and the
// 41-point trade curve. "search-only/structured" is the search without the
// refinement, for the refinement's share.
func BenchmarkPlanWeighted(b *testing.B) {
	cases := []struct {
		name   string
		set    *similarity.Settings
		refine bool
	}{
		{"water-froude", nil, true},
		{"water-froude/search-only", &similarity.Settings{TradePoints: -1, NoGains: true}, true},
		{"water-froude/search-only/structured", nil, false},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			p := waterFroudeProblem(b)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				var err error
				if c.set == nil && !c.refine {
					_, err = similarity.PlanSearch(p, false)
				} else {
					_, err = similarity.Plan(p, c.set)
				}
				if err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestRefineImproves is the case that keeps the joint refinement: a water problem
// with a Froude weight and a balance whose q ceiling falls as 1/s², found by
// drawing 3000 seeded weighted scenarios (weightedScenario, seed 99; scenario
// 1206, its figures rounded here). The structured search ends on the smallest
// model of the scale range, 0.0527, where the balance's ceiling is highest; the
// weighted sum is lower at a slightly larger model, which the nested golden
// sections miss and the simplex, moving speed and scale together, finds: a sum of
// 0.4927 at scale 0.0527 falls to 0.4864 at scale 0.0550 (logged by
// go test -v -run TestRefineImproves ./similarity; regression values).
func TestRefineImproves(t *testing.T) {
	t.Parallel()
	art := similarity.Article{ReferenceLength: 0.215, Span: 1.53, ReferenceArea: 0.27, FrontalArea: 0.0427, WettedArea: 2.32}
	fs := planFlight(t, &art, 7137, 0, 17.2)
	load := &quadLoad{K: 1, Limit: 18.48}
	p := &similarity.Problem{Flight: fs, Article: &art, Facility: planDemo(t, "wtn-04"),
		Model:     similarity.Model{ScaleMin: fp(0.0527), ScaleMax: fp(0.375)},
		Objective: similarity.Objective{Weights: map[string]float64{"reynolds": 0.4, "froude": 5}},
		LoadLimit: load}
	sc := &scenario{name: "refine-improves", p: *p, load: load}
	structured, err := similarity.PlanSearch(p, false)
	require.NoError(t, err)
	refined, err := similarity.PlanSearch(p, true)
	require.NoError(t, err)
	checkLimits(t, sc, refined)
	fs0, fs1 := weightedSum(sc, structured), weightedSum(sc, refined)
	t.Logf("structured: scale %.6g, %.6g m/s, sum %.9g; refined: scale %.6g, %.6g m/s, sum %.9g (%d evaluations)",
		structured.Model.Scale, structured.Test.Speed, fs0, refined.Model.Scale, refined.Test.Speed, fs1, refined.Stats.RefineEvaluations)
	assert.Less(t, fs1, fs0*(1-1e-3), "the refinement lowers the weighted sum by more than 0.1 %")
	assert.Greater(t, refined.Model.Scale, structured.Model.Scale, "the refined model is larger")
}
