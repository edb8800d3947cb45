package main

import (
	"encoding/json"
	"fmt"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/loads"
)

// TestLoadsResolutionFlags: --resolution and --load-fraction set the request's
// required_resolution and installation.load_fraction; the table names the
// resolution state and the margin, and a bad flag is an error naming it.
func TestLoadsResolutionFlags(t *testing.T) {
	t.Parallel()
	req := fmt.Sprintf(`{"facility_id": "tsw-1", "article": %s, "model": {"scale": "1:24"},
	  "installation": {"balance_id": "int-b1", "model_mass": 20}, "alpha": {"from": 0, "to": 8, "step": 4},
	  "test": {"mach": 0.5, "stagnation_pressure": 150000, "stagnation_temperature": 300}}`, demoAircraft["orrin-j16"])
	out, err := runCmd(t, req, "loads", "--json", "--resolution", "cd_counts=40,cl=0.02", "--load-fraction", "0.9", "--data", t.TempDir(), "-")
	var resp struct {
		ResolutionState string  `json:"resolution_state"`
		LoadFraction    float64 `json:"load_fraction"`
		Loads           loads.Report
	}
	require.NoError(t, json.Unmarshal([]byte(out), &resp), "%v", err)
	assert.Equal(t, loads.ResolutionResolved, resp.ResolutionState)
	assert.Equal(t, 0.9, resp.LoadFraction)
	require.NotNil(t, resp.Loads.Resolution)
	assert.Equal(t, 40.0, *resp.Loads.Resolution.Required.CDCounts)
	assert.InDelta(t, 0.6, resp.Loads.AllowedUtilization, 1e-12)

	table, _ := runCmd(t, req, "loads", "--resolution", "cd_counts=0.5", "--load-fraction", "0.9", "--data", t.TempDir(), "-")
	assert.Contains(t, table, "Resolution: too_coarse")
	assert.Contains(t, table, "Load margin: planned and checked to 90 % of the allowed load")
	assert.Contains(t, table, "required resolution: too_coarse; least dynamic pressure")

	for _, bad := range []string{"cd=1", "cd_counts", "cd_counts=x"} {
		_, err := runCmd(t, req, "loads", "--resolution", bad, "--data", t.TempDir(), "-")
		require.Error(t, err, bad)
		assert.Contains(t, err.Error(), "--resolution", bad)
	}
}
