package loads_test

import (
	"testing"

	"github.com/stretchr/testify/assert"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// TestCoefficientUncertainty works the demo balance int-b1 (normal 11 000 N,
// axial 1 100 N, pitching 1 020 N·m, side 4 600 N, rolling 560 N·m, yawing
// 470 N·m; accuracy 0.10 % of each rating, 2σ) by hand on a 1:24 model of the
// demo business jet (S = 36.5/576 = 0.063368 m², c = 2.4/24 = 0.1 m):
//
//	δN = 11 N, δA = 1.1 N, δm = 1.02 N·m, δY = 4.6 N, δl = 0.56 N·m, δn = 0.47 N·m
//	q_c = 40 kPa: q_c·S = 2534.72 N
//	α 0°:  δC_L = 11/2534.72 = 0.0043397; δC_D = 1.1/2534.72 = 4.3397 counts
//	α 10°: δC_D = √((1.1·cos 10°)² + (11·sin 10°)²)/2534.72
//	            = √(1.08329² + 1.91013²)/2534.72 = 2.19594/2534.72 = 8.6634 counts
//	       δC_L = √((11·cos 10°)² + (1.1·sin 10°)²)/2534.72 = 10.8344/2534.72 = 0.0042744
//	δC_m = 1.02/253.472 = 0.0040241; δC_Y = 4.6/2534.72 = 0.0018148;
//	δC_l = 0.56/253.472 = 0.0022093; δC_n = 0.47/253.472 = 0.0018543
//
// and the least q_c for δC_D = 1 count at α 0°: q = δA/(10⁻⁴·S) =
// 1.1/(10⁻⁴·0.063368) = 173 589 Pa, over three times tsw-1's 54 kPa ceiling:
// this balance cannot resolve one drag count on this model in that tunnel.
func TestCoefficientUncertainty(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("tsw-1")
	if !assert.True(t, ok) {
		return
	}
	b := f.Balances[0]
	assert.Equal(t, "int-b1", b.ID)
	var d loads.Vector
	var known [6]bool
	for i := range d {
		d[i], known[i] = b.Accuracy.Of(i, &b.Limits)
	}
	s, c := 36.5/576, 0.1
	cases := []struct {
		name              string
		alpha, q          float64
		cl, cdCounts, tol float64
	}{
		{"alpha 0 at 40 kPa", 0, 40e3, 0.0043397, 4.3397, 1e-4},
		{"alpha 10 at 40 kPa", 10, 40e3, 0.0042744, 8.6634, 1e-4},
		{"one count at alpha 0", 0, 173589.2, 0.0043397 * 40e3 / 173589.2, 1.0, 1e-5},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			u, unknown := loads.CoefficientUncertainty(d, known, tc.alpha, tc.q, s, c)
			assert.Empty(t, unknown)
			assert.InEpsilon(t, tc.cl, u.CL, tc.tol)
			assert.InEpsilon(t, tc.cdCounts, u.CDCounts, tc.tol)
			k := 40e3 / tc.q
			assert.InEpsilon(t, 0.0040241*k, u.Cm, 1e-4)
			assert.InEpsilon(t, 0.0018148*k, u.CY, 1e-4)
			assert.InEpsilon(t, 0.0022093*k, u.Cl, 1e-4)
			assert.InEpsilon(t, 0.0018543*k, u.Cn, 1e-4)
		})
	}
	t.Run("normal force without accuracy", func(t *testing.T) {
		t.Parallel()
		k := known
		k[loads.IndexNormal] = false
		u, unknown := loads.CoefficientUncertainty(d, k, 0, 40e3, s, c)
		assert.Equal(t, []string{"cl", "cd"}, unknown)
		assert.Zero(t, u.CL)
		assert.Zero(t, u.CDCounts)
	})
}
