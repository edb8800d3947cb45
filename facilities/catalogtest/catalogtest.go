// Package catalogtest is the shared test suite that every facilities.Catalog
// engine must pass: versions and optimistic concurrency, deletion with history kept,
// byte-exact idempotent plan records, concurrent writers and writes that fail midway.
package catalogtest

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/jobs"
	"scalematch/internal/jobs/jobstest"
)

// Opener returns the open function of Run and Bench for an engine: where names a
// new, empty store for one test (a file in its temporary directory, a schema of
// its own), open opens it, and the store is closed when the test ends, a failed
// Close failing the test.
func Opener[DB facilities.Catalog](open func(context.Context, string) (DB, error), where func(testing.TB) string) func(testing.TB) facilities.Catalog {
	return func(tb testing.TB) facilities.Catalog {
		tb.Helper()
		db, err := open(context.Background(), where(tb))
		require.NoError(tb, err)
		tb.Cleanup(func() { assert.NoError(tb, db.Close(), "Close") })
		return db
	}
}

// Engine is what an engine's stores give the shared suites: the catalog and
// the job queue.
type Engine interface {
	facilities.Catalog
	jobs.Store
}

// RunEngine runs the catalog suite (Run) and the job queue's (jobstest.Run) on
// an engine whose stores open with open on a new place (a file, a schema) that
// newPlace makes for each test.
func RunEngine[DB Engine](t *testing.T, open func(context.Context, string) (DB, error), newPlace func(testing.TB) string) {
	t.Run("Catalog", func(t *testing.T) { Run(t, Opener(open, newPlace)) })
	t.Run("Jobs", func(t *testing.T) { jobstest.Run(t, jobstest.Opener(open, newPlace)) })
}

// Run runs the suite. open must return a new, empty store for each call (the suite
// calls it once per subtest) and arrange for it to be closed and removed when t
// ends (Opener does); the suite does not close it.
func Run(t *testing.T, open func(testing.TB) facilities.Catalog) {
	tests := []struct {
		name string
		fn   func(*testing.T, facilities.Catalog)
	}{
		{"Empty", testEmpty},
		{"CreateRead", testCreateRead},
		{"CreateConflict", testCreateConflict},
		{"RefusesOutOfRange", testRefusesOutOfRange},
		{"List", testList},
		{"Update", testUpdate},
		{"Delete", testDelete},
		{"Recreate", testRecreate},
		{"Versions", testVersions},
		{"NotFound", testNotFound},
		{"Plans", testPlans},
		{"PlanIdempotent", testPlanIdempotent},
		{"PlanList", testPlanList},
		{"ConcurrentUpdates", testConcurrentUpdates},
		{"ConcurrentCreates", testConcurrentCreates},
		{"ConcurrentPlans", testConcurrentPlans},
		{"ConcurrentDistinctPlans", testConcurrentDistinctPlans},
		{"ConcurrentIdenticalPlans", testConcurrentIdenticalPlans},
		{"ConcurrentPlansCancelled", testConcurrentPlansCancelled},
		{"CancelledContext", testCancelledContext},
		{"FailMidway", testFailMidway},
		{"Seed", testSeed},
		{"SeedDisabled", testSeedDisabled},
		{"Ping", testPing},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			tt.fn(t, open(t))
		})
	}
}

// demo returns a demo facility by id, failing the test when it is missing.
func demo(t *testing.T, id string) facilities.Facility {
	t.Helper()
	f, ok := facilities.DemoFacility(id)
	require.True(t, ok, "demo facility %q", id)
	return f
}

func ptr(v float64) *float64 { return &v }

// sameFacility compares two facilities by their canonical JSON, ignoring Version.
func sameFacility(t *testing.T, got, want facilities.Facility) {
	t.Helper()
	a, err := facilities.CanonicalJSON(got)
	require.NoError(t, err)
	b, err := facilities.CanonicalJSON(want)
	require.NoError(t, err)
	assert.Equal(t, string(b), string(a), "facility, canonical JSON without the version")
}

func wantCode(t *testing.T, err error, code check.Code) {
	t.Helper()
	assert.Equal(t, code, check.ErrorCode(err), "error code of %v", err)
}

func mustCreate(t *testing.T, c facilities.Catalog, f facilities.Facility, by facilities.Actor) facilities.Facility {
	t.Helper()
	out, err := c.CreateFacility(context.Background(), f, by)
	require.NoError(t, err, "CreateFacility(%s)", f.ID)
	return out
}

func testEmpty(t *testing.T, c facilities.Catalog) {
	fs, err := c.Facilities(context.Background())
	require.NoError(t, err)
	assert.Len(t, fs, 0, "a new store lists %d facilities, want 0", len(fs))
}

func testCreateRead(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	in := demo(t, "tsw-1")
	in.Version = 42 // the store owns versions: a caller's value is ignored
	got := mustCreate(t, c, in, "facility-staff")
	assert.Equal(t, 1, got.Version, "created version = %d, want 1", got.Version)
	read, err := c.Facility(ctx, "tsw-1")
	require.NoError(t, err)
	assert.Equal(t, 1, read.Version, "read version = %d, want 1", read.Version)
	sameFacility(t, read, in)
	v1, err := c.FacilityVersion(ctx, "tsw-1", 1)
	require.NoError(t, err)
	assert.Equal(t, 1, v1.Version, "FacilityVersion(1).Version = %d, want 1", v1.Version)
	sameFacility(t, v1, in)
}

// testRefusesOutOfRange: a record with a value outside its documented range (a
// finite 1e308 s per point, which made every plan against it overflow) is refused
// on create and on update, naming the field, and leaves nothing behind.
func testRefusesOutOfRange(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	bad := demo(t, "tsw-1")
	ops := *bad.Operations
	ops.SecondsPerPoint = 1e308
	bad.Operations = &ops
	_, err := c.CreateFacility(ctx, bad, "a")
	wantCode(t, err, check.CodeInvalid)
	wantField(t, err, "operations.seconds_per_point")
	_, err = c.Versions(ctx, bad.ID)
	assert.Equal(t, check.CodeNotFound, check.ErrorCode(err), "a refused create leaves no history: %v", err)
	good := mustCreate(t, c, demo(t, "tsw-1"), "a")
	bad.Version = 0
	_, err = c.UpdateFacility(ctx, bad, good.Version, "a")
	wantCode(t, err, check.CodeInvalid)
	wantField(t, err, "operations.seconds_per_point")
	got, err := c.Facility(ctx, bad.ID)
	require.NoError(t, err)
	assert.Equal(t, good.Version, got.Version, "a refused update leaves the version")
	assert.Equal(t, demo(t, "tsw-1").Operations.SecondsPerPoint, got.Operations.SecondsPerPoint, "a refused update leaves seconds_per_point")
}

// wantField fails unless err is a domain error naming field.
func wantField(t *testing.T, err error, field string) {
	t.Helper()
	var de *check.Error
	require.ErrorAs(t, err, &de, "a domain error")
	names := make([]string, len(de.Fields))
	for i, f := range de.Fields {
		names[i] = f.Field
	}
	assert.Contains(t, names, field, "the fields %v names", err)
}

func testCreateConflict(t *testing.T, c facilities.Catalog) {
	f := demo(t, "lsw-2")
	mustCreate(t, c, f, "a")
	_, err := c.CreateFacility(context.Background(), f, "b")
	wantCode(t, err, check.CodeConflict)
	vs, err := c.Versions(context.Background(), f.ID)
	require.NoError(t, err)
	assert.Len(t, vs, 1, "a refused create left %d versions, want 1", len(vs))
}

func testList(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	for _, id := range []string{"wtn-04", "cn2-05", "lsw-2"} {
		mustCreate(t, c, demo(t, id), "a")
	}
	fs, err := c.Facilities(ctx)
	require.NoError(t, err)
	var ids []string
	for _, f := range fs {
		ids = append(ids, f.ID)
		assert.Equal(t, 1, f.Version, "%s listed at version %d, want 1", f.ID, f.Version)
	}
	assert.Equal(t, []string{"cn2-05", "lsw-2", "wtn-04"}, ids, "listed, ordered by id")
}

func testUpdate(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	f := mustCreate(t, c, demo(t, "lsw-2"), "alice")
	f.MaxDynamicPressure = ptr(4200)
	f.Balances[0].Limits.Normal = ptr(8500)
	got, err := c.UpdateFacility(ctx, f, 1, "bob")
	require.NoError(t, err)
	assert.Equal(t, 2, got.Version, "updated version = %d, want 2", got.Version)
	read, err := c.Facility(ctx, f.ID)
	require.NoError(t, err)
	assert.Equal(t, 2, read.Version, "read back version")
	assert.Equal(t, 4200.0, *read.MaxDynamicPressure, "read back q_max, Pa")
	assert.Equal(t, 8500.0, *read.Balances[0].Limits.Normal, "read back normal rating, N")

	// A second editor still holding version 1 must not overwrite the change.
	other := demo(t, "lsw-2")
	other.Name = "stale edit"
	_, err = c.UpdateFacility(ctx, other, 1, "carol")
	wantCode(t, err, check.CodePreconditionFailed)
	read, err = c.Facility(ctx, f.ID)
	require.NoError(t, err)
	assert.Equal(t, 2, read.Version, "a stale update leaves the version")
	assert.NotEqual(t, "stale edit", read.Name, "a stale update leaves the name")
	// An If-Match ahead of the store is stale too.
	_, err = c.UpdateFacility(ctx, other, 3, "carol")
	wantCode(t, err, check.CodePreconditionFailed)

	// The first version stays as it was.
	v1, err := c.FacilityVersion(ctx, f.ID, 1)
	require.NoError(t, err)
	sameFacility(t, v1, demo(t, "lsw-2"))
}

func testDelete(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	f := mustCreate(t, c, demo(t, "cn2-05"), "alice")
	mustCreate(t, c, demo(t, "wtn-04"), "alice")
	plan := facilities.PlanRecord{ID: "p-before-delete", FacilityID: f.ID, FacilityVersion: 1, Body: []byte(`{"id":"p-before-delete"}`)}
	_, err := c.SavePlan(ctx, plan)
	require.NoError(t, err)

	wantCode(t, c.DeleteFacility(ctx, f.ID, 2, "bob"), check.CodePreconditionFailed)
	require.NoError(t, c.DeleteFacility(ctx, f.ID, 1, "bob"))
	_, err = c.Facility(ctx, f.ID)
	wantCode(t, err, check.CodeNotFound)
	fs, err := c.Facilities(ctx)
	require.NoError(t, err)
	require.Len(t, fs, 1, "facilities after deleting cn2-05")
	assert.Equal(t, "wtn-04", fs[0].ID, "the facility left after deleting cn2-05")
	// History and plans stay readable.
	v1, err := c.FacilityVersion(ctx, f.ID, 1)
	require.NoError(t, err, "FacilityVersion of a deleted facility")
	sameFacility(t, v1, demo(t, "cn2-05"))
	p, err := c.Plan(ctx, plan.ID)
	require.NoError(t, err, "plan of a deleted facility")
	assert.Equal(t, string(plan.Body), string(p.Body), "plan body")
	vs, err := c.Versions(ctx, f.ID)
	require.NoError(t, err)
	require.Len(t, vs, 2, "history after delete")
	assert.Equal(t, []any{"delete", facilities.Actor("bob"), 2}, []any{vs[1].Action, vs[1].By, vs[1].Version}, "the second entry: action, by, version")
	assert.Nil(t, vs[1].Facility, "the deletion carries no facility")
	// The deletion itself has no facility to read.
	_, err = c.FacilityVersion(ctx, f.ID, 2)
	wantCode(t, err, check.CodeNotFound)
	// Changing or deleting a deleted facility finds nothing.
	_, err = c.UpdateFacility(ctx, f, 2, "bob")
	wantCode(t, err, check.CodeNotFound)
	wantCode(t, c.DeleteFacility(ctx, f.ID, 2, "bob"), check.CodeNotFound)
}

func testRecreate(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	f := mustCreate(t, c, demo(t, "plp-3"), "alice")
	require.NoError(t, c.DeleteFacility(ctx, f.ID, 1, "alice"))
	again := demo(t, "plp-3")
	again.Name = "rebuilt pressurised tunnel"
	got, err := c.CreateFacility(ctx, again, "dave")
	require.NoError(t, err, "creating a deleted id again")
	assert.Equal(t, 3, got.Version, "re-created version = %d, want 3 (numbers continue after the deletion)", got.Version)
	read, err := c.Facility(ctx, f.ID)
	require.NoError(t, err)
	assert.Equal(t, 3, read.Version, "read version")
	assert.Equal(t, again.Name, read.Name, "read name")
	vs, err := c.Versions(ctx, f.ID)
	require.NoError(t, err)
	var actions []string
	for _, v := range vs {
		actions = append(actions, v.Action)
	}
	assert.Equal(t, []string{"create", "delete", "create"}, actions, "actions")
}

func testVersions(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	start := time.Now().Add(-time.Minute)
	f := mustCreate(t, c, demo(t, "tsw-1"), "alice")
	f.Balances[1].Limits.PitchingMoment = ptr(2500)
	f.Balances[1].SafetyFactor = 2
	f, err := c.UpdateFacility(ctx, f, 1, "bob")
	require.NoError(t, err)
	f.Name = "transonic tunnel, rebuilt"
	f.MaxReynoldsPerMeter = ptr(40e6)
	_, err = c.UpdateFacility(ctx, f, 2, "carol")
	require.NoError(t, err)
	vs, err := c.Versions(ctx, f.ID)
	require.NoError(t, err)
	want := []struct {
		version int
		by      facilities.Actor
		action  string
		fields  []string
	}{
		{1, "alice", "create", nil}, // fields: every top-level field, checked below
		{2, "bob", "update", []string{"balances[1].limits.pitching_moment", "balances[1].safety_factor"}},
		{3, "carol", "update", []string{"max_reynolds_per_meter", "name"}},
	}
	require.Len(t, vs, len(want), "versions")
	for i, w := range want {
		v := vs[i]
		assert.Equal(t, []any{w.version, facilities.Actor(w.by), w.action}, []any{v.Version, v.By, v.Action}, "entry %d: version, by, action", i)
		if w.fields != nil {
			assert.Equal(t, w.fields, v.Fields, "version %d's changed fields", v.Version)
		}
		if assert.NotNil(t, v.Facility, "version %d carries its record", v.Version) {
			assert.Equal(t, w.version, v.Facility.Version, "version %d carries the record at that version", v.Version)
		}
		assert.WithinRange(t, v.At, start, time.Now().Add(time.Minute), "version %d recorded around now", v.Version)
		if i > 0 {
			assert.False(t, v.At.Before(vs[i-1].At), "version %d recorded before version %d", v.Version, vs[i-1].Version)
		}
	}
	for _, field := range []string{"id", "name", "medium", "test_section", "balances"} {
		assert.Contains(t, vs[0].Fields, field, "creation fields")
	}
	if vs[1].Facility != nil {
		assert.Equal(t, 2500.0, *vs[1].Facility.Balances[1].Limits.PitchingMoment, "version 2's pitching-moment limit, N·m")
	}
}

func testNotFound(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	mustCreate(t, c, demo(t, "lsw-2"), "a")
	_, err := c.Facility(ctx, "no-such")
	wantCode(t, err, check.CodeNotFound)
	_, err = c.FacilityVersion(ctx, "no-such", 1)
	wantCode(t, err, check.CodeNotFound)
	_, err = c.FacilityVersion(ctx, "lsw-2", 2)
	wantCode(t, err, check.CodeNotFound)
	_, err = c.FacilityVersion(ctx, "lsw-2", 0)
	wantCode(t, err, check.CodeNotFound)
	_, err = c.Versions(ctx, "no-such")
	wantCode(t, err, check.CodeNotFound)
	missing := demo(t, "tsw-1")
	_, err = c.UpdateFacility(ctx, missing, 1, "a")
	wantCode(t, err, check.CodeNotFound)
	wantCode(t, c.DeleteFacility(ctx, "no-such", 1, "a"), check.CodeNotFound)
	_, err = c.Plan(ctx, "no-such-plan")
	wantCode(t, err, check.CodeNotFound)
	_, err = c.CreateFacility(ctx, facilities.Facility{}, "a")
	wantCode(t, err, check.CodeInvalid)
	_, err = c.SavePlan(ctx, facilities.PlanRecord{Body: []byte(`{}`)})
	wantCode(t, err, check.CodeInvalid)
}

func testPlans(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	mustCreate(t, c, demo(t, "tsw-1"), "a")
	bodies := map[string][]byte{
		"spacing":   []byte("{\n  \"id\": \"spacing\",\n  \"mismatch\": {\"reynolds_ratio\": 0.2500}\n}\n"),
		"unicode":   []byte(`{"id":"unicode","note":"Re ≈ 3×10⁶, ΔM = 0.005 \u00e9"}`),
		"key-order": []byte(`{"z":1,"a":2,"id":"key-order","big":12345678901234567890}`),
		"empty":     {},
		// Begins with the stores' mark of a compressed body (a zero byte and
		// "s2"): it must still read back as given.
		"tagged": []byte("\x00s2 not a block"),
		// A plan answer, which the stores keep compressed.
		"answer": planAnswer,
	}
	created := time.Date(2031, 4, 2, 9, 30, 0, 123456000, time.UTC)
	for id, body := range bodies {
		rec := facilities.PlanRecord{ID: id, FacilityID: "tsw-1", FacilityVersion: 1, CreatedAt: created, Body: body}
		saved, err := c.SavePlan(ctx, rec)
		require.NoError(t, err, "SavePlan(%s)", id)
		assert.Equal(t, string(body), string(saved.Body), "SavePlan(%s) returned body", id)
	}
	for id, body := range bodies {
		p, err := c.Plan(ctx, id)
		require.NoError(t, err, "Plan(%s)", id)
		assert.Equal(t, string(body), string(p.Body), "Plan(%s) body, byte for byte", id)
		assert.Equal(t, []any{id, "tsw-1", 1}, []any{p.ID, p.FacilityID, p.FacilityVersion}, "Plan(%s): id, facility, version", id)
		assert.True(t, p.CreatedAt.Equal(created), "Plan(%s) created at %v, want %v", id, p.CreatedAt, created)
	}
	// A plan against an inline facility has no catalog id; a zero time is set.
	before := time.Now().Add(-time.Minute)
	p, err := c.SavePlan(ctx, facilities.PlanRecord{ID: "inline", Body: []byte(`{}`)})
	require.NoError(t, err)
	assert.WithinRange(t, p.CreatedAt, before, time.Now().Add(time.Minute), "a zero CreatedAt is stored as about now")
}

func testPlanIdempotent(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	first := facilities.PlanRecord{ID: "p1", FacilityID: "tsw-1", FacilityVersion: 1,
		CreatedAt: time.Date(2031, 1, 1, 0, 0, 0, 0, time.UTC), Body: []byte(`{"id":"p1","n":1}`)}
	_, err := c.SavePlan(ctx, first)
	require.NoError(t, err)
	second := facilities.PlanRecord{ID: "p1", FacilityID: "tsw-1", FacilityVersion: 2,
		CreatedAt: time.Date(2032, 1, 1, 0, 0, 0, 0, time.UTC), Body: []byte(`{"id":"p1","n":2}`)}
	got, err := c.SavePlan(ctx, second)
	require.NoError(t, err, "saving a plan id again")
	assert.Equal(t, string(first.Body), string(got.Body), "a second save answers the first record's body")
	assert.Equal(t, 1, got.FacilityVersion, "a second save answers the first record's facility version")
	assert.True(t, got.CreatedAt.Equal(first.CreatedAt), "a second save answers the first record's time, not %v", got.CreatedAt)
	read, err := c.Plan(ctx, "p1")
	require.NoError(t, err)
	assert.Equal(t, string(first.Body), string(read.Body), "the stored body is the first")
}

// testConcurrentUpdates runs writers that each read, change and write back one
// counter with If-Match, retrying on a stale version. Every version must have
// exactly one winner and the counter must show every acknowledged increment.
func testConcurrentUpdates(t *testing.T, c facilities.Catalog) {
	const writers, each = 6, 5
	ctx := context.Background()
	f := demo(t, "lsw-2")
	f.Operations.SecondsPerPoint = 0
	mustCreate(t, c, f, "a")

	var mu sync.Mutex
	winners := map[int]int{} // version → writer
	var stale atomic.Int64
	var wg sync.WaitGroup
	errs := make(chan error, writers)
	for w := 0; w < writers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			for done := 0; done < each; {
				cur, err := c.Facility(ctx, f.ID)
				if err != nil {
					errs <- err
					return
				}
				cur.Operations.SecondsPerPoint++
				got, err := c.UpdateFacility(ctx, cur, cur.Version, facilities.Actor(fmt.Sprintf("writer-%d", w)))
				if check.ErrorCode(err) == check.CodePreconditionFailed {
					stale.Add(1)
					continue
				}
				if err != nil {
					errs <- err
					return
				}
				mu.Lock()
				if prev, dup := winners[got.Version]; dup {
					errs <- fmt.Errorf("version %d acknowledged to writers %d and %d", got.Version, prev, w)
				}
				winners[got.Version] = w
				mu.Unlock()
				done++
			}
		}(w)
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		assert.NoError(t, err, "writer")
	}
	final, err := c.Facility(ctx, f.ID)
	require.NoError(t, err)
	assert.Equal(t, 1+writers*each, final.Version, "final version")
	assert.Len(t, winners, writers*each, "versions with a winner")
	assert.Equal(t, float64(writers*each), final.Operations.SecondsPerPoint, "counter after every acknowledged increment: none lost")
	vs, err := c.Versions(ctx, f.ID)
	require.NoError(t, err)
	for _, v := range vs[1:] {
		w, ok := winners[v.Version]
		assert.True(t, ok, "version %d acknowledged to a writer", v.Version)
		assert.Equal(t, facilities.Actor(fmt.Sprintf("writer-%d", w)), v.By, "version %d recorded by the writer it was acknowledged to", v.Version)
	}
	t.Logf("%d stale attempts refused", stale.Load())
}

func testConcurrentCreates(t *testing.T, c facilities.Catalog) {
	const writers = 6
	ctx := context.Background()
	var wins, conflicts atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < writers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			f := demo(t, "wtn-04")
			f.Name = fmt.Sprintf("writer %d", w)
			_, err := c.CreateFacility(ctx, f, facilities.Actor(f.Name))
			switch check.ErrorCode(err) {
			case "":
				if assert.NoError(t, err, "writer %d", w) {
					wins.Add(1)
				}
			case check.CodeConflict:
				conflicts.Add(1)
			default:
				assert.Fail(t, "a create that neither won nor conflicted", "writer %d: %v", w, err)
			}
		}(w)
	}
	wg.Wait()
	assert.Equal(t, int64(1), wins.Load(), "creates that won")
	assert.Equal(t, int64(writers-1), conflicts.Load(), "creates that conflicted")
	vs, err := c.Versions(ctx, "wtn-04")
	require.NoError(t, err)
	assert.Len(t, vs, 1, "%d versions after concurrent creates, want 1", len(vs))
}

func testConcurrentPlans(t *testing.T, c facilities.Catalog) {
	const writers = 6
	ctx := context.Background()
	got := make([][]byte, writers)
	var wg sync.WaitGroup
	for w := 0; w < writers; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			p, err := c.SavePlan(ctx, facilities.PlanRecord{ID: "same", Body: []byte(fmt.Sprintf(`{"writer":%d}`, w))})
			if !assert.NoError(t, err, "writer %d", w) {
				return
			}
			got[w] = p.Body
		}(w)
	}
	wg.Wait()
	stored, err := c.Plan(ctx, "same")
	require.NoError(t, err)
	for w, b := range got {
		if b != nil {
			assert.Equal(t, string(stored.Body), string(b), "writer %d's answer: the body the store keeps", w)
		}
	}
}

// testConcurrentDistinctPlans saves many different plans at once, as the writers of
// a busy service or a batch do (a store may commit them together): every writer
// is answered with its own record, and every record is stored byte for byte.
// Every third body is as long as a plan answer's part, so that a store which
// compresses bodies in buffers it reuses is held to each body as well.
func testConcurrentDistinctPlans(t *testing.T, c facilities.Catalog) {
	const writers = 96
	ctx := context.Background()
	got := make([]facilities.PlanRecord, writers)
	body := func(w int) string {
		if w%3 == 0 {
			return fmt.Sprintf(`{"writer":%d,"rows":"%s"}`, w, strings.Repeat(fmt.Sprintf("%d:%x;", w, w*w), 400+w))
		}
		return fmt.Sprintf(`{"writer":%d}`, w)
	}
	var wg sync.WaitGroup
	for w := range writers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			p, err := c.SavePlan(ctx, facilities.PlanRecord{ID: fmt.Sprintf("distinct-%02d", w), FacilityID: "tsw-1",
				FacilityVersion: w%3 + 1, Body: []byte(body(w))})
			if !assert.NoError(t, err, "writer %d", w) {
				return
			}
			got[w] = p
		}()
	}
	wg.Wait()
	for w := range writers {
		id, body := fmt.Sprintf("distinct-%02d", w), body(w)
		assert.Equal(t, []any{id, body, w%3 + 1}, []any{got[w].ID, string(got[w].Body), got[w].FacilityVersion},
			"writer %d's answer: id, body, facility version", w)
		stored, err := c.Plan(ctx, id)
		if !assert.NoError(t, err, "plan %s acknowledged and stored", id) {
			continue
		}
		assert.Equal(t, []any{body, "tsw-1", w%3 + 1}, []any{string(stored.Body), stored.FacilityID, stored.FacilityVersion},
			"plan %s stored: body, facility, version", id)
		assert.True(t, stored.CreatedAt.Equal(got[w].CreatedAt), "plan %s stored at %v, answered at %v", id, stored.CreatedAt, got[w].CreatedAt)
	}
}

// testConcurrentIdenticalPlans saves one id from many writers at once, with
// different bodies, and again after it is stored: one of the bodies is kept, and
// every writer, early or late, is answered with exactly that record.
func testConcurrentIdenticalPlans(t *testing.T, c facilities.Catalog) {
	const writers = 48
	ctx := context.Background()
	got := make([]facilities.PlanRecord, 2*writers)
	for round := range 2 {
		var wg sync.WaitGroup
		for w := range writers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				i := round*writers + w
				p, err := c.SavePlan(ctx, facilities.PlanRecord{ID: "identical", FacilityID: "lsw-2", FacilityVersion: 1,
					Body: []byte(fmt.Sprintf(`{"writer":%d}`, i))})
				if !assert.NoError(t, err, "writer %d", i) {
					return
				}
				got[i] = p
			}()
		}
		wg.Wait()
	}
	stored, err := c.Plan(ctx, "identical")
	require.NoError(t, err)
	var first int
	_, err = fmt.Sscanf(string(stored.Body), `{"writer":%d}`, &first)
	assert.NoError(t, err, "stored body %q", stored.Body)
	assert.Less(t, first, writers, "the stored body %q is one of the first round's", stored.Body)
	for i, p := range got {
		assert.Equal(t, string(stored.Body), string(p.Body), "writer %d's answer: the body the store keeps", i)
		assert.True(t, p.CreatedAt.Equal(stored.CreatedAt), "writer %d answered at %v, the store keeps %v", i, p.CreatedAt, stored.CreatedAt)
	}
}

// testConcurrentPlansCancelled saves plans from many writers while some of them
// give up at once: a writer that gets no error must find its plan stored, one that
// gets an error must get its context's, and the others are not disturbed.
func testConcurrentPlansCancelled(t *testing.T, c facilities.Catalog) {
	const writers = 40
	bg := context.Background()
	errs := make([]error, writers)
	var wg sync.WaitGroup
	for w := range writers {
		ctx, cancel := context.WithCancel(bg)
		if w%4 == 0 {
			cancel()
		}
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer cancel()
			if w%4 == 1 {
				go cancel() // gives up while the others queue and commit
			}
			_, errs[w] = c.SavePlan(ctx, facilities.PlanRecord{ID: fmt.Sprintf("maybe-%02d", w), Body: []byte(fmt.Sprintf(`{"w":%d}`, w))})
		}()
	}
	wg.Wait()
	for w, err := range errs {
		id := fmt.Sprintf("maybe-%02d", w)
		stored, perr := c.Plan(bg, id)
		if err == nil {
			if assert.NoError(t, perr, "writer %d was acknowledged: %s stored", w, id) {
				assert.Equal(t, fmt.Sprintf(`{"w":%d}`, w), string(stored.Body), "writer %d's stored body", w)
			}
			continue
		}
		assert.ErrorIs(t, err, context.Canceled, "writer %d: success or its context's error", w)
		assert.LessOrEqual(t, w%4, 1, "writer %d was never cancelled but failed: %v", w, err)
	}
}

func testCancelledContext(t *testing.T, c facilities.Catalog) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := c.CreateFacility(ctx, demo(t, "lsw-2"), "a")
	assert.Error(t, err, "CreateFacility with a cancelled context")
	_, err = c.SavePlan(ctx, facilities.PlanRecord{ID: "p", Body: []byte(`{}`)})
	assert.Error(t, err, "SavePlan with a cancelled context")
	bg := context.Background()
	_, err = c.Facility(bg, "lsw-2")
	wantCode(t, err, check.CodeNotFound)
	_, err = c.Plan(bg, "p")
	wantCode(t, err, check.CodeNotFound)
}

// cutContext is a context that cancels itself at its n-th look (Err or Done), so a
// write is cut at a different point inside its transaction for each n.
type cutContext struct {
	context.Context
	cancel context.CancelFunc
	left   atomic.Int64
}

func newCut(n int64) *cutContext {
	ctx, cancel := context.WithCancel(context.Background())
	c := &cutContext{Context: ctx, cancel: cancel}
	c.left.Store(n)
	return c
}

func (c *cutContext) look() {
	if c.left.Add(-1) < 0 {
		c.cancel()
	}
}

func (c *cutContext) Done() <-chan struct{} { c.look(); return c.Context.Done() }
func (c *cutContext) Err() error            { c.look(); return c.Context.Err() }

// snapshot is everything the suite can see of one facility and one plan.
type snapshot struct {
	version  int
	body     string
	versions int
	lastBody string
	plan     string
}

func take(t *testing.T, c facilities.Catalog, id, planID string) snapshot {
	t.Helper()
	ctx := context.Background()
	var s snapshot
	f, err := c.Facility(ctx, id)
	if check.ErrorCode(err) != check.CodeNotFound {
		require.NoError(t, err)
	}
	if err == nil {
		s.version = f.Version
		b, _ := facilities.CanonicalJSON(f)
		s.body = string(b)
	}
	vs, err := c.Versions(ctx, id)
	if check.ErrorCode(err) != check.CodeNotFound {
		require.NoError(t, err)
	}
	s.versions = len(vs)
	if len(vs) > 0 && vs[len(vs)-1].Facility != nil {
		b, _ := facilities.CanonicalJSON(*vs[len(vs)-1].Facility)
		s.lastBody = string(b)
	}
	p, err := c.Plan(ctx, planID)
	if check.ErrorCode(err) != check.CodeNotFound {
		require.NoError(t, err)
	}
	s.plan = string(p.Body)
	return s
}

// settle returns the state after a write. A write cut while its commit was on the
// wire may still land after the caller gave up, so after an error it waits until
// two looks 50 ms apart agree.
func settle(t *testing.T, c facilities.Catalog, id, planID string, err error) snapshot {
	t.Helper()
	s := take(t, c, id, planID)
	if err == nil {
		return s
	}
	for range 40 {
		time.Sleep(50 * time.Millisecond)
		next := take(t, c, id, planID)
		if next == s {
			return s
		}
		s = next
	}
	require.Fail(t, "the store did not settle within 2 s after a cut write")
	return s
}

// testFailMidway cuts writes at every point the store looks at its context, from
// before the transaction starts to after it commits. Each cut must leave either
// the whole write or nothing: never a version row without its facility, a
// facility at a version with no row, or a half-stored plan. A write that returned
// no error must be there.
func testFailMidway(t *testing.T, c facilities.Catalog) {
	base := demo(t, "tsw-1")
	mustCreate(t, c, base, "a")
	type write struct {
		name string
		do   func(ctx context.Context, s snapshot) error
		// after is the state the whole write leaves, given the state before.
		after func(s snapshot) snapshot
	}
	var n int
	writes := []write{
		{"update", func(ctx context.Context, s snapshot) error {
			f := base
			n++
			f.Name = fmt.Sprintf("edit %d", n)
			_, err := c.UpdateFacility(ctx, f, s.version, "cutter")
			return err
		}, nil},
		{"save plan", func(ctx context.Context, s snapshot) error {
			n++
			_, err := c.SavePlan(ctx, facilities.PlanRecord{ID: fmt.Sprintf("cut-%d", n), FacilityID: base.ID,
				FacilityVersion: s.version, Body: []byte(fmt.Sprintf(`{"n":%d}`, n))})
			return err
		}, nil},
		{"delete", func(ctx context.Context, s snapshot) error {
			return c.DeleteFacility(ctx, base.ID, s.version, "cutter")
		}, nil},
	}
	for _, w := range writes {
		t.Run(w.name, func(t *testing.T) {
			for cut := int64(0); ; cut++ {
				require.LessOrEqual(t, cut, int64(500), "looks at its context before the write completed")
				planID := fmt.Sprintf("cut-%d", n+1)
				before := take(t, c, base.ID, planID)
				err := w.do(newCut(cut), before)
				after := settle(t, c, base.ID, planID, err)
				changed := after != before
				switch w.name {
				case "update":
					require.False(t, changed && (after.version != before.version+1 || after.versions != before.versions+1 || after.body != after.lastBody),
						"cut %d left a torn update: before %+v after %+v", cut, before, after)
				case "save plan":
					require.False(t, changed && (after.plan == "" || after.version != before.version || after.versions != before.versions),
						"cut %d left a torn plan save: before %+v after %+v", cut, before, after)
				case "delete":
					require.False(t, changed && (after.version != 0 || after.versions != before.versions+1),
						"cut %d left a torn delete: before %+v after %+v", cut, before, after)
				}
				require.False(t, err == nil && !changed, "cut %d: the write was acknowledged but is not in the store", cut)
				if err != nil && !errors.Is(err, context.Canceled) && check.ErrorCode(err) == "" {
					t.Logf("cut %d: %v", cut, err)
				}
				if changed {
					// Done: acknowledged, or landed although the caller was cut off.
					t.Logf("the write landed after %d cuts (error: %v)", cut, err)
					return
				}
			}
		})
	}
}

// testSeed checks the once-only seed of stores that implement facilities.Seeder.
func testSeed(t *testing.T, c facilities.Catalog) {
	s, ok := c.(facilities.Seeder)
	if !ok {
		t.Skipf("%T does not record seeds", c)
	}
	ctx := context.Background()
	seeded, err := facilities.SeedDemo(ctx, c, true)
	require.NoError(t, err)
	require.True(t, seeded, "the first start of an empty store is seeded")
	fs, err := c.Facilities(ctx)
	require.NoError(t, err)
	assert.Len(t, fs, len(facilities.Demo()), "seeded %d facilities, want %d", len(fs), len(facilities.Demo()))
	vs, err := c.Versions(ctx, fs[0].ID)
	require.NoError(t, err)
	assert.Equal(t, facilities.SeedActor, vs[0].By, "seed recorded as by %q, want %q", vs[0].By, facilities.SeedActor)
	for _, f := range fs {
		require.NoError(t, c.DeleteFacility(ctx, f.ID, f.Version, "staff"))
	}
	again, err := s.SeedOnce(ctx, facilities.Demo(), facilities.SeedActor)
	require.NoError(t, err)
	fs, err = c.Facilities(ctx)
	require.NoError(t, err)
	assert.False(t, again, "a second start seeds again")
	assert.Empty(t, fs, "deleted demo facilities stay deleted")
}

// testSeedDisabled checks that a first start without the demo catalog (--no-demo)
// is recorded too, so a later start with it does not fill a store in use.
func testSeedDisabled(t *testing.T, c facilities.Catalog) {
	if _, ok := c.(facilities.Seeder); !ok {
		t.Skipf("%T does not record seeds", c)
	}
	ctx := context.Background()
	for i, demo := range []bool{false, true} {
		seeded, err := facilities.SeedDemo(ctx, c, demo)
		require.NoError(t, err)
		assert.False(t, seeded, "start %d (demo %v) seeds the demo catalog", i+1, demo)
	}
	fs, err := c.Facilities(ctx)
	require.NoError(t, err)
	assert.Len(t, fs, 0, "%d facilities after a first start with --no-demo, want 0", len(fs))
}

func testPing(t *testing.T, c facilities.Catalog) {
	assert.NoError(t, c.Ping(context.Background()), "Ping")
}

// testPlanList: plan records listed newest first by facility, label and
// creation time, in pages that follow one another without a gap or a repeat.
func testPlanList(t *testing.T, c facilities.Catalog) {
	ctx := context.Background()
	pl, ok := c.(facilities.PlanLister)
	require.True(t, ok, "%T lists plans (facilities.PlanLister)", c)
	base := time.Date(2031, 4, 2, 9, 0, 0, 0, time.UTC)
	recs := []facilities.PlanRecord{
		{ID: "p0", FacilityID: "tsw-1", FacilityVersion: 1, Label: "cruise", CreatedAt: base},
		{ID: "p1", FacilityID: "cn2-05", FacilityVersion: 1, Label: "cruise", CreatedAt: base.Add(time.Minute)},
		{ID: "p2", FacilityID: "tsw-1", FacilityVersion: 2, CreatedAt: base.Add(2 * time.Minute)},
		// Two records of one instant: the id orders them.
		{ID: "p3a", FacilityID: "tsw-1", FacilityVersion: 2, Label: "climb", CreatedAt: base.Add(3 * time.Minute)},
		{ID: "p3b", Label: "climb", CreatedAt: base.Add(3 * time.Minute)},
		{ID: "p4", FacilityID: "cn2-05", FacilityVersion: 1, CreatedAt: base.Add(4 * time.Minute)},
	}
	for _, r := range recs {
		r.Body = []byte(`{"id":"` + r.ID + `"}`)
		_, err := c.SavePlan(ctx, r)
		require.NoError(t, err)
	}
	list := func(q facilities.ListQuery) []string {
		t.Helper()
		var ids []string
		for range 20 {
			page, next, err := pl.Plans(ctx, q)
			require.NoError(t, err)
			for _, p := range page {
				assert.Nil(t, p.Body, "listing %s read its body", p.ID)
				ids = append(ids, p.ID)
			}
			if next == "" {
				return ids
			}
			q.Cursor = next
		}
		require.Fail(t, "the listing never ended")
		return nil
	}
	same := func(name string, got, want []string) {
		t.Helper()
		assert.Equal(t, want, got, "%s: %v, want %v", name, got, want)
	}
	all := []string{"p4", "p3b", "p3a", "p2", "p1", "p0"}
	same("all", list(facilities.ListQuery{}), all)
	for limit := 1; limit <= 3; limit++ {
		same(fmt.Sprintf("pages of %d", limit), list(facilities.ListQuery{Limit: limit}), all)
	}
	same("tsw-1", list(facilities.ListQuery{Facility: "tsw-1", Limit: 2}), []string{"p3a", "p2", "p0"})
	same("climb", list(facilities.ListQuery{Label: "climb", Limit: 1}), []string{"p3b", "p3a"})
	same("cruise in cn2-05", list(facilities.ListQuery{Label: "cruise", Facility: "cn2-05"}), []string{"p1"})
	same("time range", list(facilities.ListQuery{Since: base.Add(time.Minute), Until: base.Add(3 * time.Minute)}), []string{"p2", "p1"})
	page, _, err := pl.Plans(ctx, facilities.ListQuery{Limit: 1})
	require.NoError(t, err)
	require.Len(t, page, 1, "a page of one plan")
	p := page[0]
	assert.Equal(t, []any{"p4", "cn2-05", 1}, []any{p.ID, p.FacilityID, p.FacilityVersion}, "listed plan: id, facility, version")
	assert.True(t, p.CreatedAt.Equal(base.Add(4*time.Minute)), "listed plan created at %v, want %v", p.CreatedAt, base.Add(4*time.Minute))
	got, err := c.Plan(ctx, "p3a")
	assert.NoError(t, err, "Plan(p3a)")
	assert.Equal(t, "climb", got.Label, "Plan(p3a) label")
	for _, bad := range []facilities.ListQuery{{Cursor: "!"}, {Limit: -2}, {Limit: facilities.MaxListLimit + 1}} {
		_, _, err := pl.Plans(ctx, bad)
		wantCode(t, err, check.CodeInvalid)
	}
}
