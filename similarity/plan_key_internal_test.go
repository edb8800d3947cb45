package similarity

import (
	"fmt"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// toleranceLess is the planner's former key comparison, kept here only to show
// the failure the exact comparison removes: levels within 1e-11 counted as equal,
// and q within 1e-12 relative too.
func toleranceLess(a, b key) bool {
	const tol = 1e-11
	for i := range a.v {
		if a.v[i] < b.v[i]-tol {
			return true
		}
		if a.v[i] > b.v[i]+tol {
			return false
		}
	}
	return a.q < b.q*(1-1e-12)
}

// weakOrderViolation returns a description of the first triple of keys on which
// less is not a strict weak ordering (irreflexive, transitive, with transitive
// incomparability), or "".
func weakOrderViolation(less func(a, b key) bool, ks []key) string {
	tie := func(a, b key) bool { return !less(a, b) && !less(b, a) }
	for i, a := range ks {
		if less(a, a) {
			return "a key is better than itself"
		}
		for j, b := range ks {
			for k, c := range ks {
				if less(a, b) && less(b, c) && !less(a, c) {
					return fmt.Sprintf("not transitive: %d < %d < %d but not %d < %d", i, j, k, i, k)
				}
				if tie(a, b) && tie(b, c) && !tie(a, c) {
					return fmt.Sprintf("ties are not transitive: %d ~ %d ~ %d but not %d ~ %d", i, j, k, i, k)
				}
			}
		}
	}
	return ""
}

// creepChain is the failure a tolerance on the first level allows: each candidate
// is within the tolerance (1e-11) of the one before and has a lower q, so it wins
// as a "tie" on q, while the first level creeps from 0 to 1.8e-11. This is how the
// golden-section search walked off a plateau of the weighted sum (weight reynolds
// alone), to lose at the end to the candidate at the flight's Mach number with a
// much higher q.
var creepChain = []key{
	{v: [nGroups]float64{0}, q: 9742.7},
	{v: [nGroups]float64{0.6e-11}, q: 8500},
	{v: [nGroups]float64{1.2e-11}, q: 7900},
	{v: [nGroups]float64{1.8e-11}, q: 7374.6},
}

// TestKeyLessChain checks on the creeping chain that the former tolerant
// comparison is not transitive (the failure) and that less is: with it, the plan
// at the top of the chain (level 0) beats every candidate that crept off the
// plateau, directly and through the chain alike.
func TestKeyLessChain(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name     string
		less     func(a, b key) bool
		wantWeak bool
	}{
		{"former tolerant comparison", toleranceLess, false},
		{"key.less", key.less, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			v := weakOrderViolation(c.less, creepChain)
			if c.wantWeak {
				assert.Empty(t, v, "strict weak ordering on the chain")
			} else {
				assert.NotEmpty(t, v, "the chain breaks strict weak ordering")
			}
		})
	}
	for i := 1; i < len(creepChain); i++ {
		assert.True(t, creepChain[0].less(creepChain[i]), "candidate %d (level %.2g, q %.6g) is not worse than the plateau's (level 0, q %.6g)",
			i, creepChain[i].v[0], creepChain[i].q, creepChain[0].q)
	}
}

// TestKeyLessWeakOrder checks less on seeded random key sets built to hit equal
// levels, levels a rounding error apart, equal q and infinite values: the ways a
// comparison can stop being a strict weak ordering.
func TestKeyLessWeakOrder(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewSource(7))
	vals := []float64{0, 1e-16, 0.5e-11, 1e-11, 1.5e-11, 2e-11, 1e-3, 0.25, 1, posInf()}
	qs := []float64{6e4, 6e4 * (1 + 1e-13), 6e4 * (1 - 0.6e-12), 5e4, posInf()}
	for set := 0; set < 200; set++ {
		ks := make([]key, 8)
		for i := range ks {
			for j := range ks[i].v {
				ks[i].v[j] = vals[rng.Intn(len(vals))]
			}
			ks[i].q = qs[rng.Intn(len(qs))]
		}
		require.Empty(t, weakOrderViolation(key.less, ks), "set %d: %+v", set, ks)
	}
}

func posInf() float64 { return worst.q }
