package sqlite_test

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"scalematch/facilities"
	"scalematch/facilities/catalogtest"
	"scalematch/facilities/sqlite"
)

// open opens a new catalog file in a directory of its own for one test.
var open = catalogtest.Opener(sqlite.Open, func(tb testing.TB) string {
	return filepath.Join(tb.TempDir(), "data", sqlite.FileName)
})

func TestCatalog(t *testing.T) {
	catalogtest.Run(t, open)
}

// TestReopen checks that a closed store opens again with its data, that the
// migrations are recorded once, and that a reopened store is not seeded again.
func TestReopen(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "nested", "dir", sqlite.FileName)
	db, err := sqlite.Open(ctx, path)
	if err != nil {
		t.Fatal(err)
	}
	if seeded, err := facilities.SeedDemo(ctx, db, true); err != nil || !seeded {
		t.Fatalf("first start: seeded %v, %v", seeded, err)
	}
	f, err := db.Facility(ctx, "tsw-1")
	if err != nil {
		t.Fatal(err)
	}
	f.Name = "edited before the restart"
	if _, err := db.UpdateFacility(ctx, f, f.Version, "staff"); err != nil {
		t.Fatal(err)
	}
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}

	db, err = sqlite.Open(ctx, path)
	if err != nil {
		t.Fatalf("reopening: %v", err)
	}
	defer db.Close()
	if seeded, err := facilities.SeedDemo(ctx, db, true); err != nil || seeded {
		t.Errorf("second start: seeded %v, %v; want no seed", seeded, err)
	}
	got, err := db.Facility(ctx, "tsw-1")
	if err != nil {
		t.Fatal(err)
	}
	if got.Version != 2 || got.Name != f.Name {
		t.Errorf("after reopening: version %d name %q, want 2 %q", got.Version, got.Name, f.Name)
	}
	fs, err := db.Facilities(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(fs) != len(facilities.Demo()) {
		t.Errorf("%d facilities after reopening, want %d", len(fs), len(facilities.Demo()))
	}
}

func TestOpenErrors(t *testing.T) {
	file := filepath.Join(t.TempDir(), "a-file")
	if err := os.WriteFile(file, []byte(strings.Repeat("not a database file ", 400)), 0o600); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		path string
	}{
		{"empty path", ""},
		{"query characters", filepath.Join(t.TempDir(), "x?mode=ro")},
		{"directory under a file", filepath.Join(file, sqlite.FileName)},
		{"not a database", file},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			db, err := sqlite.Open(context.Background(), tt.path)
			if err == nil {
				db.Close()
				t.Fatalf("Open(%q) succeeded", tt.path)
			}
		})
	}
}

func TestPath(t *testing.T) {
	if got, want := sqlite.Path("/srv/data"), filepath.Join("/srv/data", "catalog.db"); got != want {
		t.Errorf("Path = %q, want %q", got, want)
	}
}
