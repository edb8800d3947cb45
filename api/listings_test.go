package api_test

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/internal/app"
)

// labelled returns the example plan request at path with a label and a
// different α step (so that each is a plan of its own).
func labelled(t *testing.T, path, label string, step float64) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	var req map[string]any
	require.NoError(t, json.Unmarshal(b, &req))
	if label != "" {
		req["label"] = label
	}
	req["alpha"] = map[string]any{"from": -4, "to": 8, "step": step}
	out, err := json.Marshal(req)
	require.NoError(t, err)
	return string(out)
}

func postPlanID(t *testing.T, ts *httptest.Server, body string) string {
	t.Helper()
	r := catalogCall(t, ts, http.MethodPost, "/v1/plans", nil, body)
	require.Equal(t, http.StatusOK, r.status, "%s", r.body)
	var p struct {
		ID    string `json:"id"`
		Label string `json:"label"`
	}
	require.NoError(t, json.Unmarshal(r.body, &p))
	return p.ID
}

func TestPlanListing(t *testing.T) {
	ts, _ := catalogServer(t, nil)
	start := time.Now().UTC().Add(-time.Second)
	lsw := []string{
		postPlanID(t, ts, labelled(t, "../examples/pellin-p3-lsw-2.json", "approach", 1)),
		postPlanID(t, ts, labelled(t, "../examples/pellin-p3-lsw-2.json", "climb", 2)),
	}
	tsw := postPlanID(t, ts, labelled(t, "../examples/orrin-j16-tsw-1.json", "climb", 1))
	unlabelled := postPlanID(t, ts, labelled(t, "../examples/orrin-j16-tsw-1.json", "", 2))

	list := func(query string) ([]string, schema.PlanList) {
		t.Helper()
		var ids []string
		var last schema.PlanList
		path := "/v1/plans" + query
		for range 10 {
			r := catalogCall(t, ts, http.MethodGet, path, nil, "")
			require.Equal(t, http.StatusOK, r.status, "%s: %s", path, r.body)
			last = schema.PlanList{}
			require.NoError(t, json.Unmarshal(r.body, &last))
			for _, p := range last.Plans {
				ids = append(ids, p.ID)
				assert.Equal(t, "/v1/plans/"+p.ID, p.Href)
			}
			if last.NextCursor == "" {
				assert.Empty(t, r.header.Get("Link"))
				return ids, last
			}
			assert.Equal(t, "<"+last.Next+">; rel=\"next\"", r.header.Get("Link"))
			path = last.Next
		}
		require.FailNow(t, "the listing never ended")
		return nil, last
	}
	all, _ := list("")
	assert.Equal(t, []string{unlabelled, tsw, lsw[1], lsw[0]}, all, "newest first")
	paged, _ := list("?limit=1")
	assert.Equal(t, all, paged, "pages of one")
	ids, page := list("?facility=lsw-2")
	assert.Equal(t, []string{lsw[1], lsw[0]}, ids)
	assert.Equal(t, "climb", page.Plans[0].Label)
	assert.Equal(t, 1, page.Plans[0].FacilityVersion)
	ids, _ = list("?label=climb&limit=1")
	assert.Equal(t, []string{tsw, lsw[1]}, ids)
	ids, _ = list("?label=climb&facility=tsw-1")
	assert.Equal(t, []string{tsw}, ids)
	ids, _ = list("?since=" + start.Format(time.RFC3339Nano) + "&until=" + time.Now().Add(time.Hour).UTC().Format(time.RFC3339))
	assert.Equal(t, all, ids)
	ids, _ = list("?until=" + start.Format(time.RFC3339Nano))
	assert.Empty(t, ids)

	for _, tt := range []struct{ query, field string }{
		{"?since=yesterday", "since"},
		{"?until=2031-04-02", "until"},
		{"?since=2031-04-02T10:00:00Z&until=2031-04-02T09:00:00Z", "until"},
		{"?limit=0", "limit"},
		{"?limit=501", "limit"},
		{"?limit=ten", "limit"},
		{"?cursor=bm90LWEtY3Vyc29y", "cursor"},
		{"?sort=id", "sort"},
		{"?label=a&label=b", "label"},
	} {
		r := catalogCall(t, ts, http.MethodGet, "/v1/plans"+tt.query, nil, "")
		assert.Equal(t, http.StatusBadRequest, r.status, "%s: %s", tt.query, r.body)
		var p schema.Problem
		require.NoError(t, json.Unmarshal(r.body, &p))
		if assert.Len(t, p.Errors, 1, "%s: %s", tt.query, r.body) {
			assert.Equal(t, tt.field, p.Errors[0].Field, tt.query)
		}
	}
}

func TestPlanListingWithoutStore(t *testing.T) {
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	r := catalogCall(t, ts, http.MethodGet, "/v1/plans", nil, "")
	assert.Equal(t, http.StatusNotFound, r.status)
	assert.Contains(t, string(r.body), "without a store")
}

func TestPlanLabel(t *testing.T) {
	ts, db := catalogServer(t, nil)
	id := postPlanID(t, ts, labelled(t, "../examples/pellin-p3-lsw-2.json", "cruise-high", 1))
	rec, err := db.Plan(t.Context(), id)
	require.NoError(t, err)
	assert.Equal(t, "cruise-high", rec.Label, "the record keeps the label")
	assert.Contains(t, string(rec.Body), `"label":"cruise-high"`, "the answer carries it")
	other := postPlanID(t, ts, labelled(t, "../examples/pellin-p3-lsw-2.json", "", 1))
	assert.NotEqual(t, id, other, "a label is part of the request")
	for _, bad := range []string{"two\nlines", strings.Repeat("x", app.MaxLabel+1)} {
		body := labelled(t, "../examples/pellin-p3-lsw-2.json", bad, 1)
		r := catalogCall(t, ts, http.MethodPost, "/v1/plans", nil, body)
		assert.Equal(t, http.StatusBadRequest, r.status, "%q: %s", bad, r.body)
		assert.Contains(t, string(r.body), `"field":"label"`)
	}
}

func TestPlanCSV(t *testing.T) {
	ts, _ := catalogServer(t, nil)
	id := postPlanID(t, ts, labelled(t, "../examples/pellin-p3-lsw-2.json", "approach", 2))
	js := catalogCall(t, ts, http.MethodGet, "/v1/plans/"+id, nil, "")
	require.Equal(t, http.StatusOK, js.status)
	var plan schema.PlanResponse
	require.NoError(t, json.Unmarshal(js.body, &plan))
	require.NotNil(t, plan.Loads)

	r := catalogCall(t, ts, http.MethodGet, "/v1/plans/"+id, map[string]string{"Accept": "text/csv"}, "")
	require.Equal(t, http.StatusOK, r.status, "%s", r.body)
	assert.Equal(t, "text/csv; charset=utf-8; header=present", r.header.Get("Content-Type"))
	assert.Equal(t, "Accept", r.header.Get("Vary"))
	rows, err := csv.NewReader(bytes.NewReader(r.body)).ReadAll()
	require.NoError(t, err)
	require.Equal(t, app.PlanCSVHeader, rows[0])
	col := map[string]int{}
	for i, name := range rows[0] {
		col[name] = i
	}
	require.Len(t, rows, 1+len(plan.Loads.Points), "one row per α/β point")
	for i, pt := range plan.Loads.Points {
		row := rows[1+i]
		assert.Equal(t, id, row[col["plan_id"]])
		assert.Equal(t, "approach", row[col["label"]])
		assert.Equal(t, "lsw-2", row[col["facility_id"]])
		for name, want := range map[string]float64{
			"alpha_deg": pt.Alpha, "beta_deg": pt.Beta, "normal_n": pt.Normal, "pitching_moment_n_m": pt.PitchingMoment,
			"utilization": pt.Utilization, "scale": plan.Model.Scale, "stagnation_pressure_pa": plan.Test.StagnationPressure,
			"reynolds_ratio": plan.Mismatch.ReynoldsRatio, "corrected_dynamic_pressure_pa": pt.DynamicPressure,
		} {
			got, err := strconv.ParseFloat(row[col[name]], 64)
			require.NoError(t, err, name)
			assert.Equal(t, want, got, "%s at point %d: written in full precision", name, i)
		}
		assert.Equal(t, plan.Verdict, row[col["verdict"]])
		assert.Equal(t, plan.Loads.BalanceID, row[col["balance_id"]])
	}

	bad := catalogCall(t, ts, http.MethodGet, "/v1/plans/"+id, map[string]string{"Accept": "image/png"}, "")
	assert.Equal(t, http.StatusNotAcceptable, bad.status)
	assert.Contains(t, string(bad.body), "text/csv")
	either := catalogCall(t, ts, http.MethodGet, "/v1/plans/"+id, map[string]string{"Accept": "text/csv;q=0.5, application/json"}, "")
	assert.Equal(t, "application/json; charset=utf-8", either.header.Get("Content-Type"), "the higher quality wins")
}
