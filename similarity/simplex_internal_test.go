package similarity

import (
	"math"
	"math/rand/v2"
	"syscall"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/optimize"
)

// simplexCase is a random test function for the simplex driver: a tilted,
// rippled quadratic bowl in dim coordinates with a region scored +Inf (as the
// refinement scores an infeasible point), its start and starting simplex.
type simplexCase struct {
	f     func([]float64) float64
	verts [][]float64
}

func newSimplexCase(r *rand.Rand, dim int) simplexCase {
	c, w := make([]float64, dim), make([]float64, dim)
	for i := range dim {
		c[i], w[i] = r.Float64(), 0.2+3*r.Float64()
	}
	wall, tilt := 0.5+r.Float64(), r.Float64()
	f := func(z []float64) float64 {
		if z[0] > wall {
			return math.Inf(1)
		}
		s := tilt * z[0] * z[dim-1]
		for i := range dim {
			s += w[i]*(z[i]-c[i])*(z[i]-c[i]) + 1e-3*math.Sin(9*z[i])
		}
		return s
	}
	verts := make([][]float64, dim+1)
	verts[0] = make([]float64, dim)
	for i := range dim {
		verts[0][i] = r.Float64() * wall
	}
	for i := range dim {
		v := append([]float64(nil), verts[0]...)
		v[i] += polishStep
		verts[i+1] = v
	}
	return simplexCase{f: f, verts: verts}
}

// points runs the case through Minimize (minimize true) or simplex and returns
// every point evaluated, in order.
func (sc simplexCase) points(minimize bool, maxEvals int) [][]float64 {
	var pts [][]float64
	f := func(z []float64) float64 {
		pts = append(pts, append([]float64(nil), z...))
		return sc.f(z)
	}
	vals := make([]float64, len(sc.verts))
	for i, v := range sc.verts {
		vals[i] = sc.f(v)
	}
	verts := make([][]float64, len(sc.verts))
	for i, v := range sc.verts {
		verts[i] = append([]float64(nil), v...)
	}
	nm := &optimize.NelderMead{InitialVertices: verts, InitialValues: vals}
	x0 := sc.verts[0]
	if minimize {
		_, _ = optimize.Minimize(optimize.Problem{Func: f}, x0, &optimize.Settings{
			InitValues:      &optimize.Location{F: vals[0]},
			FuncEvaluations: maxEvals,
			Converger:       polishConverge(),
		}, nm)
	} else {
		simplex(f, x0, vals[0], maxEvals, polishConverge(), nm)
	}
	return pts
}

// TestSimplexMatchesMinimize: the driver evaluates the same points, in the same
// order, as gonum's optimize.Minimize with the same method, start, evaluation
// bound and converger (the reference is the library itself), whether the run
// ends by convergence, by the bound (from 1 to the refinement's own), or on a
// start the method rejects.
func TestSimplexMatchesMinimize(t *testing.T) {
	r := rand.New(rand.NewPCG(17, 3))
	stops := map[bool]bool{}
	for k := range 1500 {
		dim := 2 + k%2
		sc := newSimplexCase(r, dim)
		for _, maxEvals := range []int{1, 7, 40, polishEvals} {
			want := sc.points(true, maxEvals)
			got := sc.points(false, maxEvals)
			require.Equal(t, want, got, "case %d, dim %d, bound %d", k, dim, maxEvals)
			stops[len(got) < maxEvals] = true
		}
	}
	// Both ways of ending occurred: convergence before the bound, and the bound.
	require.True(t, stops[true] && stops[false])
}

// BenchmarkSimplex runs one refinement-sized simplex (a two-coordinate case,
// the refinement's bound and converger) through Minimize and through simplex:
// the same points evaluated; the difference is the goroutines' hand-overs.
func BenchmarkSimplex(b *testing.B) {
	r := rand.New(rand.NewPCG(5, 8))
	cases := make([]simplexCase, 64)
	for i := range cases {
		cases[i] = newSimplexCase(r, 2)
	}
	for _, m := range []struct {
		name     string
		minimize bool
	}{{"minimize", true}, {"simplex", false}} {
		b.Run(m.name, func(b *testing.B) {
			evals := 0
			var ru0, ru1 syscall.Rusage
			_ = syscall.Getrusage(syscall.RUSAGE_SELF, &ru0)
			for i := range b.N {
				evals += len(cases[i%len(cases)].points(m.minimize, polishEvals))
			}
			_ = syscall.Getrusage(syscall.RUSAGE_SELF, &ru1)
			cpu := ru1.Utime.Nano() + ru1.Stime.Nano() - ru0.Utime.Nano() - ru0.Stime.Nano()
			// The process's CPU, both cores: the hand-overs' wake-ups count.
			b.ReportMetric(float64(cpu)/float64(b.N), "cpu-ns/op")
			b.ReportMetric(float64(evals)/float64(b.N), "evals/op")
		})
	}
}
