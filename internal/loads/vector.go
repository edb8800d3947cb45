package loads

import (
	"math"

	"scalematch/facilities"
)

// Vector is a set of the six balance components in body axes, indexed by the
// Index* constants: forces in N, moments in N·m (or, for Body, the
// corresponding coefficients). Signs: normal force up (towards the model's top),
// axial force aft, side force to starboard; rolling moment starboard wing down,
// pitching moment nose-up, yawing moment nose to starboard (docs/axes.md).
type Vector [6]float64

// Indices of the components of a Vector.
const (
	IndexNormal = iota
	IndexAxial
	IndexSide
	IndexRollingMoment
	IndexPitchingMoment
	IndexYawingMoment
)

// ComponentName returns the API name of Vector component i ("normal", ...), or ""
// when i is out of range.
func ComponentName(i int) string {
	switch i {
	case IndexNormal:
		return facilities.ComponentNormal
	case IndexAxial:
		return facilities.ComponentAxial
	case IndexSide:
		return facilities.ComponentSide
	case IndexRollingMoment:
		return facilities.ComponentRollingMoment
	case IndexPitchingMoment:
		return facilities.ComponentPitchingMoment
	case IndexYawingMoment:
		return facilities.ComponentYawingMoment
	}
	return ""
}

// componentIndex returns the Vector index of an API component name, or −1.
func componentIndex(name string) int {
	for i := range 6 {
		if ComponentName(i) == name {
			return i
		}
	}
	return -1
}

// Body returns point p's coefficients in body axes: normal, axial and side force,
// rolling, pitching and yawing moment about the moment reference centre. Lift and
// drag are rotated from wind axes by α and β (wind-to-body rotation, e.g. Etkin &
// Reid, Dynamics of Flight, 1996):
//
//	C_N = C_L·cos α + C_D·sin α·cos β
//	C_A = C_D·cos α·cos β − C_L·sin α
//	C_Y,body = C_Y − C_D·sin β
//
// C_Y, C_l, C_n are taken as given in body axes. At β = 0 these are physics.md §8.
func Body(p facilities.Point) Vector {
	sa, ca := math.Sincos(p.Alpha * math.Pi / 180)
	return bodyAt(&p, sa, ca)
}

// bodyAt is Body with the sine and cosine of the point's α given (Sincos of
// α·π/180, as Body takes them), for a caller that needs them again.
func bodyAt(p *facilities.Point, sa, ca float64) Vector {
	sb, cb := math.Sincos(p.Beta * math.Pi / 180)
	return Vector{
		IndexNormal:         p.CL*ca + p.CD*sa*cb,
		IndexAxial:          p.CD*ca*cb - p.CL*sa,
		IndexSide:           p.CY - p.CD*sb,
		IndexRollingMoment:  p.Cl,
		IndexPitchingMoment: p.Cm,
		IndexYawingMoment:   p.Cn,
	}
}

// Aerodynamic returns the aerodynamic loads at the balance moment centre for body-axis
// coefficients body (from Body), where qS is the dynamic pressure felt by the
// model times its reference area (N) and qSc that times its reference length (N·m),
// and off is the moment reference centre minus the balance moment centre. Forces
// are qS times their coefficients; moments are carried to the balance centre
// (physics.md §8):
//
//	l_bal = l_ref + Y·Δz
//	m_bal = m_ref + N·Δx + A·Δz
//	n_bal = n_ref + Y·Δx
func Aerodynamic(body Vector, qS, qSc float64, off Offset) Vector {
	n := qS * body[IndexNormal]
	a := qS * body[IndexAxial]
	y := qS * body[IndexSide]
	return Vector{
		IndexNormal:         n,
		IndexAxial:          a,
		IndexSide:           y,
		IndexRollingMoment:  qSc*body[IndexRollingMoment] + y*off.Z,
		IndexPitchingMoment: qSc*body[IndexPitchingMoment] + n*off.X + a*off.Z,
		IndexYawingMoment:   qSc*body[IndexYawingMoment] + y*off.X,
	}
}
