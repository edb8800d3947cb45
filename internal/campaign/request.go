package campaign

import (
	"context"
	"fmt"
	"math"
	"strconv"

	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// Model policies (ModelPolicy.Policy).
const (
	// PolicyOneModel: one model, one scale, built once and tested in every
	// facility (the default).
	PolicyOneModel = "one_model"
	// PolicyModelPerFacility: each facility gets a model of its own scale.
	PolicyModelPerFacility = "model_per_facility"
	// PolicyExistingModels: the models exist (ModelPolicy.Scales); each facility
	// tests the one of them that serves the campaign best.
	PolicyExistingModels = "existing_models"
)

// Campaign aims (Objective.Aim).
const (
	// AimLowest maximises the lowest Reynolds closeness over the conditions
	// served (the default).
	AimLowest = "lowest_reynolds_ratio"
	// AimMean maximises the mean Reynolds closeness over the conditions served.
	AimMean = "mean_reynolds_ratio"
)

// MaxConditions is the most conditions a campaign may have, explicit and grid
// together.
const MaxConditions = 10000

// maxLabel is the longest label, in bytes.
const maxLabel = 200

// MaxFacilities is the most candidate facilities a campaign may name.
const MaxFacilities = 12

// Request is a test campaign: the full-scale article, its conditions, the
// candidate facilities, the model policy, the aim and the level sharing. SI
// throughout; angles in degrees; a scale is model length over full-scale length
// (a number or "1:N").
type Request struct {
	// Article is the full-scale test article, as in a plan request.
	Article similarity.Article `json:"article"`
	// Alpha is the campaign's default angle-of-attack sweep in degrees; a condition
	// may give its own.
	Alpha similarity.Sweep `json:"alpha"`
	// Beta is the campaign's default sideslip sweep in degrees (one run per
	// angle); nil: β = 0.
	Beta *similarity.Sweep `json:"beta,omitempty"`
	// Conditions are the explicit full-scale conditions, each with the caller's
	// label.
	Conditions []Condition `json:"conditions,omitempty" maxItems:"10000"`
	// Grid adds the conditions of every altitude crossed with every Mach number,
	// after the explicit ones.
	Grid *Grid `json:"grid,omitempty"`
	// Facilities are the candidate facilities, in the caller's order of
	// preference (ties go to the earlier one).
	Facilities []FacilityChoice `json:"facilities" maxItems:"12"`
	// Model is the model policy; the zero value is one model for every facility,
	// of any scale that fits.
	Model ModelPolicy `json:"model"`
	// Objective is the campaign's aim and the default Mach tolerance.
	Objective Objective `json:"objective"`
	// LevelSharing lets conditions share stagnation-pressure and temperature
	// levels at a Reynolds cost; the zero value is off.
	LevelSharing LevelSharing `json:"level_sharing"`
}

// Condition is one full-scale flight condition of a campaign: the flight's
// fields (altitude or pressure_altitude in m, delta_isa in K, mach or one
// airspeed in m/s) with the caller's label and optionally its own sweeps and
// Mach tolerance.
type Condition struct {
	// Label is the caller's name of the condition ("cruise 2"); "" gets
	// "condition N" (N from 1).
	Label string `json:"label,omitempty" maxLength:"200"`
	similarity.Flight
	// Alpha is this condition's α sweep in degrees; nil: the campaign's.
	Alpha *similarity.Sweep `json:"alpha,omitempty"`
	// Beta is this condition's β sweep in degrees; nil: the campaign's.
	Beta *similarity.Sweep `json:"beta,omitempty"`
	// MachTolerance is the half-width of this condition's Mach band; nil: the
	// objective's.
	MachTolerance *float64 `json:"mach_tolerance,omitempty"`
}

// Grid is a block of conditions: every altitude crossed with every Mach number,
// at one temperature offset, labelled "<altitude> m M<mach>".
type Grid struct {
	// Altitudes are geometric altitudes in m.
	Altitudes []float64 `json:"altitudes" unit:"m" maxItems:"1000"`
	// Machs are flight Mach numbers.
	Machs []float64 `json:"machs" maxItems:"1000"`
	// DeltaISA is the day's temperature offset in K.
	DeltaISA float64 `json:"delta_isa,omitempty" unit:"dK"`
}

// FacilityChoice is one candidate facility: a catalog id or an inline record,
// with an optional installation (balance, offsets, model mass) and fixed scale.
type FacilityChoice struct {
	// FacilityID names a catalog facility ("tsw-1"); give this or Facility.
	FacilityID string `json:"facility_id,omitempty" example:"tsw-1"`
	// Facility is a facility given inline.
	Facility *facilities.Facility `json:"facility,omitempty"`
	// Installation places the model on the balance; balance_id "" lets the
	// planner choose for each condition.
	Installation loads.Installation `json:"installation"`
	// Scale fixes the model scale in this facility; nil: chosen by the policy.
	Scale *float64 `json:"scale,omitempty" unit:"scale"`
}

// ModelPolicy says how many models the campaign builds and of what size.
type ModelPolicy struct {
	// Policy is one_model (default), model_per_facility or existing_models.
	Policy string `json:"policy,omitempty" enums:"one_model,model_per_facility,existing_models"`
	// Scales are the scales of the existing models (existing_models only).
	Scales []float64 `json:"scales,omitempty" unit:"scale" maxItems:"100"`
	// ScaleMin and ScaleMax bound the scales searched; nil: 1:1000 and what the
	// largest test section takes.
	ScaleMin *float64 `json:"scale_min,omitempty" unit:"scale"`
	ScaleMax *float64 `json:"scale_max,omitempty" unit:"scale"`
}

// Objective is the campaign's aim. Every condition is planned with the plan
// objective's default priority (the Mach number within its tolerance first,
// then the Reynolds number); the campaign then compares model scales by the
// conditions served, then the conditions whose Mach number is matched, then the
// aim over the conditions served, then fewer tunnel hours.
type Objective struct {
	// Aim is lowest_reynolds_ratio (default) or mean_reynolds_ratio.
	Aim string `json:"aim,omitempty" enums:"lowest_reynolds_ratio,mean_reynolds_ratio"`
	// MachTolerance is the default half-width of each condition's Mach band;
	// nil: 0.005.
	MachTolerance *float64 `json:"mach_tolerance,omitempty"`
}

// LevelSharing lets conditions in one facility take the stagnation-pressure and
// temperature levels of others, each losing at most ReynoldsCostPercent of its
// Reynolds closeness, so that the test needs fewer pressure and temperature
// changes.
type LevelSharing struct {
	// ReynoldsCostPercent is the Reynolds cost a condition may pay, in per cent
	// of its closeness (0–50); 0: no sharing.
	ReynoldsCostPercent float64 `json:"reynolds_cost_percent,omitempty"`
}

// cond is one validated condition.
type cond struct {
	label  string
	flight similarity.FlightState
	mx     *similarity.Matrix
	drag   *similarity.DragRange
	sweep  int // index of the condition's sweeps in engine.sweeps
	obj    similarity.Objective
}

// fac is one resolved candidate facility.
type fac struct {
	f     *facilities.Facility
	in    loads.Installation
	fixed *float64
	geom  float64 // largest scale the test section takes
	// limits holds the balance load limit of each sweep (nil entries: no balance).
	limits []similarity.LoadLimit
}

// prepared is a request that passed validation, with every condition resolved.
type prepared struct {
	req    *Request
	conds  []cond
	facs   []fac
	policy string
	aim    string
	lo, hi float64 // the campaign's scale bounds
	share  float64 // level-sharing cost as a fraction
}

// prepare validates req and resolves its conditions and facilities. Bad input
// is a *check.Error with CodeInvalid naming every bad field.
func prepare(ctx context.Context, p *app.Planner, req *Request) (*prepared, error) {
	var fe check.Fields
	pr := &prepared{req: req, policy: req.Model.Policy, aim: req.Objective.Aim}
	app.CheckArticle(&req.Article, &fe)
	switch pr.policy {
	case "":
		pr.policy = PolicyOneModel
	case PolicyOneModel, PolicyModelPerFacility, PolicyExistingModels:
	default:
		fe.Add("model.policy", "unknown policy %q: want one_model, model_per_facility or existing_models", pr.policy)
	}
	switch pr.aim {
	case "":
		pr.aim = AimLowest
	case AimLowest, AimMean:
	default:
		fe.Add("objective.aim", "unknown aim %q: want lowest_reynolds_ratio or mean_reynolds_ratio", pr.aim)
	}
	scaleOK := func(field string, v float64) {
		if !similarity.BoundScale.Contains(v) {
			fe.Add(field, "scale %s", similarity.BoundScale.Problem(v))
		}
	}
	m := req.Model
	if m.ScaleMin != nil {
		scaleOK("model.scale_min", *m.ScaleMin)
	}
	if m.ScaleMax != nil {
		scaleOK("model.scale_max", *m.ScaleMax)
	}
	if m.ScaleMin != nil && m.ScaleMax != nil && *m.ScaleMin > *m.ScaleMax {
		fe.Add("model.scale_min", "scale_min %g is above scale_max %g", *m.ScaleMin, *m.ScaleMax)
	}
	for i, s := range m.Scales {
		scaleOK(fmt.Sprintf("model.scales[%d]", i), s)
	}
	switch {
	case pr.policy == PolicyExistingModels && len(m.Scales) == 0:
		fe.Add("model.scales", "existing_models needs the scales of the models (at least one)")
	case pr.policy != PolicyExistingModels && len(m.Scales) > 0:
		fe.Add("model.scales", "scales are the existing models of policy existing_models; policy is %s", pr.policy)
	}
	if t := req.Objective.MachTolerance; t != nil && !(*t >= 0 && *t <= 1) {
		fe.Add("objective.mach_tolerance", "%g is outside 0 to 1", *t)
	}
	if c := req.LevelSharing.ReynoldsCostPercent; !(c >= 0 && c <= 50) {
		fe.Add("level_sharing.reynolds_cost_percent", "%g %% is outside 0 %% to 50 %%", c)
	}
	pr.share = req.LevelSharing.ReynoldsCostPercent / 100

	// Facilities.
	if len(req.Facilities) == 0 {
		fe.Add("facilities", "give at least one facility (facility_id or an inline facility)")
	}
	if len(req.Facilities) > MaxFacilities {
		fe.Add("facilities", "%d facilities: at most %d", len(req.Facilities), MaxFacilities)
	}
	var fixedScale *float64
	seen := map[string]int{}
	for i, fc := range req.Facilities {
		prefix := fmt.Sprintf("facilities[%d]", i)
		f, err := p.ResolveFacility(ctx, fc.Facility, fc.FacilityID, prefix, &fe)
		if err != nil {
			if check.ErrorCode(err) == check.CodeNotFound {
				fe.Add(prefix+".facility_id", "%s", err.Error())
				continue
			}
			return nil, err
		}
		in := fc.Installation
		app.CheckInstallation(&in, f, prefix, &fe)
		if fc.Scale != nil {
			scaleOK(prefix+".scale", *fc.Scale)
			if pr.policy == PolicyOneModel {
				if fixedScale != nil && *fixedScale != *fc.Scale {
					fe.Add(prefix+".scale", "policy one_model builds one model: scale %g differs from %g fixed before", *fc.Scale, *fixedScale)
				}
				fixedScale = fc.Scale
			}
		}
		if f == nil {
			continue
		}
		if f.ID != "" {
			if j, dup := seen[f.ID]; dup {
				fe.Add(prefix+".facility_id", "facility %s is named twice (also facilities[%d])", f.ID, j)
			}
			seen[f.ID] = i
		}
		geom, _ := similarity.GeometricScale(f, &req.Article)
		pr.facs = append(pr.facs, fac{f: f, in: in, fixed: fc.Scale, geom: geom})
	}

	// Conditions.
	n := len(req.Conditions)
	if g := req.Grid; g != nil {
		if len(g.Altitudes) == 0 {
			fe.Add("grid.altitudes", "give at least one altitude (m)")
		}
		if len(g.Machs) == 0 {
			fe.Add("grid.machs", "give at least one Mach number")
		}
		n += len(g.Altitudes) * len(g.Machs)
	}
	switch {
	case n == 0:
		fe.Add("conditions", "give conditions, a grid, or both")
	case n > MaxConditions:
		fe.Add("conditions", "%d conditions (explicit and grid): at most %d", n, MaxConditions)
	}
	if err := fe.Err(); err != nil {
		return nil, err
	}
	defTol := similarity.DefaultMachTolerance
	if t := req.Objective.MachTolerance; t != nil {
		defTol = *t
	}
	type sweepKey struct {
		a    similarity.Sweep
		b    similarity.Sweep
		hasB bool
	}
	sweeps := map[sweepKey]int{}
	var matrices []*similarity.Matrix
	matrix := func(prefix string, a similarity.Sweep, b *similarity.Sweep) (int, bool) {
		k := sweepKey{a: a}
		if b != nil {
			k.b, k.hasB = *b, true
		}
		if i, ok := sweeps[k]; ok {
			return i, true
		}
		mx, err := req.Article.Aero.Matrix(a, b)
		if err != nil {
			if !fe.Merge(prefix, err) {
				fe.Add(check.JoinPath(prefix, "alpha"), "%s", err.Error())
			}
			return 0, false
		}
		sweeps[k] = len(matrices)
		matrices = append(matrices, &mx)
		return len(matrices) - 1, true
	}
	labels := map[string]int{}
	add := func(prefix, label string, fl similarity.Flight, a *similarity.Sweep, b *similarity.Sweep, tol *float64) {
		if len(fe) >= check.MaxListed {
			return
		}
		idx := len(pr.conds)
		if label == "" {
			label = "condition " + strconv.Itoa(idx+1)
		}
		if len(label) > maxLabel {
			fe.Add(check.JoinPath(prefix, "label"), "%d bytes: at most %d", len(label), maxLabel)
		}
		if j, dup := labels[label]; dup {
			fe.Add(check.JoinPath(prefix, "label"), "label %q is given twice (condition %d has it)", label, j+1)
		}
		labels[label] = idx
		bad := false
		if err := app.ValidateFlight(&fl); err != nil {
			if !fe.Merge(prefix, err) {
				fe.Add(prefix, "%s", err.Error())
			}
			bad = true
		}
		c := cond{label: label}
		if tol != nil {
			if !(*tol >= 0 && *tol <= 1) {
				fe.Add(check.JoinPath(prefix, "mach_tolerance"), "%g is outside 0 to 1", *tol)
				bad = true
			} else {
				c.obj.MachTolerance = tol
			}
		} else {
			t := defTol
			c.obj.MachTolerance = &t
		}
		alpha, beta := req.Alpha, req.Beta
		sweepPrefix := ""
		if a != nil || b != nil {
			sweepPrefix = prefix
		}
		if a != nil {
			alpha = *a
		}
		if b != nil {
			beta = b
		}
		si, ok := matrix(sweepPrefix, alpha, beta)
		if !ok || bad {
			return
		}
		c.sweep, c.mx = si, matrices[si]
		c.drag = c.mx.DragRange()
		st, err := fl.Resolve(req.Article.ReferenceLength)
		if err != nil {
			if !fe.Merge(prefix, err) {
				fe.Add(prefix, "%s", err.Error())
			}
			return
		}
		c.flight = st
		pr.conds = append(pr.conds, c)
	}
	for i, c := range req.Conditions {
		add(fmt.Sprintf("conditions[%d]", i), c.Label, c.Flight, c.Alpha, c.Beta, c.MachTolerance)
	}
	if g := req.Grid; g != nil {
		for i, h := range g.Altitudes {
			for j, mach := range g.Machs {
				h, mach := h, mach
				fl := similarity.Flight{Altitude: &h, DeltaISA: g.DeltaISA, Mach: &mach}
				var fe0 check.Fields
				if err := app.ValidateFlight(&fl); err != nil && fe0.Merge("", err) {
					for _, e := range fe0 {
						switch e.Field {
						case "altitude":
							fe.Add(fmt.Sprintf("grid.altitudes[%d]", i), "%s", e.Message)
						case "mach":
							fe.Add(fmt.Sprintf("grid.machs[%d]", j), "%s", e.Message)
						default:
							fe.Add("grid."+e.Field, "%s", e.Message)
						}
					}
					continue
				}
				add(fmt.Sprintf("grid (altitudes[%d], machs[%d])", i, j), gridLabel(h, mach), fl, nil, nil, nil)
			}
		}
	}
	if err := fe.Err(); err != nil {
		return nil, err
	}
	// Balance load limits, one per facility and sweep.
	for i := range pr.facs {
		fc := &pr.facs[i]
		fc.limits = make([]similarity.LoadLimit, len(matrices))
		if len(fc.f.Balances) == 0 {
			continue
		}
		for k, mx := range matrices {
			ll, err := loads.NewLimit(&req.Article, fc.f, fc.in.WithBuoyancy(fc.f), *mx)
			if err != nil {
				return nil, err
			}
			fc.limits[k] = ll
		}
	}
	pr.lo, pr.hi = similarity.DefaultScaleMin, 0
	for _, fc := range pr.facs {
		pr.hi = math.Max(pr.hi, fc.geom)
	}
	if m.ScaleMin != nil {
		pr.lo = *m.ScaleMin
	}
	if m.ScaleMax != nil {
		pr.hi = math.Min(pr.hi, *m.ScaleMax)
	}
	return pr, nil
}

// gridLabel is the label of a grid condition: "3000 m M0.6".
func gridLabel(h, mach float64) string {
	return strconv.FormatFloat(h, 'g', -1, 64) + " m M" + strconv.FormatFloat(mach, 'g', -1, 64)
}
