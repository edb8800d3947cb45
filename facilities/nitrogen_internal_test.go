package facilities

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
)

// TestPRLog: prLog meets ln[(1 + (1+√2)x)/(1 + (1−√2)x)], taken as the
// difference of two log1p (accurate for small x), within 2e-15 relative over x =
// bρ from 1e-8 to 0.1, across the switch from the series to the logarithm (the
// worst, 1.3e-15, is the logarithm's, just past the switch; below it the
// logarithm of the ratio itself misses by up to 1e-8).
func TestPRLog(t *testing.T) {
	t.Parallel()
	for x := 1e-8; x < 0.1; x *= 1.05 {
		want := math.Log1p((1+math.Sqrt2)*x) - math.Log1p((1-math.Sqrt2)*x)
		assert.InEpsilon(t, want, prLog(x), 2e-15, "x %g", x)
	}
}
