package similarity_test

import (
	"testing"

	"scalematch/similarity"
)

// BenchmarkParseQuantity measures the API's hot path: one call per dimensional
// field given as a string. Goal: well under 1 µs and no allocations on success.
func BenchmarkParseQuantity(b *testing.B) {
	for _, bc := range []struct{ name, in string }{
		{"simple", "35000 ft"},
		{"prefixed", "2.5 bar"},
		{"offset", "15 degC"},
		{"product", "300 in*lbf"},
		{"quotient with power", "0.0023769 slug/ft^3"},
		{"parentheses", "1.8e-5 kg/(m*s)"},
	} {
		b.Run(bc.name, func(b *testing.B) {
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				if _, _, err := similarity.ParseQuantity(bc.in); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkToSI includes parsing the field's unit tag.
func BenchmarkToSI(b *testing.B) {
	for _, bc := range []struct{ name, in, field string }{
		{"length", "35000 ft", "m"},
		{"moment", "300 in*lbf", "N*m"},
		{"temperature difference", "18 degF", "dK"},
		{"angle", "0.1 rad", "deg"},
	} {
		b.Run(bc.name, func(b *testing.B) {
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				if _, err := similarity.ToSI(bc.in, bc.field); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkGroups is the textbook five-variable problem.
func BenchmarkGroups(b *testing.B) {
	vs := vars(b, "R", "M L T^-2", "rho", "M L^-3", "V", "L T^-1", "L", "L", "mu", "M L^-1 T^-1")
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := similarity.Groups(vs, nil); err != nil {
			b.Fatal(err)
		}
	}
}
