package atmosphere

import (
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
)

func TestIsentropicPowHalfInteger(t *testing.T) {
	t.Parallel()
	// Where e rounds from a multiple of ½, isentropicPow differs from math.Pow at
	// that multiple and at the rounded e by rounding alone (the products' and
	// the square root's, e's rounding times ln x): a few units in the last
	// place up to MaxMach.
	for _, g := range []float64{1.4, 5.0 / 3.0, 4.0 / 3.0, 1.2, 1.5} {
		for _, e := range []float64{g / (g - 1), 1 / (g - 1)} {
			half := math.Round(2*e) / 2
			t.Run(fmt.Sprintf("γ=%.4g e=%g", g, e), func(t *testing.T) {
				t.Parallel()
				worstHalf, worst := 0.0, 0.0
				for m := 0.0; m <= MaxMach; m += 0.001 {
					x := TemperatureRatio(m, g)
					got := isentropicPow(x, e)
					worstHalf = math.Max(worstHalf, math.Abs(got/math.Pow(x, half)-1))
					worst = math.Max(worst, math.Abs(got/math.Pow(x, e)-1))
				}
				assert.Less(t, worstHalf, 2e-15, "largest change from math.Pow(x, %v)", half)
				assert.Less(t, worst, 3e-15, "largest change from math.Pow(x, %v)", e)
				t.Logf("largest relative change from math.Pow(x, %v): %.2g; from math.Pow(x, %v): %.2g", half, worstHalf, e, worst)
			})
		}
	}
	// Any other exponent is math.Pow's.
	for _, e := range []float64{1.3 / 0.3, 1 / 0.3, 3.5 + 1e-9, 40.5} {
		for _, x := range []float64{1, 1.2, 2.8, 11} {
			assert.Equal(t, math.Pow(x, e), isentropicPow(x, e), "x %g e %g", x, e)
		}
	}
}
