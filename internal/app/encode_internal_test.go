package app

import (
	"context"
	"encoding/json"
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

// TestSonicFloatsAgree checks that encodePlan (sonic's ConfigStd) writes the
// bytes encoding/json writes for the numbers and strings where encoders most
// often differ: the switch between plain and exponent notation at 1e-6 and
// 1e21 (encoding/json's rule), the shortest round-trip digits, negative zero,
// the smallest and largest doubles, and strings with HTML characters, U+2028,
// U+2029, control characters (a backspace and a form feed among them, which
// encoding/json writes as \b and \f since Go 1.22) and invalid UTF-8.
func TestSonicFloatsAgree(t *testing.T) {
	t.Parallel()
	body, err := os.ReadFile("../../examples/orrin-j16-tsw-1.json")
	require.NoError(t, err)
	var req schema.PlanRequest
	require.NoError(t, unitjson.Decode(body, &req))
	var p Planner
	resp, err := p.Plan(context.Background(), &req)
	require.NoError(t, err)
	floats := []float64{0, math.Copysign(0, -1), 1, -1, 0.1, 0.3, 1.0 / 3, 2.0 / 3, 123456789,
		1e-6, 9.999999999999999e-7, 1e-7, 1.5e-7, 0.000001234, 1e20, 1e21, 9.999999999999999e20,
		1.2345678901234567e21, 5e-324, math.SmallestNonzeroFloat64, math.MaxFloat64, -math.MaxFloat64,
		1e308, 1e-308, 12120412.168528454, 53999.99999999999, 0.00001421613079641336, 1 << 53, 1<<53 + 2,
		-0.0050000000000000044, 100, 1e15, 1e16, 1e17, 123e-20}
	for _, x := range floats {
		r := *resp
		r.Flight.Mach = x            // omitempty
		r.Flight.Static.Pressure = x // not omitempty
		r.Warnings = []string{"<a href=\"x\">&amp;</a>", "line\u2028sep\u2029para", "ctl\x00\x01\x1f\t\n\r\\", "backspace \b form feed \f", "escaped \\u000c", "bad \xff\xfe utf-8", "ünïcödé ✓"}
		want, err := json.Marshal(&r)
		require.NoError(t, err)
		got, err := encodePlan(&r)
		require.NoError(t, err)
		if string(want) != string(got) {
			i := 0
			for i < min(len(got), len(want)) && got[i] == want[i] {
				i++
			}
			t.Errorf("flight.mach %v: differs at byte %d: %.40q, want %.40q", x, i, got[i:], want[i:])
		}
	}
}
