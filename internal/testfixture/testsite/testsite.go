// Package testsite starts the whole service for tests that drive it from outside
// (the Go client, the HTML pages, the browser): the API and the pages over a
// seeded SQLite catalog, with one stored plan.
package testsite

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"runtime"
	"testing"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/pages"
	"scalematch/internal/testfixture"
)

// Site is a running test service.
type Site struct {
	*httptest.Server
	// PlanID is the id of the stored plan of examples/orrin-j16-tsw-1.json.
	PlanID string
}

// Start serves the API and the pages over a fresh demo catalog (DemoStore), stores
// the Orrin J16 example plan and stops the server when the test ends.
func Start(t testing.TB) Site {
	t.Helper()
	srv, err := api.New(api.Config{Catalog: DemoStore(t), Logger: testfixture.Quiet()})
	if err != nil {
		t.Fatalf("build the service: %v", err)
	}
	pg, err := pages.New(srv, testfixture.Quiet())
	if err != nil {
		t.Fatalf("build the pages: %v", err)
	}
	pg.Register(srv)
	ts := httptest.NewServer(srv.Handler())
	t.Cleanup(ts.Close)

	body, err := os.ReadFile(filepath.Join(repoRoot(), "examples", "orrin-j16-tsw-1.json"))
	if err != nil {
		t.Fatalf("read the example: %v", err)
	}
	resp, err := ts.Client().Post(ts.URL+"/v1/plans", "application/json", bytes.NewReader(body))
	if err != nil {
		t.Fatalf("store the example plan: %v", err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	if resp.StatusCode != http.StatusOK {
		t.Fatalf("store the example plan: status %d: %s", resp.StatusCode, b)
	}
	var plan struct {
		ID string `json:"id"`
	}
	if err := json.Unmarshal(b, &plan); err != nil || plan.ID == "" {
		t.Fatalf("the example plan's answer has no id (%v): %s", err, b)
	}
	return Site{Server: ts, PlanID: plan.ID}
}

// repoRoot is the repository's top directory, found from this file's place in it.
func repoRoot() string {
	_, file, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(file), "..", "..", "..")
}

// DemoStore opens a SQLite catalog in a temporary directory, seeds it with the
// demo facilities and closes it when the test ends.
func DemoStore(t testing.TB) *sqlite.DB {
	t.Helper()
	ctx := context.Background()
	db, err := sqlite.Open(ctx, filepath.Join(t.TempDir(), sqlite.FileName))
	if err != nil {
		t.Fatalf("open the test store: %v", err)
	}
	t.Cleanup(func() { db.Close() })
	if _, err := facilities.SeedDemo(ctx, db, true); err != nil {
		t.Fatalf("seed the demo facilities: %v", err)
	}
	return db
}
