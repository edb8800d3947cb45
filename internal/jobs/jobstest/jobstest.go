// Package jobstest is the shared test suite that every jobs.Store passes:
// claims that never take one job twice, also from racing processes, leases
// that expire and are taken over, fenced writes of a worker whose lease is
// lost, cancellation, results written with their state, listings, and the
// Worker over the store.
package jobstest

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"slices"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/jobs"
)

// Opener returns the open function Run and Bench take for an engine whose
// stores open with openStore on a place (a file, a schema) that newPlace makes
// for one test: each call of the function it returns opens one more store on
// that place, as another process sharing it would, closed when the test ends.
func Opener[S interface {
	jobs.Store
	Close() error
}](openStore func(ctx context.Context, place string) (S, error), newPlace func(testing.TB) string) func(testing.TB) func() jobs.Store {
	return func(tb testing.TB) func() jobs.Store {
		place := newPlace(tb)
		return func() jobs.Store {
			s, err := openStore(context.Background(), place)
			require.NoError(tb, err)
			tb.Cleanup(func() { require.NoError(tb, s.Close()) })
			return s
		}
	}
}

// Run runs the suite. open must create a new, empty database for each call
// (the suite calls it once per subtest) and return a function that opens one
// more store on that database, as another process would; every store opened
// is closed when the test ends.
func Run(t *testing.T, open func(testing.TB) func() jobs.Store) {
	tests := []struct {
		name string
		fn   func(*testing.T, func() jobs.Store)
	}{
		{"EnqueueRead", testEnqueueRead},
		{"Record", testRecord},
		{"ClaimOldestOfKinds", testClaimOldestOfKinds},
		{"ClaimRace", testClaimRace},
		{"LeaseExpiry", testLeaseExpiry},
		{"Heartbeat", testHeartbeat},
		{"Cancel", testCancel},
		{"FailRelease", testFailRelease},
		{"List", testList},
		{"Workers", testWorkers},
		{"WorkerTakeover", testWorkerTakeover},
		{"WorkerCancel", testWorkerCancel},
		{"WorkerShutdown", testWorkerShutdown},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			tt.fn(t, open(t))
		})
	}
}

func codeOf(err error) check.Code { return check.ErrorCode(err) }

func enqueue(t *testing.T, s jobs.Store, id, kind string) jobs.Job {
	t.Helper()
	j, err := s.Enqueue(context.Background(), jobs.Job{ID: id, Kind: kind, Request: []byte(`{"n":3}`), Total: 3})
	require.NoError(t, err)
	return j
}

func testEnqueueRead(t *testing.T, open func() jobs.Store) {
	s := open()
	ctx := context.Background()
	in := jobs.Job{ID: "j1", Kind: "sum", Request: []byte(`{"n":5}`), Summary: []byte(`{"conditions":5}`),
		Facilities: []string{"tsw-1", "cn2-05"}, Labels: []string{"cruise"}, Total: 5,
		State: jobs.Done, Result: []byte("ignored"), Attempt: 9}
	got, err := s.Enqueue(ctx, in)
	require.NoError(t, err)
	assert.Equal(t, jobs.Queued, got.State, "a new job is queued whatever the caller says")
	assert.Zero(t, got.Attempt)
	assert.False(t, got.CreatedAt.IsZero())
	read, err := s.Job(ctx, "j1")
	require.NoError(t, err)
	assert.Equal(t, "sum", read.Kind)
	assert.Equal(t, jobs.Queued, read.State)
	assert.JSONEq(t, `{"n":5}`, string(read.Request))
	assert.JSONEq(t, `{"conditions":5}`, string(read.Summary))
	assert.Equal(t, 5, read.Total)
	assert.Zero(t, read.Done)
	assert.Nil(t, read.Result)
	assert.Nil(t, read.Problem)
	assert.True(t, read.LeaseUntil.IsZero())
	assert.True(t, read.CreatedAt.Equal(got.CreatedAt), "created %v, read back %v", got.CreatedAt, read.CreatedAt)

	_, err = s.Enqueue(ctx, jobs.Job{ID: "j1", Kind: "sum", Request: []byte(`{}`)})
	assert.Equal(t, check.CodeConflict, codeOf(err), "a second job with one id: %v", err)
	_, err = s.Enqueue(ctx, jobs.Job{Kind: "sum"})
	assert.Equal(t, check.CodeInvalid, codeOf(err), "no id: %v", err)
	_, err = s.Job(ctx, "nope")
	assert.Equal(t, check.CodeNotFound, codeOf(err), "unknown id: %v", err)
}

// testRecord: a job run at once is stored done with its result, listed, and
// never claimed.
func testRecord(t *testing.T, open func() jobs.Store) {
	s := open()
	ctx := context.Background()
	got, err := s.Record(ctx, jobs.Job{ID: "now", Kind: "sum", Request: []byte(`{"n":2}`), Total: 2,
		Result: []byte(`{"sum":5}`), Facilities: []string{"tsw-1"}, State: jobs.Queued})
	require.NoError(t, err)
	assert.Equal(t, jobs.Done, got.State)
	read, err := s.Job(ctx, "now")
	require.NoError(t, err)
	assert.Equal(t, jobs.Done, read.State)
	assert.Equal(t, 2, read.Done)
	assert.Equal(t, 2, read.Total)
	assert.JSONEq(t, `{"sum":5}`, string(read.Result))
	_, ok, err := s.Claim(ctx, "w", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	assert.False(t, ok, "a recorded job is finished")
	page, _, err := s.Jobs(ctx, jobs.Query{ListQuery: facilities.ListQuery{Facility: "tsw-1"}})
	require.NoError(t, err)
	require.Len(t, page, 1)
	assert.Equal(t, jobs.Done, page[0].State)
	_, err = s.Record(ctx, jobs.Job{ID: "now", Kind: "sum"})
	assert.Equal(t, check.CodeConflict, codeOf(err))
	_, err = s.Cancel(ctx, "now")
	assert.Equal(t, check.CodeConflict, codeOf(err), "a recorded job cannot be cancelled")
}

func testClaimOldestOfKinds(t *testing.T, open func() jobs.Store) {
	s := open()
	ctx := context.Background()
	_, ok, err := s.Claim(ctx, "w1", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	assert.False(t, ok, "an empty queue has nothing to claim")
	enqueue(t, s, "a", "other")
	enqueue(t, s, "b", "sum")
	enqueue(t, s, "c", "sum")
	j, ok, err := s.Claim(ctx, "w1", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok)
	assert.Equal(t, "b", j.ID, "the oldest job of the kinds asked for")
	assert.Equal(t, jobs.Running, j.State)
	assert.Equal(t, "w1", j.Owner)
	assert.Equal(t, 1, j.Attempt)
	assert.JSONEq(t, `{"n":3}`, string(j.Request), "a claim returns the request")
	assert.WithinDuration(t, time.Now().Add(time.Minute), j.LeaseUntil, 30*time.Second)
	j, ok, err = s.Claim(ctx, "w2", []string{"sum", "other"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok)
	assert.Equal(t, "a", j.ID)
	j, ok, err = s.Claim(ctx, "w2", []string{"sum", "other"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok)
	assert.Equal(t, "c", j.ID)
	_, ok, err = s.Claim(ctx, "w3", []string{"sum", "other"}, time.Minute)
	require.NoError(t, err)
	assert.False(t, ok, "every job is held under a live lease")
}

// testClaimRace: several stores on one database (as several processes), two
// claimers on each, take 40 jobs: each is claimed exactly once.
func testClaimRace(t *testing.T, open func() jobs.Store) {
	const n, stores, perStore = 40, 3, 2
	first := open()
	for i := range n {
		enqueue(t, first, fmt.Sprintf("race-%02d", i), "sum")
	}
	var mu sync.Mutex
	claimed := map[string][]string{}
	var wg sync.WaitGroup
	for i := range stores {
		s := first
		if i > 0 {
			s = open()
		}
		for k := range perStore {
			owner := fmt.Sprintf("w%d.%d", i, k)
			wg.Go(func() {
				for {
					j, ok, err := s.Claim(context.Background(), owner, []string{"sum"}, time.Minute)
					if !assert.NoError(t, err) || !ok {
						return
					}
					mu.Lock()
					claimed[j.ID] = append(claimed[j.ID], owner)
					mu.Unlock()
				}
			})
		}
	}
	wg.Wait()
	assert.Len(t, claimed, n)
	for id, owners := range claimed {
		assert.Len(t, owners, 1, "job %s claimed by %v", id, owners)
	}
}

// testLeaseExpiry: a lease that is not renewed ends; another worker takes the
// job over as attempt 2, and the first worker's writes are refused from then on.
func testLeaseExpiry(t *testing.T, open func() jobs.Store) {
	s, other := open(), open()
	ctx := context.Background()
	enqueue(t, s, "x", "sum")
	a, ok, err := s.Claim(ctx, "dead", []string{"sum"}, time.Second)
	require.NoError(t, err)
	require.True(t, ok)
	_, ok, err = other.Claim(ctx, "alive", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	require.False(t, ok, "the lease still holds")
	time.Sleep(1200 * time.Millisecond)
	b, ok, err := other.Claim(ctx, "alive", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok, "the expired lease is taken over")
	assert.Equal(t, "x", b.ID)
	assert.Equal(t, 2, b.Attempt)
	assert.Equal(t, "alive", b.Owner)

	assert.ErrorIs(t, s.Heartbeat(ctx, a.Lease(), 1, 3, time.Minute), jobs.ErrLost)
	assert.ErrorIs(t, s.Finish(ctx, a.Lease(), 3, 3, []byte(`"stale"`)), jobs.ErrLost)
	assert.ErrorIs(t, s.Fail(ctx, a.Lease(), []byte(`{}`)), jobs.ErrLost)
	assert.ErrorIs(t, s.Release(ctx, a.Lease()), jobs.ErrLost)
	// The same owner name on a later attempt is not the earlier lease either.
	assert.ErrorIs(t, s.Finish(ctx, jobs.Lease{ID: "x", Owner: "alive", Attempt: 1}, 3, 3, []byte(`"stale"`)), jobs.ErrLost)

	require.NoError(t, other.Finish(ctx, b.Lease(), 3, 3, []byte(`{"sum":6}`)))
	got, err := s.Job(ctx, "x")
	require.NoError(t, err)
	assert.Equal(t, jobs.Done, got.State)
	assert.JSONEq(t, `{"sum":6}`, string(got.Result))
	assert.Equal(t, "alive", got.Owner)
	assert.True(t, got.LeaseUntil.IsZero(), "a finished job holds no lease")
	assert.ErrorIs(t, other.Finish(ctx, b.Lease(), 3, 3, []byte(`"twice"`)), jobs.ErrLost, "a finished job is not finished again")
	got, err = s.Job(ctx, "x")
	require.NoError(t, err)
	assert.JSONEq(t, `{"sum":6}`, string(got.Result))
	_, ok, err = s.Claim(ctx, "late", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	assert.False(t, ok, "a done job is never claimed again")
}

func testHeartbeat(t *testing.T, open func() jobs.Store) {
	s := open()
	ctx := context.Background()
	enqueue(t, s, "h", "sum")
	j, ok, err := s.Claim(ctx, "w", []string{"sum"}, 500*time.Millisecond)
	require.NoError(t, err)
	require.True(t, ok)
	for i := 1; i <= 3; i++ {
		time.Sleep(200 * time.Millisecond)
		require.NoError(t, s.Heartbeat(ctx, j.Lease(), i, 3, 500*time.Millisecond))
		_, ok, err = s.Claim(ctx, "thief", []string{"sum"}, time.Minute)
		require.NoError(t, err)
		require.False(t, ok, "a renewed lease holds past its first end")
	}
	got, err := s.Job(ctx, "h")
	require.NoError(t, err)
	assert.Equal(t, 3, got.Done)
	assert.Equal(t, 3, got.Total)
	assert.True(t, got.UpdatedAt.After(got.CreatedAt))
}

func testCancel(t *testing.T, open func() jobs.Store) {
	s := open()
	ctx := context.Background()
	enqueue(t, s, "q", "sum")
	enqueue(t, s, "r", "sum")
	got, err := s.Cancel(ctx, "q")
	require.NoError(t, err)
	assert.Equal(t, jobs.Cancelled, got.State)
	r, ok, err := s.Claim(ctx, "w", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok)
	assert.Equal(t, "r", r.ID, "a cancelled job is never claimed")
	_, err = s.Cancel(ctx, "r")
	require.NoError(t, err)
	assert.ErrorIs(t, s.Heartbeat(ctx, r.Lease(), 1, 3, time.Minute), jobs.ErrCancelled)
	assert.ErrorIs(t, s.Finish(ctx, r.Lease(), 3, 3, []byte(`{}`)), jobs.ErrCancelled)
	got, err = s.Job(ctx, "r")
	require.NoError(t, err)
	assert.Equal(t, jobs.Cancelled, got.State)
	assert.Nil(t, got.Result, "a cancelled job keeps no result")

	_, err = s.Cancel(ctx, "r")
	assert.Equal(t, check.CodeConflict, codeOf(err), "cancelling twice: %v", err)
	enqueue(t, s, "d", "sum")
	d, ok, err := s.Claim(ctx, "w", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok)
	require.NoError(t, s.Finish(ctx, d.Lease(), 3, 3, []byte(`{"sum":1}`)))
	got, err = s.Cancel(ctx, "d")
	assert.Equal(t, check.CodeConflict, codeOf(err), "cancelling a done job: %v", err)
	assert.Equal(t, jobs.Done, got.State, "the conflict carries the job")
	got, err = s.Job(ctx, "d")
	require.NoError(t, err)
	assert.Equal(t, jobs.Done, got.State, "a done job stays done")
	_, err = s.Cancel(ctx, "nope")
	assert.Equal(t, check.CodeNotFound, codeOf(err))
}

func testFailRelease(t *testing.T, open func() jobs.Store) {
	s := open()
	ctx := context.Background()
	enqueue(t, s, "f", "sum")
	j, ok, err := s.Claim(ctx, "w", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok)
	require.NoError(t, s.Release(ctx, j.Lease()))
	got, err := s.Job(ctx, "f")
	require.NoError(t, err)
	assert.Equal(t, jobs.Queued, got.State)
	j, ok, err = s.Claim(ctx, "w2", []string{"sum"}, time.Minute)
	require.NoError(t, err)
	require.True(t, ok, "a released job is claimed again at once")
	assert.Equal(t, 2, j.Attempt)
	require.NoError(t, s.Fail(ctx, j.Lease(), []byte(`{"title":"no"}`)))
	got, err = s.Job(ctx, "f")
	require.NoError(t, err)
	assert.Equal(t, jobs.Failed, got.State)
	assert.JSONEq(t, `{"title":"no"}`, string(got.Problem))
	assert.Nil(t, got.Result)
}

func testList(t *testing.T, open func() jobs.Store) {
	s := open()
	ctx := context.Background()
	specs := []struct {
		id, kind   string
		facilities []string
		labels     []string
	}{
		{"l0", "sum", []string{"tsw-1"}, []string{"cruise"}},
		{"l1", "sum", []string{"tsw-1", "cn2-05"}, []string{"climb", "cruise"}},
		{"l2", "other", []string{"cn2-05"}, nil},
		{"l3", "sum", nil, []string{"approach"}},
		{"l4", "sum", []string{"cn2-05"}, []string{"cruise"}},
		{"l5", "sum", []string{"tsw-1"}, nil},
		{"l6", "sum", []string{"tsw-1"}, []string{"climb"}},
	}
	created := map[string]time.Time{}
	for _, sp := range specs {
		j, err := s.Enqueue(ctx, jobs.Job{ID: sp.id, Kind: sp.kind, Request: []byte(`{}`), Facilities: sp.facilities, Labels: sp.labels})
		require.NoError(t, err)
		created[sp.id] = j.CreatedAt
		time.Sleep(2 * time.Millisecond)
	}
	list := func(q jobs.Query) []string {
		t.Helper()
		var ids []string
		for range 10 {
			page, next, err := s.Jobs(ctx, q)
			require.NoError(t, err)
			for _, j := range page {
				assert.Nil(t, j.Request, "a listing reads no request")
				ids = append(ids, j.ID)
			}
			if next == "" {
				return ids
			}
			q.Cursor = next
		}
		require.Fail(t, "the listing never ended")
		return nil
	}
	all := []string{"l6", "l5", "l4", "l3", "l2", "l1", "l0"}
	assert.Equal(t, all, list(jobs.Query{}), "newest first")
	for limit := 1; limit <= 4; limit++ {
		q := jobs.Query{}
		q.Limit = limit
		assert.Equal(t, all, list(q), "pages of %d", limit)
	}
	q := jobs.Query{Kind: "sum"}
	q.Facility, q.Limit = "tsw-1", 2
	assert.Equal(t, []string{"l6", "l5", "l1", "l0"}, list(q))
	q = jobs.Query{}
	q.Label = "cruise"
	assert.Equal(t, []string{"l4", "l1", "l0"}, list(q))
	q.Facility = "cn2-05"
	assert.Equal(t, []string{"l4", "l1"}, list(q), "facility and label together")
	q = jobs.Query{Kind: "other"}
	assert.Equal(t, []string{"l2"}, list(q))
	q = jobs.Query{}
	q.Since, q.Until = created["l2"], created["l5"]
	assert.Equal(t, []string{"l4", "l3", "l2"}, list(q), "since is inclusive, until exclusive")

	page, next, err := s.Jobs(ctx, jobs.Query{ListQuery: facilities.ListQuery{Limit: 2}})
	require.NoError(t, err)
	require.Len(t, page, 2)
	assert.NotEmpty(t, next)
	assert.Equal(t, jobs.Queued, page[0].State)
	for _, bad := range []facilities.ListQuery{{Cursor: "%%%"}, {Cursor: "bm90LWEtY3Vyc29y"}, {Limit: -1}, {Limit: facilities.MaxListLimit + 1}} {
		_, _, err := s.Jobs(ctx, jobs.Query{ListQuery: bad})
		assert.Equal(t, check.CodeInvalid, codeOf(err), "%+v: %v", bad, err)
	}
}

// sum is the suite's test runner: it adds 1² … n² one step at a time, sleeping
// delay_ms per step, recording each step with seen, and answers {"sum": Σ}.
func sum(seen func(job jobs.Job, step int)) jobs.Runner {
	return func(ctx context.Context, job jobs.Job, progress func(done, total int)) ([]byte, error) {
		var req struct {
			N     int `json:"n"`
			Delay int `json:"delay_ms"`
		}
		if err := json.Unmarshal(job.Request, &req); err != nil {
			return nil, err
		}
		if req.N < 0 {
			return nil, fmt.Errorf("n = %d: nothing to add", req.N)
		}
		total := 0
		for i := 1; i <= req.N; i++ {
			select {
			case <-ctx.Done():
				return nil, ctx.Err()
			case <-time.After(time.Duration(req.Delay) * time.Millisecond):
			}
			seen(job, i)
			total += i * i
			progress(i, req.N)
		}
		return json.Marshal(map[string]int{"sum": total})
	}
}

// steps records the steps each attempt of each job ran.
type steps struct {
	mu   sync.Mutex
	runs map[string]map[int][]int // job → attempt → steps
}

func (s *steps) seen(job jobs.Job, step int) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.runs == nil {
		s.runs = map[string]map[int][]int{}
	}
	if s.runs[job.ID] == nil {
		s.runs[job.ID] = map[int][]int{}
	}
	s.runs[job.ID][job.Attempt] = append(s.runs[job.ID][job.Attempt], step)
}

// once checks that each attempt of job ran steps 1, 2, … in order, none twice,
// and that the attempt that finished ran all n.
func (s *steps) once(t *testing.T, id string, n, finished int) {
	t.Helper()
	s.mu.Lock()
	defer s.mu.Unlock()
	for attempt, got := range s.runs[id] {
		want := n
		if attempt != finished {
			want = len(got)
		}
		seq := make([]int, want)
		for i := range seq {
			seq[i] = i + 1
		}
		assert.Equal(t, seq, got, "job %s attempt %d", id, attempt)
	}
	assert.Len(t, s.runs[id][finished], n, "job %s: the finishing attempt %d ran every step", id, finished)
}

func quiet() *slog.Logger { return slog.New(slog.NewTextHandler(io.Discard, nil)) }

func worker(s jobs.Store, owner string, st *steps, lease time.Duration) *jobs.Worker {
	return jobs.NewWorker(jobs.Config{Store: s, Owner: owner, Runners: map[string]jobs.Runner{"sum": sum(st.seen)},
		Lease: lease, Renew: lease / 4, ProgressEvery: 10 * time.Millisecond, Poll: 10 * time.Millisecond, Slots: 2, Logger: quiet()})
}

// waitFor polls the job until cond holds, failing after 20 s.
func waitFor(t *testing.T, s jobs.Store, id string, cond func(jobs.Job) bool) jobs.Job {
	t.Helper()
	deadline := time.Now().Add(20 * time.Second)
	for {
		j, err := s.Job(context.Background(), id)
		require.NoError(t, err)
		if cond(j) {
			return j
		}
		require.False(t, time.Now().After(deadline), "job %s: still %s (%d of %d) after 20 s", id, j.State, j.Done, j.Total)
		time.Sleep(5 * time.Millisecond)
	}
}

func final(j jobs.Job) bool { return j.State.Final() }

// testWorkers: two workers on two stores of one database share 12 jobs; each
// job is run once, every step once, with the right result.
func testWorkers(t *testing.T, open func() jobs.Store) {
	a, b := open(), open()
	var st steps
	ctx, cancel := context.WithCancel(context.Background())
	var wg sync.WaitGroup
	for i, s := range []jobs.Store{a, b} {
		w := worker(s, fmt.Sprintf("w%d", i), &st, 5*time.Second)
		wg.Go(func() { w.Run(ctx) })
	}
	defer func() { cancel(); wg.Wait() }()
	const n = 12
	for i := range n {
		_, err := a.Enqueue(context.Background(), jobs.Job{ID: fmt.Sprintf("w-%02d", i), Kind: "sum",
			Request: fmt.Appendf(nil, `{"n":%d,"delay_ms":1}`, i+1)})
		require.NoError(t, err)
	}
	_, err := a.Enqueue(context.Background(), jobs.Job{ID: "bad", Kind: "sum", Request: []byte(`{"n":-1}`)})
	require.NoError(t, err)
	owners := map[string]bool{}
	for i := range n {
		id := fmt.Sprintf("w-%02d", i)
		j := waitFor(t, b, id, final)
		require.Equal(t, jobs.Done, j.State)
		want := 0
		for k := 1; k <= i+1; k++ {
			want += k * k
		}
		assert.JSONEq(t, fmt.Sprintf(`{"sum":%d}`, want), string(j.Result))
		assert.Equal(t, 1, j.Attempt, "job %s", id)
		assert.Equal(t, i+1, j.Done, "progress of %s", id)
		owners[j.Owner] = true
		st.once(t, id, i+1, j.Attempt)
	}
	// Which worker took how many is the scheduler's business: both may, one may
	// take them all on a loaded machine.
	t.Logf("workers that ran jobs: %v", owners)
	j := waitFor(t, a, "bad", final)
	assert.Equal(t, jobs.Failed, j.State)
	assert.Contains(t, string(j.Problem), "nothing to add")
}

// deadStore is a store whose writes all fail once dead is closed: the
// worker's process has died, and it can no longer claim, renew, finish, fail
// nor release.
type deadStore struct {
	jobs.Store
	dead chan struct{}
}

func (d deadStore) isDead() error {
	select {
	case <-d.dead:
		return fmt.Errorf("the process has died")
	default:
		return nil
	}
}

func (d deadStore) Heartbeat(ctx context.Context, l jobs.Lease, done, total int, lease time.Duration) error {
	if err := d.isDead(); err != nil {
		return err
	}
	return d.Store.Heartbeat(ctx, l, done, total, lease)
}

func (d deadStore) Finish(ctx context.Context, l jobs.Lease, done, total int, result []byte) error {
	if err := d.isDead(); err != nil {
		return err
	}
	return d.Store.Finish(ctx, l, done, total, result)
}

func (d deadStore) Fail(ctx context.Context, l jobs.Lease, problem []byte) error {
	if err := d.isDead(); err != nil {
		return err
	}
	return d.Store.Fail(ctx, l, problem)
}

func (d deadStore) Release(ctx context.Context, l jobs.Lease) error {
	if err := d.isDead(); err != nil {
		return err
	}
	return d.Store.Release(ctx, l)
}

func (d deadStore) Claim(ctx context.Context, owner string, kinds []string, lease time.Duration) (jobs.Job, bool, error) {
	if err := d.isDead(); err != nil {
		return jobs.Job{}, false, err
	}
	return d.Store.Claim(ctx, owner, kinds, lease)
}

// testWorkerTakeover: a worker dies in the middle of a job; after its lease
// ends a second worker takes the job over and finishes it with the result an
// uninterrupted run gives, and the first worker's late result is refused.
func testWorkerTakeover(t *testing.T, open func() jobs.Store) {
	s, other := open(), open()
	var st steps
	dying := deadStore{Store: s, dead: make(chan struct{})}
	ctx, cancel := context.WithCancel(context.Background())
	var wg sync.WaitGroup
	defer func() { cancel(); wg.Wait() }()
	first := worker(dying, "first", &st, time.Second)
	wg.Go(func() { first.Run(ctx) })
	_, err := s.Enqueue(context.Background(), jobs.Job{ID: "t", Kind: "sum", Request: []byte(`{"n":40,"delay_ms":10}`)})
	require.NoError(t, err)
	first.Wake()
	waitFor(t, s, "t", func(j jobs.Job) bool { return j.Done >= 5 })
	close(dying.dead)

	second := worker(other, "second", &st, time.Second)
	wg.Go(func() { second.Run(ctx) })
	j := waitFor(t, other, "t", final)
	require.Equal(t, jobs.Done, j.State)
	assert.Equal(t, "second", j.Owner)
	// Attempt 2, or later when a loaded machine kept the second worker from
	// renewing its own lease in time (it then claims the job again itself).
	assert.GreaterOrEqual(t, j.Attempt, 2)
	assert.JSONEq(t, `{"sum":22140}`, string(j.Result), "1² + … + 40² = 40·41·81/6")
	st.once(t, "t", 40, j.Attempt)
}

// testWorkerCancel: cancelling a running job stops its runner; the job keeps
// no result.
func testWorkerCancel(t *testing.T, open func() jobs.Store) {
	s := open()
	var st steps
	ctx, cancel := context.WithCancel(context.Background())
	var wg sync.WaitGroup
	defer func() { cancel(); wg.Wait() }()
	w := worker(s, "w", &st, time.Second)
	wg.Go(func() { w.Run(ctx) })
	_, err := s.Enqueue(context.Background(), jobs.Job{ID: "c", Kind: "sum", Request: []byte(`{"n":1000,"delay_ms":5}`)})
	require.NoError(t, err)
	w.Wake()
	waitFor(t, s, "c", func(j jobs.Job) bool { return j.Done >= 3 })
	_, err = s.Cancel(context.Background(), "c")
	require.NoError(t, err)
	// The runner stops within a heartbeat: the next job is then taken.
	_, err = s.Enqueue(context.Background(), jobs.Job{ID: "next", Kind: "sum", Request: []byte(`{"n":2}`)})
	require.NoError(t, err)
	w.Wake()
	waitFor(t, s, "next", final)
	j, err := s.Job(context.Background(), "c")
	require.NoError(t, err)
	assert.Equal(t, jobs.Cancelled, j.State)
	assert.Nil(t, j.Result)
	st.mu.Lock()
	ran := len(st.runs["c"][1])
	st.mu.Unlock()
	assert.Less(t, ran, 1000, "the runner stopped")
}

// testWorkerShutdown: a worker stopped in the middle of a job releases it, and
// the next worker runs it from the start to the same result.
func testWorkerShutdown(t *testing.T, open func() jobs.Store) {
	s := open()
	var st steps
	ctx, stop := context.WithCancel(context.Background())
	w := worker(s, "before", &st, time.Minute)
	done := make(chan struct{})
	go func() { w.Run(ctx); close(done) }()
	_, err := s.Enqueue(context.Background(), jobs.Job{ID: "s", Kind: "sum", Request: []byte(`{"n":30,"delay_ms":10}`)})
	require.NoError(t, err)
	w.Wake()
	waitFor(t, s, "s", func(j jobs.Job) bool { return j.Done >= 3 })
	stop()
	<-done
	j, err := s.Job(context.Background(), "s")
	require.NoError(t, err)
	assert.Equal(t, jobs.Queued, j.State, "released at shutdown, not left to its lease")

	ctx, cancel := context.WithCancel(context.Background())
	var wg sync.WaitGroup
	defer func() { cancel(); wg.Wait() }()
	after := worker(s, "after", &st, time.Minute)
	wg.Go(func() { after.Run(ctx) })
	j = waitFor(t, s, "s", final)
	assert.Equal(t, jobs.Done, j.State)
	assert.Equal(t, 2, j.Attempt)
	assert.JSONEq(t, `{"sum":9455}`, string(j.Result), "1² + … + 30² = 30·31·61/6")
	st.once(t, "s", 30, j.Attempt)
	assert.True(t, slices.Contains([]string{"after"}, j.Owner))
}
