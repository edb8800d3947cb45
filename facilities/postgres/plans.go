package postgres

import (
	"context"
	"errors"
	"fmt"
	"sync"
	"sync/atomic"
	"time"

	"github.com/jackc/pgx/v5"

	"scalematch/facilities"
)

// maxGroup is the most plan records one group commit writes; a longer queue is
// committed in several groups, one after the other.
const maxGroup = 512

// errClosed answers SavePlan calls made after Close or still queued when it ran.
var errClosed = errors.New("postgres: the store is closed")

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

	// groups and records count the group commits and the records they wrote, for
	// the tests of this package.
	groups, records atomic.Int64
}

// SavePlan stores a plan record; a second save of the same id returns the first.
// A zero CreatedAt is set to the time of the first save.
//
// Concurrent calls share transactions (group commit): each call is acknowledged
// only after the transaction holding its record has committed, so an acknowledged
// plan is as durable as the server's commit makes it; an error of that
// transaction fails every call in it. A call whose context ends while its record
// still waits in the queue is removed from it and returns the context's error;
// one whose context ends while its group is committing returns an error saying
// the record may have been stored.
func (db *DB) SavePlan(ctx context.Context, p facilities.PlanRecord) (facilities.PlanRecord, error) {
	if p.ID == "" {
		return facilities.PlanRecord{}, facilities.Invalid("plan record", []facilities.FieldError{{Field: "id", Message: "must not be empty"}})
	}
	if err := ctx.Err(); err != nil {
		return facilities.PlanRecord{}, fmt.Errorf("postgres: saving plan %q: %w", p.ID, err)
	}
	if p.CreatedAt.IsZero() {
		p.CreatedAt = db.now()
	}
	w := &planWaiter{rec: p, done: make(chan struct{})}
	c := &db.plans
	c.mu.Lock()
	if c.closed {
		c.mu.Unlock()
		return facilities.PlanRecord{}, errClosed
	}
	c.queue = append(c.queue, w)
	if !c.running {
		c.running = true
		c.wg.Add(1)
		go db.commitPlans()
	}
	c.mu.Unlock()
	select {
	case <-w.done:
		return w.out, w.err
	case <-ctx.Done():
	}
	if w.state.CompareAndSwap(waiting, abandoned) {
		return facilities.PlanRecord{}, fmt.Errorf("postgres: saving plan %q: %w", p.ID, ctx.Err())
	}
	// Taken into a group already: its outcome is reported if it is known by now.
	select {
	case <-w.done:
		return w.out, w.err
	default:
	}
	return facilities.PlanRecord{}, fmt.Errorf("postgres: saving plan %q: %w while its group was committing: it may have been stored", p.ID, ctx.Err())
}

// commitPlans commits queued plan records in groups until the queue is empty.
func (db *DB) commitPlans() {
	c := &db.plans
	defer c.wg.Done()
	for {
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
	err := db.tx(ctx, "save_plan", func(tx pgx.Tx) error {
		for _, w := range group {
			p := w.rec
			body := p.Body
			if body == nil {
				body = []byte{}
			}
			// timestamptz keeps microseconds: store and answer the same instant.
			p.CreatedAt = p.CreatedAt.UTC().Truncate(time.Microsecond)
			tag, err := tx.Exec(ctx, `INSERT INTO plans (id, facility_id, facility_version, body, created_at)
				VALUES ($1, $2, $3, $4, $5) ON CONFLICT (id) DO NOTHING`,
				p.ID, p.FacilityID, p.FacilityVersion, body, p.CreatedAt)
			if err != nil {
				return err
			}
			if tag.RowsAffected() == 1 {
				// Stored as given: the record read back would be this one.
				p.Body = body
				w.out = p
				continue
			}
			// The id was stored before: answer with the first record.
			if w.out, err = scanPlan(tx.QueryRow(ctx, planQuery, p.ID)); err != nil {
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

// closePlans refuses further SavePlan calls, lets a running group commit finish
// and fails the calls still queued.
func (db *DB) closePlans() {
	c := &db.plans
	c.mu.Lock()
	c.closed = true
	c.mu.Unlock()
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
