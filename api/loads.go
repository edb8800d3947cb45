package api

import (
	"context"
	"fmt"
	"math"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/similarity"
)

// postLoads answers POST /v1/loads.
//
//	@Summary		Balance loads at given test conditions
//	@Description	The balance loads over the α sweep (forces in N, moments in N·m, at the balance moment centre, body axes, wall corrections and the model's weight included) for a model of the given scale at the given test settings (mach or speed m/s, stagnation pressure Pa, stagnation temperature K), with each point's utilisation of the balance's ratings and, in max_safe_dynamic_pressure (Pa), the dynamic pressure at which the worst point reaches the allowed load (rating ÷ safety factor) by this steady, static estimate: not a safe limit, the safety factor is the only margin left for the estimate's error. The model's weight is left out when model_mass is not given, which makes the check unconservative (a caution says so). loads is one object when installation.balance_id names a balance and a list, one per balance of the facility, when it does not. No optimisation.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		LoadsRequest	true	"article, facility or facility_id, model.scale, installation, alpha (degrees), test settings"
//	@Success		200		{object}	LoadsResponse
//	@Failure		400		{object}	Problem	"bad input: every bad field named by its JSON path"
//	@Failure		404		{object}	Problem	"facility_id names no facility"
//	@Failure		413		{object}	Problem	"body too large"
//	@Router			/v1/loads [post]
func (s *Server) postLoads(c *gin.Context) {
	var req LoadsRequest
	if !s.decodeBody(c, &req) {
		return
	}
	resp, err := s.planner().Loads(c.Request.Context(), &req)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, resp)
}

// Loads checks the balance loads of a model of a given scale at given test
// settings, for POST /v1/loads. A named balance gives one report; none gives one
// per balance of the facility.
func (p *Planner) Loads(ctx context.Context, req *LoadsRequest) (*LoadsResponse, error) {
	var fe fieldErrors
	f, err := p.facility(ctx, req.Facility, req.FacilityID, &fe)
	if err := notFoundOrFail(err, &fe, "facility_id"); err != nil {
		return nil, err
	}
	if err := validateFullScale(req.Flight, req.Marine, false); err != nil && !fe.merge("", err) {
		return nil, err
	}
	checkArticle(&req.Article, &fe)
	switch sc := req.Model.Scale; {
	case sc == nil:
		fe.add("model.scale", "required: the model's scale, a number or a ratio such as \"1:16\"")
	case !similarity.BoundScale.Contains(*sc):
		fe.add("model.scale", "scale %s", similarity.BoundScale.Problem(*sc))
	}
	checkInstallation(&req.Installation, f, &fe)
	if f != nil && len(f.Balances) == 0 {
		fe.add("facility_id", "facility %s lists no balance to check", f.ID)
	}
	mx, err := req.Article.Aero.Matrix(req.Alpha, req.Beta)
	if err != nil && !fe.merge("", err) {
		return nil, err
	}
	set, ok := settingOf(f, req.Test, "test", &fe)
	if err := fe.err(); err != nil {
		return nil, err
	}
	if !ok {
		fe.add("test", "the test settings are incomplete")
		return nil, fe.err()
	}
	st, err := f.State(set)
	if err != nil {
		if fe.merge("test", err) {
			return nil, fe.err()
		}
		return nil, err
	}
	scale := *req.Model.Scale
	a := &req.Article
	s2 := scale * scale
	lref := a.ReferenceLength * scale
	out := &LoadsResponse{
		FacilityID: f.ID,
		Model: similarity.ModelSize{
			Scale: scale, ReferenceLength: lref, ReferenceArea: a.ReferenceArea * s2,
			Span: a.Span * scale, FrontalArea: a.FrontalArea * s2,
			Blockage: a.FrontalArea * s2 / f.TestSection.CrossSection(),
		},
		Test: similarity.Test{State: st, Reynolds: st.ReynoldsPerMeter * lref,
			Froude: st.Speed / math.Sqrt(atmosphere.G0*lref)},
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
	w := facilities.NewWalls(f, a.FrontalArea*s2, a.ReferenceArea*s2, st.Mach)
	pts := append([]facilities.Point(nil), mx.Points...)
	w.Apply(pts)
	out.Corrections = w.Summary(pts, a.Aero.CorrectionLiftSlope())
	out.Warnings = append(out.Warnings, w.Warnings...)
	lc := facilities.LoadCase{ReferenceArea: a.ReferenceArea * s2, ReferenceLength: lref, Installation: req.Installation.WithBuoyancy(f), Points: pts}
	if req.Installation.BalanceID != "" {
		ch, err := lc.ChooseBalance(f, st.DynamicPressure)
		if err != nil {
			return nil, err
		}
		out.Loads.One = &ch.Report
		out.Warnings = append(out.Warnings, ch.Report.Warnings...)
		if !ch.Report.WithinLimits {
			out.Warnings = append(out.Warnings, overloadWarning(ch.Report))
		}
	} else {
		all, err := lc.CheckAll(f, st.DynamicPressure)
		if err != nil {
			return nil, err
		}
		out.Loads.All = all
		if len(all) > 0 {
			out.Warnings = append(out.Warnings, all[0].Warnings...)
		}
		for _, r := range all {
			if !r.WithinLimits {
				out.Warnings = append(out.Warnings, overloadWarning(r))
			}
		}
	}
	reports := out.Loads.All
	if out.Loads.One != nil {
		reports = []facilities.LoadReport{*out.Loads.One}
	}
	out.Cautions = appendCautions(nil, f, reports...)
	if b := modelBuoyancy(f, a, req.Installation, *req.Model.Scale); b != nil {
		out.Buoyancy = b
		out.Warnings = append(out.Warnings, b.Note())
	}
	out.Warnings = collapseWarnings(out.Warnings)
	if err := checkFinite(out, loadsInputs); err != nil {
		return nil, err
	}
	return out, nil
}

// loadsInputs names the request field that feeds each top-level field of a load
// check's answer, for checkFinite.
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
func overloadWarning(r facilities.LoadReport) string {
	return fmt.Sprintf("balance %s: %.0f %% of its %s rating at α %.4g°, above the %.0f %% allowed (rating ÷ safety factor): do not run the points above the allowed load",
		r.BalanceID, 100*r.MaxUtilization, r.Limiting.Component, r.Limiting.Alpha, 100*r.AllowedUtilization)
}
