package api_test

import (
	"encoding/json"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestPlanWallCorrections: a plan in closed walls matches the corrected Mach
// number and reports every point's corrections; in slotted walls the corrections
// are null with a reason, never zeros.
func TestPlanWallCorrections(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name      string
		example   string
		basis     string
		blockage  bool
		upwash    bool
		reasons   []string
		corrected bool
	}{
		{"closed walls", "../examples/pellin-p3-lsw-2.json", "corrected", true, true, []string{"streamline_curvature"}, true},
		{"slotted walls", "../examples/orrin-j16-tsw-1.json", "free_stream", false, false, []string{"blockage", "upwash", "streamline_curvature"}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			body, err := os.ReadFile(c.example)
			require.NoError(t, err)
			code, b := post(t, ts, "/v1/plans", string(body))
			require.Equal(t, 200, code, "%s", b)
			var raw struct {
				Mismatch struct {
					MachBasis               *string  `json:"mach_basis"`
					MachDifference          *float64 `json:"mach_difference"`
					CorrectedMachDifference *float64 `json:"corrected_mach_difference"`
				} `json:"mismatch"`
				Corrections struct {
					Points      []map[string]*float64 `json:"points"`
					NotComputed []struct {
						Correction string `json:"correction"`
						Reason     string `json:"reason"`
					} `json:"not_computed"`
				} `json:"corrections"`
			}
			require.NoError(t, json.Unmarshal(b, &raw))
			require.NotNil(t, raw.Mismatch.MachBasis)
			assert.Equal(t, c.basis, *raw.Mismatch.MachBasis)
			assert.Equal(t, c.corrected, raw.Mismatch.CorrectedMachDifference != nil)
			if c.corrected {
				// M_c is above the free stream in closed walls (ε > 0).
				assert.Greater(t, *raw.Mismatch.CorrectedMachDifference, *raw.Mismatch.MachDifference)
			}
			require.NotEmpty(t, raw.Corrections.Points)
			for _, p := range raw.Corrections.Points {
				for _, k := range []string{"blockage", "dynamic_pressure_factor", "speed_factor", "corrected_mach"} {
					v, present := p[k]
					assert.True(t, present, k)
					assert.Equal(t, c.blockage, v != nil, k)
				}
				for _, k := range []string{"delta_alpha_upwash", "delta_cd_upwash"} {
					assert.Equal(t, c.upwash, p[k] != nil, k)
				}
				assert.Nil(t, p["delta_cm_curvature"])
			}
			var names []string
			for _, n := range raw.Corrections.NotComputed {
				names = append(names, n.Correction)
				assert.NotEmpty(t, n.Reason)
			}
			assert.Equal(t, c.reasons, names)
		})
	}
}
