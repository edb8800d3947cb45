package api_test

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/app"
	"scalematch/internal/testfixture"
)

// replicas serves n services over one seeded SQLite file, as replicas over one
// shared database do: each has its own store connections and its own facility
// and plan caches, with the given facility recheck interval.
func replicas(t *testing.T, n int, recheck time.Duration) ([]*httptest.Server, *sqlite.DB) {
	t.Helper()
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), sqlite.FileName)
	var out []*httptest.Server
	var first *sqlite.DB
	for i := range n {
		db, err := sqlite.Open(ctx, path)
		require.NoError(t, err)
		t.Cleanup(func() { db.Close() })
		if i == 0 {
			first = db
			_, err := facilities.SeedDemo(ctx, db, true)
			require.NoError(t, err)
		}
		s, err := api.New(api.Config{Catalog: db, Logger: slog.New(slog.NewTextHandler(io.Discard, nil)), FacilityRecheck: recheck,
			WriteTokens: map[string]facilities.Actor{"tok": "tester"}})
		require.NoError(t, err)
		ts := httptest.NewServer(s.Handler())
		t.Cleanup(ts.Close)
		out = append(out, ts)
	}
	return out, first
}

// planHead is the part of a plan the tests compare.
type planHead struct {
	ID              string `json:"id"`
	FacilityVersion int    `json:"facility_version"`
	Test            struct {
		DynamicPressure float64 `json:"dynamic_pressure"`
	} `json:"test"`
}

func planOK(t *testing.T, ts *httptest.Server, body string) ([]byte, planHead) {
	t.Helper()
	status, b := post(t, ts, "/v1/plans", body)
	require.Equal(t, http.StatusOK, status, "POST /v1/plans: %s", b)
	var h planHead
	require.NoError(t, json.Unmarshal(b, &h))
	return b, h
}

// TestPlanUsesCurrentFacilityVersion changes a facility behind the replicas'
// backs (straight in the shared store) between two equal plan requests: with the
// version asked for on every plan, the second plan must use and record the new
// version, never a cached old one; and each replica must answer a stored plan byte
// for byte as it was first answered.
func TestPlanUsesCurrentFacilityVersion(t *testing.T) {
	rs, db := replicas(t, 2, -1)
	a, b := rs[0], rs[1]
	first, h1 := planOK(t, a, testfixture.J16Plan)
	require.EqualValues(t, 1, h1.FacilityVersion, "the first plan's tsw-1 version")
	again, _ := planOK(t, a, testfixture.J16Plan)
	other, _ := planOK(t, b, testfixture.J16Plan)
	require.Equal(t, string(first), string(again), "a repeated request, same replica, byte for byte")
	require.Equal(t, string(first), string(other), "a repeated request, other replica, byte for byte")

	ctx := context.Background()
	f, err := db.Facility(ctx, "tsw-1")
	require.NoError(t, err)
	q := 40000.0 // below the 54 kPa the first plan sat on
	f.MaxDynamicPressure = &q
	_, err = db.UpdateFacility(ctx, f, f.Version, "test")
	require.NoError(t, err)
	for name, ts := range map[string]*httptest.Server{"same replica": a, "other replica": b} {
		_, h2 := planOK(t, ts, testfixture.J16Plan)
		if !assert.EqualValues(t, 2, h2.FacilityVersion, name) || !assert.NotEqual(t, h1.ID, h2.ID, name) ||
			!assert.LessOrEqual(t, h2.Test.DynamicPressure, q*(1+1e-9), name) {
			t.Logf("%s after the update: version %d id %s q %.6g Pa; want version 2, a new id, q ≤ %g Pa",
				name, h2.FacilityVersion, h2.ID, h2.Test.DynamicPressure, q)
		}
	}
	require.NoError(t, db.DeleteFacility(ctx, "tsw-1", 2, "test"))
	status, body := post(t, a, "/v1/plans", testfixture.J16Plan)
	assert.Equal(t, http.StatusNotFound, status, "plan in a deleted facility: %.200s", body)
}

// TestFacilityRecheck runs two replicas with the default recheck interval: a
// change made through one replica is planned with by that replica at once, and by
// the other once the interval has passed; until then the other plans with, and
// records, the version it has.
func TestFacilityRecheck(t *testing.T) {
	rs, _ := replicas(t, 2, 0)
	a, b := rs[0], rs[1]
	planOK(t, a, testfixture.J16Plan)
	asked := time.Now() // b asks for the version after this
	planOK(t, b, testfixture.J16Plan)
	r := catalogCall(t, a, http.MethodGet, "/v1/facilities/tsw-1", nil, "")
	var f facilities.Facility
	require.NoError(t, json.Unmarshal(r.body, &f))
	f.Name += " (edited)"
	body, _ := json.Marshal(f)
	r = catalogCall(t, a, http.MethodPut, "/v1/facilities/tsw-1", map[string]string{"Authorization": "Bearer tok", "If-Match": `"1"`}, string(body))
	require.Equal(t, http.StatusOK, r.status, "PUT: %s", r.body)
	_, h := planOK(t, a, testfixture.J16Plan)
	assert.EqualValues(t, 2, h.FacilityVersion, "the replica that made the change plans with the new version")
	if _, hb := planOK(t, b, testfixture.J16Plan); time.Since(asked) < app.DefaultFacilityRecheck {
		assert.EqualValues(t, 1, hb.FacilityVersion, "the other replica within the recheck interval plans with its cached version")
	}
	time.Sleep(app.DefaultFacilityRecheck + 10*time.Millisecond)
	_, h = planOK(t, b, testfixture.J16Plan)
	assert.EqualValues(t, 2, h.FacilityVersion, "the other replica after the recheck interval")
}

// TestStoredPlanStillValidated sends requests whose valid form is stored already:
// decoding and validation still run, so a bad field is a 400 as ever.
func TestStoredPlanStillValidated(t *testing.T) {
	rs, _ := replicas(t, 1, 0)
	planOK(t, rs[0], testfixture.J16Plan)
	tests := []struct {
		name, body, field string
	}{
		{"unknown field", strings.Replace(testfixture.J16Plan, `"alpha":`, `"alpah": 1, "alpha":`, 1), "alpah"},
		{"bad balance", strings.Replace(testfixture.J16Plan, `"int-b1"`, `"int-b9"`, 1), "installation.balance_id"},
		{"trailing data", testfixture.J16Plan + "{}", ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			status, body := post(t, rs[0], "/v1/plans", tt.body)
			assert.Equal(t, http.StatusBadRequest, status, "%s", body)
			assert.Contains(t, string(body), `"field":"`+tt.field+`"`, "the 400 names the field")
		})
	}
}

// TestBatchStoresEveryPlan posts a batch of distinct plans, one repeated, to one
// replica and reads each back from the other: every plan is stored, and the stored
// bytes are those the batch answered.
func TestBatchStoresEveryPlan(t *testing.T) {
	rs, _ := replicas(t, 2, 0)
	var sb strings.Builder
	sb.WriteString(`{"requests":[`)
	const n = 40
	for i := range n {
		if i > 0 {
			sb.WriteByte(',')
		}
		mach := 0.60 + 0.005*float64(i%(n-1)) // the last repeats the first
		sb.WriteString(strings.Replace(testfixture.J16Plan, `"mach": 0.78`, fmt.Sprintf(`"mach": %.3f`, mach), 1))
	}
	sb.WriteString(`]}`)
	status, body := post(t, rs[0], "/v1/plans/batch", sb.String())
	require.Equal(t, http.StatusOK, status, "batch: %s", body)
	var out struct {
		Results []struct {
			Plan  json.RawMessage `json:"plan"`
			Error json.RawMessage `json:"error"`
		} `json:"results"`
	}
	require.NoError(t, json.Unmarshal(body, &out), "batch answer")
	require.Len(t, out.Results, n, "batch answer")
	assert.Equal(t, string(out.Results[0].Plan), string(out.Results[n-1].Plan), "two equal requests in one batch")
	var wg sync.WaitGroup
	for i, r := range out.Results {
		if !assert.Nil(t, r.Error, "item %d", i) {
			continue
		}
		var h planHead
		require.NoError(t, json.Unmarshal(r.Plan, &h))
		wg.Go(func() {
			resp, err := http.Get(rs[1].URL + "/v1/plans/" + h.ID)
			if !assert.NoError(t, err) {
				return
			}
			defer resp.Body.Close()
			got, err := io.ReadAll(resp.Body)
			assert.NoError(t, err)
			assert.Equal(t, http.StatusOK, resp.StatusCode, "item %d: stored plan %s: status", i, h.ID)
			assert.Equal(t, string(r.Plan), string(got), "item %d: stored plan %s against the batch's", i, h.ID)
		})
	}
	wg.Wait()
}
