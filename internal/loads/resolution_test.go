package loads_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// TestResolutionCheckHand works the required resolution on int-b1 (axial
// 1 100 N, 0.10 % of rating: δA = 1.1 N at 2σ, normal δN = 11 N) by hand at
// α 0° (C_L 0.3, C_D 0.03) and q = 54 kPa, tsw-1's ceiling:
//
//	δC_D = δA/(q·S) = 1.1/(54 000 × 0.0633681) = 3.2146 counts
//	4 counts asked: margin = 4/3.2146 = 1.2443, resolved;
//	  least q = δA/(4·10⁻⁴·S) = 1.1/(4·10⁻⁴ × 0.0633681) = 43 397 Pa
//	2 counts asked: least q = 86 795 Pa, margin 54 000/86 795 = 0.62216, too coarse
//	δC_L = δN/(q·S) = 11/3421.88 = 0.0032146: 0.003 asked needs q = 57 862 Pa
func TestResolutionCheckHand(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("tsw-1")
	require.True(t, ok)
	b := &f.Balances[0]
	require.Equal(t, "int-b1", b.ID)
	pt := facilities.Point{Alpha: 0, Coefficients: facilities.Coefficients{CL: 0.3, CD: 0.03}}
	for _, tc := range []struct {
		name    string
		res     loads.Resolution
		state   string
		minQ    float64
		margin  float64
		limitBy string
	}{
		{"4 counts", loads.Resolution{CDCounts: fptr(4)}, loads.ResolutionResolved, 43397, 1.2443, "cd"},
		{"2 counts", loads.Resolution{CDCounts: fptr(2)}, loads.ResolutionTooCoarse, 86795, 0.62216, "cd"},
		{"cl 0.003", loads.Resolution{CL: fptr(0.003), CDCounts: fptr(4)}, loads.ResolutionTooCoarse, 57862, 0.93326, "cl"},
		{"cy unrated", loads.Resolution{CY: fptr(0.01)}, loads.ResolutionResolved, 0, 0, "cy"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			lc := j16Case(&tc.res, pt)
			r, err := lc.Check(b, 54000)
			require.NoError(t, err)
			require.NotNil(t, r.Resolution)
			rc := r.Resolution
			if tc.minQ == 0 {
				// int-b1 rates the side force, so δY is known: 4.6/3421.88 =
				// 0.0013443 ≤ 0.01, least q 4.6/(0.01 × 0.0633681) = 7 259 Pa.
				assert.Equal(t, loads.ResolutionResolved, rc.State)
				assert.InDelta(t, 7259, rc.MinDynamicPressure, 1)
				return
			}
			assert.Equal(t, tc.state, rc.State)
			assert.InDelta(t, tc.minQ, rc.MinDynamicPressure, 1e-4*tc.minQ)
			assert.InDelta(t, tc.margin, rc.Margin, 1e-4*tc.margin)
			assert.Equal(t, tc.limitBy, rc.Limiting.Component)
		})
	}
	t.Run("accuracy unknown", func(t *testing.T) {
		t.Parallel()
		nb := *b
		nb.Accuracy = nil
		lc := j16Case(&loads.Resolution{CDCounts: fptr(4)}, pt)
		r, err := lc.Check(&nb, 54000)
		require.NoError(t, err)
		assert.Equal(t, loads.ResolutionAccuracyUnknown, r.Resolution.State)
		assert.Equal(t, []string{"cd"}, r.Resolution.Unknown)
	})
}

// TestLoadFraction: planning to 90 % of the allowed load scales every allowed
// load and the allowed utilisation by 0.9 and states it.
func TestLoadFraction(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("tsw-1")
	require.True(t, ok)
	b := &f.Balances[0]
	lc := j16Case(nil, facilities.Point{Alpha: 4, Coefficients: facilities.Coefficients{CL: 0.6, CD: 0.04}})
	full, err := lc.Check(b, 30000)
	require.NoError(t, err)
	lc.Installation.LoadFraction = fptr(0.9)
	part, err := lc.Check(b, 30000)
	require.NoError(t, err)
	assert.Equal(t, 1.0, full.LoadFraction)
	assert.Equal(t, 0.9, part.LoadFraction)
	assert.InDelta(t, 0.9*full.AllowedUtilization, part.AllowedUtilization, 1e-15)
	assert.InDelta(t, 0.9*float64(full.MaxSafeDynamicPressure), float64(part.MaxSafeDynamicPressure), 0.1*float64(full.MaxSafeDynamicPressure),
		"less allowed load, less q")
	for i, r := range part.Points[0].Rows {
		assert.InDelta(t, 0.9*full.Points[0].Rows[i].Allowed, r.Allowed, 1e-12*r.Rating+1e-300, r.Name)
	}
	lc.Installation.LoadFraction = fptr(1.2)
	_, err = lc.Check(b, 30000)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "load_fraction")
}
