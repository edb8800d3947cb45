package loads

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestPruneMatchesBefore requires prune's live elements (their points and
// tables) to be the ones of pruneBefore, prune as it was before its
// candidates' figures were computed once (git main at 8e0f770, kept below as
// the reference), on the seeded random matrices, balances and installations
// of pruneCase in every demo facility.
func TestPruneMatchesBefore(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(17, 4))
	cases := 2000
	if testing.Short() {
		cases = 300
	}
	dropped := 0
	for i := range cases {
		art, f, in, mx := pruneCase(rng, i)
		all, err := newLimit(art, f, in, mx, false)
		require.NoError(t, err, "case %d", i)
		for b := range all.balances {
			br := all.balances[b]
			now, before := br, br
			now.prune(all.cd, true)
			before.pruneBefore(all.cd, true)
			require.Equal(t, before.livePoint, now.livePoint, "case %d balance %d: live points", i, b)
			for _, x := range [][2][]float64{{before.force, now.force}, {before.moment, now.moment}, {before.up, now.up}, {before.down, now.down}} {
				require.True(t, slices.EqualFunc(x[0], x[1], func(a, b float64) bool { return math.Float64bits(a) == math.Float64bits(b) }),
					"case %d balance %d: tables", i, b)
			}
			dropped += len(br.livePoint) - len(now.livePoint)
		}
	}
	require.Positive(t, dropped, "the cases drop elements")
	t.Logf("%d cases: %d elements dropped", cases, dropped)
}

// pruneBefore is prune as it was at 8e0f770: the reference of
// TestPruneMatchesBefore.
func (br *balanceRows) pruneBefore(cd []float64, drop bool) {
	n := len(br.force)
	keepAll := br.weightBreaks || !drop
	for k := 0; k < n && !keepAll; k++ {
		keepAll = math.IsNaN(br.force[k]) || math.IsNaN(br.moment[k])
	}
	// ks collects the live elements in a pooled buffer; setLive then keeps
	// them in one allocation of their final size.
	kbuf := liveScratch.Get().(*[]int32)
	defer liveScratch.Put(kbuf)
	ks := (*kbuf)[:0]
	if keepAll {
		for k := range n {
			ks = append(ks, int32(k))
		}
		*kbuf = ks
		br.setLive(ks)
		return
	}
	// inv is prune's scratch: a pooled buffer, since every load limit (every
	// plan) prunes once and drops it.
	buf := pruneScratch.Get().(*[]float64)
	defer pruneScratch.Put(buf)
	if cap(*buf) < 3*n {
		*buf = make([]float64, 3*n)
	}
	inv := (*buf)[:3*n]
	clear(inv)
	pr := pruner{f: br.force, m: br.moment, inv: inv}
	for k := range n {
		if up, down := br.up[k], br.down[k]; up > 0 && down > 0 {
			pr.inv[3*k], pr.inv[3*k+1], pr.inv[3*k+2] = 1/up, 1/down, 1/min(up, down)
		}
	}
	usable := func(k int) bool { return pr.inv[3*k] > 0 }
	// The candidates: the element with the largest g at each sample t and the one
	// with the steepest rise in t, among the usable ones.
	var cands [len(pruneSamples) + 1]int
	nc := 0
	add := func(k int) {
		if k < 0 || slices.Contains(cands[:nc], k) {
			return
		}
		cands[nc] = k
		nc++
	}
	for _, t := range pruneSamples {
		best, bg := -1, 0.0
		for k := range n {
			if g := pr.g(k, t); usable(k) && g > bg {
				best, bg = k, g
			}
		}
		add(best)
	}
	best, bs := -1, 0.0
	for k := range n {
		if sl := pr.slope(k); usable(k) && sl > bs {
			best, bs = k, sl
		}
	}
	add(best)
	for k := range n {
		i := k / br.rows
		dropped := false
		for _, d := range cands[:nc] {
			if j := d / br.rows; d != k && usable(k) && (i == j || (cd[j] >= cd[i] && cd[i] >= 0)) && pr.dominatesBefore(d, k) {
				dropped = true
				break
			}
		}
		if !dropped {
			ks = append(ks, int32(k))
		}
	}
	*kbuf = ks
	br.setLive(ks)
}

// gapBefore returns g_d − g_k − pruneMargin·(h_d + h_k) at t.
func (p *pruner) gapBefore(d, k int, t float64) float64 {
	return p.g(d, t) - p.g(k, t) - pruneMargin*(p.h(d, t)+p.h(k, t))
}

// dominatesBefore reports whether element d's g exceeds element k's by more than
// pruneMargin·(h_d + h_k) at every t > 0.
func (p *pruner) dominatesBefore(d, k int) bool {
	// At t = 0 the gap must be positive, or exactly 0 because neither element has a
	// part that does not grow with t (then the slope decides near 0).
	g0 := p.gapBefore(d, k, 0)
	if !(g0 > 0) && !(p.f[d] == 0 && p.f[k] == 0) {
		return false
	}
	// Beyond the last kink both sides are linear: the gap must not fall.
	rise := 0.0
	if p.m[d] != 0 || p.m[k] != 0 {
		rise = p.slope(d) - p.slope(k) - pruneMargin*(math.Abs(p.m[d])*p.inv[3*d+2]+math.Abs(p.m[k])*p.inv[3*k+2])
		if !(rise >= 0) {
			return false
		}
	}
	kinked := false
	for _, x := range [2]int{d, k} {
		if f, m := p.f[x], p.m[x]; m != 0 {
			if t := -f / m; t > 0 {
				if !(p.gapBefore(d, k, t) > 0) {
					return false
				}
				kinked = true
			}
		}
	}
	// Without a kink the gap is linear from t = 0: it must start positive or rise.
	return kinked || g0 > 0 || rise > 0
}
