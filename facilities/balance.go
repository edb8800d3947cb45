package facilities

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"scalematch/atmosphere"
	"sort"
	"strings"
)

// ErrNoBalance is returned when a load check is asked of a facility with no balance.
var ErrNoBalance = errors.New("facilities: the facility has no balance")

// Coefficients are the aerodynamic coefficients of one test-matrix point, based on
// the model's reference area S and reference length c. Lift C_L and drag C_D are in
// wind axes (their plane is the model's plane of symmetry); the pitching moment C_m
// is about the moment reference centre, positive nose-up; side force C_Y (positive
// to starboard), rolling moment C_l (positive starboard wing down) and yawing moment
// C_n (positive nose to starboard) are in body axes. Zero values are zero loads.
type Coefficients struct {
	CL float64 `json:"cl"`
	CD float64 `json:"cd"`
	Cm float64 `json:"cm"`
	CY float64 `json:"cy"`
	Cl float64 `json:"cl_roll"`
	Cn float64 `json:"cn"`
}

// Point is one point of the test matrix: its angles of attack and sideslip in
// degrees (geometric, in the test section), its coefficients, and the wall
// correction's q_c/q at this point (0 means 1: no correction).
type Point struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
	Coefficients
	DynamicPressureFactor float64 `json:"dynamic_pressure_factor"`
}

// Load is a set of the six balance components in body axes, indexed by the
// Index* constants: forces in N, moments in N·m (or, for Point.Body, the
// corresponding coefficients). Signs: normal force up (towards the model's top),
// axial force aft, side force to starboard; rolling moment starboard wing down,
// pitching moment nose-up, yawing moment nose to starboard (docs/axes.md).
type Load [6]float64

// Indices of the components of a Load.
const (
	IndexNormal = iota
	IndexAxial
	IndexSide
	IndexRollingMoment
	IndexPitchingMoment
	IndexYawingMoment
)

// ComponentName returns the API name of Load component i ("normal", ...), or ""
// when i is out of range.
func ComponentName(i int) string {
	switch i {
	case IndexNormal:
		return ComponentNormal
	case IndexAxial:
		return ComponentAxial
	case IndexSide:
		return ComponentSide
	case IndexRollingMoment:
		return ComponentRollingMoment
	case IndexPitchingMoment:
		return ComponentPitchingMoment
	case IndexYawingMoment:
		return ComponentYawingMoment
	}
	return ""
}

// componentIndex returns the Load index of an API component name, or −1.
func componentIndex(name string) int {
	for i := range 6 {
		if ComponentName(i) == name {
			return i
		}
	}
	return -1
}

// Body returns the point's coefficients in body axes: normal, axial and side force,
// rolling, pitching and yawing moment about the moment reference centre. Lift and
// drag are rotated from wind axes by α and β (wind-to-body rotation, e.g. Etkin &
// Reid, Dynamics of Flight, 1996):
//
//	C_N = C_L·cos α + C_D·sin α·cos β
//	C_A = C_D·cos α·cos β − C_L·sin α
//	C_Y,body = C_Y − C_D·sin β
//
// C_Y, C_l, C_n are taken as given in body axes. At β = 0 these are physics.md §8.
func (p Point) Body() Load {
	sa, ca := math.Sincos(p.Alpha * math.Pi / 180)
	sb, cb := math.Sincos(p.Beta * math.Pi / 180)
	return Load{
		IndexNormal:         p.CL*ca + p.CD*sa*cb,
		IndexAxial:          p.CD*ca*cb - p.CL*sa,
		IndexSide:           p.CY - p.CD*sb,
		IndexRollingMoment:  p.Cl,
		IndexPitchingMoment: p.Cm,
		IndexYawingMoment:   p.Cn,
	}
}

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
	return Invalid("invalid installation", in.FieldErrors())
}

// FieldErrors returns the problems of the installation's numbers, each named by
// its request path ("installation.model_mass") and judged against its documented
// range (BoundModelMass, BoundModelVolume, BoundOffset). The plan and load-check
// requests and the load check itself all validate an installation with it. The
// balance id is checked where the facility is known.
func (in Installation) FieldErrors() []FieldError {
	var fe []FieldError
	if msg := BoundModelMass.Problem(in.ModelMass); msg != "" {
		fe = append(fe, FieldError{Field: "installation.model_mass", Message: msg + " (0: weight left out)"})
	}
	if msg := BoundModelVolume.Problem(in.ModelVolume); msg != "" {
		fe = append(fe, FieldError{Field: "installation.model_volume", Message: msg + " (0: not given)"})
	}
	if in.LoadFraction != nil {
		BoundLoadFraction.Check(&fe, "installation.load_fraction", *in.LoadFraction)
	}
	for _, o := range []struct {
		name string
		v    float64
	}{{"balance_offset.x", in.BalanceOffset.X}, {"balance_offset.z", in.BalanceOffset.Z},
		{"cg_offset.x", in.CGOffset.X}, {"cg_offset.z", in.CGOffset.Z}} {
		BoundOffset.Check(&fe, "installation."+o.name, o.v)
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

// AeroLoads returns the aerodynamic loads at the balance moment centre for body-axis
// coefficients body (from Point.Body), where qS is the dynamic pressure felt by the
// model times its reference area (N) and qSc that times its reference length (N·m),
// and off is the moment reference centre minus the balance moment centre. Forces
// are qS times their coefficients; moments are carried to the balance centre
// (physics.md §8):
//
//	l_bal = l_ref + Y·Δz
//	m_bal = m_ref + N·Δx + A·Δz
//	n_bal = n_ref + Y·Δx
func AeroLoads(body Load, qS, qSc float64, off Offset) Load {
	n := qS * body[IndexNormal]
	a := qS * body[IndexAxial]
	y := qS * body[IndexSide]
	return Load{
		IndexNormal:         n,
		IndexAxial:          a,
		IndexSide:           y,
		IndexRollingMoment:  qSc*body[IndexRollingMoment] + y*off.Z,
		IndexPitchingMoment: qSc*body[IndexPitchingMoment] + n*off.X + a*off.Z,
		IndexYawingMoment:   qSc*body[IndexYawingMoment] + y*off.X,
	}
}

// WeightLoads returns the loads at the balance moment centre from the model's weight
// W = m·g0 acting at its centre of gravity, at angle of attack alphaDeg (degrees):
//
//	N_w = −W·cos α,  A_w = +W·sin α,  m_w = N_w·x_cg + A_w·z_cg
//
// (physics.md §8). The sideslip is taken as not tilting the weight (exact at β = 0).
// In water the weight is the net W − B, with B = Buoyancy acting up at the centre
// of gravity. It returns zero loads when ModelMass and Buoyancy are 0.
func (in Installation) WeightLoads(alphaDeg float64) Load {
	if in.ModelMass == 0 && in.Buoyancy == 0 {
		return Load{}
	}
	w := in.ModelMass*atmosphere.G0 - in.Buoyancy
	sa, ca := math.Sincos(alphaDeg * math.Pi / 180)
	n := -w * ca
	a := w * sa
	return Load{
		IndexNormal:         n,
		IndexAxial:          a,
		IndexPitchingMoment: n*in.CGOffset.X + a*in.CGOffset.Z,
	}
}

// rating is one row of a balance's limits: a single component (index ≥ 0) or a
// combined gauge row (index −1, coefficients coef).
type rating struct {
	name    string
	index   int
	coef    Load
	limit   float64 // rated load
	allowed float64 // limit / safety factor
}

func (r *rating) value(l *Load) float64 {
	if r.index >= 0 {
		return l[r.index]
	}
	var s float64
	for i, c := range r.coef {
		s += c * l[i]
	}
	return s
}

// Ratings are a balance's limits compiled for fast checks. Build them with
// Balance.Ratings; the zero value limits nothing.
type Ratings struct {
	rows []rating
	// single holds, per component, the index of its own rating row, −1 when
	// it has none; covered marks the components that are rated or enter a
	// gauge row with a non-zero coefficient.
	single  [6]int
	covered [6]bool
	// SafetyFactor divides every rated load.
	SafetyFactor float64
	// Fraction is the share of rating ÷ SafetyFactor allowed (Derate); 1 as
	// compiled.
	Fraction float64
}

// Derate allows only the fraction f (0 < f ≤ 1) of every row's allowed load:
// allowed = f·rating ÷ safety factor. Other values leave the ratings as they are.
func (rs *Ratings) Derate(f float64) {
	if !(f > 0 && f < 1) {
		return
	}
	rs.Fraction *= f
	for i := range rs.rows {
		rs.rows[i].allowed *= f
	}
}

// Ratings compiles the balance's limits. A safety factor of 0 is taken as 1; one
// below 1, a non-positive rated load or an unknown component name in a combined
// row is an error naming the field under "balance".
func (b *Balance) Ratings() (Ratings, error) { return b.ratings(-1) }

// BalanceRatings compiles the limits of the facility's i-th balance, naming bad
// fields under "facility.balances[i]".
func (f *Facility) BalanceRatings(i int) (Ratings, error) {
	return f.Balances[i].ratings(i)
}

// balancePath returns the JSON path of a facility's i-th balance, or "balance" for
// i < 0 (a balance on its own).
func balancePath(i int) string {
	if i < 0 {
		return "balance"
	}
	return fmt.Sprintf("facility.balances[%d]", i)
}

// ratings compiles the limits of the balance at balancePath(idx); the path is
// written only when there is an error to name.
func (b *Balance) ratings(idx int) (Ratings, error) {
	var fe []FieldError
	path := ""
	at := func(field string) string {
		if path == "" {
			path = balancePath(idx)
		}
		return path + field
	}
	sf := b.SafetyFactor
	switch {
	case sf == 0:
		sf = 1
	case !(sf >= 1) || math.IsInf(sf, 0):
		fe = append(fe, FieldError{Field: at(".safety_factor"), Message: fmt.Sprintf("must be at least 1, got %g", sf)})
	}
	rs := Ratings{SafetyFactor: sf, Fraction: 1, single: [6]int{-1, -1, -1, -1, -1, -1}}
	single := [6]*float64{b.Limits.Normal, b.Limits.Axial, b.Limits.Side,
		b.Limits.RollingMoment, b.Limits.PitchingMoment, b.Limits.YawingMoment}
	for i, l := range single {
		if l == nil {
			continue
		}
		if !(*l > 0) || math.IsInf(*l, 0) {
			fe = append(fe, FieldError{Field: at(".limits." + ComponentName(i)), Message: fmt.Sprintf("must be a positive finite load, got %g", *l)})
			continue
		}
		rs.single[i], rs.covered[i] = len(rs.rows), true
		rs.rows = append(rs.rows, rating{name: ComponentName(i), index: i, limit: *l, allowed: *l / sf})
	}
	for j, c := range b.Combined {
		p := func(field string) string { return at(fmt.Sprintf(".combined[%d]", j) + field) }
		r := rating{name: c.Name, index: -1, limit: c.Limit, allowed: c.Limit / sf}
		if r.name == "" {
			r.name = fmt.Sprintf("combined[%d]", j)
		}
		if !(c.Limit > 0) || math.IsInf(c.Limit, 0) {
			fe = append(fe, FieldError{Field: p(".limit"), Message: fmt.Sprintf("must be a positive finite load, got %g", c.Limit)})
		}
		keys := make([]string, 0, len(c.Coefficients))
		for k := range c.Coefficients {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			i := componentIndex(k)
			v := c.Coefficients[k]
			switch {
			case i < 0:
				fe = append(fe, FieldError{Field: p(".coefficients." + k), Message: "unknown component: want normal, axial, side, rolling_moment, pitching_moment or yawing_moment"})
			case math.IsNaN(v) || math.IsInf(v, 0):
				fe = append(fe, FieldError{Field: p(".coefficients." + k), Message: "must be finite"})
			default:
				r.coef[i] = v
				rs.covered[i] = rs.covered[i] || v != 0
			}
		}
		rs.rows = append(rs.rows, r)
	}
	if err := Invalid("balance limits are not usable", fe); err != nil {
		return Ratings{}, err
	}
	return rs, nil
}

// Utilization returns the largest |load|/rating over the components and combined
// rows, and the index of the row that gives it (−1 when nothing is limited).
func (rs *Ratings) Utilization(l *Load) (u float64, row int) {
	row = -1
	for i := range rs.rows {
		r := &rs.rows[i]
		if v := math.Abs(r.value(l)) / r.limit; v > u || row < 0 {
			u, row = v, i
		}
	}
	return u, row
}

// countSingle returns how many rows are single-component ratings.
func countSingle(rs *Ratings) int {
	n := 0
	for _, i := range rs.single {
		if i >= 0 {
			n++
		}
	}
	return n
}

// fillRows writes the six components of load l and then every gauge row into
// rows (len 6 + gauge rows), marking the rating row limit as limiting.
func (rs *Ratings) fillRows(rows []RowLoad, l *Load, limit int) {
	k := 6
	for i := range rs.rows {
		r := &rs.rows[i]
		at := k
		if r.index >= 0 {
			at = r.index
		} else {
			k++
		}
		v := r.value(l)
		rows[at] = RowLoad{Name: r.name, Load: v, Rated: true, Covered: true, Rating: r.limit, Allowed: r.allowed,
			ShareOfAllowed: math.Abs(v) / r.allowed, Limiting: i == limit}
	}
	for c := range 6 {
		if rs.single[c] < 0 {
			rows[c] = RowLoad{Name: ComponentName(c), Load: l[c], Covered: rs.covered[c]}
		}
	}
}

// RowName returns the name of row i: a component name or a combined row's name.
func (rs *Ratings) RowName(i int) string {
	if i < 0 || i >= len(rs.rows) {
		return ""
	}
	return rs.rows[i].name
}

// Rows returns the number of rated rows: limited components, then combined rows.
func (rs *Ratings) Rows() int { return len(rs.rows) }

// Row returns row i's value of load l: the component, or Σ coefficient·load for a
// combined row.
func (rs *Ratings) Row(i int, l *Load) float64 { return rs.rows[i].value(l) }

// Allowed returns row i's rated load divided by the safety factor (times the
// Derate fraction).
func (rs *Ratings) Allowed(i int) float64 { return rs.rows[i].allowed }

// SafeDynamicPressure returns the largest dynamic pressure q ≥ 0 with
// |q·u + w| ≤ allowed, for a load row that is affine in q (u per pascal, w the part
// that does not grow with q, such as weight):
//
//	q_max = (allowed − sign(u)·w)/|u|
//
// It returns 0 when |w| > allowed already, and +Inf when u = 0.
func SafeDynamicPressure(u, w, allowed float64) float64 {
	if math.Abs(w) > allowed {
		return 0
	}
	if u == 0 {
		return math.Inf(1)
	}
	return (allowed - math.Copysign(1, u)*w) / math.Abs(u)
}

// MaxDynamicPressure returns the largest free-stream dynamic pressure q in Pa at
// which the load q·perQ + weight stays within every rating over the safety factor,
// and the row that sets it; each row is solved exactly by SafeDynamicPressure. It
// returns 0 when the weight alone exceeds a row, and +Inf (row −1) when no row
// grows with q.
func (rs *Ratings) MaxDynamicPressure(perQ, weight *Load) (q float64, row int) {
	q, row = math.Inf(1), -1
	for i := range rs.rows {
		r := &rs.rows[i]
		qi := SafeDynamicPressure(r.value(perQ), r.value(weight), r.allowed)
		if qi < q {
			q, row = qi, i
		}
		if qi == 0 {
			break
		}
	}
	return q, row
}

// LoadCase is the input of a balance load check: a model at test scale in the test
// section, its installation and its test matrix with coefficients and wall
// corrections.
type LoadCase struct {
	// ReferenceArea is the model's reference area S in m².
	ReferenceArea float64
	// ReferenceLength is the model's reference length c in m (moment coefficients).
	ReferenceLength float64
	// Installation places the model on the balance.
	Installation Installation
	// Points is the test matrix.
	Points []Point
	// Resolution, when not nil, is the coarsest 2σ uncertainty of each
	// coefficient the test accepts: each report then says whether the balance
	// resolves it (LoadReport.Resolution), and loads.Choose prefers, among the
	// balances within the allowed loads, the one that resolves it with the most
	// margin.
	Resolution *Resolution
}

// LoadPoint is the loads of one test point at the balance moment centre, body axes,
// wall corrections and weight included: forces in N, moments in N·m, angles in
// degrees. Utilization is the largest |load|/rating of the point (not divided by
// the safety factor); Limiting names the component or gauge row that gives it.
type LoadPoint struct {
	Alpha           float64 `json:"alpha"`
	Beta            float64 `json:"beta"`
	DynamicPressure float64 `json:"dynamic_pressure"`
	Normal          float64 `json:"normal"`
	Axial           float64 `json:"axial"`
	Side            float64 `json:"side"`
	PitchingMoment  float64 `json:"pitching_moment"`
	RollingMoment   float64 `json:"rolling_moment"`
	YawingMoment    float64 `json:"yawing_moment"`
	Utilization     float64 `json:"utilization"`
	Limiting        string  `json:"limiting,omitempty"`
	// Rows are every component (normal, axial, side, rolling_moment,
	// pitching_moment, yawing_moment, in that order) and then every gauge row of
	// the balance at this point, rated or not.
	Rows []RowLoad `json:"rows"`
}

// RowLoad is one balance component or gauge row at one test point.
type RowLoad struct {
	// Name is the component's name or the gauge row's name.
	Name string `json:"name"`
	// Load is the component's load (N for forces, N·m for moments) or the gauge
	// row's Σ coefficient·load, in its rating's unit.
	Load float64 `json:"load"`
	// Rated is false for a component with no rating of its own; such a component
	// may still enter a gauge row (Covered).
	Rated bool `json:"rated"`
	// Covered reports that the row is rated or that a gauge row of the balance
	// includes the component: false for a component the balance does not measure
	// against any limit.
	Covered bool `json:"covered"`
	// Rating is the rated load (N, N·m or the gauge row's unit); 0 when not rated.
	Rating float64 `json:"rating,omitempty"`
	// Allowed is Rating ÷ the safety factor, in the same unit; 0 when not rated.
	Allowed float64 `json:"allowed,omitempty"`
	// ShareOfAllowed is |Load| ÷ Allowed (1 = at the allowed load); 0 when not
	// rated.
	ShareOfAllowed float64 `json:"share_of_allowed"`
	// Limiting marks the row with the point's largest ShareOfAllowed.
	Limiting bool `json:"limiting,omitempty"`
}

// Verdicts of a load check (LoadReport.Verdict and the answers built on it), in
// the order of how far they are from letting the model be run.
const (
	// VerdictWithin: the model fits the test section, every point keeps every
	// rated component and gauge row at or under its allowed load (rating ÷ safety
	// factor), the weight is included and no unrated component carries load.
	VerdictWithin = "within_allowed_loads"
	// VerdictNotVerified: no rated row is above its allowed load, but the check
	// cannot vouch for the loads: a component with no rating (and in no gauge
	// row) carries load, the model's weight was left out, or the facility lists
	// no balance to check.
	VerdictNotVerified = "not_verified"
	// VerdictOver: at least one point loads a rated component or gauge row above
	// its allowed load (or the weight alone does): those points must not be run.
	VerdictOver = "over_allowed_load"
	// VerdictDoesNotFit: the model breaks a test-section limit (span, blockage or
	// length); no load figure makes it runnable.
	VerdictDoesNotFit = "does_not_fit"
)

// VerdictRank orders the verdicts from VerdictWithin (0) to VerdictDoesNotFit
// (3); an unknown verdict ranks with VerdictNotVerified.
func VerdictRank(v string) int {
	switch v {
	case VerdictWithin:
		return 0
	case VerdictOver:
		return 2
	case VerdictDoesNotFit:
		return 3
	}
	return 1
}

// Limiting names a component (or gauge row) and the test point where it binds.
type Limiting struct {
	Component string  `json:"component"`
	Alpha     float64 `json:"alpha"`
	Beta      float64 `json:"beta"`
}

// LoadReport is the load check of one balance over the test matrix.
type LoadReport struct {
	// BalanceID names the balance.
	BalanceID string `json:"balance_id"`
	// SafetyFactor is the balance's safety factor (0 taken as 1).
	SafetyFactor float64 `json:"safety_factor"`
	// AllowedUtilization is 1/SafetyFactor.
	AllowedUtilization float64 `json:"allowed_utilization"`
	// DynamicPressure is the free-stream dynamic pressure checked, in Pa.
	DynamicPressure float64 `json:"dynamic_pressure"`
	// Points are the loads of every test point.
	Points []LoadPoint `json:"points"`
	// MaxUtilization is the largest point utilisation.
	MaxUtilization float64 `json:"max_utilization"`
	// WithinLimits reports MaxUtilization ≤ AllowedUtilization and that the wind-off
	// loads (the model's weight alone, which the balance carries at every q on the
	// way up) stay within it too: DynamicPressure ≤ MaxSafeDynamicPressure.
	WithinLimits bool `json:"within_limits"`
	// Limiting is the component and point of MaxUtilization.
	Limiting Limiting `json:"limiting"`
	// MaxSafeLimiting is the component and point that set MaxSafeDynamicPressure.
	MaxSafeLimiting Limiting `json:"max_safe_limiting"`
	// WeightIncluded reports whether the model's weight is in the loads.
	WeightIncluded bool `json:"weight_included"`
	// Warnings are notes on the check's inputs.
	Warnings []string `json:"warnings,omitempty"`
	// Verdict is this balance's verdict on the loads (the Verdict* names; a
	// report alone never says VerdictDoesNotFit: the fit is the answer's).
	Verdict string `json:"verdict"`
	// UnratedLoaded names the components that carry load at some point but have
	// no rating and enter no gauge row: the check cannot vouch for them.
	UnratedLoaded []string `json:"unrated_loaded,omitempty"`
	// OverAllowed lists every point and row above its allowed load.
	OverAllowed []Limiting `json:"over_allowed,omitempty"`
	// Uncertainty is, per point in the order of Points, the 2σ uncertainty of
	// the coefficients from the balance's accuracy (Balance.Accuracy); empty
	// when the balance gives no accuracy.
	Uncertainty []Uncertainty `json:"uncertainty,omitempty"`
	// UncertaintyUnknown names the coefficients whose uncertainty is not known
	// (a component they need has no accuracy).
	UncertaintyUnknown []string `json:"uncertainty_unknown,omitempty"`
	// LoadFraction is the share of the allowed load (rating ÷ safety factor)
	// the check allowed (Installation.LoadFraction; 1: all of it):
	// AllowedUtilization and every row's Allowed include it.
	LoadFraction float64 `json:"load_fraction"`
	// Resolution says whether the balance resolves the required resolution
	// (LoadCase.Resolution); absent when none was asked.
	Resolution *ResolutionCheck `json:"resolution,omitempty"`
	// MaxSafeDynamicPressure is the free-stream dynamic pressure in Pa at which, by
	// this estimate, the worst point reaches AllowedUtilization (rating ÷ safety
	// factor); 0 when the weight alone exceeds it; +Inf (JSON null) when no rated
	// load grows with q. Despite the published name (kept for compatibility) it is
	// not a safe limit: it is where a linear-lift, parabolic-polar, steady estimate
	// reaches the allowed loads, and the safety factor is the only margin left for
	// the estimate's error and for unsteady loads. It comes last in the JSON
	// object, as it always has.
	MaxSafeDynamicPressure Ceiling `json:"max_safe_dynamic_pressure"`
}

// Ceiling is an upper bound in which +Inf means that there is none; JSON
// writes that as null and reads null back as +Inf.
type Ceiling float64

// MarshalJSON writes the bound as encoding/json writes a float64, or null when
// there is none.
func (c Ceiling) MarshalJSON() ([]byte, error) {
	if math.IsInf(float64(c), 1) {
		return []byte("null"), nil
	}
	return json.Marshal(float64(c))
}

// UnmarshalJSON reads a number, or null as no bound (+Inf).
func (c *Ceiling) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*c = Ceiling(math.Inf(1))
		return nil
	}
	var f float64
	if err := json.Unmarshal(b, &f); err != nil {
		return err
	}
	*c = Ceiling(f)
	return nil
}

// Uncertainty is the 2σ uncertainty of the coefficients at one point, from the
// balance components' 2σ uncertainties δF at the point's corrected dynamic
// pressure q_c, the model's reference area S and reference length c:
//
//	δC = δF/(q_c·S) for forces, δF/(q_c·S·c) for moments,
//	δC_L = √((δN·cos α)² + (δA·sin α)²)/(q_c·S),
//	δC_D = √((δA·cos α)² + (δN·sin α)²)/(q_c·S)
//
// (the rotation of normal and axial force into lift and drag at angle of
// attack α; sideslip is not in the rotation). A coefficient that is not known is
// 0 and named in LoadReport.UncertaintyUnknown. At q_c = 0 nothing is resolved
// and every figure is 0 with "all" unknown.
type Uncertainty struct {
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
	// CL is δC_L (dimensionless).
	CL float64 `json:"cl,omitempty"`
	// CDCounts is δC_D in drag counts (1 count = 0.0001).
	CDCounts float64 `json:"cd_counts,omitempty"`
	// Cm is δC_m (dimensionless).
	Cm float64 `json:"cm,omitempty"`
	// CY is δC_Y (dimensionless).
	CY float64 `json:"cy,omitempty"`
	// Cl is δC_l, the rolling moment (dimensionless).
	Cl float64 `json:"cl_roll,omitempty"`
	// Cn is δC_n (dimensionless).
	Cn float64 `json:"cn,omitempty"`
}

// CoefficientUncertainty returns the 2σ uncertainty of the coefficients at
// angle of attack alphaDeg (degrees) for component uncertainties d (N, N·m;
// known[i] false where not given), corrected dynamic pressure qc (Pa),
// reference area s (m²) and length c (m), and the names of the coefficients not
// known.
func CoefficientUncertainty(d Load, known [6]bool, alphaDeg, qc, s, c float64) (Uncertainty, []string) {
	u := Uncertainty{}
	var unknown []string
	qs := qc * s
	sa, ca := math.Sincos(alphaDeg * math.Pi / 180)
	if known[IndexNormal] && known[IndexAxial] {
		u.CL = math.Hypot(d[IndexNormal]*ca, d[IndexAxial]*sa) / qs
		u.CDCounts = 1e4 * math.Hypot(d[IndexAxial]*ca, d[IndexNormal]*sa) / qs
	} else {
		unknown = append(unknown, "cl", "cd")
	}
	one := func(i int, name string, den float64, dst *float64) {
		if known[i] {
			*dst = d[i] / den
		} else {
			unknown = append(unknown, name)
		}
	}
	one(IndexPitchingMoment, "cm", qs*c, &u.Cm)
	one(IndexSide, "cy", qs, &u.CY)
	one(IndexRollingMoment, "cl_roll", qs*c, &u.Cl)
	one(IndexYawingMoment, "cn", qs*c, &u.Cn)
	return u, unknown
}

// validate checks the case's numbers, naming fields by their request paths.
func (lc *LoadCase) validate(q float64) error {
	var fe []FieldError
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	if !(lc.ReferenceArea > 0) || !finite(lc.ReferenceArea) {
		fe = append(fe, FieldError{Field: "article.reference_area", Message: "model reference area must be positive"})
	}
	if !(lc.ReferenceLength > 0) || !finite(lc.ReferenceLength) {
		fe = append(fe, FieldError{Field: "article.reference_length", Message: "model reference length must be positive"})
	}
	fe = append(fe, lc.Installation.FieldErrors()...)
	if !(q >= 0) || !finite(q) {
		fe = append(fe, FieldError{Field: "test.dynamic_pressure", Message: fmt.Sprintf("must be a non-negative dynamic pressure in Pa, got %g", q)})
	}
	if len(lc.Points) == 0 {
		fe = append(fe, FieldError{Field: "alpha", Message: "the test matrix has no points"})
	}
	return Invalid("load check", fe)
}

// Affine returns the loads of point i at the balance as perQ·q + weight, where q is
// the free-stream dynamic pressure: perQ holds the aerodynamic loads per pascal of
// free-stream q (the point's wall correction q_c/q included), weight the model's
// weight.
func (lc *LoadCase) Affine(i int) (perQ, weight Load) {
	p := lc.Points[i]
	f := p.DynamicPressureFactor
	if f == 0 {
		f = 1
	}
	qS := f * lc.ReferenceArea
	perQ = AeroLoads(p.Body(), qS, qS*lc.ReferenceLength, lc.Installation.BalanceOffset)
	weight = lc.Installation.WeightLoads(p.Alpha)
	return perQ, weight
}

// Check returns the loads of every test point on balance b at free-stream dynamic
// pressure q (Pa), the utilisation of each point, the worst point, and the
// free-stream dynamic pressure at which the worst point reaches the allowed load by
// this estimate (MaxSafeDynamicPressure). Bad input is a *Error naming the field.
func (lc *LoadCase) Check(b *Balance, q float64) (LoadReport, error) {
	return lc.check(b, q, -1)
}

func (lc *LoadCase) check(b *Balance, q float64, idx int) (LoadReport, error) {
	if err := lc.validate(q); err != nil {
		return LoadReport{}, err
	}
	rs, err := b.ratings(idx)
	if err != nil {
		return LoadReport{}, err
	}
	rs.Derate(lc.Installation.Fraction())
	r := LoadReport{
		BalanceID:              b.ID,
		SafetyFactor:           rs.SafetyFactor,
		AllowedUtilization:     rs.Fraction / rs.SafetyFactor,
		LoadFraction:           rs.Fraction,
		DynamicPressure:        q,
		Points:                 make([]LoadPoint, len(lc.Points)),
		MaxSafeDynamicPressure: Ceiling(math.Inf(1)),
		WeightIncluded:         lc.Installation.ModelMass > 0,
	}
	if !r.WeightIncluded {
		r.Warnings = append(r.Warnings, "model_mass not given: the model's weight is left out of the balance loads, which makes the check unconservative")
	}
	worst := -1
	nrow := 6 + len(rs.rows) - countSingle(&rs)
	table := make([]RowLoad, len(lc.Points)*nrow)
	var unrated [6]bool
	for i, p := range lc.Points {
		perQ, weight := lc.Affine(i)
		var l Load
		for k := range l {
			l[k] = q*perQ[k] + weight[k]
		}
		u, row := rs.Utilization(&l)
		rows := table[i*nrow : (i+1)*nrow : (i+1)*nrow]
		rs.fillRows(rows, &l, row)
		for k := range 6 {
			if !rs.covered[k] && l[k] != 0 {
				unrated[k] = true
			}
		}
		for j := range rows {
			if rows[j].ShareOfAllowed > 1+1e-12 {
				r.OverAllowed = append(r.OverAllowed, Limiting{rows[j].Name, p.Alpha, p.Beta})
			}
		}
		f := p.DynamicPressureFactor
		if f == 0 {
			f = 1
		}
		r.Points[i] = LoadPoint{
			Alpha: p.Alpha, Beta: p.Beta, DynamicPressure: q * f,
			Normal: l[IndexNormal], Axial: l[IndexAxial], Side: l[IndexSide],
			RollingMoment: l[IndexRollingMoment], PitchingMoment: l[IndexPitchingMoment],
			YawingMoment: l[IndexYawingMoment],
			Utilization:  u, Limiting: rs.RowName(row), Rows: rows,
		}
		if worst < 0 || u > r.MaxUtilization {
			worst, r.MaxUtilization = i, u
			r.Limiting = Limiting{rs.RowName(row), p.Alpha, p.Beta}
		}
		if qs, row := rs.MaxDynamicPressure(&perQ, &weight); qs < float64(r.MaxSafeDynamicPressure) {
			r.MaxSafeDynamicPressure = Ceiling(qs)
			r.MaxSafeLimiting = Limiting{rs.RowName(row), p.Alpha, p.Beta}
		}
	}
	r.WithinLimits = r.MaxUtilization <= r.AllowedUtilization*(1+1e-12) &&
		q <= float64(r.MaxSafeDynamicPressure)*(1+1e-12)
	for k, u := range unrated {
		if u {
			r.UnratedLoaded = append(r.UnratedLoaded, ComponentName(k))
		}
	}
	if lc.Resolution != nil {
		r.Resolution = lc.resolution(b, q)
	}
	if b.Accuracy != nil && q > 0 {
		d, known := b.Accuracy.Load(&b.Limits)
		r.Uncertainty = make([]Uncertainty, len(lc.Points))
		for i, p := range lc.Points {
			r.Uncertainty[i], r.UncertaintyUnknown = CoefficientUncertainty(d, known, p.Alpha, r.Points[i].DynamicPressure,
				lc.ReferenceArea, lc.ReferenceLength)
			r.Uncertainty[i].Alpha, r.Uncertainty[i].Beta = p.Alpha, p.Beta
		}
	}
	switch {
	case !r.WithinLimits:
		r.Verdict = VerdictOver
	case len(r.UnratedLoaded) > 0 || !r.WeightIncluded:
		r.Verdict = VerdictNotVerified
	default:
		r.Verdict = VerdictWithin
	}
	if len(r.UnratedLoaded) > 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("balance %s has no rating for %s, which carry load in this test matrix: the check cannot vouch for them (not verified)",
			b.ID, strings.Join(r.UnratedLoaded, ", ")))
	}
	if r.MaxSafeDynamicPressure == 0 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("the model's weight alone loads %s beyond %.0f %% of its rating at α %.4g°: the balance carries it wind-off and on the way to the test's dynamic pressure",
			r.MaxSafeLimiting.Component, 100*r.AllowedUtilization, r.MaxSafeLimiting.Alpha))
	}
	return r, nil
}

// CheckBalance returns the load check of facility f's i-th balance at
// free-stream dynamic pressure q (Pa), as Check, naming bad balance fields under
// "facility.balances[i]". The balance choice over a facility's balances is
// internal/loads' (loads.Choose).
func (lc *LoadCase) CheckBalance(f *Facility, i int, q float64) (LoadReport, error) {
	return lc.check(&f.Balances[i], q, i)
}

// CautionFraction is the share of the allowed utilisation (1/safety factor) above
// which a load answer carries a caution naming the component and point (80 %).
const CautionFraction = 0.8

// pressureCautionAbove is the stagnation pressure in Pa above which a facility is
// treated as a pressure vessel in the cautions: 0.5 bar above a standard
// atmosphere, a common threshold of pressure-equipment rules (common practice).
const pressureCautionAbove = 101325 + 50000

// subAtmosphericBelow is the stagnation pressure in Pa below which a facility with
// a variable stagnation pressure is treated as a sub-atmospheric circuit in the
// cautions. The record does not carry the site's ambient pressure, so the standard
// sea-level atmosphere (101 325 Pa, U.S. Standard Atmosphere 1976) stands in for
// it: a site above sea level has a lower ambient, so the caution errs towards
// being given. A facility with a fixed stagnation pressure is taken to be open to
// its site's atmosphere.
const subAtmosphericBelow = 101325

// cryogenicBelow is the stagnation temperature in K below which a facility is
// treated as cryogenic in the cautions (common practice).
const cryogenicBelow = 200

// The standing cautions of every answer that carries cautions. They are exported
// so that callers and tests can recognise them; their wording is the contract.
const (
	// CautionEstimate is the first caution of every answer.
	CautionEstimate = "These figures are engineering estimates from simplified published models, not a clearance to run: the facility's approved limits and balance ratings, the model's stress analysis, the facility's operating procedures and the judgement of a licensed engineer govern."
	// CautionWeightLeftOut goes with an answer whose loads leave the model's weight out.
	CautionWeightLeftOut = "The model's weight is left out of these balance loads (no model_mass given), which makes the load check unconservative: the balance carries the weight at every point, wind on and wind off. Give model_mass."
	// CautionStaticLoads goes with every answer that carries balance loads.
	CautionStaticLoads = "The balance loads are steady, static estimates from a linear lift curve and a parabolic drag polar: stall, buffet, tunnel start and stop transients and model vibration can load the balance well beyond them, and the safety factor is the only margin left for that and for the estimate's own error."
)

// Cautions returns the cautions that go with an answer for facility f and the
// given load reports, each worded to its danger:
//
//   - always CautionEstimate;
//   - with any load report, CautionStaticLoads;
//   - for each report whose worst point exceeds its allowed utilisation
//     (rating ÷ safety factor): that those points must not be run;
//   - for each report whose worst point is above CautionFraction of its allowed
//     utilisation but within it: how little margin is left;
//   - when any report leaves the model's weight out, CautionWeightLeftOut;
//   - for the facility (f may be nil): a pressure vessel (stagnation pressure above
//     1.5 bar absolute), a sub-atmospheric circuit (a variable stagnation pressure
//     reaching below the standard sea-level atmosphere), any cold circuit
//     (stagnation temperature below 200 K, any gas), nitrogen (asphyxiation, at
//     any temperature), and water.
func Cautions(f *Facility, reports ...LoadReport) []string {
	out := []string{CautionEstimate}
	if len(reports) > 0 {
		out = append(out, CautionStaticLoads)
	}
	noWeight := false
	for _, r := range reports {
		switch {
		case r.MaxUtilization > r.AllowedUtilization*(1+1e-12):
			out = append(out, fmt.Sprintf("Balance %s: do not run the points above its allowed load. By this estimate %s reaches %.0f %% of its rating at α %.4g°, β %.4g°, beyond the %.0f %% allowed (rating ÷ safety factor %.3g); change the model scale, the dynamic pressure, the α range or the balance, and plan again.",
				r.BalanceID, r.Limiting.Component, 100*r.MaxUtilization, r.Limiting.Alpha, r.Limiting.Beta,
				100*r.AllowedUtilization, r.SafetyFactor))
		case r.MaxUtilization > CautionFraction*r.AllowedUtilization:
			out = append(out, fmt.Sprintf("Balance %s: %s reaches %.0f %% of its rating at α %.4g°, β %.4g° (%.0f %% of the %.0f %% allowed, rating ÷ safety factor %.3g): within the allowed load by this estimate only, with the safety factor as the only margin left for the estimate's error.",
				r.BalanceID, r.Limiting.Component, 100*r.MaxUtilization, r.Limiting.Alpha, r.Limiting.Beta,
				100*r.MaxUtilization/r.AllowedUtilization, 100*r.AllowedUtilization, r.SafetyFactor))
		}
		noWeight = noWeight || !r.WeightIncluded
	}
	if noWeight {
		out = append(out, CautionWeightLeftOut)
	}
	if f == nil {
		return out
	}
	p, what := f.StagnationPressure, "stagnation pressure"
	if f.StaticPressure != nil {
		p, what = *f.StaticPressure, "test-section static pressure"
	}
	if p.Max > pressureCautionAbove {
		out = append(out, fmt.Sprintf("Facility %s is a pressure vessel (%s up to %.0f kPa): only its certified pressure limits and its pressurisation procedures apply; access to the circuit and model changes need it vented first.",
			f.ID, what, p.Max/1000))
	}
	if !p.Fixed() && p.Min < subAtmosphericBelow {
		out = append(out, fmt.Sprintf("Facility %s runs below atmospheric pressure (%s down to %.0f kPa): the circuit is loaded from outside and can buckle or implode, hatches and windows are held by the pressure difference, and a leak draws air or water in; only its certified vacuum limits and its procedures apply, and access needs it brought back to ambient first.",
			f.ID, what, p.Min/1000))
	}
	if f.Medium.Kind != MediumWater && f.StagnationTemperature.Min > 0 && f.StagnationTemperature.Min < cryogenicBelow {
		out = append(out, fmt.Sprintf("Facility %s runs cold (stagnation temperature down to %.0f K): cold gas and cold surfaces burn skin and embrittle materials; follow the facility's cold-running and warm-up procedures, and check the model's materials, fits and balance calibration at the test temperature.",
			f.ID, f.StagnationTemperature.Min))
	}
	if f.Medium.Kind == MediumNitrogen {
		out = append(out, fmt.Sprintf("Facility %s runs on nitrogen: nitrogen displaces oxygen without warning and can kill in an enclosed space; follow the facility's oxygen monitoring, ventilation and confined-space procedures.", f.ID))
	}
	if f.Medium.Kind == MediumWater && len(reports) > 0 {
		out = append(out, CautionWaterLoads)
	}
	if f.Medium.Kind == MediumWater {
		out = append(out, fmt.Sprintf("Facility %s is a water circuit: the water's mass, pressure and flow store energy, a model or fairing that comes loose travels downstream, and wet electrical equipment and open hatches are hazards; follow the facility's filling, draining, isolation and entry procedures, and check the model's sealing and fastening for immersion.", f.ID))
	}
	return out
}
