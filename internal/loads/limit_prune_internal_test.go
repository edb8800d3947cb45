package loads

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// pruneCase draws a random test matrix, installation and balance set on a demo
// facility: coefficients of both signs (side force and rolling and yawing
// moments included), repeated points, points of zero load, combined gauge rows,
// and weights near a rating.
func pruneCase(rng *rand.Rand, i int) (*similarity.Article, *facilities.Facility, Installation, similarity.Matrix) {
	ids := []string{"lsw-2", "tsw-1", "plp-3", "wtn-04", "cn2-05"}
	f, _ := facilities.DemoFacility(ids[i%len(ids)])
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	art := &similarity.Article{ReferenceLength: u(0.2, 5), ReferenceArea: u(0.5, 80), FrontalArea: u(0.05, 8), Span: u(1, 30)}
	np := 1 + rng.IntN(40)
	mx := similarity.Matrix{Points: make([]facilities.Point, np)}
	for k := range mx.Points {
		p := &mx.Points[k]
		switch {
		case k > 0 && rng.IntN(6) == 0:
			*p = mx.Points[rng.IntN(k)] // a repeated point
			continue
		case rng.IntN(10) == 0:
			p.Alpha = u(-10, 20) // no aerodynamic load
			continue
		}
		p.Alpha, p.Beta = u(-10, 20), 0
		if rng.IntN(3) == 0 {
			p.Beta = u(-8, 8)
		}
		p.CL, p.CD, p.Cm = u(-0.8, 1.6), u(0, 0.3), u(-0.3, 0.3)
		if rng.IntN(2) == 0 {
			p.CY, p.Cl, p.Cn = u(-0.1, 0.1), u(-0.05, 0.05), u(-0.05, 0.05)
		}
	}
	in := Installation{ModelMass: u(0, 40)}
	if rng.IntN(2) == 0 {
		in.BalanceOffset = Offset{X: u(-0.2, 0.2), Z: u(-0.05, 0.05)}
		in.CGOffset = Offset{X: u(-0.2, 0.2), Z: u(-0.05, 0.05)}
	}
	lim := func(lo, hi float64) *float64 { v := u(lo, hi); return &v }
	f.Balances = nil
	for b := range 1 + rng.IntN(3) {
		bal := facilities.Balance{ID: string(rune('a' + b)), SafetyFactor: u(1, 2),
			Limits: facilities.Limits{Normal: lim(500, 8000), Axial: lim(100, 1500), PitchingMoment: lim(50, 800)}}
		if rng.IntN(2) == 0 {
			bal.Limits.Side, bal.Limits.RollingMoment, bal.Limits.YawingMoment = lim(200, 3000), lim(20, 400), lim(20, 400)
		}
		if rng.IntN(3) == 0 {
			bal.Combined = []facilities.CombinedLimit{{Name: "gauge", Limit: u(500, 8000),
				Coefficients: map[string]float64{"normal": u(-1, 1), "pitching_moment": u(-10, 10), "axial": u(-1, 1)}}}
		}
		f.Balances = append(f.Balances, bal)
	}
	if rng.IntN(8) == 0 {
		// The weight exactly at the normal-force rating over the safety factor.
		b := &f.Balances[0]
		in.CGOffset, in.BalanceOffset = Offset{}, Offset{}
		in.ModelMass = *b.Limits.Normal / b.SafetyFactor / 9.80665 // g0 of Installation.Weight
	}
	if rng.IntN(2) == 0 {
		in.BalanceID = f.Balances[rng.IntN(len(f.Balances))].ID
	}
	return art, &f, in, mx
}

// TestPruneExact compares the pruned ceiling with the scan of every element on
// seeded random matrices, balances and installations in every demo facility
// (closed walls, where the blockage weights the points unequally, and slotted
// walls, where it does not), at scales from 1e-4 to 10 and Mach numbers from 0
// to 1.3: the balance and the ceiling must be equal to the bit.
func TestPruneExact(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(17, 3))
	cases := 400
	if testing.Short() {
		cases = 100
	}
	kept, total := 0, 0
	for i := range cases {
		art, f, in, mx := pruneCase(rng, i)
		l, err := NewLimit(art, f, in, mx)
		require.NoError(t, err, "case %d", i)
		all, err := newLimit(art, f, in, mx, false)
		require.NoError(t, err, "case %d", i)
		for b, br := range l.balances {
			kept += len(br.livePoint)
			total += len(all.balances[b].livePoint)
		}
		for range 200 {
			s := math.Exp(rng.Float64()*math.Log(1e5)) * 1e-4
			m := 1.3 * rng.Float64()
			if rng.IntN(10) == 0 {
				m = 0
			}
			k, q := l.best(s, m)
			ka, qa := all.best(s, m)
			require.Equal(t, [2]uint64{uint64(ka), math.Float64bits(qa)}, [2]uint64{uint64(k), math.Float64bits(q)},
				"case %d (%s, %d points) at scale %.6g, M %.4g: balance and the bits of q, pruned against every element (q %v, %v)",
				i, f.ID, len(mx.Points), s, m, q, qa)
		}
	}
	t.Logf("%d cases: %d of %d elements kept (%.1f %%)", cases, kept, total, 100*float64(kept)/float64(total))
}
