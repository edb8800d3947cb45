package app

import (
	"context"
	"math"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/internal/check"
	"scalematch/internal/unitjson"
)

// TestEncodePlanNamesNonFinite checks that a plan answer with a non-finite
// number, which PlanJSON no longer walks before encoding, is refused as
// CheckFinite refuses it: a 422-class error naming the number's path and the
// input behind it, in the answer's top level and inside the load report.
func TestEncodePlanNamesNonFinite(t *testing.T) {
	t.Parallel()
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
			t.Parallel()
			_, err := encodePlan(tc.resp)
			var fe *check.Error
			require.ErrorAs(t, err, &fe)
			assert.Equal(t, check.CodeUnprocessable, fe.Code)
			assert.Contains(t, fe.Message, tc.path)
			require.Len(t, fe.Fields, 1)
			assert.Equal(t, tc.input, fe.Fields[0].Field)
		})
	}
}
