package loads

import (
	"math"

	"scalematch/atmosphere"
	"scalematch/facilities"
)

// Offset is a position in the model's plane of symmetry relative to the balance
// moment centre, in metres: X positive forward, Z positive up (body axes).
type Offset struct {
	X float64 `json:"x" unit:"m"`
	Z float64 `json:"z" unit:"m"`
}

// Installation is how the model sits on the balance.
type Installation struct {
	// BalanceID names the balance; "": choose the balance with the highest peak
	// utilisation that still respects its safety factor.
	BalanceID string `json:"balance_id,omitempty"`
	// BalanceOffset is the moment reference centre minus the balance moment centre,
	// in m; zero: they coincide. When the planner chooses the scale, the offset is
	// the same physical distance on every candidate model.
	BalanceOffset Offset `json:"balance_offset" unit:"m"`
	// ModelMass is the mass of the model (metric part, on the balance) in kg; 0:
	// weight left out of the check, with a warning. When the planner chooses the
	// scale the same mass is used for every candidate model.
	ModelMass float64 `json:"model_mass,omitempty" unit:"kg"`
	// CGOffset is the model's centre of gravity minus the balance moment centre, in m.
	CGOffset Offset `json:"cg_offset" unit:"m"`
	// ModelVolume is the model's displaced volume in m³ (metric part) for its
	// buoyancy in a water facility, 0–1000 m³; 0: not given (the answer then
	// shows an estimate, not used in the loads). Ignored in a gas facility.
	ModelVolume float64 `json:"model_volume,omitempty" unit:"m^3"`
	// LoadFraction is the share of the allowed load (rating ÷ safety factor) the
	// plan and the check may use, above 0 and at most 1 (0.9 plans to 90 % of
	// it); nil: 1, all of it. It lowers every row's allowed load, the planner's
	// load ceiling and the verdict's threshold alike.
	LoadFraction *float64 `json:"load_fraction,omitempty"`
	// Buoyancy is the upthrust in N the weight loads subtract (WithBuoyancy sets
	// it from ModelVolume); never read from a request.
	Buoyancy float64 `json:"-"`
}

// Validate checks the installation's numbers and returns a *Error (CodeInvalid)
// naming each bad field under "installation", or nil.
func (in Installation) Validate() error {
	return facilities.Invalid("invalid installation", in.FieldErrors())
}

// FieldErrors returns the problems of the installation's numbers, each named by
// its request path ("installation.model_mass") and judged against its documented
// range (BoundModelMass, BoundModelVolume, BoundOffset). The plan and load-check
// requests and the load check itself all validate an installation with it. The
// balance id is checked where the facility is known.
func (in Installation) FieldErrors() []facilities.FieldError {
	var fe []facilities.FieldError
	if msg := BoundModelMass.Problem(in.ModelMass); msg != "" {
		fe = append(fe, facilities.FieldError{Field: "installation.model_mass", Message: msg + " (0: weight left out)"})
	}
	if msg := BoundModelVolume.Problem(in.ModelVolume); msg != "" {
		fe = append(fe, facilities.FieldError{Field: "installation.model_volume", Message: msg + " (0: not given)"})
	}
	if in.LoadFraction != nil {
		BoundLoadFraction.Check(&fe, "installation.load_fraction", *in.LoadFraction)
	}
	for _, o := range []struct {
		name string
		v    float64
	}{{"balance_offset.x", in.BalanceOffset.X}, {"balance_offset.z", in.BalanceOffset.Z},
		{"cg_offset.x", in.CGOffset.X}, {"cg_offset.z", in.CGOffset.Z}} {
		if msg := BoundOffset.Problem(o.v); msg != "" {
			// The field's name is built only for an error.
			fe = append(fe, facilities.FieldError{Field: "installation." + o.name, Message: msg})
		}
	}
	return fe
}

// Fraction returns the share of the allowed load the installation may use:
// LoadFraction, or 1 when it is nil.
func (in Installation) Fraction() float64 {
	if in.LoadFraction == nil {
		return 1
	}
	return *in.LoadFraction
}

// Weight returns the loads at the balance moment centre from the model's weight
// W = m·g0 acting at its centre of gravity, at angle of attack alphaDeg (degrees):
//
//	N_w = −W·cos α,  A_w = +W·sin α,  m_w = N_w·x_cg + A_w·z_cg
//
// (physics.md §8). The sideslip is taken as not tilting the weight (exact at β = 0).
// In water the weight is the net W − B, with B = Buoyancy acting up at the centre
// of gravity. It returns zero loads when ModelMass and Buoyancy are 0.
func (in Installation) Weight(alphaDeg float64) Vector {
	if in.ModelMass == 0 && in.Buoyancy == 0 {
		return Vector{}
	}
	sa, ca := math.Sincos(alphaDeg * math.Pi / 180)
	return in.weightAt(sa, ca)
}

// weightAt is Weight with the sine and cosine of α given (Sincos of
// α·π/180, as Weight takes them).
func (in *Installation) weightAt(sa, ca float64) Vector {
	if in.ModelMass == 0 && in.Buoyancy == 0 {
		return Vector{}
	}
	w := in.ModelMass*atmosphere.G0 - in.Buoyancy
	n := -w * ca
	a := w * sa
	return Vector{
		IndexNormal:         n,
		IndexAxial:          a,
		IndexPitchingMoment: n*in.CGOffset.X + a*in.CGOffset.Z,
	}
}

// rating is one row of a balance's limits: a single component (index ≥ 0) or a
