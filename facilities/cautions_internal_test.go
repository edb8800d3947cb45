package facilities

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestFacilityCautionsMemo checks that the kept cautions are the ones worded
// afresh (makeCautions) for every demo facility, loaded or not, on the first
// call and the second; that a caller changing its slice does not change the
// next answer; and that a pressure of 0 and one of -0, which print
// differently, are kept apart (regression checks of the memo, no published
// values).
func TestFacilityCautionsMemo(t *testing.T) {
	demo := Demo()
	require.NotEmpty(t, demo)
	for _, f := range demo {
		for _, loaded := range []bool{false, true} {
			p, what := f.StagnationPressure, "stagnation pressure"
			if f.StaticPressure != nil {
				p, what = *f.StaticPressure, "test-section static pressure"
			}
			want := makeCautions(cautionKey{id: f.ID, what: what, pMin: math.Float64bits(p.Min), pMax: math.Float64bits(p.Max),
				medium: f.Medium.Kind, tMin: math.Float64bits(f.StagnationTemperature.Min), loaded: loaded})
			first := FacilityCautions(&f, loaded)
			assert.Equal(t, want, first, "%s loaded %v", f.ID, loaded)
			if len(first) > 0 {
				first[0] = "changed by the caller"
			}
			assert.Equal(t, want, FacilityCautions(&f, loaded), "%s loaded %v, second call", f.ID, loaded)
		}
	}
	assert.Nil(t, FacilityCautions(nil, true))

	f := Facility{ID: "x", StagnationPressure: Range{Min: 0, Max: 2e5}, Medium: Medium{Kind: MediumAir}}
	zero := FacilityCautions(&f, false)
	f.StagnationPressure.Min = math.Copysign(0, -1)
	negZero := FacilityCautions(&f, false)
	require.Len(t, zero, 2)
	require.Len(t, negZero, 2)
	assert.Contains(t, zero[1], "down to 0 kPa")
	assert.Contains(t, negZero[1], "down to -0 kPa")
}
