package api_test

import (
	"encoding/json"
	"fmt"
	"net/http"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/internal/app"
	"scalematch/internal/testfixture"
)

// TestRequestCaps: a 0.92 MB request with 90,000 scales was planned and stored
// (9.8 MB, 90,002 warnings); 200,000 bad scales gave 14.5 MB of errors. Every list
// is capped, every error list holds at most 50, echoed input is cut short, and
// the largest sweep stays within the stored plan's cap.
func TestRequestCaps(t *testing.T) {
	ts := newServer(t)
	scales := func(n int, v string) string {
		return strings.Repeat(v+",", n-1) + v
	}
	badRows := make([]string, 80)
	for i := range badRows {
		badRows[i] = fmt.Sprintf(`{"alpha": %d, "cl": 1e9, "cd": -1, "cm": 0}`, i)
	}
	cases := []struct {
		name     string
		body     string
		status   int
		field    string
		maxBytes int
	}{
		{"90,000 scales", strings.Replace(testfixture.J16Plan, `{"scale_min": 0.01, "scale_max": 0.5}`, `{"scales": [`+scales(90000, "0.9")+`]}`, 1),
			400, "model.scales", 2000},
		{"200,000 bad scales", strings.Replace(testfixture.J16Plan, `{"scale_min": 0.01, "scale_max": 0.5}`, `{"scales": [`+scales(200000, `"x"`)+`]}`, 1),
			400, "model.scales", 2000},
		{"errors after decoding are capped at 50", strings.Replace(testfixture.J16Plan, `"cm_slope": -1.05}`, `"cm_slope": -1.05, "table": [`+strings.Join(badRows, ",")+`]}`, 1),
			400, "article.aero.table[0].cl", 20000},
		{"an unknown field with a 10 kB name", strings.Replace(testfixture.J16Plan, `"facility_id"`, `"`+strings.Repeat("k", 10000)+`": 1, "facility_id"`, 1),
			400, "", 1500},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, b := post(t, ts, "/v1/plans", tc.body)
			require.Equal(t, tc.status, code, "%.300s", b)
			assert.LessOrEqual(t, len(b), tc.maxBytes, "answer size")
			var p schema.Problem
			require.NoError(t, json.Unmarshal(b, &p))
			assert.LessOrEqual(t, len(p.Errors), 50)
			if tc.field != "" {
				assert.Equal(t, tc.field, p.Errors[0].Field)
			}
		})
	}
	t.Run("the largest sweep fits a stored plan", func(t *testing.T) {
		body := strings.Replace(testfixture.J16Plan, `"alpha": {"from": -4, "to": 16, "step": 1}`, `"alpha": {"from": -180, "to": 180, "step": 0.18}`, 1)
		code, b := post(t, ts, "/v1/plans", body)
		require.Equal(t, http.StatusOK, code, "%.300s", b)
		assert.Less(t, len(b), app.MaxPlanBytes)
		t.Logf("a 2001-point plan is %d bytes", len(b))
	})
}
