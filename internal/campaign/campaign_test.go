package campaign_test

import (
	"bufio"
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/campaign"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
)

// demoRequest reads testdata/demo.json: the Orrin J16 at 2 labelled conditions
// and a 5 × 4 grid in tsw-1, cn2-05 and plp-3.
func demoRequest(t *testing.T) campaign.Request {
	t.Helper()
	b, err := os.ReadFile("testdata/demo.json")
	require.NoError(t, err)
	var req campaign.Request
	require.NoError(t, unitjson.Decode(b, &req))
	return req
}

func TestRunDemo(t *testing.T) {
	t.Parallel()
	req := demoRequest(t)
	var calls, last, total int
	res, err := campaign.Run(context.Background(), nil, req, func(done, tot int) {
		require.GreaterOrEqual(t, done, last, "progress never goes back")
		calls, last, total = calls+1, done, tot
	})
	require.NoError(t, err)
	assert.Equal(t, 2*22, total, "each condition counts twice")
	assert.Equal(t, total, last)
	assert.Greater(t, calls, 2)

	sm := res.Summary
	assert.Equal(t, 22, sm.Conditions)
	assert.Equal(t, 22, sm.ConditionsServed)
	require.Len(t, sm.ModelScales, 1, "one model")
	s := sm.ModelScales[0]
	served := 0
	for _, fp := range res.Facilities {
		served += fp.ConditionsServed
		if fp.ConditionsServed > 0 {
			assert.Equal(t, s, fp.Scale)
			assert.Len(t, fp.RunOrder, fp.ConditionsServed)
			require.NotNil(t, fp.Schedule)
			assert.LessOrEqual(t, fp.Schedule.Hours, fp.HoursCallerOrder)
			assert.NotEmpty(t, fp.ScaleReason.Note)
		}
	}
	assert.Equal(t, 22, served)
	hours := 0.0
	for _, fp := range res.Facilities {
		if fp.Schedule != nil {
			hours += fp.Schedule.Hours
		}
	}
	assert.InDelta(t, hours, sm.Hours, 1e-9)
	lowest := 2.0
	for _, c := range res.Conditions {
		require.True(t, c.Served, c.Label)
		require.NotNil(t, c.Plan)
		assert.Equal(t, s, c.Plan.Scale)
		assert.Positive(t, c.RunPosition)
		lowest = min(lowest, c.Plan.ReynoldsRatio)
		// The price of one model: a model for the condition alone is never
		// worse (to the planner's 0.1 %).
		own, shared := c.OwnReynoldsRatio, c.Plan.ReynoldsRatio
		assert.GreaterOrEqual(t, min(own, 1/own)*(1+1e-3), min(shared, 1/shared), c.Label)
		assert.Len(t, c.Plan.Points, 7, "α −2° to 10° by 2°")
	}
	assert.Equal(t, lowest, sm.LowestReynoldsRatio)
	assert.Contains(t, res.Cautions, facilities.CautionEstimate)
	assert.Contains(t, res.Cautions, loads.CautionStaticLoads)
	assert.Equal(t, "cruise", res.Conditions[0].Label)
	assert.Equal(t, "0 m M0.3", res.Conditions[2].Label)

	// Deterministic: the same request gives the same answer.
	again, err := campaign.Run(context.Background(), nil, req, nil)
	require.NoError(t, err)
	a, _ := json.Marshal(res)
	b, _ := json.Marshal(again)
	assert.Equal(t, string(a), string(b))
}

func TestRunCancelled(t *testing.T) {
	t.Parallel()
	req := demoRequest(t)
	ctx, cancel := context.WithCancel(context.Background())
	_, err := campaign.Run(ctx, nil, req, func(done, total int) {
		if done > 3 {
			cancel()
		}
	})
	require.ErrorIs(t, err, context.Canceled)
}

func TestRunInvalid(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		name, body string
		fields     []string
	}{
		{"nothing", `{"article": {}, "facilities": []}`, []string{"facilities", "conditions"}},
		{"bad policy and aim", `{"model": {"policy": "two"}, "objective": {"aim": "best"}, "conditions": [{"altitude": 0, "mach": 0.5}], "facilities": [{"facility_id": "tsw-1"}]}`,
			[]string{"model.policy", "objective.aim"}},
		{"condition fields", `{"conditions": [{"mach": 0.5}, {"label": "x", "altitude": 0, "mach": 9}, {"label": "x", "altitude": 0, "mach": 0.5}], "facilities": [{"facility_id": "tsw-1"}]}`,
			[]string{"conditions[0].altitude", "conditions[1].mach", "conditions[2].label"}},
		{"grid", `{"grid": {"altitudes": [0, 99000], "machs": []}, "facilities": [{"facility_id": "tsw-1"}]}`, []string{"grid.machs"}},
		{"facilities", `{"conditions": [{"altitude": 0, "mach": 0.5}], "facilities": [{"facility_id": "tsw-1", "installation": {"balance_id": "nope"}}, {"facility_id": "nowhere"}, {"facility_id": "tsw-1"}]}`,
			[]string{"facilities[0].installation.balance_id", "facilities[1].facility_id", "facilities[2].facility_id"}},
		{"one model, two scales", `{"conditions": [{"altitude": 0, "mach": 0.5}], "facilities": [{"facility_id": "tsw-1", "scale": 0.02}, {"facility_id": "cn2-05", "scale": 0.01}]}`,
			[]string{"facilities[1].scale"}},
		{"existing without scales", `{"model": {"policy": "existing_models"}, "conditions": [{"altitude": 0, "mach": 0.5}], "facilities": [{"facility_id": "tsw-1"}]}`,
			[]string{"model.scales"}},
		{"sharing cost", `{"level_sharing": {"reynolds_cost_percent": 80}, "conditions": [{"altitude": 0, "mach": 0.5}], "facilities": [{"facility_id": "tsw-1"}]}`,
			[]string{"level_sharing.reynolds_cost_percent"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			req := demoRequest(t)
			req.Conditions, req.Grid, req.Facilities = nil, nil, nil
			require.NoError(t, unitjson.Decode([]byte(c.body), &req))
			_, err := campaign.Run(context.Background(), nil, req, nil)
			require.Error(t, err)
			de, ok := err.(*check.Error)
			require.True(t, ok, "%T %v", err, err)
			require.Equal(t, check.CodeInvalid, de.Code, de.Error())
			var got []string
			for _, f := range de.Fields {
				got = append(got, f.Field)
			}
			for _, f := range c.fields {
				assert.Contains(t, got, f)
			}
		})
	}
}

func TestPolicies(t *testing.T) {
	t.Parallel()
	base := demoRequest(t)
	one, err := campaign.Run(context.Background(), nil, base, nil)
	require.NoError(t, err)

	per := base
	per.Model.Policy = campaign.PolicyModelPerFacility
	res, err := campaign.Run(context.Background(), nil, per, nil)
	require.NoError(t, err)
	// A model per facility is never worse than one for all.
	assert.GreaterOrEqual(t, res.Summary.ConditionsServed, one.Summary.ConditionsServed)
	assert.GreaterOrEqual(t, res.Summary.AimValue, one.Summary.AimValue*(1-1e-12))

	ex := base
	ex.Model = campaign.ModelPolicy{Policy: campaign.PolicyExistingModels, Scales: []float64{1.0 / 60, 1.0 / 45, 1.0 / 30}}
	res, err = campaign.Run(context.Background(), nil, ex, nil)
	require.NoError(t, err)
	for _, fp := range res.Facilities {
		if fp.ConditionsServed > 0 {
			assert.Contains(t, ex.Model.Scales, fp.Scale)
			assert.Equal(t, "existing_model", fp.ScaleReason.Kind)
		}
	}

	fixed := base
	fixed.Facilities = append([]campaign.FacilityChoice{}, base.Facilities...)
	s := 1.0 / 50
	fixed.Facilities[1].Scale = &s
	res, err = campaign.Run(context.Background(), nil, fixed, nil)
	require.NoError(t, err)
	assert.Equal(t, []float64{s}, res.Summary.ModelScales, "one model: the fixed scale everywhere")
}

// TestLevelSharing checks that sharing levels at a 5 % Reynolds cost never
// costs a condition more than 5 % of its closeness nor its Mach match, and
// saves hours in cn2-05, where the condensation rule puts every condition's
// temperature somewhere else.
func TestLevelSharing(t *testing.T) {
	t.Parallel()
	req := demoRequest(t)
	req.Facilities = req.Facilities[1:2] // cn2-05
	off, err := campaign.Run(context.Background(), nil, req, nil)
	require.NoError(t, err)
	req.LevelSharing.ReynoldsCostPercent = 5
	on, err := campaign.Run(context.Background(), nil, req, nil)
	require.NoError(t, err)
	require.Equal(t, off.Summary.ModelScales, on.Summary.ModelScales)
	assert.InDelta(t, off.Summary.Hours, on.Facilities[0].HoursWithoutSharing, 1e-9)
	assert.Positive(t, on.Summary.HoursSavedBySharing)
	assert.InDelta(t, on.Summary.Hours+on.Summary.HoursSavedBySharing, off.Summary.Hours, 1e-9)
	shared := 0
	for i, c := range on.Conditions {
		o := off.Conditions[i].Plan
		p := c.Plan
		require.NotNil(t, p)
		if p.SharedLevel {
			shared++
			assert.Equal(t, o.ReynoldsRatio, p.ReynoldsRatioBeforeSharing)
		}
		cl := func(r float64) float64 { return min(r, 1/r) }
		assert.GreaterOrEqual(t, cl(p.ReynoldsRatio), cl(o.ReynoldsRatio)*0.95*(1-1e-12), c.Label)
		if *o.MachMatched {
			assert.True(t, *p.MachMatched, c.Label)
		}
	}
	assert.Positive(t, shared)
	t.Logf("sharing at 5 %%: %d of %d conditions moved, %.2f h of %.2f h saved", shared, len(on.Conditions), on.Summary.HoursSavedBySharing, off.Summary.Hours)
}

func TestWriters(t *testing.T) {
	t.Parallel()
	req := demoRequest(t)
	req.Conditions = append(req.Conditions, campaign.Condition{Label: "too fast"})
	h, m := 0.0, 0.99
	req.Conditions[len(req.Conditions)-1].Altitude, req.Conditions[len(req.Conditions)-1].Mach = &h, &m
	res, err := campaign.Run(context.Background(), nil, req, nil)
	require.NoError(t, err)
	var unserved *campaign.ConditionPlan
	for i := range res.Conditions {
		if !res.Conditions[i].Served {
			unserved = &res.Conditions[i]
		}
	}
	if unserved != nil {
		assert.NotEmpty(t, unserved.Excluded)
	}

	var buf bytes.Buffer
	require.NoError(t, res.WriteCSV(&buf))
	rows, err := csv.NewReader(&buf).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, campaign.CSVHeader, rows[0])
	want := 1
	for _, c := range res.Conditions {
		if c.Plan != nil {
			want += len(c.Plan.Points)
		} else {
			want++
		}
	}
	assert.Len(t, rows, want, "one row per condition and α point")
	assert.Equal(t, "cruise", rows[1][0])

	buf.Reset()
	require.NoError(t, res.WriteNDJSON(&buf))
	sc := bufio.NewScanner(&buf)
	sc.Buffer(nil, 1<<20)
	var lines []string
	for sc.Scan() {
		lines = append(lines, sc.Text())
	}
	require.Len(t, lines, len(res.Conditions)+1)
	var first campaign.ConditionPlan
	require.NoError(t, json.Unmarshal([]byte(lines[0]), &first))
	assert.Equal(t, "cruise", first.Label)
	var tail campaign.Tail
	require.NoError(t, json.Unmarshal([]byte(lines[len(lines)-1]), &tail))
	assert.Equal(t, res.Summary, tail.Summary)
	assert.True(t, strings.Contains(lines[len(lines)-1], `"summary"`))
}

func TestSmall(t *testing.T) {
	t.Parallel()
	req := demoRequest(t) // 22 conditions, 3 facilities
	assert.True(t, campaign.Small(&req))
	req.Grid.Altitudes = make([]float64, 60) // 2 + 240 conditions
	assert.False(t, campaign.Small(&req))
}

// TestRunJSON runs the demo request from its bytes and gets the same answer as
// Run, and a body that does not decode names its field.
func TestRunJSON(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("testdata/demo.json")
	require.NoError(t, err)
	got, err := campaign.RunJSON(context.Background(), nil, b, nil)
	require.NoError(t, err)
	res, err := campaign.Run(context.Background(), nil, demoRequest(t), nil)
	require.NoError(t, err)
	want, err := json.Marshal(res)
	require.NoError(t, err)
	assert.JSONEq(t, string(want), string(got))
	_, err = campaign.RunJSON(context.Background(), nil, []byte(`{"grid": {"altitudes": "high"}}`), nil)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "grid.altitudes")
}
