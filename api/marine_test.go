package api_test

import (
	"bytes"
	"encoding/json"
	"io"
	"net/http"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/loads"
)

// TestMarineExamplesPlan plans each demo vessel (Tarn A2, Brisa F7) in each demo
// water tunnel (wtn-04, cvt-07) through POST /v1/plans: the full-scale part has no
// Mach number or airspeeds, the test and the mismatch carry the cavitation number.
// cvt-07 sets its static pressure and matches σ within the default ±0.02; wtn-04
// holds 101 kPa and matches only the Tarn A2's large σ (at low speed), not the
// Brisa F7's (about 1.07 against σ ≥ 14.8 at its top speed, 3.5 m/s).
func TestMarineExamplesPlan(t *testing.T) {
	ts, _ := catalogServer(t, nil)
	tests := []struct {
		file    string
		matched bool
		limit   string // a binding limit the plan must name
		basis   string // of the model volume
	}{
		{"../examples/brisa-f7-cvt-07.json", true, "balance", "estimated"},
		{"../examples/brisa-f7-wtn-04.json", false, "speed_max", "estimated"},
		{"../examples/tarn-a2-cvt-07.json", true, "static_pressure_max", "given"},
		{"../examples/tarn-a2-wtn-04.json", true, "max_blockage", "given"},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			body, err := os.ReadFile(tc.file)
			require.NoError(t, err)
			code, b := post(t, ts, "/v1/plans", string(body))
			require.Equal(t, http.StatusOK, code, "%s", b)
			var raw struct {
				Flight map[string]any `json:"flight"`
			}
			require.NoError(t, json.Unmarshal(b, &raw))
			for _, k := range []string{"mach", "true_airspeed", "calibrated_airspeed", "equivalent_airspeed"} {
				assert.NotContains(t, raw.Flight, k)
			}
			var plan schema.PlanResponse
			require.NoError(t, json.Unmarshal(b, &plan))
			require.NotNil(t, plan.Flight.Marine)
			require.NotNil(t, plan.Test.Cavitation)
			require.NotNil(t, plan.Mismatch.CavitationMatched)
			assert.Equal(t, tc.matched, *plan.Mismatch.CavitationMatched, "σ test %.4g, full scale %.4g", *plan.Test.Cavitation, plan.Flight.Marine.Cavitation)
			assert.Nil(t, plan.Mismatch.MachDifference)
			var names []string
			for _, bd := range plan.Binding {
				names = append(names, bd.Constraint)
			}
			assert.Contains(t, names, tc.limit)
			// Weight, buoyancy and net, and the water-load caution.
			require.NotNil(t, plan.Buoyancy)
			assert.Equal(t, tc.basis, plan.Buoyancy.VolumeBasis)
			assert.InDelta(t, plan.Buoyancy.Weight-plan.Buoyancy.Buoyancy, plan.Buoyancy.Net, 1e-9)
			assert.Contains(t, plan.Cautions, facilities.CautionWaterLoads)
		})
	}
}

// TestMarineRequestErrors: a plan takes exactly one full-scale condition.
func TestMarineRequestErrors(t *testing.T) {
	ts, _ := catalogServer(t, nil)
	body, err := os.ReadFile("../examples/brisa-f7-cvt-07.json")
	require.NoError(t, err)
	var req map[string]any
	require.NoError(t, json.Unmarshal(body, &req))
	tests := []struct {
		name  string
		edit  func(r map[string]any)
		field string
	}{
		{"flight and marine", func(r map[string]any) { r["flight"] = map[string]any{"altitude": 0, "mach": 0.3} }, "marine"},
		{"neither", func(r map[string]any) { delete(r, "marine") }, "flight.altitude"},
		{"bad temperature", func(r map[string]any) { r["marine"].(map[string]any)["temperature"] = "60 degC" }, "marine.temperature"},
		{"cavitation with a flight", func(r map[string]any) {
			delete(r, "marine")
			r["flight"] = map[string]any{"altitude": 0, "true_airspeed": 30}
		}, "objective.priority[0]"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := map[string]any{}
			require.NoError(t, json.Unmarshal(body, &r))
			tc.edit(r)
			b, err := json.Marshal(r)
			require.NoError(t, err)
			resp, err := http.Post(ts.URL+"/v1/plans", "application/json", bytes.NewReader(b))
			require.NoError(t, err)
			defer resp.Body.Close()
			out, _ := io.ReadAll(resp.Body)
			require.Equal(t, http.StatusBadRequest, resp.StatusCode, "%s", out)
			assert.Contains(t, string(out), `"`+tc.field+`"`)
		})
	}
}

// TestMarineLoads checks POST /v1/loads with a marine condition in cvt-07: the
// answer compares the test's cavitation number with the full scale's and shows the
// model's weight, buoyancy and net (volume given), with the water-load caution.
func TestMarineLoads(t *testing.T) {
	ts, _ := catalogServer(t, nil)
	body, err := os.ReadFile("../examples/tarn-a2-cvt-07.json")
	require.NoError(t, err)
	var plan map[string]any
	require.NoError(t, json.Unmarshal(body, &plan))
	req := map[string]any{"facility_id": "cvt-07", "marine": plan["marine"], "article": plan["article"],
		"installation": plan["installation"], "alpha": plan["alpha"], "model": map[string]any{"scale": 0.49},
		"test": map[string]any{"speed": 1.5, "stagnation_temperature": 300}}
	b, err := json.Marshal(req)
	require.NoError(t, err)
	code, out := post(t, ts, "/v1/loads", string(b))
	require.Equal(t, http.StatusOK, code, "%s", out)
	var got struct {
		Test     map[string]any  `json:"test"`
		Mismatch map[string]any  `json:"mismatch"`
		Buoyancy *loads.Buoyancy `json:"buoyancy"`
		Cautions []string        `json:"cautions"`
		Flight   map[string]any  `json:"flight"`
	}
	require.NoError(t, json.Unmarshal(out, &got))
	assert.Contains(t, got.Test, "cavitation")
	assert.Contains(t, got.Mismatch, "cavitation_difference")
	assert.NotContains(t, got.Flight, "mach")
	require.NotNil(t, got.Buoyancy)
	assert.Equal(t, "given", got.Buoyancy.VolumeBasis)
	// 40 kg and 0.019 m³ in water at 34 °C (994.37 kg/m³): W 392.27 N, B 185.28 N.
	assert.InDelta(t, 392.27-185.28, got.Buoyancy.Net, 0.02)
	assert.Contains(t, got.Cautions, facilities.CautionWaterLoads)
}
