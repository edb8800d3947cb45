package similarity

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
)

// noteValues returns values that exercise the formats' edges: zeros of both
// signs, infinities, NaN, values that round up to the next power of ten at 0,
// 1, 3 and 4 digits, the %g exponent thresholds (1e-4, 1e21), and random
// values of every sign and magnitude from 1e-12 to 1e12.
func noteValues(r *rand.Rand, n int) []float64 {
	vs := []float64{0, math.Copysign(0, -1), math.Inf(1), math.Inf(-1), math.NaN(),
		0.5, 1.5, 2.5, 0.05, 0.95, 9.5, 9.95, 9.995, 99.95, 999.5, 9999.5, 0.99995, 0.9999,
		1e-4, 9.9995e-5, 1e-5, 1e21, 9.99999e20, 1e6, 123456, 1234567, 5e5, -0.04, -0.05, -0.0004}
	for range n {
		v := math.Pow(10, -12+24*r.Float64())
		if r.IntN(2) == 0 {
			v = -v
		}
		vs = append(vs, v)
	}
	return vs
}

// TestNoteSentencesMatchSprintf checks every note written with noteText
// against fmt.Sprintf with the format the note replaced, over noteValues: the
// answers' text is unchanged byte for byte.
func TestNoteSentencesMatchSprintf(t *testing.T) {
	r := rand.New(rand.NewPCG(17, 2))
	vs := noteValues(r, 3000)
	pick := func() float64 { return vs[r.IntN(len(vs))] }
	depth := 0.7
	for range 4000 {
		a, b, c := pick(), pick(), pick()
		n, m := r.IntN(2000)-1000, r.IntN(2000)
		cases := []struct{ got, want string }{
			{machCorrectedNote(a, b), fmt.Sprintf("the Mach number is compared with the flight's after the closed-wall correction: free stream M %.4f, corrected M_c %.4f (blockage at the middle of the matrix's drag range; each point's M_c is in the corrections)", a, b)},
			{machReachNote(a, b), fmt.Sprintf("the flight Mach number %.4g is out of the facility's reach: the nearest usable is %.4g", a, b)},
			{reynoldsShortNote(a, b, c), fmt.Sprintf("the model reaches %.3g of the flight Reynolds number (%.4g against %.4g): expect a Reynolds-number effect on drag and maximum lift", a, b, c)},
			{reynoldsOverNote(a), fmt.Sprintf("the test Reynolds number is %.3g times the flight's: the facility cannot go lower with the allowed models", a)},
			{flightTransitionAt(a), fmt.Sprintf("%.1f %%", a)},
			{transitionNote(a, "x y", b), fmt.Sprintf("natural transition on the model near %.0f %% of the reference length against %s at full scale: fix transition with trips near the leading edges (common practice); the tripped estimate is %+.1f counts", a, "x y", b)},
			{lowReynoldsNote(a), fmt.Sprintf("the model's Reynolds number %.3g is below the flat-plate transition value %.0e: trips may not hold a turbulent boundary layer and size them with care", a, TransitionReynolds)},
			{tripNote(a, b, c, n), fmt.Sprintf("trip at %.0f %% of the reference chord (%.3g mm from the leading edge), roughness height %.3g mm for Re_k = %d (Braslow & Knox 1958, NACA TN 4363), local flow from a flat-plate laminar (Blasius) profile at the free-stream speed", a, b, c, n)},
			{overTripNote(a, b), fmt.Sprintf("the trip height %.3g mm exceeds the local laminar boundary-layer thickness %.3g mm: it over-trips, adding drag and thickening the boundary layer; move it aft or accept the penalty knowingly", a, b)},
			{pointlessTripNote(a), fmt.Sprintf("natural transition on the model (near %.1f %% of the chord) is already ahead of the trip position: a trip there does nothing", a)},
			{stallNote(a, n, m, b, c), fmt.Sprintf("the lift estimate is held at ±C_Lmax = %g past the stall at %d of %d points (α %g° to %g°); post-stall drag and pitching moment are not modelled, so loads there are rough", a, n, m, b, c)},
			{gasVesselNote(a), fmt.Sprintf("a vessel in a gas facility: only the Reynolds number is matched; the cavitation number (full scale %.4g) and the free surface are not represented", a)},
			{cavUnmatchedNote(a, b, "why"), fmt.Sprintf("the cavitation number is not matched: the test reaches σ %.4g against %.4g at full scale (%s); cavitation inception and extent will differ", a, b, "why")},
			{cavOutsideObjectiveNote(a, b), fmt.Sprintf("the cavitation number is not in the objective: the test runs at σ %.4g against %.4g at full scale", a, b)},
			{freeSurfaceNote("pierces", a, nil), fmt.Sprintf("the vessel %s the free surface (full-scale Froude number on length %.4g%s), but a closed water tunnel has none: the Froude number cannot be matched and waves, spray and ventilation are not reproduced", "pierces", a, "")},
			{freeSurfaceNote("runs near", a, &depth), fmt.Sprintf("the vessel %s the free surface (full-scale Froude number on length %.4g%s), but a closed water tunnel has none: the Froude number cannot be matched and waves, spray and ventilation are not reproduced", "runs near", a, fmt.Sprintf(", on depth %.4g", depth))},
		}
		for i, c := range cases {
			if !assert.Equal(t, c.want, c.got, "note %d with %v %v %v %d %d", i, a, b, c, n, m) {
				return
			}
		}
	}
}

// BenchmarkNoteSentence writes one of a plan's notes (the trip's, four
// numbers) with fmt.Sprintf and with noteText: why the notes are written
// without Sprintf.
func BenchmarkNoteSentence(b *testing.B) {
	b.Run("sprintf", func(b *testing.B) {
		b.ReportAllocs()
		for i := range b.N {
			_ = fmt.Sprintf("trip at %.0f %% of the reference chord (%.3g mm from the leading edge), roughness height %.3g mm for Re_k = %d (Braslow & Knox 1958, NACA TN 4363), local flow from a flat-plate laminar (Blasius) profile at the free-stream speed",
				5.0, 12.5+float64(i&7), 0.0843, TripCriticalRoughnessReynolds)
		}
	})
	b.Run("notetext", func(b *testing.B) {
		b.ReportAllocs()
		for i := range b.N {
			_ = tripNote(5.0, 12.5+float64(i&7), 0.0843, TripCriticalRoughnessReynolds)
		}
	})
}
