package app

import (
	"context"
	"fmt"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// Loads checks the balance loads of a model of a given scale at given test
// settings, for POST /v1/loads. A named balance gives one report; none gives one
// per balance of the facility.
func (p *Planner) Loads(ctx context.Context, req *schema.LoadsRequest) (*schema.LoadsResponse, error) {
	var fe check.Fields
	f, err := p.facility(ctx, req.Facility, req.FacilityID, &fe)
	if err := notFoundOrFail(err, &fe, "facility_id"); err != nil {
		return nil, err
	}
	if err := validateFullScale(req.Flight, req.Marine, false); err != nil && !fe.Merge("", err) {
		return nil, err
	}
	checkArticle(&req.Article, &fe)
	switch sc := req.Model.Scale; {
	case sc == nil:
		fe.Add("model.scale", "required: the model's scale, a number or a ratio such as \"1:16\"")
	case !similarity.BoundScale.Contains(*sc):
		fe.Add("model.scale", "scale %s", similarity.BoundScale.Problem(*sc))
	}
	checkInstallation(&req.Installation, f, &fe)
	checkResolution(req.RequiredResolution, &fe)
	if f != nil && len(f.Balances) == 0 {
		fe.Add("facility_id", "facility %s lists no balance to check", f.ID)
	}
	mx, err := req.Article.Aero.Matrix(req.Alpha, req.Beta)
	if err != nil && !fe.Merge("", err) {
		return nil, err
	}
	set, ok := settingOf(f, req.Test, "test", &fe)
	if err := fe.Err(); err != nil {
		return nil, err
	}
	if !ok {
		fe.Add("test", "the test settings are incomplete")
		return nil, fe.Err()
	}
	st, err := f.State(set)
	if err != nil {
		if fe.Merge("test", err) {
			return nil, fe.Err()
		}
		return nil, err
	}
	scale := *req.Model.Scale
	a := &req.Article
	lref := a.ReferenceLength * scale
	out := &schema.LoadsResponse{
		FacilityID: f.ID,
		Model:      a.SizeAt(scale, f.TestSection.CrossSection()),
		Test:       similarity.TestOn(st, lref),
		Violations: f.Violations(st),
		Warnings:   append([]string{}, mx.Warnings...),
	}
	if req.Flight != nil || req.Marine != nil {
		fl, err := resolveFullScale(req.Flight, req.Marine, a.ReferenceLength)
		if err != nil {
			return nil, err
		}
		out.Flight = &fl
		out.Mismatch = &similarity.Mismatch{ReynoldsRatio: out.Test.Reynolds / fl.Reynolds}
		if !f.Medium.IsLiquid() && fl.Marine == nil {
			d := st.Mach - fl.Mach
			out.Mismatch.MachDifference = &d
		}
		out.Mismatch.Decide(similarity.DefaultMachTolerance)
		similarity.CompareCavitation(&out.Test, out.Mismatch, fl, f, similarity.DefaultCavitationTolerance)
	}
	out.Warnings = append(out.Warnings, f.Warnings(st)...)
	res, err := loads.Check(&loads.Case{Facility: f, Article: a, Installation: req.Installation, Matrix: mx,
		Scale: scale, State: st, Every: true, Resolution: req.RequiredResolution})
	if err != nil {
		return nil, err
	}
	out.Verdict, out.FitBroken = res.Verdict, res.FitBroken
	out.LoadFraction, out.ResolutionState = req.Installation.Fraction(), res.ResolutionState
	if out.FitBroken == nil {
		out.FitBroken = []facilities.Violation{}
	}
	out.Corrections = res.Corrections
	out.Warnings = append(out.Warnings, res.Warnings...)
	reports := res.Reports
	if req.Installation.BalanceID != "" {
		out.Loads.One = &reports[0]
	} else {
		out.Loads.All = reports
	}
	if len(reports) > 0 {
		out.Warnings = append(out.Warnings, reports[0].Warnings...)
	}
	for _, r := range reports {
		if !r.WithinLimits {
			out.Warnings = append(out.Warnings, overloadWarning(r))
		}
	}
	if w := res.ResolutionWarning(); w != "" {
		out.Warnings = append(out.Warnings, w)
	}
	out.Cautions = appendCautions(nil, f, reports...)
	if b := modelBuoyancy(f, a, req.Installation, *req.Model.Scale); b != nil {
		out.Buoyancy = b
		out.Warnings = append(out.Warnings, b.Note())
	}
	out.Cautions = appendUnique(out.Cautions, res.Cautions()...)
	out.Warnings = collapseWarnings(out.Warnings)
	if err := CheckFinite(out, loadsInputs); err != nil {
		return nil, err
	}
	return out, nil
}

// loadsInputs names the request field that feeds each top-level field of a load
// check's answer, for CheckFinite.
func loadsInputs(top string) string {
	switch top {
	case "flight", "mismatch":
		return "flight"
	case "model":
		return "model.scale"
	case "loads":
		return "installation"
	case "corrections":
		return "facility.test_section"
	}
	return "test"
}

// overloadWarning says that a balance would be loaded beyond its allowed load
// (rating ÷ safety factor) and that those points must not be run.
func overloadWarning(r loads.Report) string {
	return fmt.Sprintf("balance %s: %.0f %% of its %s rating at α %.4g°, above the %.0f %% allowed (rating ÷ safety factor): do not run the points above the allowed load",
		r.BalanceID, 100*r.MaxUtilization, r.Limiting.Component, r.Limiting.Alpha, 100*r.AllowedUtilization)
}
