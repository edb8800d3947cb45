package groupcommit_test

import (
	"context"
	"errors"
	"fmt"
	"sync"
	"testing"
	"time"

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
	deadline := time.Now().Add(10 * time.Second)
	for c.Queued() != n {
		if time.Now().After(deadline) {
			t.Fatalf("%d records queued after 10 s, want %d", c.Queued(), n)
		}
		time.Sleep(100 * time.Microsecond)
	}
}

// TestGrouping holds the first group's commit until more records have queued and
// checks that they are committed together, in order, in the next group, each
// answered with its own result; and that MaxGroup splits a longer queue.
func TestGrouping(t *testing.T) {
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
				r := <-results
				if r.outcome != groupcommit.Committed || r.err != nil || r.out != 2*r.rec {
					t.Errorf("record %d: %d, %v, %v; want %d, committed, no error", r.rec, r.out, r.outcome, r.err, 2*r.rec)
				}
			}
			groups := e.committed()
			if len(groups) != 1+len(tt.wantGroups) {
				t.Fatalf("%d groups %v, want %d", len(groups), groups, 1+len(tt.wantGroups))
			}
			next := 0
			for i, want := range tt.wantGroups {
				g := groups[1+i]
				if len(g) != want {
					t.Errorf("group %d holds %d records, want %d", 2+i, len(g), want)
				}
				for _, rec := range g {
					if rec != next {
						t.Errorf("group %d: record %d out of order, want %d", 2+i, rec, next)
					}
					next++
				}
			}
			if g, r := c.Stats(); g != int64(len(groups)) || r != int64(tt.queued+1) {
				t.Errorf("Stats: %d records in %d groups, want %d in %d", r, g, tt.queued+1, len(groups))
			}
		})
	}
}

// TestFailureFailsGroup checks that a group whose commit fails answers every
// record of that group with the commit's error, and no other group's.
func TestFailureFailsGroup(t *testing.T) {
	const queued = 10
	injected := errors.New("injected failure")
	for _, inline := range []bool{true, false} {
		t.Run(fmt.Sprintf("inline=%v", inline), func(t *testing.T) {
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
			if r := <-first; r.outcome != groupcommit.Committed || r.out != 2000 {
				t.Errorf("first group: %d, %v, %v; want 2000, committed", r.out, r.outcome, r.err)
			}
			for range queued {
				r := <-results
				if r.outcome != groupcommit.Failed || !errors.Is(r.err, injected) || r.out != 0 {
					t.Errorf("record %d of the failed group: %d, %v, %v; want 0, failed, the injected error", r.rec, r.out, r.outcome, r.err)
				}
			}
		})
	}
}

// TestCancellation checks what a caller that gives up gets: while queued, its
// record is dropped (Abandoned, never committed); while its group commits,
// Unknown; and a caller that commits its own group inline gets the outcome.
func TestCancellation(t *testing.T) {
	t.Run("while queued", func(t *testing.T) {
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
		if r := <-gaveUp; r.outcome != groupcommit.Abandoned || !errors.Is(r.err, context.Canceled) {
			t.Errorf("cancelled while queued: %v, %v; want abandoned, context.Canceled", r.outcome, r.err)
		}
		close(e.release)
		if r := <-kept; r.outcome != groupcommit.Committed || r.out != 6 {
			t.Errorf("the record queued behind: %d, %v, %v; want 6, committed", r.out, r.outcome, r.err)
		}
		<-first
		groups := e.committed()
		if len(groups) != 2 || len(groups[1]) != 1 || groups[1][0] != 3 {
			t.Errorf("groups %v, want [[1] [3]]: the abandoned record must not be committed", groups)
		}
	})
	t.Run("while committing", func(t *testing.T) {
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
				if r.outcome != tt.want {
					t.Errorf("outcome %v (%v), want %v", r.outcome, r.err, tt.want)
				}
				if tt.want == groupcommit.Unknown && !errors.Is(r.err, context.Canceled) {
					t.Errorf("error %v, want context.Canceled", r.err)
				}
			})
		}
	})
	t.Run("already ended", func(t *testing.T) {
		e := newEngine()
		c := groupcommit.New(groupcommit.Config[int]{Commit: e.commit})
		defer c.Close()
		ctx, cancel := context.WithCancel(context.Background())
		cancel()
		if _, outcome, err := c.Submit(ctx, 1); outcome != groupcommit.Abandoned || !errors.Is(err, context.Canceled) {
			t.Errorf("ended context: %v, %v; want abandoned, context.Canceled", outcome, err)
		}
		if g, _ := c.Stats(); g != 0 {
			t.Errorf("%d groups committed, want 0", g)
		}
	})
}

// TestClose checks that Close waits for the running group (and those queued
// behind it), and that calls made once it has begun are refused with Closed.
func TestClose(t *testing.T) {
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
	deadline := time.Now().Add(10 * time.Second)
	for {
		// A probe that is queued before Close begins gives up after 1 ms.
		probe, cancel := context.WithTimeout(context.Background(), time.Millisecond)
		_, outcome, err := c.Submit(probe, 3)
		cancel()
		if outcome == groupcommit.Closed {
			if err != nil {
				t.Errorf("refused call: error %v, want nil", err)
			}
			break
		}
		if time.Now().After(deadline) {
			t.Fatal("calls still accepted 10 s after Close began")
		}
		time.Sleep(100 * time.Microsecond)
	}
	select {
	case <-closed:
		t.Fatal("Close returned while a group was committing")
	case <-time.After(20 * time.Millisecond):
	}
	close(e.release)
	<-closed
	for range 2 {
		if r := <-results; r.outcome != groupcommit.Committed || r.out != 2*r.rec {
			t.Errorf("record %d accepted before Close: %d, %v, %v; want %d, committed", r.rec, r.out, r.outcome, r.err, 2*r.rec)
		}
	}
	if _, outcome, _ := c.Submit(context.Background(), 4); outcome != groupcommit.Closed {
		t.Errorf("call after Close: %v, want closed", outcome)
	}
	c.Close() // a second Close does nothing more
}

// TestExpect checks that a group waits for an announced record, which then
// joins it, and that a withdrawn announcement is counted out once.
func TestExpect(t *testing.T) {
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
		if r := <-ch; r.outcome != groupcommit.Committed {
			t.Errorf("record %d: %v, %v; want committed", r.rec, r.outcome, r.err)
		}
	}
	withdrawA()
	withdrawB()
	withdrawB()
	mu.Lock()
	defer mu.Unlock()
	if len(sizes) != 1 || sizes[0] != 2 {
		t.Errorf("group sizes %v, want [2]", sizes)
	}
	if n, settled := c.Announced(); n != 0 || settled != 2 {
		t.Errorf("%d announcements outstanding, %d settled; want 0 and 2", n, settled)
	}
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
	if r := <-results; r.rec != 1 || r.outcome != groupcommit.Committed {
		t.Fatalf("first answer: record %d %v, want record 1 committed", r.rec, r.outcome)
	}
	go submit(c, ctx, 4, results)
	for range 3 {
		if r := <-results; r.outcome != groupcommit.Committed {
			t.Errorf("record %d: %v, %v; want committed", r.rec, r.outcome, r.err)
		}
	}
	// Three were in flight again; a lone record waits for the others at most
	// about a commit's time (the mean of the commits so far), not Gather.
	start := time.Now()
	go submit(c, ctx, 5, results)
	if r := <-results; r.outcome != groupcommit.Committed {
		t.Errorf("record 5: %v, %v; want committed", r.outcome, r.err)
	}
	if waited := time.Since(start); waited > 20*time.Second {
		t.Errorf("a lone record waited %v for records that never came, want about one commit's time", waited)
	}
	want := [][]int{{1}, {2, 3, 4}, {5}}
	if got := e.committed(); fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("groups %v, want %v", got, want)
	}
}

// TestOutcomeString checks the outcome names.
func TestOutcomeString(t *testing.T) {
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
		if got := tt.o.String(); got != tt.want {
			t.Errorf("Outcome(%d).String() = %q, want %q", int(tt.o), got, tt.want)
		}
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
			got := groupcommit.Explain(`store: saving plan "p"`, tt.outcome, tt.err, failed, closedErr)
			if tt.want == "" {
				if got != nil {
					t.Errorf("error %v, want nil", got)
				}
				return
			}
			if got == nil || got.Error() != tt.want || !errors.Is(got, tt.is) {
				t.Errorf("error %v, want %q wrapping %v", got, tt.want, tt.is)
			}
		})
	}
}
