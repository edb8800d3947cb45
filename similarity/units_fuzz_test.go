package similarity_test

import (
	"errors"
	"math"
	"testing"

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
			if !errors.As(err, &ue) || err.Error() == "" {
				t.Fatalf("ParseQuantity(%q): error %T %q", s, err, err)
			}
			if !errors.Is(err, similarity.ErrSyntax) && !errors.Is(err, similarity.ErrUnknownUnit) && !errors.Is(err, similarity.ErrRange) {
				t.Fatalf("ParseQuantity(%q): unclassified error %q", s, err)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("ParseQuantity(%q) = %v", s, v)
		}
		back, err := similarity.ParseDimension(dim.String())
		if err != nil || back != dim {
			t.Fatalf("dimension %v of %q does not round-trip: %v, %v", dim, s, back, err)
		}
		if _, err := similarity.ToSI(s, "m"); err == nil && dim != similarity.DimLength {
			t.Fatalf("ToSI(%q, m) accepted dimension %v", s, dim)
		}
	})
}
