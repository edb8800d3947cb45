package sqlite

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/internal/sqlstore"
)

// hooks returns the shared store's insides under db.
func hooks(db *DB) sqlstore.Hooks { return sqlstore.HooksOf(db.store) }

func openInternal(t *testing.T) *DB {
	t.Helper()
	db, err := Open(context.Background(), filepath.Join(t.TempDir(), FileName))
	require.NoError(t, err)
	t.Cleanup(func() { db.Close() })
	return db
}

// TestFailureBeforeCommit fails each kind of write after all its statements ran,
// just before the commit, and checks that nothing of it remains.
func TestFailureBeforeCommit(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db := openInternal(t)
	f, _ := facilities.DemoFacility("lsw-2")
	_, err := db.CreateFacility(ctx, f, "a")
	require.NoError(t, err)
	injected := errors.New("injected failure")
	*hooks(db).BeforeCommit = func(string) error { return injected }
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
	// The cases run one after another on one store: each checks that the one
	// before it left nothing behind.
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			require.ErrorIs(t, tt.write(), injected, "write error")
			var facilitiesRows, versionRows, planRows, metaRows int
			for q, dst := range map[string]*int{
				"SELECT count(*) FROM facilities":        &facilitiesRows,
				"SELECT count(*) FROM facility_versions": &versionRows,
				"SELECT count(*) FROM plans":             &planRows,
				"SELECT count(*) FROM store_meta":        &metaRows,
			} {
				require.NoError(t, db.r.QueryRowContext(ctx, q).Scan(dst), q)
			}
			assert.Equal(t, [4]int{1, 1, 0, 0}, [4]int{facilitiesRows, versionRows, planRows, metaRows},
				"rows of facilities, versions, plans, meta after a failed %s", tt.name)
			cur, err := db.Facility(ctx, "lsw-2")
			require.NoError(t, err)
			assert.Equal(t, 1, cur.Version, "lsw-2's version after a failed %s", tt.name)
			assert.NotEqual(t, "changed", cur.Name, "lsw-2's name after a failed %s", tt.name)
		})
	}
}

// TestDurabilitySettings checks the pragmas that make an acknowledged write durable.
func TestDurabilitySettings(t *testing.T) {
	t.Parallel()
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
			require.NoError(t, db.w.QueryRowContext(ctx, "PRAGMA "+tt.pragma).Scan(&got))
			assert.Equal(t, tt.want, got, "writer PRAGMA %s", tt.pragma)
		})
	}
}

// TestGroupCommit holds the first plan's transaction open until many more
// SavePlan calls have queued, then checks that they were written together in one
// more transaction, and that a failure of a group's transaction fails every call
// in that group and stores none of them.
func TestGroupCommit(t *testing.T) {
	t.Parallel()
	const queued = 20
	tests := []struct {
		name       string
		secondErr  error // what the second group's commit hook returns
		wantStored int
	}{
		{"commits", nil, 1 + queued},
		{"fails together", errors.New("injected failure"), 1},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			ctx := context.Background()
			db := openInternal(t)
			release := make(chan struct{})
			entered := make(chan struct{})
			calls := 0
			*hooks(db).BeforeCommit = func(op string) error {
				calls++ // the committer runs one group at a time
				if calls == 1 {
					close(entered)
					<-release
					return nil
				}
				return tt.secondErr
			}
			first := make(chan error, 1)
			go func() {
				_, err := db.SavePlan(ctx, facilities.PlanRecord{ID: "first", Body: []byte(`{}`)})
				first <- err
			}()
			<-entered
			errs := make(chan error, queued)
			for i := range queued {
				go func() {
					_, err := db.SavePlan(ctx, facilities.PlanRecord{ID: fmt.Sprintf("queued-%d", i), Body: []byte(`{}`)})
					errs <- err
				}()
			}
			// Wait until all of them are queued behind the held transaction.
			require.Eventually(t, func() bool { return hooks(db).Plans.Queued() == queued }, 30*time.Second, time.Millisecond,
				"%d plans queued", queued)
			close(release)
			require.NoError(t, <-first, "first plan")
			for range queued {
				if err := <-errs; tt.secondErr == nil {
					assert.NoError(t, err, "queued plan")
				} else {
					assert.ErrorIs(t, err, tt.secondErr, "queued plan")
				}
			}
			g, r := hooks(db).Plans.Stats()
			assert.Equal(t, [2]int64{2, 1 + queued}, [2]int64{g, r}, "transactions and records")
			var stored int
			require.NoError(t, db.r.QueryRowContext(ctx, "SELECT count(*) FROM plans").Scan(&stored))
			assert.Equal(t, tt.wantStored, stored, "plans stored")
		})
	}
}

// TestSavePlanAfterClose checks that a closed store refuses plans with an error.
func TestSavePlanAfterClose(t *testing.T) {
	t.Parallel()
	db := openInternal(t)
	require.NoError(t, db.Close())
	_, err := db.SavePlan(context.Background(), facilities.PlanRecord{ID: "late", Body: []byte(`{}`)})
	assert.ErrorIs(t, err, hooks(db).Closed, "SavePlan after Close")
}

// TestPlanStoredBeforeCompression reads a plan row written as the store wrote
// them before bodies were compressed (the JSON itself in plans.body): it reads
// back byte for byte, and a new plan's row is compressed.
func TestPlanStoredBeforeCompression(t *testing.T) {
	t.Parallel()
	db := openInternal(t)
	ctx := context.Background()
	body := []byte(`{"id":"old","mismatch":{"reynolds_ratio":0.25},"notes":["` + strings.Repeat("an old plan ", 100) + `"]}`)
	_, err := db.w.ExecContext(ctx, `INSERT INTO plans (id, facility_id, facility_version, body, created_us) VALUES ('old', 'tsw-1', 1, ?, 0)`, body)
	require.NoError(t, err)
	p, err := db.Plan(ctx, "old")
	require.NoError(t, err)
	assert.Equal(t, string(body), string(p.Body))

	_, err = db.SavePlan(ctx, facilities.PlanRecord{ID: "new", FacilityID: "tsw-1", FacilityVersion: 1, Body: body})
	require.NoError(t, err)
	var stored []byte
	require.NoError(t, db.w.QueryRowContext(ctx, `SELECT body FROM plans WHERE id = 'new'`).Scan(&stored))
	assert.Less(t, len(stored), len(body)/4, "a new row's body is stored compressed")
	p, err = db.Plan(ctx, "new")
	require.NoError(t, err)
	assert.Equal(t, string(body), string(p.Body))
}
