package similarity_test

import (
	"testing"

	"github.com/stretchr/testify/assert"

	"scalematch/similarity"
)

// TestMismatchDecide checks the matched booleans: decided exactly, so that a plan
// on the edge of the Mach band (ΔM 0.010000000000000009 at a tolerance of 0.01, one
// rounding error above it, as a plan answer gave) counts as matched.
func TestMismatchDecide(t *testing.T) {
	t.Parallel()
	f := func(v float64) *float64 { return &v }
	tr, fa := true, false
	cases := []struct {
		name        string
		m           similarity.Mismatch
		tol         float64
		wantRe      bool
		wantMach    *bool
		wantFroude  *bool
		wantMachTol float64
	}{
		{"band edge in binary", similarity.Mismatch{ReynoldsRatio: 0.54, MachDifference: f(0.010000000000000009)}, 0.01, false, &tr, nil, 0.01},
		{"just outside the band", similarity.Mismatch{ReynoldsRatio: 1, MachDifference: f(-0.0101)}, 0.01, true, &fa, nil, 0.01},
		{"exact", similarity.Mismatch{ReynoldsRatio: 1.0009, MachDifference: f(0)}, 0.005, true, &tr, nil, 0.005},
		{"Reynolds just outside 0.1 %", similarity.Mismatch{ReynoldsRatio: 0.9985, MachDifference: f(0.001)}, 0.005, false, &tr, nil, 0.005},
		{"water: no Mach, Froude matched", similarity.Mismatch{ReynoldsRatio: 0.2, FroudeRatio: 0.9995}, 0.005, false, nil, &tr, 0},
		{"water: Froude off", similarity.Mismatch{ReynoldsRatio: 0.2, FroudeRatio: 1.3}, 0.005, false, nil, &fa, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			m := c.m
			m.Decide(c.tol)
			assert.Equal(t, c.wantRe, m.ReynoldsMatched)
			assert.Equal(t, c.wantMach, m.MachMatched)
			assert.Equal(t, c.wantFroude, m.FroudeMatched)
			assert.Equal(t, c.wantMachTol, m.MachTolerance)
		})
	}
}
