package api_test

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/similarity"
)

// decodePlan decodes a plan request as POST /v1/plans does.
func decodePlan(t testing.TB, body string) *api.PlanRequest {
	t.Helper()
	var req api.PlanRequest
	if err := api.Decode([]byte(body), &req); err != nil {
		t.Fatal(err)
	}
	return &req
}

// TestBalanceBindingAgreesWithLoads checks that the plan lists "balance" among its
// binding limits exactly when the reported balance check sits at its allowed
// utilisation (1/safety factor), and that the planner's load limit at the chosen
// scale is the report's largest safe dynamic pressure: the planner and the load
// report use one load-limit implementation (similarity.BalanceLimit).
func TestBalanceBindingAgreesWithLoads(t *testing.T) {
	cases := []struct {
		name    string
		edit    func(string) string
		binding bool // "balance" expected among the binding limits
		tol     float64
	}{
		// int-b1's axial rating (1200 N over 1.5) meets q_max = 60 kPa at a scale
		// below the span limit: the plan sits on both.
		{"J20 tsw-1 int-b1", func(s string) string { return s }, true, 1e-6},
		// int-b2 carries the span-limited model at q_max with room to spare.
		{"J20 tsw-1 int-b2", func(s string) string { return strings.Replace(s, `"int-b1"`, `"int-b2"`, 1) }, false, 1e-6},
		{"J20 tsw-1 balance chosen", func(s string) string { return strings.Replace(s, `"balance_id": "int-b1", `, ``, 1) }, false, 1e-6},
		{"J20 tsw-1 no weight", func(s string) string { return strings.Replace(s, `, "model_mass": 20`, ``, 1) }, true, 1e-6},
		// In cn2-05 the span limit and q_max bind before int-k's ratings do.
		{"J20 cn2-05 int-k", func(s string) string {
			return strings.NewReplacer(`"tsw-1"`, `"cn2-05"`, `"int-b1"`, `"int-k"`).Replace(s)
		}, false, 1e-6},
	}
	var p api.Planner
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			req := decodePlan(t, tc.edit(j20Plan))
			resp, err := p.Plan(context.Background(), req)
			if err != nil {
				t.Fatal(err)
			}
			binds := slices.ContainsFunc(resp.Binding, func(b similarity.Binding) bool {
				return b.Constraint == facilities.ConstraintBalance
			})
			r := resp.Loads
			atLimit := math.Abs(r.MaxUtilization-r.AllowedUtilization) <= tc.tol*r.AllowedUtilization
			if binds != tc.binding || atLimit != tc.binding {
				t.Errorf("balance binding %v, report at its limit %v (%.6g of %.6g on %s); want both %v",
					binds, atLimit, r.MaxUtilization, r.AllowedUtilization, r.BalanceID, tc.binding)
			}
			if r.MaxUtilization > r.AllowedUtilization*(1+tc.tol) {
				t.Errorf("balance %s loaded to %.6g, above its allowed %.6g", r.BalanceID, r.MaxUtilization, r.AllowedUtilization)
			}
			f, _ := facilities.DemoFacility(resp.FacilityID)
			in := req.Installation
			in.BalanceID = r.BalanceID
			mx, err := req.Article.Aero.Matrix(req.Alpha, req.Beta)
			if err != nil {
				t.Fatal(err)
			}
			ll, err := similarity.NewLoadLimit(&req.Article, &f, in, mx)
			if err != nil {
				t.Fatal(err)
			}
			q := ll.MaxDynamicPressure(resp.Model.Scale, resp.Test.State)
			if math.Abs(q/r.MaxSafeDynamicPressure-1) > 1e-9 {
				t.Errorf("load limit %.10g Pa, report's safe q %.10g Pa", q, r.MaxSafeDynamicPressure)
			}
		})
	}
}
