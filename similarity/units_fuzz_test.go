package similarity_test

import (
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/similarity"
)

// FuzzParseQuantity checks that no input panics, that every success is finite, that
// every failure is a *UnitError with a message, and that ToSI agrees with
// ParseQuantity on the SI unit of the parsed dimension.
func FuzzParseQuantity(f *testing.F) {
	for _, s := range []string{
		"35000 ft", "250 kt", "2.5 bar", "45 psf", "15 degC", "1.8 m", "12 ft^2",
		"400 lbf", "300 in*lbf", "1.5e5 Pa", "-3 deg", "1 kg/(m*s)", "3 m²", "2 s⁻¹",
		"1e308 mi", "NaN", "", "1 (((m)))^-2", "5 %", "1 m**2", "7 N·m",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, dim, err := similarity.ParseQuantity(s)
		if err != nil {
			var ue *similarity.UnitError
			require.ErrorAs(t, err, &ue, "ParseQuantity(%q)", s)
			require.NotEmpty(t, err.Error(), "ParseQuantity(%q): error message", s)
			require.True(t, errors.Is(err, similarity.ErrSyntax) || errors.Is(err, similarity.ErrUnknownUnit) || errors.Is(err, similarity.ErrRange),
				"ParseQuantity(%q): unclassified error %q", s, err)
			return
		}
		require.False(t, math.IsNaN(v) || math.IsInf(v, 0), "ParseQuantity(%q) = %v", s, v)
		back, err := similarity.ParseDimension(dim.String())
		require.NoError(t, err, "dimension %v of %q", dim, s)
		require.Equal(t, dim, back, "dimension of %q round-trips", s)
		if _, err := similarity.ToSI(s, "m"); err == nil {
			require.Equal(t, similarity.DimLength, dim, "ToSI(%q, m) accepted it", s)
		}
	})
}
