package similarity

import (
	"math"

	"gonum.org/v1/gonum/optimize"
)

// polishEvals bounds the objective evaluations of one joint refinement, the
// starting simplex and the tries on the bounds included.
const polishEvals = 200

// polishStep is the starting simplex's edge in the unit box of the refinement: half
// a cell of the structured search's 17-point Mach (speed) grid.
const polishStep = 1.0 / 32

// polishSnap is the distance in the unit box within which the refined point is
// tried on the bound it approaches.
const polishSnap = 1e-4

// polishTie is the weight of the q tie-break in the refinement's objective: the
// simplex minimises the weighted sum plus polishTie·q/q(start), so that along a
// plateau of the sum (a match the facility meets at many settings) it moves toward
// lower q, while elsewhere the term is too small to outweigh a real change of the
// sum. The planner's own order (key.less) compares exactly; this weight only
// steers the simplex.
const polishTie = 1e-11

// polishConverge is the refinement's function tolerance: it stops when the best
// objective value has not fallen by more than 1e-9 relative (or 1e-17 absolute, a
// millionth of the q tie-break's weight, for an objective near zero, where the
// tie-break term still guides the simplex) over 12 successive simplex iterations.
func polishConverge() *optimize.FunctionConverge {
	return &optimize.FunctionConverge{Absolute: 1e-6 * polishTie, Relative: 1e-9, Iterations: 12}
}

// polish refines the structured search's best candidate x of a weighted objective
// jointly in the test Mach number (speed in water) machOrSpeed and the log of the model scale
// ln s, by the Nelder–Mead simplex method of gonum/optimize:
//
//	Nelder, J.A., Mead, R. (1965) A simplex method for function minimization.
//	The Computer Journal 7(4), 308–313; the adaptive parameters of Gao, F., Han, L.
//	(2012) Computational Optimization and Applications 51(1), 259–277.
//
// The weighted sum Σ w·(ln(test/flight))² is smooth in (machOrSpeed, ln s) inside the
// feasible region, while the structured search nests a golden section over ln s
// inside a grid and golden section over machOrSpeed; the simplex moves both at once from the
// structured optimum. It works in the unit box over machOrSpeed's feasible interval holding
// x.machOrSpeed and [ln sLo, ln sHi] (with one of them alone free it does not run:
// the structured search has minimised over it already): a point
// outside the box is projected onto it and pays the squared distance, so that the
// simplex returns. Every point is evaluated through prepare and at, which honour
// every facility limit, the scale range and the load limit exactly; an infeasible
// point scores +Inf. The simplex minimises the weighted sum plus polishTie·q/q(x),
// the key's q tie-break at a small weight, so that on a plateau of the
// sum it moves toward lower q. The best candidate seen by the solver's
// lexicographic key (weighted sum, then the lowest q) is returned, so the result is
// never worse than x. A priority objective leaves x as it is.
func (sv *solver) polish(x candidate, ivs []interval) candidate {
	if sv.noPolish || !sv.obj.weighted || !x.ok {
		return x
	}
	return sv.refine(x, ivs)
}

// refine is polish's refinement itself. It is a function of its own because its
// closures keep x on the heap, which a plan that is not refined need not pay for.
func (sv *solver) refine(x candidate, ivs []interval) candidate {
	ua, ub := x.machOrSpeed, x.machOrSpeed
	for _, iv := range ivs {
		if x.machOrSpeed >= iv.a && x.machOrSpeed <= iv.b {
			ua, ub = iv.a, iv.b
			break
		}
	}
	la, lb := math.Log(sv.sLo), math.Log(sv.sHi)
	// The free coordinates: machOrSpeed when its interval has width, ln s when the range has.
	var lo, hi [2]float64
	var isU [2]bool
	dim := 0
	if ub > ua {
		lo[dim], hi[dim], isU[dim] = ua, ub, true
		dim++
	}
	if sv.kind == scaleRange && lb > la {
		lo[dim], hi[dim] = la, lb
		dim++
	}
	if dim < 2 {
		// One free coordinate: the structured search has minimised over it
		// already, by the golden section over the Mach number (speed) or the
		// scale, to 1e-9 (46 and 115 simplex evaluations only confirmed it in
		// the plp-3 and lsw-2 examples with weights).
		return x
	}

	best := x
	n := 0
	// The key's tie-break folded in at the weight polishTie: along a plateau of the
	// weighted sum (a match the facility can meet at many settings) the simplex
	// moves toward lower q, and elsewhere the term is below polishTie.
	q0 := x.q
	// at returns the candidate at point z of the unit box (projected onto it) and
	// the squared distance of z from the box.
	at := func(z []float64) (candidate, float64) {
		machOrSpeed, s, d2 := x.machOrSpeed, x.s, 0.0
		for i := range dim {
			zi := z[i]
			switch {
			case zi < 0:
				d2 += zi * zi
				zi = 0
			case zi > 1:
				d2 += (zi - 1) * (zi - 1)
				zi = 1
			}
			// The ends exactly, so that a limit met at an end is met to the bit.
			v := lo[i] + zi*(hi[i]-lo[i])
			switch zi {
			case 0:
				v = lo[i]
			case 1:
				v = hi[i]
			}
			if isU[i] {
				machOrSpeed = v
			} else {
				s = math.Exp(v)
				switch zi {
				case 0:
					s = sv.sLo
				case 1:
					s = sv.sHi
				}
			}
		}
		n++
		c := sv.prepare(machOrSpeed)
		return sv.at(&c, s), d2
	}
	// eval scores a point z of the unit box (or beyond it) for the simplex.
	eval := func(z []float64) float64 {
		y, d2 := at(z)
		if !y.ok || math.IsNaN(y.k.v[0]) {
			return math.Inf(1)
		}
		if y.k.less(best.k) {
			best = y
		}
		return y.k.v[0] + polishTie*y.q/q0 + d2
	}

	// zOf returns candidate y's point in the unit box.
	zOf := func(y candidate) []float64 {
		z := make([]float64, dim)
		for i := range dim {
			v := math.Log(y.s)
			if isU[i] {
				v = y.machOrSpeed
			}
			z[i] = math.Min(math.Max((v-lo[i])/(hi[i]-lo[i]), 0), 1)
		}
		return z
	}

	// The starting simplex: x and one step along each free coordinate, inward.
	z0 := zOf(x)
	f0 := x.k.v[0] + polishTie
	verts := make([][]float64, dim+1)
	vals := make([]float64, dim+1)
	verts[0], vals[0] = z0, f0
	for i := range dim {
		v := append([]float64(nil), z0...)
		if v[i] > 0.5 {
			v[i] -= polishStep
		} else {
			v[i] += polishStep
		}
		verts[i+1], vals[i+1] = v, eval(v)
	}
	// The best candidate seen stands however the simplex stops (the evaluation
	// bound, convergence, or a start the method rejects).
	simplex(eval, z0, f0, polishEvals-n-dim, polishConverge(), // dim: the tries on the bounds
		&optimize.NelderMead{InitialVertices: verts, InitialValues: vals})
	// The simplex approaches a bound it should sit on (a span limit, the top of the
	// speed range) only to within its last step: try each coordinate at the bound it
	// is within polishSnap of, so that a binding limit binds exactly and is listed.
	for i := range dim {
		z := zOf(best)
		switch {
		case z[i] < polishSnap && z[i] > 0:
			z[i] = 0
		case z[i] > 1-polishSnap && z[i] < 1:
			z[i] = 1
		default:
			continue
		}
		// A tie by the key goes to the point on the bound (never one worse than x).
		if y, _ := at(z); y.ok && !best.k.less(y.k) && !x.k.less(y.k) {
			best = y
		}
	}
	sv.polishEvals += n
	sv.polishImproved = sv.polishImproved || best.k.less(x.k)
	return best
}
