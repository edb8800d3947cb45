package groupcommit_test

import (
	"context"
	"errors"
	"fmt"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities/internal/groupcommit"
)

// engine is a stand-in for a store: its commit answers each record with the
// record doubled, can hold the first group until released and can fail a group.
type engine struct {
	mu      sync.Mutex
	groups  [][]int
	entered chan struct{} // closed when the first group starts committing
	release chan struct{} // the first group commits once this is closed
	failAt  int           // the group (1-based) that fails; 0: none
	failErr error
}

func newEngine() *engine {
	return &engine{entered: make(chan struct{}), release: make(chan struct{})}
}

func (e *engine) commit(recs []int) error {
	e.mu.Lock()
	e.groups = append(e.groups, append([]int(nil), recs...))
	n := len(e.groups)
	e.mu.Unlock()
	if n == 1 {
		close(e.entered)
		<-e.release
	}
	if n == e.failAt {
		return e.failErr
	}
	for i := range recs {
		recs[i] *= 2
	}
	return nil
}

func (e *engine) committed() [][]int {
	e.mu.Lock()
	defer e.mu.Unlock()
	return append([][]int(nil), e.groups...)
}

type result struct {
	rec     int
	out     int
	outcome groupcommit.Outcome
	err     error
}

func submit(c *groupcommit.Committer[int], ctx context.Context, rec int, to chan<- result) {
	out, outcome, err := c.Submit(ctx, rec)
	to <- result{rec, out, outcome, err}
}

// waitQueued waits until n records are queued (at most 10 s).
func waitQueued(t *testing.T, c *groupcommit.Committer[int], n int) {
	t.Helper()
	require.Eventually(t, func() bool { return c.Queued() == n }, 10*time.Second, 100*time.Microsecond,
		"%d records queued", n)
}

// TestGrouping holds the first group's commit until more records have queued and
// checks that they are committed together, in order, in the next group, each
// answered with its own result; and that MaxGroup splits a longer queue.
func TestGrouping(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name       string
		inline     bool
		maxGroup   int
		queued     int
		wantGroups []int // sizes of the groups after the first
	}{
		{"inline, one group", true, 0, 20, []int{20}},
		{"goroutine, one group", false, 0, 20, []int{20}},
		{"inline, split by MaxGroup", true, 8, 20, []int{8, 8, 4}},
		{"goroutine, split by MaxGroup", false, 8, 20, []int{8, 8, 4}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			e := newEngine()
			c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit, MaxGroup: tt.maxGroup, Inline: tt.inline})
			defer c.Close()
			ctx := context.Background()
			results := make(chan result, tt.queued+1)
			go submit(c, ctx, 1000, results)
			<-e.entered
			// Queued one after the other so that their order is known.
			for i := range tt.queued {
				go submit(c, ctx, i, results)
				waitQueued(t, c, i+1)
			}
			close(e.release)
			for range tt.queued + 1 {
				assertCommitted(t, <-results)
			}
			groups := e.committed()
			require.Len(t, groups, 1+len(tt.wantGroups), "groups %v", groups)
			next := 0
			for i, want := range tt.wantGroups {
				g := groups[1+i]
				assert.Len(t, g, want, "group %d", 2+i)
				for _, rec := range g {
					assert.Equal(t, next, rec, "group %d: records in order", 2+i)
					next++
				}
			}
			g, r := c.Stats()
			assert.Equal(t, [2]int64{int64(len(groups)), int64(tt.queued + 1)}, [2]int64{g, r}, "Stats: groups and records")
		})
	}
}

// assertCommitted checks that r's record was committed and answered with its
// own result (the record doubled, by engine.commit).
func assertCommitted(t *testing.T, r result) {
	t.Helper()
	assert.Equal(t, groupcommit.Committed, r.outcome, "record %d", r.rec)
	assert.NoError(t, r.err, "record %d", r.rec)
	assert.Equal(t, 2*r.rec, r.out, "record %d: its own result", r.rec)
}

// TestFailureFailsGroup checks that a group whose commit fails answers every
// record of that group with the commit's error, and no other group's.
func TestFailureFailsGroup(t *testing.T) {
	t.Parallel()
	const queued = 10
	injected := errors.New("injected failure")
	for _, inline := range []bool{true, false} {
		t.Run(fmt.Sprintf("inline=%v", inline), func(t *testing.T) {
			t.Parallel()
			e := newEngine()
			e.failAt, e.failErr = 2, injected
			c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit, Inline: inline})
			defer c.Close()
			ctx := context.Background()
			first := make(chan result, 1)
			go submit(c, ctx, 1000, first)
			<-e.entered
			results := make(chan result, queued)
			for i := range queued {
				go submit(c, ctx, i, results)
			}
			waitQueued(t, c, queued)
			close(e.release)
			assertCommitted(t, <-first)
			for range queued {
				r := <-results
				assert.Equal(t, groupcommit.Failed, r.outcome, "record %d of the failed group", r.rec)
				assert.ErrorIs(t, r.err, injected, "record %d of the failed group", r.rec)
				assert.Zero(t, r.out, "record %d of the failed group: no result", r.rec)
			}
		})
	}
}

// TestCancellation checks what a caller that gives up gets: while queued, its
// record is dropped (Abandoned, never committed); while its group commits,
// Unknown; and a caller that commits its own group inline gets the outcome.
func TestCancellation(t *testing.T) {
	t.Parallel()
	t.Run("while queued", func(t *testing.T) {
		t.Parallel()
		e := newEngine()
		c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit, Inline: true})
		defer c.Close()
		first := make(chan result, 1)
		go submit(c, context.Background(), 1, first)
		<-e.entered
		ctx, cancel := context.WithCancel(context.Background())
		gaveUp := make(chan result, 1)
		go submit(c, ctx, 2, gaveUp)
		waitQueued(t, c, 1)
		kept := make(chan result, 1)
		go submit(c, context.Background(), 3, kept)
		waitQueued(t, c, 2)
		cancel()
		r := <-gaveUp
		assert.Equal(t, groupcommit.Abandoned, r.outcome, "cancelled while queued")
		assert.ErrorIs(t, r.err, context.Canceled, "cancelled while queued")
		close(e.release)
		assertCommitted(t, <-kept)
		<-first
		assert.Equal(t, [][]int{{1}, {3}}, e.committed(), "groups: the abandoned record is not committed")
	})
	t.Run("while committing", func(t *testing.T) {
		t.Parallel()
		tests := []struct {
			name   string
			inline bool
			want   groupcommit.Outcome
		}{
			{"goroutine", false, groupcommit.Unknown},
			{"inline caller", true, groupcommit.Committed},
		}
		for _, tt := range tests {
			t.Run(tt.name, func(t *testing.T) {
				t.Parallel()
				e := newEngine()
				c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit, Inline: tt.inline})
				defer c.Close()
				ctx, cancel := context.WithCancel(context.Background())
				got := make(chan result, 1)
				go submit(c, ctx, 1, got)
				<-e.entered
				cancel()
				if tt.inline {
					// The inline caller is busy committing: release it first.
					time.Sleep(time.Millisecond)
					close(e.release)
				}
				r := <-got
				if !tt.inline {
					close(e.release)
				}
				assert.Equal(t, tt.want, r.outcome, "outcome (%v)", r.err)
				if tt.want == groupcommit.Unknown {
					assert.ErrorIs(t, r.err, context.Canceled)
				}
			})
		}
	})
	t.Run("already ended", func(t *testing.T) {
		t.Parallel()
		e := newEngine()
		c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit})
		defer c.Close()
		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		_, outcome, err := c.Submit(ctx, 1)
		assert.Equal(t, groupcommit.Abandoned, outcome, "ended context")
		assert.ErrorIs(t, err, context.Canceled, "ended context")
		g, _ := c.Stats()
		assert.Zero(t, g, "groups committed")
	})
}

// TestClose checks that Close waits for the running group (and those queued
// behind it), and that calls made once it has begun are refused with Closed.
func TestClose(t *testing.T) {
	t.Parallel()
	e := newEngine()
	c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit, Inline: true})
	results := make(chan result, 2)
	go submit(c, context.Background(), 1, results)
	<-e.entered
	go submit(c, context.Background(), 2, results)
	waitQueued(t, c, 1)
	closed := make(chan struct{})
	go func() { c.Close(); close(closed) }()
	// Close has begun once a new call is refused.
	require.Eventually(t, func() bool {
		// A probe that is queued before Close begins gives up after 1 ms.
		probe, cancel := context.WithTimeout(context.Background(), time.Millisecond)
		defer cancel()
		_, outcome, err := c.Submit(probe, 3)
		if outcome != groupcommit.Closed {
			return false
		}
		assert.NoError(t, err, "refused call")
		return true
	}, 10*time.Second, 100*time.Microsecond, "calls refused after Close began")
	select {
	case <-closed:
		require.Fail(t, "Close returned while a group was committing")
	case <-time.After(20 * time.Millisecond):
	}
	close(e.release)
	<-closed
	for range 2 {
		assertCommitted(t, <-results)
	}
	_, outcome, _ := c.Submit(context.Background(), 4)
	assert.Equal(t, groupcommit.Closed, outcome, "call after Close")
	c.Close() // a second Close does nothing more
}

// TestExpect checks that a group waits for an announced record, which then
// joins it, and that a withdrawn announcement is counted out once.
func TestExpect(t *testing.T) {
	t.Parallel()
	var mu sync.Mutex
	var sizes []int
	c := groupcommit.New(groupcommit.Config[int]{
		Commit: func(recs []int) error {
			mu.Lock()
			sizes = append(sizes, len(recs))
			mu.Unlock()
			return nil
		},
		Gather: time.Minute,
		Inline: true,
	})
	defer c.Close()
	ctxA, withdrawA := c.Expect(context.Background())
	ctxB, withdrawB := c.Expect(context.Background())
	first := make(chan result, 1)
	go submit(c, ctxA, 1, first)
	// Wait until the first record has settled its announcement.
	for n, _ := c.Announced(); n != 1; n, _ = c.Announced() {
		time.Sleep(100 * time.Microsecond)
	}
	second := make(chan result, 1)
	go submit(c, ctxB, 2, second)
	for _, ch := range []chan result{first, second} {
		r := <-ch
		assert.Equal(t, groupcommit.Committed, r.outcome, "record %d (%v)", r.rec, r.err)
	}
	withdrawA()
	withdrawB()
	withdrawB()
	mu.Lock()
	defer mu.Unlock()
	assert.Equal(t, []int{2}, sizes, "group sizes: the announced record joins the group")
	n, settled := c.Announced()
	assert.Equal(t, 0, n, "announcements outstanding")
	assert.Equal(t, int64(2), settled, "announcements settled")
}

// TestGatherInFlight checks that a group waits for as many records as were in
// flight when the group before it finished (its own and those queued behind it),
// so that callers answered by that group join the next one, and that without
// them it waits no longer than a commit takes.
func TestGatherInFlight(t *testing.T) {
	t.Parallel()
	e := newEngine()
	c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit, Gather: time.Minute})
	defer c.Close()
	ctx := context.Background()
	results := make(chan result, 5)
	go submit(c, ctx, 1, results)
	<-e.entered
	go submit(c, ctx, 2, results)
	waitQueued(t, c, 1)
	go submit(c, ctx, 3, results)
	waitQueued(t, c, 2)
	// The first commit takes at least this long, which bounds the waits after it.
	time.Sleep(500 * time.Millisecond)
	close(e.release)
	// Record 1 is answered; three records were in flight, so the next group
	// waits for a third, which comes back as a caller answered would.
	r := <-results
	require.Equal(t, 1, r.rec, "the first answer's record")
	assertCommitted(t, r)
	go submit(c, ctx, 4, results)
	for range 3 {
		assertCommitted(t, <-results)
	}
	// Three were in flight again; a lone record waits for the others at most
	// about a commit's time (the mean of the commits so far), not Gather.
	start := time.Now()
	go submit(c, ctx, 5, results)
	assertCommitted(t, <-results)
	assert.LessOrEqual(t, time.Since(start), 20*time.Second, "a lone record's wait for records that never came: about one commit's time")
	assert.Equal(t, [][]int{{1}, {2, 3, 4}, {5}}, e.committed(), "groups")
}

// TestOutcomeString checks the outcome names.
func TestOutcomeString(t *testing.T) {
	t.Parallel()
	tests := []struct {
		o    groupcommit.Outcome
		want string
	}{
		{groupcommit.Committed, "committed"},
		{groupcommit.Failed, "failed"},
		{groupcommit.Closed, "closed"},
		{groupcommit.Abandoned, "abandoned"},
		{groupcommit.Unknown, "unknown"},
		{groupcommit.Outcome(99), "outcome(?)"},
	}
	for _, tt := range tests {
		assert.Equal(t, tt.want, tt.o.String(), "Outcome(%d)", int(tt.o))
	}
}

// ExampleCommitter commits one record through an engine that answers with the
// record's length in bytes.
func ExampleCommitter() {
	c := groupcommit.New(groupcommit.Config[string]{
		Commit: func(recs []string) error {
			for i, r := range recs {
				recs[i] = fmt.Sprintf("%s: %d B", r, len(r))
			}
			return nil
		},
		Inline: true,
	})
	defer c.Close()
	out, outcome, err := c.Submit(context.Background(), "plan-1")
	fmt.Println(out, outcome, err)
	groups, records := c.Stats()
	fmt.Println(groups, "group,", records, "record")
	// Output:
	// plan-1: 6 B committed <nil>
	// 1 group, 1 record
}

// TestExplain checks the error a store answers for each outcome.
func TestExplain(t *testing.T) {
	t.Parallel()
	closedErr := errors.New("the store is closed")
	groupErr := errors.New("disk full")
	failed := func(err error) error { return fmt.Errorf("saving plan: %w", err) }
	tests := []struct {
		name    string
		outcome groupcommit.Outcome
		err     error
		want    string // "" means nil
		is      error
	}{
		{"committed", groupcommit.Committed, nil, "", nil},
		{"failed", groupcommit.Failed, groupErr, "saving plan: disk full", groupErr},
		{"closed", groupcommit.Closed, nil, "the store is closed", closedErr},
		{"abandoned", groupcommit.Abandoned, context.Canceled, `store: saving plan "p": context canceled`, context.Canceled},
		{"unknown", groupcommit.Unknown, context.DeadlineExceeded,
			`store: saving plan "p": context deadline exceeded while its group was committing: it may have been stored`, context.DeadlineExceeded},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			got := groupcommit.Explain(`store: saving plan "p"`, tt.outcome, tt.err, failed, closedErr)
			if tt.want == "" {
				assert.NoError(t, got)
				return
			}
			require.EqualError(t, got, tt.want)
			assert.ErrorIs(t, got, tt.is)
		})
	}
}
