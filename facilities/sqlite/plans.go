package sqlite

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"time"

	"scalematch/facilities"
	"scalematch/facilities/internal/groupcommit"
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

// planCommitter commits SavePlan calls in groups.
type planCommitter = groupcommit.Committer[facilities.PlanRecord]

// newPlanCommitter returns the group committer of db's plan records: a call that
// finds no group committing commits its own on its goroutine, and a group waits
// up to maxGather for the plans announced by ExpectPlan.
func newPlanCommitter(db *DB) *planCommitter {
	return groupcommit.New(groupcommit.Config[facilities.PlanRecord]{
		Commit:   db.commitGroup,
		MaxGroup: maxGroup,
		Gather:   maxGather,
		Inline:   true,
	})
}

// SavePlan stores a plan record; a second save of the same id returns the first.
// A zero CreatedAt is set to the time of the first save.
//
// Concurrent calls share transactions (group commit, package groupcommit): each
// call is acknowledged only after the transaction holding its record has
// committed with synchronous=FULL, so an acknowledged plan is durable; an error of
// that transaction fails every call in it. A call that finds no group committing
// commits its own group on its own goroutine and reports that group's outcome,
// whatever its context does meanwhile. A queued call whose context ends while its
// record still waits is removed from the queue and returns the context's error;
// one whose context ends while its group is committing returns an error saying
// the record may have been stored.
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
	return facilities.PlanRecord{}, groupcommit.Explain(fmt.Sprintf("sqlite: saving plan %q", id), outcome, err, failed, errClosed)
}

// ExpectPlan announces that a SavePlan call with the returned context (or one
// derived from it) is likely to follow soon, as it does when a plan request has
// been received and is being planned. A group commit that starts while plans are
// announced waits for them to be queued, at most maxGather (1 ms), so that they
// share its transaction and fsync instead of each waiting for one of its own
// (groupcommit.Committer.Expect). Durability is unchanged: every call is still
// answered only after its own group has committed.
//
// The returned function withdraws the announcement; call it when the plan is
// finished, stored or not (after SavePlan it does nothing). An announcement that
// is never withdrawn nor followed by SavePlan delays each group by maxGather.
func (db *DB) ExpectPlan(ctx context.Context) (context.Context, func()) {
	return db.plans.Expect(ctx)
}

// insertPlanQuery stores one plan record unless its id is stored already.
const insertPlanQuery = `INSERT INTO plans (id, facility_id, facility_version, body, created_us)
	VALUES (?, ?, ?, ?, ?) ON CONFLICT (id) DO NOTHING`

// commitGroup writes the group's records in one transaction, in the order their
// calls arrived (so of two records with one id the first is kept), leaving in
// recs[i] the record as stored; an error fails the whole group. The transaction
// does not use any caller's context: one caller giving up must not abort the
// others' writes.
func (db *DB) commitGroup(recs []facilities.PlanRecord) error {
	ctx := context.Background()
	return db.tx(ctx, "save_plan", func(tx *sql.Tx) error {
		// Prepared on the writer connection once (Open): StmtContext reuses it.
		ins := tx.StmtContext(ctx, db.insertPlanStmt)
		defer ins.Close()
		var sel *sql.Stmt
		for i := range recs {
			p := &recs[i]
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
				continue
			}
			// The id was stored before: answer with the first record.
			if sel == nil {
				if sel, err = tx.PrepareContext(ctx, planQuery); err != nil {
					return err
				}
				defer sel.Close()
			}
			if *p, err = scanPlan(sel.QueryRowContext(ctx, p.ID)); err != nil {
				return err
			}
		}
		return nil
	})
}

// PlanGroups returns how many group commits of plan records this store has run
// since Open and how many records they held (records/groups is the mean group
// size; a group whose transaction failed counts too).
func (db *DB) PlanGroups() (groups, records int64) {
	return db.plans.Stats()
}

// closePlans refuses further SavePlan calls, lets a running group commit finish
// and fails the calls still queued.
func (db *DB) closePlans() {
	db.plans.Close()
}
