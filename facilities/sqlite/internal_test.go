package sqlite

import (
	"context"
	"errors"
	"path/filepath"
	"testing"

	"scalematch/facilities"
)

func openInternal(t *testing.T) *DB {
	t.Helper()
	db, err := Open(context.Background(), filepath.Join(t.TempDir(), FileName))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	return db
}

// TestFailureBeforeCommit fails each kind of write after all its statements ran,
// just before the commit, and checks that nothing of it remains.
func TestFailureBeforeCommit(t *testing.T) {
	ctx := context.Background()
	db := openInternal(t)
	f, _ := facilities.DemoFacility("lsw-2")
	if _, err := db.CreateFacility(ctx, f, "a"); err != nil {
		t.Fatal(err)
	}
	injected := errors.New("injected failure")
	db.beforeCommit = func(string) error { return injected }
	g, _ := facilities.DemoFacility("tsw-1")
	tests := []struct {
		name  string
		write func() error
	}{
		{"create", func() error { _, err := db.CreateFacility(ctx, g, "a"); return err }},
		{"update", func() error { f.Name = "changed"; _, err := db.UpdateFacility(ctx, f, 1, "a"); return err }},
		{"delete", func() error { return db.DeleteFacility(ctx, "lsw-2", 1, "a") }},
		{"save plan", func() error {
			_, err := db.SavePlan(ctx, facilities.PlanRecord{ID: "p", Body: []byte("{}")})
			return err
		}},
		{"seed", func() error { _, err := db.SeedOnce(ctx, facilities.Demo(), facilities.SeedActor); return err }},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if err := tt.write(); !errors.Is(err, injected) {
				t.Fatalf("write error = %v, want the injected failure", err)
			}
			var facilitiesRows, versionRows, planRows, metaRows int
			for q, dst := range map[string]*int{
				"SELECT count(*) FROM facilities":        &facilitiesRows,
				"SELECT count(*) FROM facility_versions": &versionRows,
				"SELECT count(*) FROM plans":             &planRows,
				"SELECT count(*) FROM store_meta":        &metaRows,
			} {
				if err := db.r.QueryRowContext(ctx, q).Scan(dst); err != nil {
					t.Fatal(err)
				}
			}
			if facilitiesRows != 1 || versionRows != 1 || planRows != 0 || metaRows != 0 {
				t.Errorf("rows after a failed %s: facilities %d, versions %d, plans %d, meta %d; want 1, 1, 0, 0",
					tt.name, facilitiesRows, versionRows, planRows, metaRows)
			}
			cur, err := db.Facility(ctx, "lsw-2")
			if err != nil || cur.Version != 1 || cur.Name == "changed" {
				t.Errorf("lsw-2 after a failed %s: %+v, %v; want version 1 unchanged", tt.name, cur.Version, err)
			}
		})
	}
}

// TestDurabilitySettings checks the pragmas that make an acknowledged write durable.
func TestDurabilitySettings(t *testing.T) {
	ctx := context.Background()
	db := openInternal(t)
	tests := []struct {
		pragma string
		want   string
	}{
		{"journal_mode", "wal"},
		{"synchronous", "2"}, // FULL
		{"foreign_keys", "1"},
		{"busy_timeout", "10000"},
	}
	for _, tt := range tests {
		t.Run(tt.pragma, func(t *testing.T) {
			var got string
			if err := db.w.QueryRowContext(ctx, "PRAGMA "+tt.pragma).Scan(&got); err != nil {
				t.Fatal(err)
			}
			if got != tt.want {
				t.Errorf("writer PRAGMA %s = %s, want %s", tt.pragma, got, tt.want)
			}
		})
	}
}
