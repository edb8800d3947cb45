package sqlstore

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"sync"
	"time"

	"scalematch/facilities"
	"scalematch/facilities/internal/groupcommit"
	"scalematch/internal/check"
)

// SavePlan stores a plan record; a second save of the same id returns the first.
// A zero CreatedAt is set to the time of the first save.
//
// Concurrent calls share transactions (group commit, package groupcommit): each
// call is acknowledged only after the transaction holding its record has
// committed, so an acknowledged plan is as durable as the engine's commit makes
// it; an error of that transaction fails every call in it. A call whose context
// ends while its record still waits in the queue is removed from it and returns
// the context's error; one whose context ends while its group is committing
// returns an error saying the record may have been stored. With
// groupcommit.Config.Inline, a call that finds no group committing commits its
// own group on its own goroutine and reports that group's outcome, whatever its
// context does meanwhile.
func (s *Store) SavePlan(ctx context.Context, p facilities.PlanRecord) (facilities.PlanRecord, error) {
	if p.ID == "" {
		return facilities.PlanRecord{}, check.Invalid("plan record", []check.FieldError{{Field: "id", Message: "must not be empty"}})
	}
	if p.CreatedAt.IsZero() {
		p.CreatedAt = s.now()
	}
	// The body is compressed here, on the caller's goroutine, so that callers
	// compress in parallel and the group commit, which runs one at a time,
	// only writes (docs/performance.md).
	buf := packedPool.Get().(*[]byte)
	q := QueuedPlan{Record: p, stored: storedBody(*buf, nonNil(p.Body))}
	out, outcome, err := s.plans.Submit(ctx, q)
	if outcome != groupcommit.Unknown {
		// The group is done with q (Unknown: it may still be writing it).
		*buf = q.stored[:0]
		packedPool.Put(buf)
	}
	if outcome == groupcommit.Committed {
		return out.Record, nil
	}
	id := p.ID
	failed := func(err error) error { return s.wrap("saving plan", id, err) }
	return facilities.PlanRecord{}, groupcommit.Explain(fmt.Sprintf("%s: saving plan %q", s.d.Name, id), outcome, err, failed, s.closed)
}

// QueuedPlan is a plan record queued for a group commit with its body as
// stored (planbody.go), compressed by SavePlan before it queued.
type QueuedPlan struct {
	Record facilities.PlanRecord
	stored []byte
}

// packedPool holds SavePlan's buffers of compressed bodies (*[]byte), each
// about as long as a plan answer's S2 block may be.
var packedPool = sync.Pool{New: func() any { return new([]byte) }}

// PlanGather is the longest a group commit of plan records waits for more plans
// before it commits without them (groupcommit.Config.Gather): for the plans
// announced by ExpectPlan, and for as many plans as were in flight when the group
// before it finished. Once groups have committed, the wait is also at most the
// mean time a commit takes, so a group that waits in vain at most doubles its
// callers' wait; on a disk whose flush takes milliseconds (3.4 to 5 ms for
// fsync on the 2-core machine of docs/performance.md) that bound, not this one,
// is what applies.
const PlanGather = 10 * time.Millisecond

// ExpectPlan announces that a SavePlan call with the returned context (or one
// derived from it) is likely to follow soon, as it does when a plan request has
// been received and is being planned. A group commit that starts while plans are
// announced waits for them to be queued (at most the engine's gathering limit,
// PlanGather), so that they share its transaction and flush instead of each
// waiting for one of its own (groupcommit.Committer.Expect). Durability is
// unchanged: every call is still answered only after its own group has
// committed.
//
// The returned function withdraws the announcement; call it when the plan is
// finished, stored or not (after SavePlan it does nothing). An announcement that
// is never withdrawn nor followed by SavePlan delays each group by the
// gathering limit.
func (s *Store) ExpectPlan(ctx context.Context) (context.Context, func()) {
	return s.plans.Expect(ctx)
}

// PlanGroups returns how many group commits of plan records this store has run
// since Open and how many records they held (records/groups is the mean group
// size; a group whose transaction failed counts too).
func (s *Store) PlanGroups() (groups, records int64) {
	return s.plans.Stats()
}

// commitGroup writes the group's records in one transaction, in the order their
// calls arrived (so of two records with one id the first is kept), leaving in
// recs[i] the record as stored; an error fails the whole group. The transaction
// does not use any caller's context: one caller giving up must not abort the
// others' writes.
func (s *Store) commitGroup(recs []QueuedPlan) error {
	ctx := context.Background()
	if g, ok := s.db.(GroupExecer); ok && s.beforeCommit == nil {
		return s.execGroup(ctx, g, recs)
	}
	return s.tx(ctx, "save_plan", func(tx Tx) error {
		for i := range recs {
			p := &recs[i].Record
			p.Body = nonNil(p.Body)
			// Instants are kept to the microsecond: store and answer the same one.
			p.CreatedAt = p.CreatedAt.UTC().Truncate(time.Microsecond)
			// The body is stored compressed (planbody.go); the record answered
			// keeps it as given.
			n, err := tx.Exec(ctx, s.q.planInsert, p.ID, p.FacilityID, p.FacilityVersion, p.Label, recs[i].stored, s.d.Instant(p.CreatedAt))
			if err != nil {
				return err
			}
			if n == 1 {
				continue // stored as given: the record read back would be this one
			}
			// The id was stored before: answer with the first record.
			if *p, err = scanPlan(tx.QueryRow(ctx, s.q.plan, p.ID)); err != nil {
				return err
			}
		}
		return nil
	})
}

// execGroup is commitGroup through a driver that sends the group's inserts in
// one round trip as a transaction of their own (GroupExecer), instead of one
// round trip for each insert and two for the transaction.
func (s *Store) execGroup(ctx context.Context, g GroupExecer, recs []QueuedPlan) error {
	args := s.planArgs[:0]
	defer func() { clear(args); s.planArgs = args[:0] }()
	for i := range recs {
		p := &recs[i].Record
		p.Body = nonNil(p.Body)
		p.CreatedAt = p.CreatedAt.UTC().Truncate(time.Microsecond)
		args = append(args, []any{p.ID, p.FacilityID, p.FacilityVersion, p.Label, recs[i].stored, s.d.Instant(p.CreatedAt)})
	}
	inserted, err := g.ExecGroup(ctx, s.q.planInsert, args)
	if err != nil {
		return err
	}
	for i, n := range inserted {
		if n == 1 {
			continue
		}
		// The id was stored before: answer with the first record, which has
		// committed (stored plans are never changed nor deleted).
		if recs[i].Record, err = scanPlan(s.db.QueryRow(ctx, s.q.plan, recs[i].Record.ID)); err != nil {
			return err
		}
	}
	return nil
}

// Plan returns a stored plan record.
func (s *Store) Plan(ctx context.Context, id string) (facilities.PlanRecord, error) {
	p, err := scanPlan(s.db.QueryRow(ctx, s.q.plan, id))
	if errors.Is(err, sql.ErrNoRows) {
		return facilities.PlanRecord{}, &check.Error{Code: check.CodeNotFound, Message: fmt.Sprintf("no stored plan %q", id)}
	}
	if err != nil {
		return facilities.PlanRecord{}, fmt.Errorf("%s: reading plan %q: %w", s.d.Name, id, err)
	}
	return p, nil
}

func scanPlan(row Row) (facilities.PlanRecord, error) {
	var p facilities.PlanRecord
	var stored []byte
	if err := row.Scan(&p.ID, &p.FacilityID, &p.FacilityVersion, &p.Label, &stored, instant{&p.CreatedAt}); err != nil {
		return facilities.PlanRecord{}, err
	}
	var err error
	if p.Body, err = readBody(stored); err != nil {
		return facilities.PlanRecord{}, err
	}
	return p, nil
}

func nonNil(b []byte) []byte {
	if b == nil {
		return []byte{}
	}
	return b
}

// Plans lists plan records newest first, without their bodies, from the
// indexes plans_listing, plans_facility_listing and plans_label_listing.
func (s *Store) Plans(ctx context.Context, q facilities.ListQuery) ([]facilities.PlanRecord, string, error) {
	l, err := s.listing(q, "")
	if err != nil {
		return nil, "", err
	}
	if q.Facility != "" {
		l.add("facility_id = ?", q.Facility)
	}
	if q.Label != "" {
		l.add("label = ?", q.Label)
	}
	query, args := l.query(s, `SELECT id, facility_id, facility_version, label, {created} FROM plans`)
	rows, err := s.db.Query(ctx, query, args...)
	if err != nil {
		return nil, "", s.wrapList("plans", err)
	}
	defer rows.Close()
	var out []facilities.PlanRecord
	for rows.Next() {
		var p facilities.PlanRecord
		if err := rows.Scan(&p.ID, &p.FacilityID, &p.FacilityVersion, &p.Label, instant{&p.CreatedAt}); err != nil {
			return nil, "", s.wrapList("plans", err)
		}
		out = append(out, p)
	}
	if err := rows.Err(); err != nil {
		return nil, "", s.wrapList("plans", err)
	}
	out, next := page(out, l.limit, func(p facilities.PlanRecord) (time.Time, string) { return p.CreatedAt, p.ID })
	return out, next, nil
}
