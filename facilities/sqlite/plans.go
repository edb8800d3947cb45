package sqlite

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"sync"
	"sync/atomic"
	"time"

	"scalematch/facilities"
)

// maxGroup is the most plan records one group commit writes; a longer queue is
// committed in several groups, one after the other.
const maxGroup = 512

// maxGather is the longest a group commit waits for the plans announced by
// ExpectPlan to join it before it commits without them. It is of the order of one
// commit of a few plan records on this kind of machine (0.3 to 1 ms), so that a
// group that waits at most doubles its callers' wait, and only when other plans
// are known to be on their way.
const maxGather = time.Millisecond

// errClosed answers SavePlan calls made after Close or still queued when it ran.
var errClosed = errors.New("sqlite: the store is closed")

// Waiter states. A waiter is queued, then either taken into a group by the
// committer or abandoned by its caller, whichever comes first.
const (
	waiting int32 = iota
	taken
	abandoned
)

// planWaiter is one SavePlan call waiting for its group commit.
type planWaiter struct {
	rec   facilities.PlanRecord
	state atomic.Int32
	done  chan struct{} // closed when out and err are set
	out   facilities.PlanRecord
	err   error
}

// committer gathers concurrent SavePlan calls and writes them in group commits:
// while one group's transaction runs (and waits for its fsync), the calls that
// arrive queue up, and the next transaction writes all of them at once. A call
// that finds no commit running starts one at once, so a lone call waits for one
// transaction, as it would without grouping; under load each fsync serves many.
type committer struct {
	mu      sync.Mutex
	queue   []*planWaiter
	running bool // a commit goroutine is active
	closed  bool
	wg      sync.WaitGroup
	// coming counts the plans announced by ExpectPlan that have neither been
	// queued by SavePlan nor withdrawn; settled counts the announcements settled
	// either way since Open.
	coming  int
	settled int64
	// arrived (capacity 1) wakes a committer gathering its group: a record was
	// queued, an announcement withdrawn, or the store closed.
	arrived chan struct{}
	// gatherMax is how long a group waits for announced plans (maxGather; the
	// tests of this package change it).
	gatherMax time.Duration

	// groups and records count the group commits and the records they wrote
	// (PlanGroups).
	groups, records atomic.Int64
}

// SavePlan stores a plan record; a second save of the same id returns the first.
// A zero CreatedAt is set to the time of the first save.
//
// Concurrent calls share transactions (group commit): each call is acknowledged
// only after the transaction holding its record has committed with
// synchronous=FULL, so an acknowledged plan is durable; an error of that
// transaction fails every call in it. A call that finds no group committing
// commits its own group on its own goroutine and reports that group's outcome,
// whatever its context does meanwhile. A queued call whose context ends while its
// record still waits is removed from the queue and returns the context's error;
// one whose context ends while its group is committing returns an error saying
// the record may have been stored.
func (db *DB) SavePlan(ctx context.Context, p facilities.PlanRecord) (facilities.PlanRecord, error) {
	if p.ID == "" {
		return facilities.PlanRecord{}, facilities.Invalid("plan record", []facilities.FieldError{{Field: "id", Message: "must not be empty"}})
	}
	if err := ctx.Err(); err != nil {
		return facilities.PlanRecord{}, fmt.Errorf("sqlite: saving plan %q: %w", p.ID, err)
	}
	if p.CreatedAt.IsZero() {
		p.CreatedAt = db.now()
	}
	w := &planWaiter{rec: p, done: make(chan struct{})}
	c := &db.plans
	e, _ := ctx.Value(expectKey{}).(*expectation)
	c.mu.Lock()
	if e != nil && e.c == c && e.settled.CompareAndSwap(false, true) {
		c.coming--
		c.settled++
	}
	if c.closed {
		c.mu.Unlock()
		return facilities.PlanRecord{}, errClosed
	}
	c.queue = append(c.queue, w)
	inline := !c.running
	if inline {
		c.running = true
		c.wg.Add(1)
	}
	c.mu.Unlock()
	if inline {
		// No group is committing: this call commits its own on its goroutine,
		// sparing the hand-over to a committer goroutine and back.
		db.commitPlans(w)
		return w.out, w.err
	}
	c.signal()
	select {
	case <-w.done:
		return w.out, w.err
	case <-ctx.Done():
	}
	if w.state.CompareAndSwap(waiting, abandoned) {
		return facilities.PlanRecord{}, fmt.Errorf("sqlite: saving plan %q: %w", p.ID, ctx.Err())
	}
	// Taken into a group already: its outcome is reported if it is known by now.
	select {
	case <-w.done:
		return w.out, w.err
	default:
	}
	return facilities.PlanRecord{}, fmt.Errorf("sqlite: saving plan %q: %w while its group was committing: it may have been stored", p.ID, ctx.Err())
}

// expectKey is the context key of an ExpectPlan announcement.
type expectKey struct{}

// expectation is one announced plan: settled once it is queued or withdrawn.
type expectation struct {
	c       *committer
	settled atomic.Bool
}

// ExpectPlan announces that a SavePlan call with the returned context (or one
// derived from it) is likely to follow soon, as it does when a plan request has
// been received and is being planned. A group commit that starts while plans are
// announced waits for them to be queued, at most maxGather (1 ms), so that they
// share its transaction and fsync instead of each waiting for one of its own;
// the same idea as PostgreSQL's commit_delay with commit_siblings (PostgreSQL
// documentation, "WAL Configuration"). Durability is unchanged: every call is
// still answered only after its own group has committed.
//
// The returned function withdraws the announcement; call it when the plan is
// finished, stored or not (after SavePlan it does nothing). An announcement that
// is never withdrawn nor followed by SavePlan delays each group by maxGather.
func (db *DB) ExpectPlan(ctx context.Context) (context.Context, func()) {
	c := &db.plans
	e := &expectation{c: c}
	c.mu.Lock()
	c.coming++
	c.mu.Unlock()
	return context.WithValue(ctx, expectKey{}, e), e.withdraw
}

// withdraw settles an announcement that SavePlan has not settled.
func (e *expectation) withdraw() {
	if !e.settled.CompareAndSwap(false, true) {
		return
	}
	e.c.mu.Lock()
	e.c.coming--
	e.c.settled++
	e.c.mu.Unlock()
	e.c.signal()
}

// signal wakes a committer gathering its group, if one is.
func (c *committer) signal() {
	select {
	case c.arrived <- struct{}{}:
	default:
	}
}

// gather waits, at most maxGather, until as many announcements have settled as
// were outstanding when it started (or the queue holds a full group, or the store
// is closing). Plans announced while it waits are not waited for: they arrive
// as the group commits and start the next one.
func (c *committer) gather() {
	var timer *time.Timer
	c.mu.Lock()
	target := c.settled + int64(c.coming)
	c.mu.Unlock()
	for {
		c.mu.Lock()
		wait := c.settled < target && c.coming > 0 && len(c.queue) < maxGroup && !c.closed
		c.mu.Unlock()
		if !wait {
			return
		}
		if timer == nil {
			timer = time.NewTimer(c.gatherMax)
			defer timer.Stop()
		}
		select {
		case <-c.arrived:
		case <-timer.C:
			return
		}
	}
}

// insertPlanQuery stores one plan record unless its id is stored already.
const insertPlanQuery = `INSERT INTO plans (id, facility_id, facility_version, body, created_us)
	VALUES (?, ?, ?, ?, ?) ON CONFLICT (id) DO NOTHING`

// commitPlans commits queued plan records in groups until the queue is empty.
// Called by SavePlan with its own waiter, it returns as soon as that waiter's
// group has committed, leaving any records queued meanwhile to a committer
// goroutine it starts.
func (db *DB) commitPlans(own *planWaiter) {
	c := &db.plans
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
			go db.commitPlans(nil)
			return
		}
		c.gather()
		c.mu.Lock()
		n := min(len(c.queue), maxGroup)
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
		group := make([]*planWaiter, 0, len(batch))
		for _, w := range batch {
			if w.state.CompareAndSwap(waiting, taken) {
				group = append(group, w)
			}
		}
		if len(group) > 0 {
			db.commitGroup(group)
		}
	}
}

// commitGroup writes the group's records in one transaction, in the order their
// calls arrived (so of two records with one id the first is kept), and answers
// every waiter: each with the record as stored, or all with the transaction's
// error. The transaction does not use any caller's context: one caller giving up
// must not abort the others' writes.
func (db *DB) commitGroup(group []*planWaiter) {
	ctx := context.Background()
	err := db.tx(ctx, "save_plan", func(tx *sql.Tx) error {
		// Prepared on the writer connection once (Open): StmtContext reuses it.
		ins := tx.StmtContext(ctx, db.insertPlanStmt)
		defer ins.Close()
		var sel *sql.Stmt
		for _, w := range group {
			p := w.rec
			res, err := ins.ExecContext(ctx, p.ID, p.FacilityID, p.FacilityVersion, nonNil(p.Body), p.CreatedAt.UnixMicro())
			if err != nil {
				return err
			}
			if n, err := res.RowsAffected(); err != nil {
				return err
			} else if n == 1 {
				// Stored as given: the record read back would be this one.
				p.Body = nonNil(p.Body)
				p.CreatedAt = time.UnixMicro(p.CreatedAt.UnixMicro()).UTC()
				w.out = p
				continue
			}
			// The id was stored before: answer with the first record.
			if sel == nil {
				if sel, err = tx.PrepareContext(ctx, planQuery); err != nil {
					return err
				}
				defer sel.Close()
			}
			if w.out, err = scanPlan(sel.QueryRowContext(ctx, p.ID)); err != nil {
				return err
			}
		}
		return nil
	})
	db.plans.groups.Add(1)
	db.plans.records.Add(int64(len(group)))
	for _, w := range group {
		if err != nil {
			w.out, w.err = facilities.PlanRecord{}, wrap("saving plan", w.rec.ID, err)
		}
		close(w.done)
	}
}

// PlanGroups returns how many group commits of plan records this store has run
// since Open and how many records they held (records/groups is the mean group
// size; a group whose transaction failed counts too).
func (db *DB) PlanGroups() (groups, records int64) {
	return db.plans.groups.Load(), db.plans.records.Load()
}

// closePlans refuses further SavePlan calls, lets a running group commit finish
// and fails the calls still queued.
func (db *DB) closePlans() {
	c := &db.plans
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
			w.err = errClosed
			close(w.done)
		}
	}
}
