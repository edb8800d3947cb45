package main

import (
	"encoding/json"
	"fmt"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// demoAircraft are the demo world's four aircraft (full scale: MAC m, S m², span
// m, length m, frontal m², wetted m², then the aerodynamic estimate).
var demoAircraft = map[string]string{
	"velmar-t64": `{"reference_length": 2.10, "reference_area": 46.5, "span": 23.4, "length": 23.9, "frontal_area": 7.6, "wetted_area": 305,
	  "aero": {"lift_slope": 5.3, "zero_lift_alpha": -2.2, "cl_max": 1.45, "cd_min": 0.027, "cl_at_cd_min": 0.18, "induced_drag_factor": 0.042, "cm_zero": 0.05, "cm_slope": -0.85}}`,
	"orrin-j16": `{"reference_length": 2.40, "reference_area": 36.5, "span": 16.4, "length": 19.6, "frontal_area": 4.4, "wetted_area": 228,
	  "aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25, "cd_min": 0.022, "cl_at_cd_min": 0.14, "induced_drag_factor": 0.057, "cm_zero": 0.03, "cm_slope": -1.05}}`,
	"pellin-p3": `{"reference_length": 1.42, "reference_area": 13.4, "span": 9.6, "length": 7.9, "frontal_area": 1.7, "wetted_area": 45,
	  "aero": {"lift_slope": 5.1, "zero_lift_alpha": -2.4, "cl_max": 1.55, "cd_min": 0.029, "cl_at_cd_min": 0.12, "induced_drag_factor": 0.052, "cm_zero": 0.04, "cm_slope": -0.75}}`,
	"quill-u5": `{"reference_length": 0.41, "reference_area": 1.4, "span": 3.45, "length": 2.05, "frontal_area": 0.10, "wetted_area": 3.9,
	  "aero": {"lift_slope": 4.95, "zero_lift_alpha": -2.8, "cl_max": 1.35, "cd_min": 0.031, "cl_at_cd_min": 0.28, "induced_drag_factor": 0.047, "cm_zero": 0.06, "cm_slope": -0.65}}`,
}

// spans are the demo aircraft spans in m, to size each model to its section.
var spans = map[string]float64{"velmar-t64": 23.4, "orrin-j16": 16.4, "pellin-p3": 9.6, "quill-u5": 3.45}

// TestVerdictExitCodes runs scalematch loads for every demo aircraft in every
// demo facility, at a model span of half the section width and of 1.2 widths,
// with the model's mass, without it and with a mass no balance carries (3 t):
// the exit status is always the one the
// answer's verdict documents, an oversized model is always does_not_fit, and a
// check without the weight is never within_allowed_loads.
func TestVerdictExitCodes(t *testing.T) {
	t.Parallel()
	seen := map[string]int{}
	for _, f := range facilities.Demo() {
		test := map[string]any{"stagnation_temperature": f.StagnationTemperature.Min}
		if f.StaticPressure == nil {
			test["stagnation_pressure"] = f.StagnationPressure.Min
		}
		if f.Mach != nil {
			test["mach"] = (f.Mach.Min + f.Mach.Max) / 2
		} else {
			test["speed"] = (f.Speed.Min + f.Speed.Max) / 2
		}
		tb, err := json.Marshal(test)
		require.NoError(t, err)
		for name, art := range demoAircraft {
			for _, size := range []struct {
				name    string
				ofWidth float64
			}{{"half the width", 0.5}, {"1.2 widths", 1.2}} {
				for _, mass := range []string{`"model_mass": 0.5,`, "", `"model_mass": 3000,`} {
					scale := size.ofWidth * f.TestSection.Width / spans[name]
					req := fmt.Sprintf(`{"facility_id": %q, "article": %s, "model": {"scale": %g},
					  "installation": {%s "balance_offset": {"x": 0, "z": 0}}, "alpha": {"from": -4, "to": 12, "step": 4}, "test": %s}`,
						f.ID, art, scale, mass, tb)
					t.Run(fmt.Sprintf("%s/%s/%s/%s", f.ID, name, size.name, mass), func(t *testing.T) {
						out, err := runCmd(t, req, "loads", "--json", "--data", t.TempDir(), "-")
						var resp struct {
							Verdict   string `json:"verdict"`
							FitBroken []facilities.Violation
						}
						require.NoError(t, json.Unmarshal([]byte(out), &resp), "answer printed before the exit status: %v", err)
						assert.Equal(t, verdictExit(resp.Verdict), exitStatus(err), "verdict %s, error %v", resp.Verdict, err)
						if verdictExit(resp.Verdict) == exitOK {
							assert.NoError(t, err)
						}
						if size.ofWidth > 1 {
							assert.Equal(t, loads.VerdictDoesNotFit, resp.Verdict)
						}
						if mass == "" {
							assert.NotEqual(t, loads.VerdictWithin, resp.Verdict)
						}
						seen[resp.Verdict]++
					})
				}
			}
		}
	}
	t.Logf("verdicts over the demo matrix: %v", seen)
	for _, v := range []string{loads.VerdictWithin, loads.VerdictNotVerified, loads.VerdictOver, loads.VerdictDoesNotFit} {
		assert.Positive(t, seen[v], "the demo matrix reaches %s", v)
	}
}
