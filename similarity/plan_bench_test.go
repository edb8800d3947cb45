package similarity_test

import (
	"testing"

	"scalematch/internal/loads"
	"scalematch/similarity"
)

// benchProblem is the Orrin J16 at cruise in tsw-1, with an optional synthetic
// balance limit (q·s² ≤ 60 N-equivalent, which binds).
func benchProblem(b *testing.B, load similarity.LoadLimit) *similarity.Problem {
	fs := planFlight(b, &orrinJ16, 12000, 0.78, 0)
	return &similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: planDemo(b, "tsw-1"), LoadLimit: load}
}

// BenchmarkPlan times a full plan (search, binding gains, 41-point trade curve).
// Goal: under 100 µs and 50 allocations a plan.
func BenchmarkPlan(b *testing.B) {
	cases := []struct {
		name string
		load similarity.LoadLimit
		set  *similarity.Settings
	}{
		{"tsw-1", nil, nil},
		{"tsw-1/balance", quadLoad{K: 1, Limit: 60}, nil},
		{"tsw-1/search-only", nil, &similarity.Settings{TradePoints: -1, NoGains: true}},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			p := benchProblem(b, c.load)
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if _, err := similarity.Plan(p, c.set); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkReference times the brute-force reference on the same problem at a grid
// that matches the planner's search to 0.1 % in Reynolds number (checked once
// before timing), for comparison with BenchmarkPlan/tsw-1/search-only.
func BenchmarkReference(b *testing.B) {
	p := benchProblem(b, nil)
	sc := &scenario{name: "bench", p: *p}
	res, err := similarity.Plan(p, &similarity.Settings{TradePoints: -1, NoGains: true})
	if err != nil {
		b.Fatal(err)
	}
	ref := reference(sc, 25, 13, 7, 14)
	pk := objectiveKey(sc, res.Test.Reynolds, res.Test.Mach, res.Test.Froude)
	if d := ref.key.levels[1] - pk.levels[1]; ref.key.levels[0] > 1e-9 || d > 1e-3 {
		b.Fatalf("reference grid too coarse: %.3g worse in ln Re", d)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		reference(sc, 25, 13, 7, 14)
	}
}

// BenchmarkPlanWithBalance21 times what a plan request costs at the similarity
// level with a real balance: the Orrin J16 at cruise in tsw-1 on its balance int-b1
// (model mass 20 kg) over a 21-point α sweep (−4° to 16°): the test matrix, the
// load limit built from the balance's ratings, the plan, and the loads at the
// chosen scale and test state (wall corrections and the balance check).
// Goal: under 300 µs.
func BenchmarkPlanWithBalance21(b *testing.B) {
	f := planDemo(b, "tsw-1")
	art := orrinJ16
	// The J16's estimate as the load-test request gives it
	// (api/testdata/load/plan-orrin-j16-tsw-1.json).
	art.Aero = similarity.Aero{LiftSlope: 4.9, ZeroLiftAlpha: -1.6, CLMax: 1.25, CDMin: 0.022, CLAtCDMin: 0.14,
		InducedDragFactor: 0.057, CmZero: 0.03, CmSlope: -1.05}
	fs := planFlight(b, &art, 12000, 0.78, 0)
	in := loads.Installation{BalanceID: "int-b1", ModelMass: 20}
	sweep := similarity.Sweep{From: -4, To: 16, Step: 1}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		mx, err := art.Aero.Matrix(sweep, nil)
		if err != nil {
			b.Fatal(err)
		}
		ll, err := loads.NewLimit(&art, f, in, mx)
		if err != nil {
			b.Fatal(err)
		}
		res, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &art, Facility: f, LoadLimit: ll}, nil)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := loads.Check(&loads.Case{Facility: f, Article: &art, Installation: in, Matrix: mx, Scale: res.Model.Scale, State: res.Test.State}); err != nil {
			b.Fatal(err)
		}
	}
}
