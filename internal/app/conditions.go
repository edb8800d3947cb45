package app

import (
	"context"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/check"
)

// Conditions computes the test-section state of a facility at given settings, with
// the limits they break, for POST /v1/conditions.
func (p *Planner) Conditions(ctx context.Context, req *schema.ConditionsRequest) (*schema.ConditionsResponse, error) {
	var fe check.Fields
	f, err := p.facility(ctx, req.Facility, req.FacilityID, &fe)
	if err := notFoundOrFail(err, &fe, "facility_id"); err != nil {
		return nil, err
	}
	set, ok := settingOf(f, req.TestSettings, "", &fe)
	if err := fe.Err(); err != nil {
		return nil, err
	}
	if !ok {
		return nil, check.Fields{{Field: "", Message: "the settings are incomplete"}}.Err()
	}
	st, err := f.State(set)
	if err != nil {
		if fe.Merge("", err) {
			return nil, fe.Err()
		}
		return nil, err
	}
	w := f.Warnings(st)
	if w == nil {
		w = []string{}
	}
	out := &schema.ConditionsResponse{State: st, Violations: f.Violations(st), Warnings: w, Cautions: appendCautions(nil, f)}
	if err := CheckFinite(out, conditionsInputs); err != nil {
		return nil, err
	}
	return out, nil
}

// notFoundOrFail sorts the error of a facility lookup: nil stays nil; a not-found is
// returned as it is when fe is empty (a 404) and otherwise joins fe as a problem of
// field, so that one 400 names every bad field; any other error is returned.
func notFoundOrFail(err error, fe *check.Fields, field string) error {
	if err == nil {
		return nil
	}
	if check.ErrorCode(err) == check.CodeNotFound {
		if len(*fe) == 0 {
			return err
		}
		fe.Add(field, "%s", err.Error())
		return nil
	}
	return err
}

// settingOf checks test settings against facility f (nil when it could not be
// resolved) and returns the facilities.Setting; problems are added to fe under
// prefix. A stagnation value left out takes the facility's fixed value. ok is false
// when the setting is incomplete.
func settingOf(f *facilities.Facility, ts schema.TestSettings, prefix string, fe *check.Fields) (set facilities.Setting, ok bool) {
	ok = true
	water := f != nil && f.Medium.IsLiquid()
	switch {
	case ts.Mach != nil && ts.Speed != nil:
		fe.Add(check.JoinPath(prefix, "speed"), "give mach or speed, not both")
		ok = false
	case ts.Mach == nil && ts.Speed == nil:
		if water {
			fe.Add(check.JoinPath(prefix, "speed"), "give the speed in m/s (water: no Mach number)")
		} else {
			fe.Add(check.JoinPath(prefix, "mach"), "give mach or speed (m/s)")
		}
		ok = false
	case ts.Mach != nil && water:
		fe.Add(check.JoinPath(prefix, "mach"), "a water facility takes speed (m/s), not mach")
		ok = false
	case ts.Mach != nil:
		if msg := BoundSettingMach.Problem(*ts.Mach); msg != "" {
			fe.Add(check.JoinPath(prefix, "mach"), "%s", msg)
			ok = false
		}
		set.Mach = *ts.Mach
	default:
		if msg := BoundSettingSpeed.Problem(*ts.Speed); msg != "" {
			fe.Add(check.JoinPath(prefix, "speed"), "%s", msg)
			ok = false
		}
		set.Speed = *ts.Speed
	}
	tBound := facilities.BoundStagnationTemperature
	if f != nil {
		tBound = f.Medium.TemperatureBound()
	}
	stag := func(v *float64, r func() facilities.Range, name, unit string) float64 {
		if v != nil {
			b := facilities.BoundStagnationPressure
			if name == "stagnation_temperature" {
				b = tBound
			}
			if msg := b.Problem(*v); msg != "" {
				fe.Add(check.JoinPath(prefix, name), "%s", msg)
				ok = false
			}
			return *v
		}
		if f == nil {
			fe.Add(check.JoinPath(prefix, name), "required (%s)", unit)
			ok = false
			return 0
		}
		rg := r()
		if rg.Fixed() {
			return rg.Min
		}
		fe.Add(check.JoinPath(prefix, name), "required: facility %s allows %g %s to %g %s", f.ID, rg.Min, unit, rg.Max, unit)
		ok = false
		return 0
	}
	set.StagnationPressure = stag(ts.StagnationPressure, func() facilities.Range { return f.StagnationPressure }, "stagnation_pressure", "Pa")
	set.StagnationTemperature = stag(ts.StagnationTemperature, func() facilities.Range { return f.StagnationTemperature }, "stagnation_temperature", "K")
	if f == nil {
		ok = false
	}
	return set, ok
}

// conditionsInputs names the setting that feeds each field of a test-section
// state, for checkFinite: the temperature the speed of sound and viscosity, the
// pressure the rest.
func conditionsInputs(top string) string {
	switch top {
	case "static_temperature", "speed_of_sound", "viscosity", "speed":
		return "stagnation_temperature"
	}
	return "stagnation_pressure"
}
