package main

import (
	"context"
	"encoding/json"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/testfixture"
)

// TestDemoVersionsAgree checks that the built-in demo catalog shows the same
// facility versions everywhere: the command line without a store (table and
// --json), the service without a store, and the service over a store seeded with
// the demo facilities (version 1 each). A plan of a demo facility carries that
// version and gets the same id with and without the seeded store.
func TestDemoVersionsAgree(t *testing.T) {
	t.Setenv(envDatabaseURL, "")
	ctx := context.Background()
	noStore := t.TempDir()
	seededDir := t.TempDir()
	seeded, err := sqlite.Open(ctx, sqlite.Path(seededDir))
	require.NoError(t, err)
	t.Cleanup(func() { seeded.Close() })
	_, err = facilities.SeedDemo(ctx, seeded, true)
	require.NoError(t, err)

	serve := func(c facilities.Catalog, method, path, body string) []byte {
		t.Helper()
		s, err := api.New(api.Config{Catalog: c, Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
		require.NoError(t, err)
		req := httptest.NewRequest(method, path, strings.NewReader(body))
		if body != "" {
			req.Header.Set("Content-Type", "application/json")
		}
		rec := httptest.NewRecorder()
		s.Handler().ServeHTTP(rec, req)
		require.Equal(t, http.StatusOK, rec.Code, "%s %s: %s", method, path, rec.Body.String())
		return rec.Body.Bytes()
	}
	versions := func(body []byte) map[string]int {
		t.Helper()
		var list struct {
			Facilities []facilities.Facility `json:"facilities"`
		}
		require.NoError(t, json.Unmarshal(body, &list))
		out := map[string]int{}
		for _, f := range list.Facilities {
			out[f.ID] = f.Version
		}
		return out
	}

	want := map[string]int{}
	for _, f := range facilities.Demo() {
		want[f.ID] = 1 // the version a seeded store gives each demo facility
	}
	cliJSON, err := runCmd(t, "", "facilities", "--json", "--data", noStore)
	require.NoError(t, err)
	assert.Equal(t, want, versions([]byte(cliJSON)), "command line, demo catalog, --json")
	assert.Equal(t, want, versions(serve(nil, http.MethodGet, "/v1/facilities", "")), "service, demo catalog")
	assert.Equal(t, want, versions(serve(seeded, http.MethodGet, "/v1/facilities", "")), "service, seeded store")

	// The table's version column: "  tsw-1   1  ..." for every demo facility.
	table, err := runCmd(t, "", "facilities", "--data", noStore)
	require.NoError(t, err)
	for id := range want {
		assert.Regexp(t, regexp.MustCompile(`(?m)^  `+regexp.QuoteMeta(id)+` +1 `), table, "table row of %s", id)
	}

	// A plan: the same facility version and id from the command line's demo
	// catalog, the service's demo catalog and the seeded store.
	type planHead struct {
		ID              string `json:"id"`
		FacilityVersion int    `json:"facility_version"`
	}
	head := func(b []byte) planHead {
		t.Helper()
		var p planHead
		require.NoError(t, json.Unmarshal(b, &p))
		return p
	}
	cliPlan, err := runCmd(t, testfixture.J16Plan, "plan", "--json", "--data", noStore, "-")
	require.NoError(t, err)
	demoPlan := head([]byte(cliPlan))
	assert.Equal(t, 1, demoPlan.FacilityVersion)
	assert.Equal(t, demoPlan, head(serve(nil, http.MethodPost, "/v1/plans", testfixture.J16Plan)), "service, demo catalog")
	assert.Equal(t, demoPlan, head(serve(seeded, http.MethodPost, "/v1/plans", testfixture.J16Plan)), "service, seeded store")
	out, err := runCmd(t, testfixture.J16Plan, "plan", "--data", noStore, "-")
	require.NoError(t, err)
	assert.Contains(t, out, "facility tsw-1 (demo catalog, version 1)")
}
