package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/campaign"
)

// TestCampaignExamples runs every example campaign request (examples/campaign-*.json)
// through scalematch campaign in each format, and checks that the table and
// the JSON say the same and that nothing is drawn on standard error when
// standard output is not a terminal.
func TestCampaignExamples(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "..", "examples", "campaign-*.json"))
	require.NoError(t, err)
	require.NotEmpty(t, files)
	noStore := t.TempDir()
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			var out, errOut bytes.Buffer
			require.NoError(t, run([]string{"campaign", "--data", noStore, "--json", f}, strings.NewReader(""), &out, &errOut))
			var res campaign.Result
			require.NoError(t, json.Unmarshal(out.Bytes(), &res))
			assert.Empty(t, errOut.String(), "no progress bar without a terminal")

			table, err := runCmd(t, "", "campaign", "--data", noStore, f)
			require.NoError(t, err)
			assert.Contains(t, table, "Campaign: ")
			for _, fp := range res.Facilities {
				if fp.ConditionsServed > 0 {
					assert.Contains(t, table, "Run order in "+fp.FacilityID)
					for _, l := range fp.RunOrder {
						assert.Contains(t, table, l)
					}
				}
			}
			assert.Contains(t, table, "\nCautions\n")

			csvOut, err := runCmd(t, "", "campaign", "--data", noStore, "--csv", f)
			require.NoError(t, err)
			rows, err := csv.NewReader(strings.NewReader(csvOut)).ReadAll()
			require.NoError(t, err)
			assert.Equal(t, campaign.CSVHeader, rows[0])

			nd, err := runCmd(t, "", "campaign", "--data", noStore, "--ndjson", f)
			require.NoError(t, err)
			assert.Len(t, strings.Split(strings.TrimSpace(nd), "\n"), len(res.Conditions)+1)
		})
	}
}

// TestCampaignProgress draws the progress bar when told to (as on a terminal)
// and checks that it reaches the total.
func TestCampaignProgress(t *testing.T) {
	var out, errOut bytes.Buffer
	o := campaignOptions{progress: true}
	o.stdout, o.stderr = &out, &errOut
	var req campaign.Request
	body := `{"article": {"reference_length": 2.4, "reference_area": 36.5, "span": 16.4, "frontal_area": 4.4, "wetted_area": 228,
		"aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25, "cd_min": 0.022, "cl_at_cd_min": 0.14, "induced_drag_factor": 0.057}},
		"alpha": {"from": 0, "to": 4, "step": 2}, "grid": {"altitudes": [0, 6000], "machs": [0.5, 0.7]}, "facilities": [{"facility_id": "tsw-1"}]}`
	require.NoError(t, json.Unmarshal([]byte(body), &req))
	err := o.run(t.Context(), nil, req)
	if err != nil {
		_, isVerdict := err.(verdictError)
		require.True(t, isVerdict, "%v", err)
	}
	assert.Contains(t, errOut.String(), "planning")
	assert.Contains(t, errOut.String(), "8/8", "two passes over 4 conditions")
	assert.Contains(t, out.String(), "Campaign: 4 of 4 conditions served")
}

// TestCampaignFlags refuses two output formats at once.
func TestCampaignFlags(t *testing.T) {
	_, err := runCmd(t, "", "campaign", "--json", "--csv", filepath.Join("..", "..", "examples", "campaign-j16.json"))
	require.ErrorContains(t, err, "at most one of")
}
