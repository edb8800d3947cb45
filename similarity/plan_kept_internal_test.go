package similarity

import (
	"fmt"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestKeptCandidatesPlans compares whole plans (the search with its Mach-aim
// re-solves, the binding gains' re-solves, a 41-point trade curve) made with
// the best candidates over the scales kept by Mach number (solver.kept, the
// default in an ideal gas with a priority objective) and without: 360 random
// problems in lsw-2, plp-3 and tsw-1 (randomGasProblemIn: article, flight up
// to 45 km, q ceiling, balance, a test matrix's drag range every other one,
// so that the closed walls' correction moves the Mach aim), with a fixed
// scale, a list of three or a range, and the priorities mach then reynolds,
// reynolds then mach, or reynolds alone. The plans must be the same to the
// bit (a kept candidate is the one the search would compute again;
// regression check, from the keeping's own claim), and the plans that keep
// candidates (keepsCandidates) must compute fewer states.
func TestKeptCandidatesPlans(t *testing.T) {
	rng := rand.New(rand.NewSource(41))
	prios := [][]string{{"mach", "reynolds"}, {"reynolds", "mach"}, {"reynolds"}}
	plans, kept, saved := 0, 0, 0
	for i := 0; i < 360; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"lsw-2", "plp-3", "tsw-1"})
		p.Objective = Objective{Priority: prios[i%3]}
		lo, hi := *p.Model.ScaleMin, *p.Model.ScaleMax
		switch i / 3 % 3 {
		case 0:
			p.Model = Model{Scale: fp(lo + (hi-lo)*rng.Float64())}
		case 1:
			p.Model = Model{Scales: []float64{lo, lo + (hi-lo)*rng.Float64(), hi}}
		}
		plan := func(keep bool) (*Result, int, error) {
			sv, err := newSolver(p)
			if err != nil {
				return nil, 0, err
			}
			if !keep {
				sv.kept = nil
			} else if sv.kept != nil {
				kept++
			}
			best, err := sv.solveCorrected()
			if err != nil {
				return nil, 0, err
			}
			res := sv.result(best)
			n := 0
			if !sv.reynoldsMet(best) {
				for j := range res.Binding {
					g, e, err := sv.gain(res.Binding[j].Constraint, best)
					n += e
					if err == nil {
						res.Binding[j].ReynoldsGainPerPercent = g
					}
				}
			}
			res.Trade = sv.trade(best.s, 41)
			return res, n + sv.evals, nil
		}
		name := fmt.Sprintf("case %d", i)
		x, nx, errx := plan(true)
		y, ny, erry := plan(false)
		require.Equal(t, erry, errx, name)
		if errx != nil {
			continue
		}
		plans++
		require.Equal(t, y, x, name)
		require.LessOrEqual(t, nx, ny, "%s: states computed", name)
		saved += ny - nx
	}
	t.Logf("%d plans, %d of them keeping candidates, %d states fewer", plans, kept, saved)
	require.Greater(t, plans, 300)
	require.Greater(t, kept, 150)
	require.Greater(t, saved, kept)
}

// TestKeptCandidatesKeys asks solvers that keep their candidates
// (keepsCandidates: lsw-2, plp-3 with a test matrix's drag range) for the
// best candidate over the scales at 9 Mach numbers, moves the Mach aim as
// the wall correction does (solveCorrected: the band and the aim divided by
// M_c/M) and asks again: each candidate kept, its key computed again for
// the new aim, must be the one a solver that keeps none computes at that
// aim, to the bit (regression check of keptCandidates.get's claim).
func TestKeptCandidatesKeys(t *testing.T) {
	rng := rand.New(rand.NewSource(43))
	prios := [][]string{{"mach", "reynolds"}, {"reynolds", "mach"}}
	n, moved := 0, 0
	for i := 0; i < 120; i++ {
		p := randomGasProblemIn(t, rng, i, []string{"lsw-2", "plp-3"})
		p.Objective = Objective{Priority: prios[i%2]}
		p.MatrixDrag = &DragRange{Min: 0.02, Max: 0.08}
		a, err := newSolver(p)
		if err != nil {
			continue
		}
		b, err := newSolver(p)
		require.NoError(t, err)
		require.NotNil(t, a.kept, "case %d", i)
		b.kept = nil
		us := make([]float64, 9)
		for j := range us {
			us[j] = a.machOrSpeedMin + (a.machOrSpeedMax-a.machOrSpeedMin)*float64(j)/8
			a.bestOverScales(us[j])
		}
		// The aim moved so that the flight's Mach number lies near the
		// band's ends at some of the Mach numbers asked.
		r := 1 + 0.02*(rng.Float64()-0.5)
		for _, sv := range []*solver{a, b} {
			sv.aimRatio, sv.aim = r, sv.fl.Mach/r
		}
		for _, u := range us {
			e := a.evals
			x, y := a.bestOverScales(u), b.bestOverScales(u)
			require.Equal(t, e, a.evals, "case %d, Mach %g: kept, no state computed", i, u)
			require.Equal(t, y, x, "case %d, Mach %g", i, u)
			n++
			if y.ok && y.k.v[0] != 0 {
				moved++
			}
		}
	}
	t.Logf("%d candidates compared, %d of them with a Mach (or Reynolds) level off zero", n, moved)
	require.Greater(t, n, 500)
	require.Greater(t, moved, n/4)
}
