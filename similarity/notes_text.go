package similarity

import (
	"math"
	"strconv"
)

// The sentences a plan writes among its warnings and notes (three to eight a
// plan) are built with strconv's Append functions rather than fmt.Sprintf:
// Sprintf's parsing of the format and its interface-boxed arguments cost a
// plan about 25k instructions, about 5 % of an air plan
// (BenchmarkNoteSentence gives the two side by side). Each function below
// gives, byte for byte, what fmt.Sprintf gives for the format in its comment
// (TestNoteSentencesMatchSprintf checks them over random values).

// noteText is a sentence being written.
type noteText []byte

// newNote starts a sentence with room for most notes.
func newNote() noteText { return make(noteText, 0, 256) }

// s appends text.
func (t noteText) s(x string) noteText { return append(t, x...) }

// f appends v as %.{prec}f.
func (t noteText) f(v float64, prec int) noteText { return strconv.AppendFloat(t, v, 'f', prec, 64) }

// g appends v as %.{prec}g; prec −1 gives %g.
func (t noteText) g(v float64, prec int) noteText { return strconv.AppendFloat(t, v, 'g', prec, 64) }

// signedF appends v as %+.{prec}f: fmt's plus flag writes a sign for every
// value, "+NaN" included.
func (t noteText) signedF(v float64, prec int) noteText {
	if math.IsNaN(v) {
		return append(t, "+NaN"...)
	}
	if !math.Signbit(v) && !math.IsInf(v, 1) {
		t = append(t, '+')
	}
	return t.f(v, prec)
}

// d appends n as %d.
func (t noteText) d(n int) noteText { return strconv.AppendInt(t, int64(n), 10) }

// machCorrectedNote: "… free stream M %.4f, corrected M_c %.4f (…)".
func machCorrectedNote(free, corrected float64) string {
	return string(newNote().s("the Mach number is compared with the flight's after the closed-wall correction: free stream M ").f(free, 4).
		s(", corrected M_c ").f(corrected, 4).
		s(" (blockage at the middle of the matrix's drag range; each point's M_c is in the corrections)"))
}

// machReachNote: "the flight Mach number %.4g is out of … usable is %.4g".
func machReachNote(flight, nearest float64) string {
	return string(newNote().s("the flight Mach number ").g(flight, 4).
		s(" is out of the facility's reach: the nearest usable is ").g(nearest, 4))
}

// reynoldsShortNote: "the model reaches %.3g of the flight Reynolds number
// (%.4g against %.4g): …".
func reynoldsShortNote(ratio, test, flight float64) string {
	return string(newNote().s("the model reaches ").g(ratio, 3).s(" of the flight Reynolds number (").g(test, 4).
		s(" against ").g(flight, 4).s("): expect a Reynolds-number effect on drag and maximum lift"))
}

// reynoldsOverNote: "the test Reynolds number is %.3g times the flight's: …".
func reynoldsOverNote(ratio float64) string {
	return string(newNote().s("the test Reynolds number is ").g(ratio, 3).
		s(" times the flight's: the facility cannot go lower with the allowed models"))
}

// flightTransitionAt: "%.1f %%".
func flightTransitionAt(percent float64) string { return string(newNote().f(percent, 1).s(" %")) }

// transitionNote: "natural transition on the model near %.0f %% … against %s
// at full scale: … the tripped estimate is %+.1f counts".
func transitionNote(modelPercent float64, flightAt string, trippedCounts float64) string {
	return string(newNote().s("natural transition on the model near ").f(modelPercent, 0).
		s(" % of the reference length against ").s(flightAt).
		s(" at full scale: fix transition with trips near the leading edges (common practice); the tripped estimate is ").
		signedF(trippedCounts, 1).s(" counts"))
}

// lowReynoldsNote: "the model's Reynolds number %.3g is below the flat-plate
// transition value %.0e: …" (the value TransitionReynolds).
func lowReynoldsNote(re float64) string {
	return string(newNote().s("the model's Reynolds number ").g(re, 3).s(" is below the flat-plate transition value ").
		e0(TransitionReynolds).s(": trips may not hold a turbulent boundary layer and size them with care"))
}

// e0 appends v as %.0e.
func (t noteText) e0(v float64) noteText { return strconv.AppendFloat(t, v, 'e', 0, 64) }

// tripNote: "trip at %.0f %% of the reference chord (%.3g mm from the leading
// edge), roughness height %.3g mm for Re_k = %d (…)".
func tripNote(positionPercent, position, height float64, reK int) string {
	return string(newNote().s("trip at ").f(positionPercent, 0).s(" % of the reference chord (").g(position, 3).
		s(" mm from the leading edge), roughness height ").g(height, 3).s(" mm for Re_k = ").d(reK).
		s(" (Braslow & Knox 1958, NACA TN 4363), local flow from a flat-plate laminar (Blasius) profile at the free-stream speed"))
}

// overTripNote: "the trip height %.3g mm exceeds the local laminar
// boundary-layer thickness %.3g mm: …".
func overTripNote(height, thickness float64) string {
	return string(newNote().s("the trip height ").g(height, 3).s(" mm exceeds the local laminar boundary-layer thickness ").
		g(thickness, 3).s(" mm: it over-trips, adding drag and thickening the boundary layer; move it aft or accept the penalty knowingly"))
}

// pointlessTripNote: "natural transition on the model (near %.1f %% of the
// chord) is already ahead of the trip position: …".
func pointlessTripNote(percent float64) string {
	return string(newNote().s("natural transition on the model (near ").f(percent, 1).
		s(" % of the chord) is already ahead of the trip position: a trip there does nothing"))
}

// stallNote: "the lift estimate is held at ±C_Lmax = %g past the stall at %d
// of %d points (α %g° to %g°); …".
func stallNote(clMax float64, stalled, points int, lo, hi float64) string {
	return string(newNote().s("the lift estimate is held at ±C_Lmax = ").g(clMax, -1).s(" past the stall at ").d(stalled).
		s(" of ").d(points).s(" points (α ").g(lo, -1).s("° to ").g(hi, -1).
		s("°); post-stall drag and pitching moment are not modelled, so loads there are rough"))
}

// gasVesselNote: "a vessel in a gas facility: … (full scale %.4g) …".
func gasVesselNote(cavitation float64) string {
	return string(newNote().s("a vessel in a gas facility: only the Reynolds number is matched; the cavitation number (full scale ").
		g(cavitation, 4).s(") and the free surface are not represented"))
}

// cavUnmatchedNote: "the cavitation number is not matched: the test reaches σ
// %.4g against %.4g at full scale (%s); …".
func cavUnmatchedNote(test, full float64, why string) string {
	return string(newNote().s("the cavitation number is not matched: the test reaches σ ").g(test, 4).s(" against ").g(full, 4).
		s(" at full scale (").s(why).s("); cavitation inception and extent will differ"))
}

// cavOutsideObjectiveNote: "the cavitation number is not in the objective: the
// test runs at σ %.4g against %.4g at full scale".
func cavOutsideObjectiveNote(test, full float64) string {
	return string(newNote().s("the cavitation number is not in the objective: the test runs at σ ").g(test, 4).
		s(" against ").g(full, 4).s(" at full scale"))
}

// freeSurfaceNote: "the vessel %s the free surface (full-scale Froude number on
// length %.4g%s), …", the %s after the number ", on depth %.4g" when depth is
// given.
func freeSurfaceNote(verb string, froude float64, depth *float64) string {
	t := newNote().s("the vessel ").s(verb).s(" the free surface (full-scale Froude number on length ").g(froude, 4)
	if depth != nil {
		t = t.s(", on depth ").g(*depth, 4)
	}
	return string(t.s("), but a closed water tunnel has none: the Froude number cannot be matched and waves, spray and ventilation are not reproduced"))
}
