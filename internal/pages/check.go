package pages

import (
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"slices"
	"strconv"
	"strings"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/charts"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
)

// formField is one input of the load-check form. Name is the JSON path of the
// field in a POST /v1/loads request, so that the service's field errors land
// beside the input they name.
type formField struct {
	Name, Label, Help, Placeholder string
	Value, Error                   string
	Options                        []option
}

// ID is the input's element id.
func (f formField) ID() string { return "f-" + strings.NewReplacer(".", "-", "_", "-").Replace(f.Name) }

// option is one choice of a select.
type option struct{ Value, Text string }

// fieldset is a group of the form's fields.
type fieldset struct {
	Legend string
	Fields []formField
}

// planField is the form's field for a stored plan's id; it is not part of a
// load request.
const planField = "plan_id"

// checkForm returns the load-check form's fields, empty, with the facility and
// balance choices of the catalog.
func checkForm(fs []facilities.Facility) []fieldset {
	facs := []option{{"", "choose a facility"}}
	bals := []option{{"", "every balance of the facility"}}
	for _, f := range fs {
		facs = append(facs, option{f.ID, f.ID + ": " + f.Name})
		for _, b := range f.Balances {
			bals = append(bals, option{b.ID, f.ID + ": " + b.ID})
		}
	}
	return []fieldset{
		{"Facility and balance", []formField{
			{Name: "facility_id", Label: "facility", Options: facs, Help: "the catalog's facility"},
			{Name: "installation.balance_id", Label: "balance", Options: bals, Help: "one of the facility's balances, or all of them"},
			{Name: planField, Label: "plan id (optional)", Placeholder: "e.g. 2947ccf1d6c6fed8ba9d",
				Help: "a stored plan: its facility, balance, scale and test setting fill the fields left empty; with no article entered, its own load check is shown"},
		}},
		{"Full-scale article", []formField{
			{Name: "article.reference_length", Label: "reference length", Placeholder: "2.6 m", Help: "mean aerodynamic chord, m"},
			{Name: "article.reference_area", Label: "reference area", Placeholder: "50 m^2", Help: "m²"},
			{Name: "article.span", Label: "span", Placeholder: "19 m", Help: "m"},
			{Name: "article.frontal_area", Label: "frontal area", Placeholder: "5.5 m^2", Help: "m², for blockage"},
			{Name: "article.wetted_area", Label: "wetted area", Placeholder: "290 m^2", Help: "m²"},
		}},
		{"Aerodynamic estimate", []formField{
			{Name: "article.aero.lift_slope", Label: "lift slope", Placeholder: "5.0", Help: "dC_L/dα per radian"},
			{Name: "article.aero.zero_lift_alpha", Label: "zero-lift α", Placeholder: "-1.5", Help: "degrees"},
			{Name: "article.aero.cl_max", Label: "C_L max", Placeholder: "1.3", Help: "dimensionless"},
			{Name: "article.aero.cd_min", Label: "C_D min", Placeholder: "0.021", Help: "dimensionless"},
			{Name: "article.aero.cl_at_cd_min", Label: "C_L at C_D min", Placeholder: "0.15", Help: "dimensionless"},
			{Name: "article.aero.induced_drag_factor", Label: "induced-drag factor K", Placeholder: "0.055", Help: "dimensionless"},
			{Name: "article.aero.cm_zero", Label: "C_m at α = 0", Placeholder: "0.02", Help: "dimensionless"},
			{Name: "article.aero.cm_slope", Label: "C_m slope", Placeholder: "-1.1", Help: "per radian"},
		}},
		{"Model and mounting", []formField{
			{Name: "model.scale", Label: "scale", Placeholder: "1:30", Help: "model length over full-scale length, or 1:N"},
			{Name: "installation.model_mass", Label: "model mass", Placeholder: "20 kg", Help: "kg; empty leaves the weight out of the loads"},
		}},
		{"Test conditions", []formField{
			{Name: "test.mach", Label: "Mach number", Placeholder: "0.8", Help: "give this or the speed"},
			{Name: "test.speed", Label: "speed", Placeholder: "250 m/s", Help: "m/s, or \"kt\"; water facilities take the speed"},
			{Name: "test.stagnation_pressure", Label: "stagnation pressure", Placeholder: "1.5 bar", Help: "Pa, or \"bar\", \"psi\"; empty when the facility fixes it"},
			{Name: "test.stagnation_temperature", Label: "stagnation temperature", Placeholder: "310 K", Help: "K, or \"degC\"; empty when the facility fixes it"},
			{Name: "alpha.from", Label: "α from", Placeholder: "-4", Help: "degrees"},
			{Name: "alpha.to", Label: "α to", Placeholder: "16", Help: "degrees"},
			{Name: "alpha.step", Label: "α step", Placeholder: "2", Help: "degrees"},
		}},
	}
}

// checkResult is the verdict and loads of a check.
type checkResult struct {
	FromPlan string
	// Verdict is the answer's verdict (loads.Verdict*).
	Verdict string
	Fits    bool
	// FitBroken are the test-section limits the model breaks; Violations the
	// facility limits the test setting breaks.
	FitBroken    []facilities.Violation
	Violations   []facilities.Violation
	WithinLoads  bool
	LoadsSummary string
	Resolution   string
	Test         struct{ Mach, Speed, DynamicPressure, Reynolds float64 }
	Model        struct{ ReferenceLength, Blockage float64 }
	Loads        []loadsView
	Cautions     []string
	Warnings     []string
}

// checkView is the data of the load-check page.
type checkView struct {
	Fieldsets []fieldset
	Errors    []check.FieldError
	Result    *checkResult
}

// check shows the form (GET) or checks what it was given (POST).
func (p *Pages) check(w http.ResponseWriter, r *http.Request) {
	ctx := r.Context()
	fs, err := p.b.Facilities(ctx)
	if err != nil {
		p.fail(w, r, err)
		return
	}
	v := checkView{Fieldsets: checkForm(fs)}
	if r.Method == http.MethodGet {
		p.render(w, r, http.StatusOK, "check", "Load check", v)
		return
	}
	if err := r.ParseForm(); err != nil {
		v.Errors = []check.FieldError{{Field: "form", Message: err.Error()}}
		p.render(w, r, http.StatusBadRequest, "check", "Load check", v)
		return
	}
	values := map[string]string{}
	for _, set := range v.Fieldsets {
		for i := range set.Fields {
			f := &set.Fields[i]
			f.Value = strings.TrimSpace(r.PostForm.Get(f.Name))
			values[f.Name] = f.Value
		}
	}
	res, err := p.runCheck(r, values)
	if err != nil {
		status := api.StatusOf(err)
		if status >= 500 {
			p.fail(w, r, err)
			return
		}
		v.Errors = fieldErrors(err)
		for _, set := range v.Fieldsets {
			for i := range set.Fields {
				f := &set.Fields[i]
				for _, e := range v.Errors {
					if e.Field == f.Name || strings.HasPrefix(e.Field, f.Name+".") {
						f.Error = e.Message
					}
				}
			}
		}
		p.render(w, r, status, "check", "Load check: problem", v)
		return
	}
	v.Result = res
	p.render(w, r, http.StatusOK, "check", "Load check: verdict", v)
}

// fieldErrors returns the fields a domain error names, or the error as one
// problem of the whole form.
func fieldErrors(err error) []check.FieldError {
	var de *check.Error
	if e, ok := err.(*check.Error); ok {
		de = e
	}
	if de == nil || len(de.Fields) == 0 {
		return []check.FieldError{{Field: "form", Message: err.Error()}}
	}
	out := make([]check.FieldError, len(de.Fields))
	for i, f := range de.Fields {
		out[i] = f
		if out[i].Field == "" {
			out[i].Field = "form"
		}
	}
	return out
}

// articleFields reports whether any article field was entered.
func articleFields(values map[string]string) bool {
	for k, v := range values {
		if strings.HasPrefix(k, "article.") && v != "" {
			return true
		}
	}
	return false
}

// runCheck makes the check the form asks for: a stored plan's own load check, or
// POST /v1/loads with the form's values (the plan's filling the empty ones).
func (p *Pages) runCheck(r *http.Request, values map[string]string) (*checkResult, error) {
	ctx := r.Context()
	var plan *schema.PlanResponse
	var planFacility *facilities.Facility
	if id := values[planField]; id != "" {
		var err error
		plan, planFacility, err = p.b.StoredPlan(ctx, id)
		if check.ErrorCode(err) == check.CodeNotFound {
			return nil, check.Invalid("no such plan", []check.FieldError{{Field: planField, Message: fmt.Sprintf("no plan %q is stored", id)}})
		}
		if err != nil {
			return nil, err
		}
		if !articleFields(values) {
			return planResult(plan, planFacility)
		}
		fillFromPlan(values, plan)
	}
	body, err := json.Marshal(requestTree(values))
	if err != nil {
		return nil, err
	}
	var req schema.LoadsRequest
	if err := unitjson.Decode(body, &req); err != nil {
		return nil, err
	}
	resp, err := p.b.Loads(ctx, &req)
	if err != nil {
		return nil, err
	}
	f, err := p.b.Facility(ctx, resp.FacilityID)
	if err != nil {
		return nil, err
	}
	reports := resp.Loads.All
	if resp.Loads.One != nil {
		reports = []loads.Report{*resp.Loads.One}
	}
	res := &checkResult{Verdict: resp.Verdict, Fits: len(resp.FitBroken) == 0 && len(resp.Violations) == 0, FitBroken: resp.FitBroken,
		Violations: resp.Violations, Cautions: resp.Cautions, Warnings: resp.Warnings}
	res.Test.Mach, res.Test.Speed, res.Test.DynamicPressure, res.Test.Reynolds = resp.Test.Mach, resp.Test.Speed, resp.Test.DynamicPressure, resp.Test.Reynolds
	res.Model.ReferenceLength, res.Model.Blockage = resp.Model.ReferenceLength, resp.Model.Blockage
	if err := res.addLoads(&f, "", reports); err != nil {
		return nil, err
	}
	return res, nil
}

// planResult is the verdict of a stored plan's own load check.
func planResult(plan *schema.PlanResponse, f *facilities.Facility) (*checkResult, error) {
	if plan.Loads == nil {
		return nil, check.Invalid("plan has no loads", []check.FieldError{{Field: planField,
			Message: fmt.Sprintf("plan %s has no load check (its facility lists no balance)", plan.ID)}})
	}
	if f == nil {
		return nil, check.Invalid("plan's facility is inline", []check.FieldError{{Field: planField,
			Message: fmt.Sprintf("plan %s was made with a facility given inline, which is not stored", plan.ID)}})
	}
	res := &checkResult{FromPlan: plan.ID, Verdict: plan.Verdict, Fits: len(plan.FitBroken) == 0, FitBroken: plan.FitBroken,
		Cautions: plan.Cautions, Warnings: plan.Warnings}
	res.Test.Mach, res.Test.Speed, res.Test.DynamicPressure, res.Test.Reynolds = plan.Test.Mach, plan.Test.Speed, plan.Test.DynamicPressure, plan.Test.Reynolds
	res.Model.ReferenceLength, res.Model.Blockage = plan.Model.ReferenceLength, plan.Model.Blockage
	if err := res.addLoads(f, plan.ID, []loads.Report{*plan.Loads}); err != nil {
		return nil, err
	}
	return res, nil
}

// addLoads adds the reports, their verdict and a chart of each.
func (res *checkResult) addLoads(f *facilities.Facility, planID string, reports []loads.Report) error {
	res.WithinLoads = len(reports) > 0
	var parts []string
	for _, rep := range reports {
		rs, err := app.BalanceRatings(f, rep.BalanceID)
		if err != nil {
			return err
		}
		c, err := charts.LoadsChart(charts.Loads{FacilityID: f.ID, PlanID: planID, Report: rep, Ratings: rs})
		if err != nil {
			return err
		}
		u, err := dataURL(c)
		if err != nil {
			return err
		}
		res.Loads = append(res.Loads, loadsView{Report: rep, Chart: u, ChartTitle: c.Title})
		res.WithinLoads = res.WithinLoads && rep.Verdict == loads.VerdictWithin
		word := "within"
		switch rep.Verdict {
		case loads.VerdictOver:
			word = "OVER"
		case loads.VerdictNotVerified:
			word = "NOT VERIFIED"
			if len(rep.UnratedLoaded) > 0 {
				word += " (no rating for " + strings.Join(rep.UnratedLoaded, ", ") + ")"
			} else if !rep.WeightIncluded {
				word += " (weight left out)"
			}
		}
		parts = append(parts, fmt.Sprintf("balance %s: largest %.1f %% of the %s rating (allowed %.1f %%), %s",
			rep.BalanceID, 100*rep.MaxUtilization, strings.ReplaceAll(rep.Limiting.Component, "_", " "), 100*rep.AllowedUtilization, word))
	}
	res.LoadsSummary = strings.Join(parts, "; ")
	res.Resolution = "not available: the facility record gives no balance resolution"
	return nil
}

// fillFromPlan fills the empty fields that a stored plan answers: the facility,
// the balance, the scale, the test setting and the α sweep.
func fillFromPlan(values map[string]string, plan *schema.PlanResponse) {
	set := func(k string, v string) {
		if values[k] == "" {
			values[k] = v
		}
	}
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	set("facility_id", plan.FacilityID)
	set("model.scale", g(plan.Model.Scale))
	if plan.Mismatch.MachDifference == nil {
		set("test.speed", g(plan.Test.Speed))
	} else if values["test.speed"] == "" {
		set("test.mach", g(plan.Test.Mach))
	}
	set("test.stagnation_pressure", g(plan.Test.StagnationPressure))
	set("test.stagnation_temperature", g(plan.Test.StagnationTemperature))
	if plan.Loads == nil || len(plan.Loads.Points) == 0 {
		return
	}
	set("installation.balance_id", plan.Loads.BalanceID)
	var alphas []float64
	for _, pt := range plan.Loads.Points {
		if !slices.Contains(alphas, pt.Alpha) {
			alphas = append(alphas, pt.Alpha)
		}
	}
	slices.Sort(alphas)
	set("alpha.from", g(alphas[0]))
	set("alpha.to", g(alphas[len(alphas)-1]))
	if len(alphas) > 1 {
		set("alpha.step", g(math.Round((alphas[1]-alphas[0])*1e9)/1e9))
	}
}

// requestTree turns the form's values, keyed by JSON path, into the JSON object
// of a load request: a value that is a plain number goes as a number, anything
// else as a string for the service's unit-aware decoder; empty values are left
// out.
func requestTree(values map[string]string) map[string]any {
	root := map[string]any{}
	for k, v := range values {
		if v == "" || k == planField {
			continue
		}
		parts := strings.Split(k, ".")
		m := root
		for _, p := range parts[:len(parts)-1] {
			next, ok := m[p].(map[string]any)
			if !ok {
				next = map[string]any{}
				m[p] = next
			}
			m = next
		}
		if n, err := strconv.ParseFloat(v, 64); err == nil && !math.IsInf(n, 0) && !math.IsNaN(n) {
			m[parts[len(parts)-1]] = json.Number(strconv.FormatFloat(n, 'g', -1, 64))
		} else {
			m[parts[len(parts)-1]] = v
		}
	}
	return root
}
