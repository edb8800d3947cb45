package postgres

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"

	"scalematch/facilities"
	"scalematch/facilities/internal/groupcommit"
)

// maxGroup is the most plan records one group commit writes; a longer queue is
// committed in several groups, one after the other.
const maxGroup = 512

// errClosed answers SavePlan calls made after Close or still queued when it ran.
var errClosed = errors.New("postgres: the store is closed")

// planCommitter commits SavePlan calls in groups.
type planCommitter = groupcommit.Committer[facilities.PlanRecord]

// newPlanCommitter returns the group committer of db's plan records: a call that
// finds no group committing starts a committer goroutine and waits for it.
func newPlanCommitter(db *DB) *planCommitter {
	return groupcommit.New(groupcommit.Config[facilities.PlanRecord]{
		Commit:   db.commitGroup,
		MaxGroup: maxGroup,
	})
}

// SavePlan stores a plan record; a second save of the same id returns the first.
// A zero CreatedAt is set to the time of the first save.
//
// Concurrent calls share transactions (group commit, package groupcommit): each
// call is acknowledged only after the transaction holding its record has
// committed, so an acknowledged plan is as durable as the server's commit makes
// it; an error of that transaction fails every call in it. A call whose context
// ends while its record still waits in the queue is removed from it and returns
// the context's error; one whose context ends while its group is committing
// returns an error saying the record may have been stored.
func (db *DB) SavePlan(ctx context.Context, p facilities.PlanRecord) (facilities.PlanRecord, error) {
	if p.ID == "" {
		return facilities.PlanRecord{}, facilities.Invalid("plan record", []facilities.FieldError{{Field: "id", Message: "must not be empty"}})
	}
	if p.CreatedAt.IsZero() {
		p.CreatedAt = db.now()
	}
	out, outcome, err := db.plans.Submit(ctx, p)
	if outcome == groupcommit.Committed {
		return out, nil
	}
	id := p.ID
	failed := func(err error) error { return wrap("saving plan", id, err) }
	return facilities.PlanRecord{}, groupcommit.Explain(fmt.Sprintf("postgres: saving plan %q", id), outcome, err, failed, errClosed)
}

// commitGroup writes the group's records in one transaction, in the order their
// calls arrived (so of two records with one id the first is kept), leaving in
// recs[i] the record as stored; an error fails the whole group. The transaction
// does not use any caller's context: one caller giving up must not abort the
// others' writes.
func (db *DB) commitGroup(recs []facilities.PlanRecord) error {
	ctx := context.Background()
	return db.tx(ctx, "save_plan", func(tx pgx.Tx) error {
		for i := range recs {
			p := &recs[i]
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
				continue
			}
			// The id was stored before: answer with the first record.
			if *p, err = scanPlan(tx.QueryRow(ctx, planQuery, p.ID)); err != nil {
				return err
			}
		}
		return nil
	})
}

// closePlans refuses further SavePlan calls, lets a running group commit finish
// and fails the calls still queued.
func (db *DB) closePlans() {
	db.plans.Close()
}
