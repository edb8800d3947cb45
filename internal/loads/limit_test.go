package loads_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/internal/testfixture"
	"scalematch/similarity"
)

func demoPtr(t testing.TB, id string) *facilities.Facility {
	t.Helper()
	f, ok := facilities.DemoFacility(id)
	require.True(t, ok, "demo facility %s", id)
	return &f
}

// pellin is the Pellin P3 trainer of the demo world.
func pellin() *similarity.Article {
	return &similarity.Article{ReferenceLength: 1.42, ReferenceArea: 13.4, Span: 9.6, Length: 7.9,
		FrontalArea: 1.7, WettedArea: 45, Aero: similarity.Aero{LiftSlope: 5.1, ZeroLiftAlpha: -2.4,
			CLMax: 1.55, CDMin: 0.029, CLAtCDMin: 0.12, InducedDragFactor: 0.052, CmZero: 0.04, CmSlope: -0.75}}
}

var sweep = similarity.Sweep{From: -4, To: 16, Step: 1}

// bisect finds the largest free-stream q at which the full load check (wall
// corrections applied at the scale) stays within the balance's allowance.
func bisect(t *testing.T, art *similarity.Article, f *facilities.Facility, in loads.Installation, mx similarity.Matrix, scale, mach float64) float64 {
	t.Helper()
	ok := func(q float64) bool {
		res, err := loads.Check(&loads.Case{Facility: f, Article: art, Installation: in, Matrix: mx, Scale: scale,
			State: facilities.State{Mach: mach, DynamicPressure: q}})
		if check.ErrorCode(err) == check.CodeUnprocessable {
			return false
		}
		require.NoError(t, err)
		return res.Reports[0].WithinLimits
	}
	if !ok(0) {
		return 0
	}
	lo, hi := 0.0, 1.0
	for ok(hi) {
		lo, hi = hi, 2*hi
	}
	lo, _ = testfixture.Bisect(lo, hi, 1e-11, ok)
	return lo
}

// TestLoadLimitAgreesWithBisection: MaxDynamicPressure against a brute-force
// bisection on q through the full load check, at seeded random scales, Mach numbers
// and installations, for a named balance and for the best of all balances.
func TestLoadLimitAgreesWithBisection(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(2024, 6))
	art := pellin()
	mx := pellinMatrix(t)
	f := demoPtr(t, "lsw-2")
	for trial := range 24 {
		in := loads.Installation{
			BalanceOffset: loads.Offset{X: 0.05 * (rng.Float64() - 0.5), Z: 0.02 * (rng.Float64() - 0.5)},
			CGOffset:      loads.Offset{X: 0.1 * (rng.Float64() - 0.5), Z: 0.02 * (rng.Float64() - 0.5)},
			ModelMass:     60 * rng.Float64(),
		}
		if trial%3 != 0 {
			in.BalanceID = f.Balances[trial%2].ID
		}
		scale := 0.05 + 0.2*rng.Float64()
		mach := 0.25 * rng.Float64()
		ll, err := loads.NewLimit(art, f, in, mx)
		require.NoError(t, err)
		got := ll.MaxDynamicPressure(scale, facilities.State{Mach: mach, DynamicPressure: 123})
		want := bisect(t, art, f, in, mx, scale, mach)
		assert.InDelta(t, want, got, 1e-9*want+1e-9, "trial %d (%q, s %.4f, M %.3f, m %.1f kg): q Pa against the bisection",
			trial, in.BalanceID, scale, mach, in.ModelMass)
	}
}

// pellinMatrix is pellin's test matrix over sweep.
func pellinMatrix(t testing.TB) similarity.Matrix {
	t.Helper()
	mx, err := pellin().Aero.Matrix(sweep, nil)
	require.NoError(t, err)
	return mx
}

func TestLoadLimitCases(t *testing.T) {
	// Not parallel: it counts allocations (AllocsPerRun counts every goroutine's).
	art := pellin()
	mx := pellinMatrix(t)
	f := demoPtr(t, "lsw-2")
	st := facilities.State{Mach: 0.2}
	heavy, err := loads.NewLimit(art, f, loads.Installation{BalanceID: "int-a", ModelMass: 500}, mx)
	require.NoError(t, err)
	// 500 kg weighs 4903 N, more than int-a's 3600 N normal rating over 1.5.
	assert.Zero(t, heavy.MaxDynamicPressure(0.1, st), "weight over the rating: q Pa")
	any, err := loads.NewLimit(art, f, loads.Installation{}, mx)
	require.NoError(t, err)
	assert.Equal(t, facilities.ConstraintBalance, any.Name())
	// The external balance is the stronger, so it carries the most at every scale.
	id, q := any.Balance(0.1, st)
	assert.Equal(t, "ext-6c", id, "best balance")
	assert.Positive(t, q, "the best balance's q, Pa")
	// Forces grow with s², so the ceiling falls as the model grows (no weight).
	q1, q2 := any.MaxDynamicPressure(0.1, st), any.MaxDynamicPressure(0.2, st)
	assert.Less(t, q2, q1/3.9, "q Pa at scale 0.2 against 0.1: a fall of about 4 or more")
	for _, s := range []float64{0, -1, math.NaN()} {
		assert.Zero(t, any.MaxDynamicPressure(s, st), "scale %g: q Pa", s)
	}
	_, err = loads.NewLimit(art, f, loads.Installation{BalanceID: "nope"}, mx)
	assert.Contains(t, testfixture.InvalidFields(t, err), "installation.balance_id", "unknown balance")
	_, err = loads.NewLimit(art, &facilities.Facility{ID: "bare"}, loads.Installation{}, mx)
	assert.Equal(t, loads.ErrNoBalance, err, "no balances")
	assert.Zero(t, testing.AllocsPerRun(100, func() { any.MaxDynamicPressure(0.1, st) }), "MaxDynamicPressure allocations per call")
}

// TestCheckCorrectsAndChooses: the check applies the wall corrections to every
// point, chooses a balance with a reason, checks every balance with Every, and
// answers a q no balance carries with a CodeUnprocessable error.
func TestCheckCorrectsAndChooses(t *testing.T) {
	t.Parallel()
	art := pellin()
	f := demoPtr(t, "lsw-2")
	st := facilities.State{Mach: 0.2, DynamicPressure: 2500}
	c := loads.Case{Facility: f, Article: art, Installation: loads.Installation{ModelMass: 20}, Matrix: pellinMatrix(t), Scale: 0.15, State: st}
	res, err := loads.Check(&c)
	require.NoError(t, err)
	require.Len(t, res.Reports, 1, "the chosen balance's report")
	require.NotEmpty(t, res.Reason, "the reason for the choice")
	every := c
	every.Every = true
	all, err := loads.Check(&every)
	require.NoError(t, err, "every balance")
	assert.Len(t, all.Reports, 2, "every balance of lsw-2")
	cor := res.Corrections
	assert.True(t, cor.Applied, "closed-wall corrections applied")
	assert.Greater(t, cor.DynamicPressureFactor, 1.0, "closed-wall blockage raises q")
	assert.Positive(t, cor.LiftInterference, "closed-wall Δα, °")
	// The point of largest C_D carries the summary's q factor: its q is q·factor.
	maxQ := 0.0
	for _, p := range res.Reports[0].Points {
		maxQ = math.Max(maxQ, p.DynamicPressure)
	}
	assert.InDelta(t, 2500*cor.DynamicPressureFactor, maxQ, 1e-9, "largest point q, Pa")
	// Too much q for either balance: 422.
	c.Installation = loads.Installation{}
	c.State = facilities.State{Mach: 0.2, DynamicPressure: 60000}
	_, err = loads.Check(&c)
	assert.Equal(t, check.CodeUnprocessable, check.ErrorCode(err), "overload: %v", err)
}

func benchLimit(b *testing.B, points int) {
	art := pellin()
	mx, err := art.Aero.Matrix(similarity.Sweep{From: -4, To: -4 + float64(points-1), Step: 1}, nil)
	if err != nil {
		b.Fatal(err)
	}
	ll, err := loads.NewLimit(art, demoPtr(b, "lsw-2"), loads.Installation{BalanceID: "ext-6c", ModelMass: 20}, mx)
	if err != nil {
		b.Fatal(err)
	}
	st := facilities.State{Mach: 0.2}
	b.ReportAllocs()
	b.ResetTimer()
	s := 0.1
	for b.Loop() {
		if q := ll.MaxDynamicPressure(s, st); !(q > 0) {
			b.Fatal(q)
		}
	}
}

func BenchmarkLoadLimit(b *testing.B) {
	for _, c := range []struct {
		name   string
		points int
	}{{"21points", 21}, {"101points", 101}} {
		b.Run(c.name, func(b *testing.B) { benchLimit(b, c.points) })
	}
}

// BenchmarkNewLimit times building the load limit of a plan (the rows of
// balance ext-6c of lsw-2 projected on every point, and pruned) over α sweeps of
// 21 and 101 points.
func BenchmarkNewLimit(b *testing.B) {
	for _, points := range []int{21, 101} {
		b.Run(fmt.Sprintf("%dpoints", points), func(b *testing.B) {
			art := pellin()
			mx, err := art.Aero.Matrix(similarity.Sweep{From: -4, To: -4 + float64(points-1), Step: 1}, nil)
			require.NoError(b, err)
			f := demoPtr(b, "lsw-2")
			in := loads.Installation{BalanceID: "ext-6c", ModelMass: 20}
			b.ReportAllocs()
			for b.Loop() {
				if _, err := loads.NewLimit(art, f, in, mx); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkCheck21 times the load check of a plan: wall corrections over a
// 21-point sweep, every balance checked and one chosen (it replaces
// similarity.EstimateLoads, the second copy of this assembly).
func BenchmarkCheck21(b *testing.B) {
	art := pellin()
	mx := pellinMatrix(b)
	f := demoPtr(b, "lsw-2")
	st := facilities.State{Mach: 0.2, DynamicPressure: 2500}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := loads.Check(&loads.Case{Facility: f, Article: art, Installation: loads.Installation{ModelMass: 20}, Matrix: mx, Scale: 0.15, State: st}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCheck21Resolution is BenchmarkCheck21 with a required resolution
// (C_L 0.005, C_D 1 count): every balance's report says whether it resolves
// it.
func BenchmarkCheck21Resolution(b *testing.B) {
	art := pellin()
	mx := pellinMatrix(b)
	f := demoPtr(b, "lsw-2")
	st := facilities.State{Mach: 0.2, DynamicPressure: 2500}
	cl, cd := 0.005, 1.0
	res := &loads.Resolution{CL: &cl, CDCounts: &cd}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := loads.Check(&loads.Case{Facility: f, Article: art, Installation: loads.Installation{ModelMass: 20}, Matrix: mx, Scale: 0.15, State: st, Resolution: res}); err != nil {
			b.Fatal(err)
		}
	}
}

func TestLoadLimitBadRating(t *testing.T) {
	t.Parallel()
	f := demoPtr(t, "lsw-2")
	f.Balances[1].SafetyFactor = 0.8
	_, err := loads.NewLimit(pellin(), f, loads.Installation{}, pellinMatrix(t))
	assert.Contains(t, testfixture.InvalidFields(t, err), "facility.balances[1].safety_factor")
}
