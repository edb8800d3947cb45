package app

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

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

// TestEncodePlanNamesNonFinite checks that a plan answer with a non-finite
// number, which PlanJSON no longer walks before encoding, is refused as
// CheckFinite refuses it: a 422-class error naming the number's path and the
// input behind it, in the answer's top level and inside the load report.
func TestEncodePlanNamesNonFinite(t *testing.T) {
	body, err := os.ReadFile("../../examples/orrin-j16-tsw-1.json")
	require.NoError(t, err)
	var req schema.PlanRequest
	require.NoError(t, unitjson.Decode(body, &req))
	var p Planner
	resp, err := p.Plan(context.Background(), &req)
	require.NoError(t, err)
	_, err = encodePlan(resp)
	require.NoError(t, err)

	top := *resp
	top.Flight.Mach = math.Inf(1)
	lr := *resp.Loads
	lr.MaxUtilization = math.NaN()
	inLoads := *resp
	inLoads.Loads = &lr
	for _, tc := range []struct {
		name, path, input string
		resp              *schema.PlanResponse
	}{
		{"flight", "flight.mach", "flight", &top},
		{"load report", "loads.max_utilization", "installation", &inLoads},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := encodePlan(tc.resp)
			var fe *facilities.Error
			require.ErrorAs(t, err, &fe)
			assert.Equal(t, facilities.CodeUnprocessable, fe.Code)
			assert.Contains(t, fe.Message, tc.path)
			require.Len(t, fe.Fields, 1)
			assert.Equal(t, tc.input, fe.Fields[0].Field)
		})
	}
}
