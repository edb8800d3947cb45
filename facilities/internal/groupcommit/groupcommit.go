// Package groupcommit writes records that concurrent callers submit in shared
// transactions (group commit), for the catalog stores of this module: while one
// group's transaction runs and waits for its flush to stable storage, the calls
// that arrive queue up, and the next transaction writes all of them at once, so
// under load one flush serves many callers while a lone caller still waits for
// one transaction only (Gray and Reuter, "Transaction Processing: Concepts and
// Techniques", 1993, on group commit; cited from memory).
//
// What a Committer guarantees:
//
//   - An acknowledged record is durable as far as the engine's commit makes it
//     so: a caller is answered Committed only after the transaction that holds
//     its record has committed.
//   - Groups are all or nothing: the engine's commit function writes a group in
//     one transaction and either returns a result for every record or one error,
//     which every caller of that group gets (Failed).
//   - Records are committed in the order their calls were queued, in groups of at
//     most Config.MaxGroup, one group at a time.
//   - A caller whose context ends while its record is still queued is removed
//     from the queue and gets Abandoned: its record is not written. One whose
//     context ends while its group is committing gets Unknown (the record may
//     have been stored), unless the group's outcome is known by then. A caller
//     that commits its group on its own goroutine (Config.Inline) always gets its
//     group's outcome, whatever its context does meanwhile.
//   - Close lets a running group finish (and the groups queued before it), then
//     answers any call still queued, and every later call, with Closed.
//
// The commit function never sees a caller's context: one caller giving up must
// not abort the others' writes.
package groupcommit

import (
	"context"
	"fmt"
	"sync"
	"sync/atomic"
	"time"
)

// Outcome says what became of one submitted record.
type Outcome int

const (
	// Committed: the record's group committed; the result is the engine's answer
	// for the record.
	Committed Outcome = iota
	// Failed: the record's group failed as a whole; the error is the commit
	// function's, and nothing of the group was stored.
	Failed
	// Closed: the Committer was closed before the record was taken into a group;
	// it was not stored.
	Closed
	// Abandoned: the caller's context ended before the record was taken into a
	// group; it was not stored. The error is the context's.
	Abandoned
	// Unknown: the caller's context ended while the record's group was
	// committing; it may have been stored. The error is the context's.
	Unknown
)

// String names the outcome in lower case.
func (o Outcome) String() string {
	switch o {
	case Committed:
		return "committed"
	case Failed:
		return "failed"
	case Closed:
		return "closed"
	case Abandoned:
		return "abandoned"
	case Unknown:
		return "unknown"
	}
	return "outcome(?)"
}

// Config is what a Committer needs from the engine.
type Config[R any] struct {
	// Commit writes recs in one transaction, in order. On success it leaves in
	// recs[i] the result for the i-th record and returns nil; otherwise it
	// returns the error that fails the whole group. It runs on one goroutine at a
	// time and must not keep recs after it returns.
	Commit func(recs []R) error
	// MaxGroup is the most records one group holds; a longer queue is committed
	// in several groups, one after the other. Zero or less means 512.
	MaxGroup int
	// Gather is the longest a group waits for more records before it commits:
	// for those announced by Expect, and for as many records as were in flight
	// when the group before it finished (gatherAnnounced). Once a group has
	// committed, the wait is also at most the mean time a commit takes. Zero
	// turns the wait off.
	Gather time.Duration
	// Inline lets a call that finds no group committing commit its own group on
	// its own goroutine, sparing the hand-over to a committer goroutine and back;
	// when false such a call starts a committer goroutine and waits for it.
	Inline bool
}

// Waiter states. A waiter is queued, then either taken into a group by the
// committer or abandoned by its caller, whichever comes first.
const (
	waiting int32 = iota
	taken
	abandoned
)

// waiter is one Submit call waiting for its group commit.
type waiter[R any] struct {
	rec     R
	state   atomic.Int32
	done    chan struct{} // closed when out, outcome and err are set
	out     R
	outcome Outcome
	err     error
}

// Committer queues records submitted by concurrent callers and commits them in
// groups through Config.Commit. It is safe for concurrent use; create it with New.
type Committer[R any] struct {
	commit   func([]R) error
	maxGroup int
	inline   bool

	mu      sync.Mutex
	queue   []*waiter[R]
	running bool // a group is being committed, by a caller or a goroutine
	closed  bool
	wg      sync.WaitGroup
	// coming counts the records announced by Expect that have neither been
	// submitted nor withdrawn; settled counts the announcements settled either
	// way since New.
	coming  int
	settled int64
	// gather is Config.Gather (SetGather changes it).
	gather time.Duration
	// inFlight is how many records were in flight when the last group finished
	// committing: that group's, those queued behind it and those announced; the
	// next group waits for as many (gatherAnnounced). commitTime is the mean
	// wall time of a group's commit (a running mean over about four groups; zero
	// before the first), which bounds that wait.
	inFlight   int
	commitTime time.Duration
	// arrived (capacity 1) wakes a group gathering its records once its wait
	// can end (gatherWaits turned false): enough records were queued, the
	// announcements it waits for were settled, or the Committer closed.
	// gathering says a group is gathering, gatherTarget and gatherWant what it
	// waits for. A record queued while the group still waits for more does not
	// wake it: such wake-ups were about three a group of four, each a goroutine
	// switch that found the wait not over.
	arrived      chan struct{}
	gathering    bool
	gatherTarget int64
	gatherWant   int

	// group and recs are the running group's buffers, reused from group to group
	// (only one group runs at a time).
	group []*waiter[R]
	recs  []R

	// groups and records count the groups committed and the records they held.
	groups, records atomic.Int64
}

// New returns a Committer that writes groups with cfg.Commit.
func New[R any](cfg Config[R]) *Committer[R] {
	if cfg.MaxGroup <= 0 {
		cfg.MaxGroup = 512
	}
	return &Committer[R]{
		commit:   cfg.Commit,
		maxGroup: cfg.MaxGroup,
		inline:   cfg.Inline,
		gather:   cfg.Gather,
		arrived:  make(chan struct{}, 1),
	}
}

// Submit queues rec and waits for its group to commit. It returns the engine's
// result for rec with Committed, or the zero R with the outcome that kept rec
// from committing and its error: the group's error (Failed), nil (Closed), or the
// context's (Abandoned, Unknown). A context that has ended already gives
// Abandoned without queueing rec.
func (c *Committer[R]) Submit(ctx context.Context, rec R) (R, Outcome, error) {
	var zero R
	if err := ctx.Err(); err != nil {
		return zero, Abandoned, err
	}
	w := &waiter[R]{rec: rec, done: make(chan struct{})}
	e, _ := ctx.Value(expectKey{}).(*expectation[R])
	c.mu.Lock()
	if e != nil && e.c == c && e.settled.CompareAndSwap(false, true) {
		c.coming--
		c.settled++
	}
	if c.closed {
		c.mu.Unlock()
		return zero, Closed, nil
	}
	c.queue = append(c.queue, w)
	start := !c.running
	if start {
		c.running = true
		c.wg.Add(1)
	}
	wake := c.gathering && !c.gatherWaits()
	c.mu.Unlock()
	if start && c.inline {
		// No group is committing: this call commits its own on its goroutine.
		c.run(w)
		return w.out, w.outcome, w.err
	}
	if start {
		go c.run(nil)
	} else if wake {
		c.signal()
	}
	select {
	case <-w.done:
		return w.out, w.outcome, w.err
	case <-ctx.Done():
	}
	if w.state.CompareAndSwap(waiting, abandoned) {
		return zero, Abandoned, ctx.Err()
	}
	// Taken into a group already: its outcome is reported if it is known by now.
	select {
	case <-w.done:
		return w.out, w.outcome, w.err
	default:
	}
	return zero, Unknown, ctx.Err()
}

// run commits queued records in groups until the queue is empty. Called by
// Submit with its own waiter, it returns as soon as that waiter's group has
// committed, leaving any records queued meanwhile to a goroutine it starts.
func (c *Committer[R]) run(own *waiter[R]) {
	for {
		if own != nil && own.state.Load() == taken {
			// The caller's group has committed: what has queued since is left
			// to a committer goroutine.
			c.mu.Lock()
			if len(c.queue) == 0 {
				c.running = false
				c.mu.Unlock()
				c.wg.Done()
				return
			}
			c.mu.Unlock()
			go c.run(nil)
			return
		}
		c.gatherAnnounced()
		c.mu.Lock()
		n := min(len(c.queue), c.maxGroup)
		batch := c.queue[:n:n]
		c.queue = c.queue[n:]
		if len(c.queue) == 0 {
			c.queue = nil
		}
		if n == 0 {
			c.running = false
			c.mu.Unlock()
			c.wg.Done()
			return
		}
		c.mu.Unlock()
		group := c.group[:0]
		for _, w := range batch {
			if w.state.CompareAndSwap(waiting, taken) {
				group = append(group, w)
			}
		}
		if len(group) > 0 {
			c.commitGroup(group)
		}
		clear(group)
		c.group = group[:0]
	}
}

// commitGroup writes the group's records through the engine and answers every
// waiter of the group.
func (c *Committer[R]) commitGroup(group []*waiter[R]) {
	recs := c.recs[:0]
	for _, w := range group {
		recs = append(recs, w.rec)
	}
	start := time.Now()
	err := c.commit(recs)
	took := time.Since(start)
	c.mu.Lock()
	c.inFlight = len(group) + len(c.queue) + c.coming
	if c.commitTime == 0 {
		c.commitTime = took
	} else {
		c.commitTime += (took - c.commitTime) / 4
	}
	c.mu.Unlock()
	c.groups.Add(1)
	c.records.Add(int64(len(group)))
	for i, w := range group {
		if err != nil {
			w.outcome, w.err = Failed, err
		} else {
			w.out = recs[i]
		}
		close(w.done)
	}
	clear(recs)
	c.recs = recs[:0]
}

// Stats returns how many groups this Committer has committed since New and how
// many records they held (records/groups is the mean group size; a group whose
// transaction failed counts too).
func (c *Committer[R]) Stats() (groups, records int64) {
	return c.groups.Load(), c.records.Load()
}

// Queued returns how many records wait in the queue, not yet taken into a group
// (records whose callers gave up are counted until a group passes them over).
func (c *Committer[R]) Queued() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return len(c.queue)
}

// Close refuses further calls, lets a running group commit finish (with those
// queued behind it) and answers any call still queued with Closed. It returns
// once no group is committing. Calling it again does nothing more.
func (c *Committer[R]) Close() {
	c.mu.Lock()
	c.closed = true
	c.mu.Unlock()
	c.signal()
	c.wg.Wait()
	c.mu.Lock()
	queued := c.queue
	c.queue = nil
	c.mu.Unlock()
	for _, w := range queued {
		if w.state.CompareAndSwap(waiting, taken) {
			w.outcome = Closed
			close(w.done)
		}
	}
}

// signal wakes a group gathering its records, if one is.
func (c *Committer[R]) signal() {
	select {
	case c.arrived <- struct{}{}:
	default:
	}
}

// Explain returns the error a store answers for a record that did not commit,
// call naming the call and the record (for example `sqlite: saving plan "p1"`):
// failed(err) for Failed, closed for Closed, call and the context's error for
// Abandoned, the same followed by "while its group was committing: it may have
// been stored" for Unknown. It returns nil for Committed.
func Explain(call string, outcome Outcome, err error, failed func(error) error, closed error) error {
	switch outcome {
	case Committed:
		return nil
	case Failed:
		return failed(err)
	case Closed:
		return closed
	case Unknown:
		return fmt.Errorf("%s: %w while its group was committing: it may have been stored", call, err)
	}
	return fmt.Errorf("%s: %w", call, err)
}
