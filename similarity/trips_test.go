package similarity

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
)

// TestBlasiusVelocity checks the integrated profile against the Blasius table
// (Howarth 1938, as tabulated in Schlichting, Boundary-Layer Theory, 7th ed.
// 1979, table 7.1; from memory): f'(1) = 0.32979, f'(2) = 0.62977,
// f'(3) = 0.84605, f'(5) = 0.99155.
func TestBlasiusVelocity(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		name      string
		eta, want float64
		tol       float64
	}{
		{"eta 1", 1, 0.32979, 1e-4},
		{"eta 2", 2, 0.62977, 1e-4},
		{"eta 3", 3, 0.84605, 1e-4},
		{"eta 5", 5, 0.99155, 1e-4},
		{"wall", 0, 0, 0},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			assert.InDelta(t, c.want, blasiusVelocity(c.eta), c.tol)
		})
	}
}

// TestSizeTrip works a trip by hand: a 0.1 m chord at Re_c = 2×10⁶, trip at
// 5 % chord: x = 5 mm, Re_x = 10⁵, √Re_x = 316.23, so f'(η)·η must reach
// 600/316.23 = 1.8974. From the Blasius table (Schlichting 1979, table 7.1;
// from memory) f'(2.4)·2.4 = 0.72899·2.4 = 1.7496 and f'(2.6)·2.6 = 0.77246·2.6
// = 2.0084; linear interpolation gives η_k = 2.4 + 0.2·(1.8974 − 1.7496)/
// (2.0084 − 1.7496) = 2.5142, so k = η_k·x/√Re_x = 2.5142·5 mm/316.23 =
// 0.03975 mm; δ99 = 4.91·5 mm/316.23 = 0.07763 mm (Braslow & Knox 1958, NACA
// TN 4363, criterion with Re_k = 600).
func TestSizeTrip(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name               string
		re, chord, tr      float64
		height, delta, tol float64
		exceeds, pointless bool
	}{
		{"hand-worked 0.1 m at Re 2e6", 2e6, 0.1, 0.4, 0.03975, 0.07763, 0.005, false, false},
		// Re_c = 2×10⁴: Re_x = 1000, target 600/31.62 = 18.97: η_k ≈ 19 > 4.91,
		// the trip is far taller than the boundary layer.
		{"low Reynolds over-trips", 2e4, 0.1, 1, 0, 4.91 * 5 / 31.6228, 0.005, true, false},
		// Re_c = 2×10⁷: Re_x = 10⁶ at 5 mm, δ99 = 4.91·5 mm/1000.
		{"transition ahead of the trip", 2e7, 0.1, 0.03, 0, 4.91 * 5 / 1000, 0.005, false, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			tr := SizeTrip(c.re, c.chord, c.tr)
			if c.height > 0 {
				assert.InEpsilon(t, c.height, tr.Height, c.tol)
			}
			assert.InEpsilon(t, c.delta, tr.BoundaryLayerThickness, c.tol)
			assert.InDelta(t, 5.0, tr.Position, 1e-12)
			assert.Equal(t, c.exceeds, tr.ExceedsBoundaryLayer)
			assert.Equal(t, c.pointless, tr.Pointless)
			assert.NotEmpty(t, tr.Notes)
		})
	}
}

// BenchmarkSizeTrip is one trip sizing, as every plan of a tripped model does.
func BenchmarkSizeTrip(b *testing.B) {
	for b.Loop() {
		SizeTrip(2e6, 0.1, 0.4)
	}
}

// tripEtaBisection is the plain bisection tripEta replays: every step
// evaluates the profile.
func tripEtaBisection(target float64) float64 {
	lo, hi := 0.0, 1.0
	for blasiusVelocity(hi)*hi < target {
		hi *= 2
	}
	for range 60 {
		mid := (lo + hi) / 2
		if blasiusVelocity(mid)*mid < target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// TestTripEtaBisection: the bisection that skips the steps outside its
// certified bracket gives the plain bisection's η to the bit, from a trip deep in
// the boundary layer to one far outside it, at targets spread over nine
// decades and at the profile's tabulated points and its end.
func TestTripEtaBisection(t *testing.T) {
	t.Parallel()
	targets := []float64{1e-4, 0.01, 0.3, 1, 10, 1e3, 1e5}
	for re := 1e3; re <= 1e12; re *= 1.37 {
		targets = append(targets, TripCriticalRoughnessReynolds/math.Sqrt(re*TripPositionFraction))
	}
	for _, eta := range []float64{0.01, 0.5, 1, 2.5, 4.91, 9.99, 10} {
		targets = append(targets, eta*blasiusVelocity(eta))
	}
	for _, target := range targets {
		assert.Equal(t, tripEtaBisection(target), tripEta(target), "η at η·f' = %g", target)
		a, b := tripBracket(target)
		assert.Less(t, a, b, "bracket at %g", target)
	}
}
