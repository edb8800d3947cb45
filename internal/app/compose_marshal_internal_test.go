package app

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/unitjson"
)

// TestMarshalPlan checks marshalPlan against json.Marshal byte for byte on the
// plans of every example request, on each of them in an inline copy of its
// facility without balances (no load report), and on answers whose strings hold
// the text marshalPlan looks for; and that a load report encoding/json refuses
// (a NaN) is refused by marshalPlan too.
func TestMarshalPlan(t *testing.T) {
	files, err := filepath.Glob("../../examples/*.json")
	if err != nil || len(files) == 0 {
		t.Fatalf("no examples: %v", err)
	}
	var p Planner
	ctx := context.Background()
	check := func(t *testing.T, resp *schema.PlanResponse) {
		t.Helper()
		want, werr := json.Marshal(resp)
		got, gerr := marshalPlan(resp)
		if (werr == nil) != (gerr == nil) || !bytes.Equal(got, want) {
			t.Fatalf("marshalPlan: %d bytes, error %v; json.Marshal: %d bytes, error %v", len(got), gerr, len(want), werr)
		}
	}
	for _, file := range files {
		body, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		t.Run(filepath.Base(file), func(t *testing.T) {
			var req schema.PlanRequest
			if err := unitjson.Decode(body, &req); err != nil {
				t.Fatal(err)
			}
			resp, err := p.Plan(ctx, &req)
			if err != nil {
				t.Fatal(err)
			}
			if resp.Loads == nil {
				t.Fatal("the example has no load report")
			}
			check(t, resp)

			// Strings that hold the text looked for, escaped as JSON escapes them.
			odd := *resp
			odd.Warnings = append([]string{`,"loads":null,`, `"loads":null`}, resp.Warnings...)
			odd.FacilityID = `x","loads":null,"y`
			check(t, &odd)

			// A report encoding/json refuses.
			bad := *resp
			lr := *resp.Loads
			lr.MaxUtilization = math.NaN()
			bad.Loads = &lr
			check(t, &bad)

			// The same facility inline, without balances: no load report.
			f, ok := facilities.DemoFacility(req.FacilityID)
			if !ok {
				t.Fatalf("no demo facility %q", req.FacilityID)
			}
			f.Balances = nil
			req.FacilityID, req.Facility, req.Installation.BalanceID = "", &f, ""
			resp, err = p.Plan(ctx, &req)
			if err != nil {
				t.Fatal(err)
			}
			if resp.Loads != nil {
				t.Fatal("a load report without balances")
			}
			check(t, resp)
		})
	}
}
