package similarity

import (
	"math"

	"gonum.org/v1/gonum/optimize"
)

// simplex runs gonum's Nelder–Mead method nm on f from x0, whose value f0 is
// known, until conv reports convergence, the method ends, or maxEvals
// evaluations of f have been made: the same points, in the same order, that
// optimize.Minimize evaluates with Settings{InitValues: &Location{F: f0},
// FuncEvaluations: maxEvals, Converger: conv} (TestSimplexMatchesMinimize).
//
// Minimize passes each evaluation through four goroutines (the method's, a
// distributor, a worker and its own), and on a machine with an idle core every
// hand-over wakes a thread there; a weighted plan's refinement of about 23
// evaluations spent as much on those hand-overs as on a cheap plan's physics.
// Here the method's Run, which is written for channels, is the only other
// goroutine, and f runs on the caller's (BenchmarkSimplex: the same run in
// both, a fraction of Minimize's CPU).
func simplex(f func([]float64) float64, x0 []float64, f0 float64, maxEvals int, conv optimize.Converger, nm *optimize.NelderMead) {
	dim := len(x0)
	conv.Init(dim)
	nm.Init(dim, 1)
	ops := make(chan optimize.Task, 1)
	res := make(chan optimize.Task, 1)
	// As Minimize starts it: the location with its value known, so the method
	// does not ask for it again.
	start := optimize.Task{Location: &optimize.Location{X: append([]float64(nil), x0...), F: f0}, Op: optimize.FuncEvaluation}
	go nm.Run(ops, res, []optimize.Task{start})
	x := make([]float64, dim)
	evals, ended := 0, false
	// The method closes ops once it has read res to its end.
	for t := range ops {
		stop := false
		switch t.Op {
		case optimize.FuncEvaluation:
			// A copy, so that f cannot move the method's point.
			copy(x, t.X)
			t.F = f(x)
			evals++
			stop = maxEvals > 0 && evals >= maxEvals
		case optimize.NoOperation:
		case optimize.MajorIteration:
			stop = math.IsInf(t.F, -1) || conv.Converged(t.Location) != optimize.NotTerminated
		case optimize.MethodDone:
			stop = true
		default:
			panic("similarity: the simplex asked for an operation it does not use: " + t.Op.String())
		}
		switch {
		case ended:
			// After the end the method only drains res; nothing more is evaluated.
		case stop:
			ended = true
			res <- optimize.Task{Op: optimize.PostIteration}
			close(res)
		default:
			res <- t
		}
	}
}
