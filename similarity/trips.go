package similarity

import (
	"math"
	"sort"
	"sync"
)

// Transition-trip sizing by the criterion of Braslow & Knox (1958, NACA TN 4363,
// "Simplified method for determination of critical height of distributed
// roughness particles for boundary-layer transition at Mach numbers from 0 to
// 5"): a roughness of height k fixes transition when its roughness Reynolds
// number Re_k = u_k·k/ν_k, with u_k and ν_k the local flow at the top of the
// roughness, reaches a critical value, about 600 for three-dimensional
// (distributed grit) roughness at subsonic speeds (Braslow, Hicks & Harris 1966,
// NASA TN D-3579; from memory).
//
// The local flow here is the stated approximation of a flat plate at zero
// pressure gradient with a laminar Blasius profile, the free-stream speed and
// kinematic viscosity at the edge and at the top of the roughness (a low-speed
// approximation: the compressible profile of Braslow & Knox raises the height at
// high subsonic Mach numbers).
const (
	// TripCriticalRoughnessReynolds is the critical Re_k (Braslow, Hicks &
	// Harris 1966, NASA TN D-3579; from memory).
	TripCriticalRoughnessReynolds = 600
	// TripPositionFraction is the trip's distance from the leading edge as a
	// fraction of the model's reference chord (5 %, common practice).
	TripPositionFraction = 0.05
	// blasiusEdgeEta is the Blasius similarity variable η = y·√(U/(ν·x)) at
	// which u = 0.99·U: δ99 = 4.91·x/√Re_x (Schlichting, Boundary-Layer Theory,
	// 7th ed. 1979, ch. VII; from memory).
	blasiusEdgeEta = 4.91
	// blasiusWallShear is f''(0) of the Blasius equation f''' + ½·f·f'' = 0
	// (0.33206; Schlichting 1979, ch. VII; from memory).
	blasiusWallShear = 0.332057
)

// TripSize is the size and place of a transition trip on the model.
type TripSize struct {
	// PositionFraction is the trip's distance from the leading edge over the
	// model's reference chord.
	PositionFraction float64 `json:"position_fraction"`
	// Position is that distance in mm.
	Position float64 `json:"position_mm" unit:"mm"`
	// Height is the roughness height k in mm at which Re_k reaches
	// CriticalRoughnessReynolds.
	Height float64 `json:"height_mm" unit:"mm"`
	// CriticalRoughnessReynolds is the Re_k used (dimensionless).
	CriticalRoughnessReynolds float64 `json:"critical_roughness_reynolds"`
	// LocalReynolds is Re_x = U·x/ν at the trip (dimensionless).
	LocalReynolds float64 `json:"local_reynolds"`
	// BoundaryLayerThickness is the laminar δ99 at the trip in mm (Blasius).
	BoundaryLayerThickness float64 `json:"boundary_layer_thickness_mm" unit:"mm"`
	// ExceedsBoundaryLayer: the height is above δ99, the trip over-trips
	// (thickens the boundary layer and adds its own drag).
	ExceedsBoundaryLayer bool `json:"exceeds_boundary_layer"`
	// Pointless: natural transition on the model is already ahead of the trip
	// position at the test Reynolds number.
	Pointless bool `json:"pointless"`
	// Notes say what the figures mean.
	Notes []string `json:"notes,omitempty"`
}

// SizeTrip sizes a trip at TripPositionFraction of a model reference chord
// chord (m) at the model Reynolds number reChord on it, with natural transition
// at transitionFraction of the chord: the height k with
// f'(η_k)·η_k·√Re_x = Re_k,crit, η_k = k·√Re_x/x (u_k = U·f'(η_k) from the
// Blasius profile, ν_k = ν), solved by bisection on the profile integrated
// once by RK4 (blasiusProfile).
func SizeTrip(reChord, chord, transitionFraction float64) TripSize {
	x := TripPositionFraction * chord
	rex := reChord * TripPositionFraction
	eta := tripEta(TripCriticalRoughnessReynolds / math.Sqrt(rex))
	scale := x / math.Sqrt(rex) // m per unit η
	t := TripSize{
		PositionFraction:          TripPositionFraction,
		Position:                  1e3 * x,
		Height:                    1e3 * eta * scale,
		CriticalRoughnessReynolds: TripCriticalRoughnessReynolds,
		LocalReynolds:             rex,
		BoundaryLayerThickness:    1e3 * blasiusEdgeEta * scale,
		ExceedsBoundaryLayer:      eta > blasiusEdgeEta,
		Pointless:                 transitionFraction <= TripPositionFraction,
	}
	t.Notes = append(t.Notes, tripNote(100*t.PositionFraction, t.Position, t.Height, TripCriticalRoughnessReynolds))
	if t.ExceedsBoundaryLayer {
		t.Notes = append(t.Notes, overTripNote(t.Height, t.BoundaryLayerThickness))
	}
	if t.Pointless {
		t.Notes = append(t.Notes, pointlessTripNote(100*transitionFraction))
	}
	return t
}

// tripEta returns the η at which η·f'(η) reaches target (> 0): the bracket
// [0, 1] doubled until it holds the crossing, then 60 bisections, the midpoint
// of the last bracket. A bisection step whose midpoint lies outside the
// certified bracket of the crossing (tripBracket) takes the side it is on
// without evaluating the profile, so only the last steps, inside the bracket,
// evaluate it: the answer is the plain bisection's to the bit, at about a
// third of the profile evaluations.
func tripEta(target float64) float64 {
	a, b := tripBracket(target)
	below := func(eta float64) bool {
		switch {
		case eta < a:
			return true
		case eta > b:
			return false
		}
		return blasiusVelocity(eta)*eta < target
	}
	lo, hi := 0.0, 1.0
	for below(hi) {
		hi *= 2
	}
	for range 60 {
		mid := (lo + hi) / 2
		if below(mid) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// tripBracket returns a < b around the η where η·f'(η) reaches target such
// that η·f'(η) < target, as computed (blasiusVelocity), at every η below a and
// at a, and not below it at b and every η above: the crossing is found by
// Newton's method on the profile (g = η·f', g' = f' + η·f”), and a and b are
// 1e-12 relative either side of it, checked by evaluating there. η·f' rises
// steeply enough that 1e-12 relative moves it a thousand times its rounding, so
// the computed values beyond a and b keep their side. Where a check fails the
// bracket is (−Inf, +Inf), and every step evaluates.
func tripBracket(target float64) (a, b float64) {
	t := blasiusProfile()
	// Newton from the first tabulated η whose η·f' reaches target.
	i := sort.Search(len(t), func(i int) bool { return float64(i)*blasiusStep*t[i][1] >= target })
	eta := blasiusEnd + 0.0
	if i < len(t) {
		eta = float64(i) * blasiusStep
	}
	for range 20 {
		g, dg := eta, 1.0
		if eta < blasiusEnd {
			j := min(int(eta/blasiusStep), len(t)-1)
			y := t[j]
			if h := eta - float64(j)*blasiusStep; h > 0 {
				y = blasiusRK4(y, h)
			}
			g, dg = eta*y[1], y[1]+eta*y[2]
		}
		if !(dg > 0) {
			break
		}
		step := (g - target) / dg
		eta -= step
		if math.Abs(step) <= 1e-15*eta {
			break
		}
	}
	a, b = eta*(1-1e-12), eta*(1+1e-12)
	if !(a > 0) || !(blasiusVelocity(a)*a < target) || blasiusVelocity(b)*b < target {
		return math.Inf(-1), math.Inf(1)
	}
	return a, b
}

// blasiusStep is the step in η of the tabulated Blasius profile, blasiusEnd
// its end (f' = 1 beyond).
const (
	blasiusStep = 0.01
	blasiusEnd  = 10
)

// blasiusPoint is (f, f', f”) of the Blasius profile at one η.
type blasiusPoint [3]float64

// blasiusProfile is the Blasius flat-plate profile (f”' + ½·f·f” = 0,
// f(0) = f'(0) = 0, f”(0) = 0.332057) at η = i·blasiusStep up to blasiusEnd,
// integrated once by fourth-order Runge–Kutta. The profile is universal, so
// every trip reads it instead of integrating from the wall again at each
// bisection step (which cost about 0.9 ms a trip, most of a plan's physics).
var blasiusProfile = sync.OnceValue(func() []blasiusPoint {
	n := int(math.Round(blasiusEnd / blasiusStep))
	t := make([]blasiusPoint, n+1)
	t[0] = blasiusPoint{0, 0, blasiusWallShear}
	for i := 1; i <= n; i++ {
		t[i] = blasiusRK4(t[i-1], blasiusStep)
	}
	return t
})

// blasiusRK4 advances y by one fourth-order Runge–Kutta step of h in η.
func blasiusRK4(y blasiusPoint, h float64) blasiusPoint {
	d := func(y blasiusPoint) blasiusPoint { return blasiusPoint{y[1], y[2], -0.5 * y[0] * y[2]} }
	add := func(a, b blasiusPoint, s float64) blasiusPoint {
		return blasiusPoint{a[0] + s*b[0], a[1] + s*b[1], a[2] + s*b[2]}
	}
	k1 := d(y)
	k2 := d(add(y, k1, h/2))
	k3 := d(add(y, k2, h/2))
	k4 := d(add(y, k3, h))
	for i := range y {
		y[i] += h / 6 * (k1[i] + 2*k2[i] + 2*k3[i] + k4[i])
	}
	return y
}

// blasiusVelocity returns f'(η) of the Blasius flat-plate profile: the
// tabulated point at or below η (blasiusProfile) advanced by one Runge–Kutta
// step to η; 0 at the wall and 1 beyond η = 10.
func blasiusVelocity(eta float64) float64 {
	if eta >= blasiusEnd {
		return 1
	}
	if eta <= 0 {
		return 0
	}
	t := blasiusProfile()
	i := min(int(eta/blasiusStep), len(t)-1)
	if h := eta - float64(i)*blasiusStep; h > 0 {
		return blasiusRK4(t[i], h)[1]
	}
	return t[i][1]
}
