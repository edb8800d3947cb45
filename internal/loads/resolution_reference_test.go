package loads_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// TestResolutionPlanAgainstSearchRandom runs 60 seeded random articles,
// installations and required resolutions across the four gas facilities (the
// first 12 under -short) through the planner with the balance's resolution floor
// and the brute-force search of limit_reference_test.go, which counts a
// candidate only where some balance within its allowed loads (at the drawn
// planning margin, installation.load_fraction) resolves C_D and C_L (and C_m in
// some draws) at every point by the uncertainty formulas of docs/loads.md. The
// plan's Reynolds number must be within 0.1 % of the search's, the plan must
// keep every limit (the full check at its answer), and the resolution must bind
// in enough cases to exercise the floor.
func TestResolutionPlanAgainstSearchRandom(t *testing.T) {
	t.Parallel()
	n := 60
	if testing.Short() {
		n = 12
	}
	rng := rand.New(rand.NewPCG(12, 2026))
	planned, bound, worst := 0, 0, 0.0
	for i := range n {
		c := llrRandomCase(rng, i)
		c.name = "res-" + c.name
		u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
		c.res = &loads.Resolution{CDCounts: fptr(math.Exp(u(math.Log(8), math.Log(250)))), CL: fptr(math.Exp(u(math.Log(0.004), math.Log(0.08))))}
		if rng.IntN(3) == 0 {
			c.res.Cm = fptr(math.Exp(u(math.Log(0.001), math.Log(0.04))))
		}
		if rng.IntN(2) == 0 {
			c.in.LoadFraction = fptr(u(0.6, 1))
		}
		c.tol = 1e-3
		// The cases run one after another: they add to planned, bound and worst.
		t.Run(c.name, func(t *testing.T) {
			rel, ok := llrCheck(t, c, 81, 41)
			if !ok {
				return
			}
			planned++
			worst = math.Max(worst, math.Abs(rel))
			if resolutionBinds(t, c) {
				bound++
			}
		})
	}
	t.Logf("%d cases: %d planned, the resolution binding in %d; largest |plan Re / search Re − 1| = %.2e", n, planned, bound, worst)
	assert.GreaterOrEqual(t, planned, n/2, "random cases with a plan: fewer and the draw asks too fine a resolution")
	if !testing.Short() {
		assert.GreaterOrEqual(t, bound, 5, "plans the resolution binds: fewer and the draw no longer exercises the floor")
	}
}

// resolutionBinds plans case c again and reports whether "resolution" is among
// its binding limits, with the plan's q at or above the floor and a finite
// Reynolds gain.
func resolutionBinds(t *testing.T, c *llrCase) bool {
	t.Helper()
	x := llrPrepare(t, c)
	ll, err := loads.NewLimit(c.art, x.f, c.in, x.mx)
	require.NoError(t, err)
	ll = ll.Resolved(c.res)
	res, err := similarity.Plan(&similarity.Problem{Flight: x.fl, Article: c.art, Facility: x.f, Model: c.model,
		LoadLimit: ll, LoadFloor: ll}, &similarity.Settings{TradePoints: -1})
	require.NoError(t, err)
	i := slices.IndexFunc(res.Binding, func(b similarity.Binding) bool { return b.Constraint == facilities.ConstraintResolution })
	if i < 0 {
		return false
	}
	b := res.Binding[i]
	assert.GreaterOrEqual(t, b.Value, b.Limit*(1-1e-9), "the plan's q Pa against the resolution's least q")
	// The gain is negative where the floor forces the Reynolds number above the
	// flight's (relaxing it brings the test closer), and it must be a number.
	assert.False(t, math.IsNaN(b.ReynoldsGainPerPercent) || math.IsInf(b.ReynoldsGainPerPercent, 0),
		"resolution gain %v: a finite number", b.ReynoldsGainPerPercent)
	return true
}

// TestResolutionFloorHand checks the least dynamic pressure for one drag count
// on a demo balance against the arithmetic written out: the demo balance int-b1
// of tsw-1 (docs/demo-world.md: axial rating 1 100 N, accuracy 0.10 % of
// rating, so δA = 1.1 N at 2σ) under the demo business jet (S = 36.5 m² full
// scale) at scale 1:24, S = 36.5/576 = 0.0633681 m², α = 0, free-stream blockage
// correction left out (a facility with no walls correction: the section edited
// to open walls). At α = 0, δC_D = δA/(q·S), so one count (10⁻⁴) needs
//
//	q = δA/(10⁻⁴·S) = 1.1 N / (10⁻⁴ × 0.0633681 m²) = 173 589 Pa.
//
// With 2 counts asked it halves, 86 795 Pa.
func TestResolutionFloorHand(t *testing.T) {
	t.Parallel()
	f := demoPtr(t, "tsw-1")
	f.TestSection.Walls = facilities.WallsOpen
	art := &similarity.Article{ReferenceLength: 2.4, ReferenceArea: 36.5, Span: 16.4, Length: 19.6, FrontalArea: 4.4, WettedArea: 228,
		Aero: llrAero(4.9, -1.6, 1.25, 0.022, 0.14, 0.057, 0.03, -1.05)}
	mx, err := art.Aero.Matrix(similarity.Sweep{From: 0, To: 0, Step: 1}, nil)
	require.NoError(t, err)
	ll, err := loads.NewLimit(art, f, loads.Installation{BalanceID: "int-b1", ModelMass: 20}, mx)
	require.NoError(t, err)
	// Each case resolves the one limit to its own resolution.
	for _, c := range []struct {
		counts, want float64
	}{{1, 173589}, {2, 86795}} {
		t.Run(fmt.Sprintf("%g counts", c.counts), func(t *testing.T) {
			lr := ll.Resolved(&loads.Resolution{CDCounts: &c.counts})
			st := facilities.State{Mach: 0.3}
			assert.InEpsilon(t, c.want, lr.MinDynamicPressure(1.0/24, st), 1e-5, "least q Pa for %g counts, hand arithmetic", c.counts)
		})
	}
}
