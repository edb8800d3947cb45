package loads_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"scalematch/internal/check"
	"slices"
	"testing"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

func demoPtr(t testing.TB, id string) *facilities.Facility {
	t.Helper()
	f, ok := facilities.DemoFacility(id)
	if !ok {
		t.Fatalf("demo facility %s missing", id)
	}
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
		if err != nil {
			if check.ErrorCode(err) == check.CodeUnprocessable {
				return false
			}
			t.Fatal(err)
		}
		return res.Reports[0].WithinLimits
	}
	if !ok(0) {
		return 0
	}
	lo, hi := 0.0, 1.0
	for ok(hi) {
		lo, hi = hi, 2*hi
	}
	for hi-lo > 1e-11*hi {
		if mid := (lo + hi) / 2; ok(mid) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// TestLoadLimitAgreesWithBisection: MaxDynamicPressure against a brute-force
// bisection on q through the full load check, at seeded random scales, Mach numbers
// and installations, for a named balance and for the best of all balances.
func TestLoadLimitAgreesWithBisection(t *testing.T) {
	rng := rand.New(rand.NewPCG(2024, 6))
	art := pellin()
	mx, err := art.Aero.Matrix(sweep, nil)
	if err != nil {
		t.Fatal(err)
	}
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
		if err != nil {
			t.Fatal(err)
		}
		got := ll.MaxDynamicPressure(scale, facilities.State{Mach: mach, DynamicPressure: 123})
		want := bisect(t, art, f, in, mx, scale, mach)
		if math.Abs(got-want) > 1e-9*want+1e-9 {
			t.Errorf("trial %d (%q, s %.4f, M %.3f, m %.1f kg): q = %.12g, bisection %.12g", trial, in.BalanceID, scale, mach, in.ModelMass, got, want)
		}
	}
}

func TestLoadLimitCases(t *testing.T) {
	art := pellin()
	mx, err := art.Aero.Matrix(sweep, nil)
	if err != nil {
		t.Fatal(err)
	}
	f := demoPtr(t, "lsw-2")
	st := facilities.State{Mach: 0.2}
	heavy, err := loads.NewLimit(art, f, loads.Installation{BalanceID: "int-a", ModelMass: 500}, mx)
	if err != nil {
		t.Fatal(err)
	}
	// 500 kg weighs 4903 N, more than int-a's 3600 N normal rating over 1.5.
	if q := heavy.MaxDynamicPressure(0.1, st); q != 0 {
		t.Errorf("weight over the rating: q = %g, want 0", q)
	}
	any, err := loads.NewLimit(art, f, loads.Installation{}, mx)
	if err != nil {
		t.Fatal(err)
	}
	if any.Name() != facilities.ConstraintBalance {
		t.Errorf("name %q", any.Name())
	}
	// The external balance is the stronger, so it carries the most at every scale.
	if id, q := any.Balance(0.1, st); id != "ext-6c" || !(q > 0) {
		t.Errorf("best balance %s at q %g, want ext-6c", id, q)
	}
	// Forces grow with s², so the ceiling falls as the model grows (no weight).
	if q1, q2 := any.MaxDynamicPressure(0.1, st), any.MaxDynamicPressure(0.2, st); !(q2 < q1/3.9) {
		t.Errorf("q at 0.1 = %g, at 0.2 = %g: want a fall of about 4 or more", q1, q2)
	}
	for _, s := range []float64{0, -1, math.NaN()} {
		if q := any.MaxDynamicPressure(s, st); q != 0 {
			t.Errorf("scale %g: q = %g, want 0", s, q)
		}
	}
	if _, err := loads.NewLimit(art, f, loads.Installation{BalanceID: "nope"}, mx); !slices.Contains(fieldsOf(t, err), "installation.balance_id") {
		t.Errorf("unknown balance: %v", err)
	}
	if _, err := loads.NewLimit(art, &facilities.Facility{ID: "bare"}, loads.Installation{}, mx); err != loads.ErrNoBalance {
		t.Errorf("no balances: %v, want ErrNoBalance", err)
	}
	if n := testing.AllocsPerRun(100, func() { any.MaxDynamicPressure(0.1, st) }); n != 0 {
		t.Errorf("MaxDynamicPressure allocates %g times a call, want 0", n)
	}
}

// TestCheckCorrectsAndChooses: the check applies the wall corrections to every
// point, chooses a balance with a reason, checks every balance with Every, and
// answers a q no balance carries with a CodeUnprocessable error.
func TestCheckCorrectsAndChooses(t *testing.T) {
	art := pellin()
	mx, err := art.Aero.Matrix(sweep, nil)
	if err != nil {
		t.Fatal(err)
	}
	f := demoPtr(t, "lsw-2")
	st := facilities.State{Mach: 0.2, DynamicPressure: 2500}
	c := loads.Case{Facility: f, Article: art, Installation: loads.Installation{ModelMass: 20}, Matrix: mx, Scale: 0.15, State: st}
	res, err := loads.Check(&c)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Reports) != 1 || res.Reason == "" {
		t.Fatalf("result %+v: want one report and a reason", res)
	}
	every := c
	every.Every = true
	all, err := loads.Check(&every)
	if err != nil || len(all.Reports) != 2 {
		t.Fatalf("every balance: %v, %d reports; want 2", err, len(all.Reports))
	}
	cor := res.Corrections
	if !cor.Applied || !(cor.DynamicPressureFactor > 1) || !(cor.LiftInterference > 0) {
		t.Errorf("corrections %+v: want closed-wall blockage and a positive Δα", cor)
	}
	// The point of largest C_D carries the summary's q factor: its q is q·factor.
	maxQ := 0.0
	for _, p := range res.Reports[0].Points {
		maxQ = math.Max(maxQ, p.DynamicPressure)
	}
	if math.Abs(maxQ-2500*cor.DynamicPressureFactor) > 1e-9 {
		t.Errorf("largest point q %g, want %g", maxQ, 2500*cor.DynamicPressureFactor)
	}
	// Too much q for either balance: 422.
	c.Installation = loads.Installation{}
	c.State = facilities.State{Mach: 0.2, DynamicPressure: 60000}
	if _, err := loads.Check(&c); check.ErrorCode(err) != check.CodeUnprocessable {
		t.Errorf("overload: error %v, want unprocessable", err)
	}
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

// BenchmarkCheck21 times the load check of a plan: wall corrections over a
// 21-point sweep, every balance checked and one chosen (it replaces
// similarity.EstimateLoads, the second copy of this assembly).
func BenchmarkCheck21(b *testing.B) {
	art := pellin()
	mx, err := art.Aero.Matrix(sweep, nil)
	if err != nil {
		b.Fatal(err)
	}
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

func TestLoadLimitBadRating(t *testing.T) {
	art := pellin()
	mx, err := art.Aero.Matrix(sweep, nil)
	if err != nil {
		t.Fatal(err)
	}
	f := demoPtr(t, "lsw-2")
	f.Balances[1].SafetyFactor = 0.8
	_, err = loads.NewLimit(art, f, loads.Installation{}, mx)
	if fs := fieldsOf(t, err); !slices.Contains(fs, "facility.balances[1].safety_factor") {
		t.Errorf("fields %q, want facility.balances[1].safety_factor", fs)
	}
}

// fieldsOf returns the fields a CodeInvalid *check.Error names.
func fieldsOf(t *testing.T, err error) []string {
	t.Helper()
	var e *check.Error
	if !errors.As(err, &e) || e.Code != check.CodeInvalid {
		t.Fatalf("error %v, want a CodeInvalid *check.Error", err)
	}
	var out []string
	for _, f := range e.Fields {
		out = append(out, f.Field)
	}
	return out
}
