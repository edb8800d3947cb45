package sqlstore

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"strings"
	"time"

	"scalematch/internal/check"
	"scalematch/internal/jobs"
)

var _ jobs.Store = (*Store)(nil)

// Enqueue stores a new queued job with its listing keys in one transaction.
func (s *Store) Enqueue(ctx context.Context, j jobs.Job) (jobs.Job, error) {
	j.State, j.Done, j.Result = jobs.Queued, 0, nil
	return s.insertJob(ctx, "enqueueing job", j)
}

// Record stores a job run at once, done with its result, with its listing keys
// in one transaction.
func (s *Store) Record(ctx context.Context, j jobs.Job) (jobs.Job, error) {
	j.State, j.Done, j.Result = jobs.Done, j.Total, nonNil(j.Result)
	return s.insertJob(ctx, "recording job", j)
}

func (s *Store) insertJob(ctx context.Context, what string, in jobs.Job) (jobs.Job, error) {
	var fe []check.FieldError
	if in.ID == "" {
		fe = append(fe, check.FieldError{Field: "id", Message: "must not be empty"})
	}
	if in.Kind == "" {
		fe = append(fe, check.FieldError{Field: "kind", Message: "must not be empty"})
	}
	if err := check.Invalid("job", fe); err != nil {
		return jobs.Job{}, err
	}
	now := s.now()
	j := jobs.Job{ID: in.ID, Kind: in.Kind, State: in.State, Request: nonNil(in.Request), Summary: in.Summary,
		Facilities: in.Facilities, Labels: in.Labels, Done: in.Done, Total: in.Total, Result: in.Result, CreatedAt: now, UpdatedAt: now}
	if len(j.Summary) == 0 {
		j.Summary = []byte("{}")
	}
	err := s.tx(ctx, "enqueue", func(tx Tx) error {
		n, err := tx.Exec(ctx, s.q.jobInsert, j.ID, j.Kind, string(j.State), j.Request, j.Summary, j.Done, j.Total, j.Result,
			s.d.Instant(now), s.d.Instant(now))
		if err != nil {
			return err
		}
		if n == 0 {
			return &check.Error{Code: check.CodeConflict, Message: fmt.Sprintf("a job %q exists", j.ID)}
		}
		var args []any
		for _, k := range []struct {
			field  string
			values []string
		}{{"facility", j.Facilities}, {"label", j.Labels}} {
			for _, v := range k.values {
				args = append(args, j.ID, k.field, v)
			}
		}
		// The keys go in statements of up to keysPerInsert rows: one round trip
		// for a few hundred labels rather than one each.
		for len(args) > 0 {
			n := min(len(args), 3*keysPerInsert)
			if _, err := tx.Exec(ctx, s.keyInsert(n/3), args[:n]...); err != nil {
				return err
			}
			args = args[n:]
		}
		return nil
	})
	if err != nil {
		return jobs.Job{}, s.wrap(what, j.ID, err)
	}
	return j, nil
}

// keysPerInsert is the most job_keys rows one INSERT writes (3 parameters
// each, well under SQLite's 32766 and PostgreSQL's 65535).
const keysPerInsert = 500

// keyInsert is the INSERT of n job_keys rows.
func (s *Store) keyInsert(n int) string {
	if n == 1 {
		return s.q.jobKeyInsert
	}
	return bind(s.d, `INSERT INTO job_keys (job_id, field, value) VALUES (?, ?, ?)`+
		strings.Repeat(", (?, ?, ?)", n-1)+` ON CONFLICT DO NOTHING`)
}

// Job returns a job with its request, result and problem.
func (s *Store) Job(ctx context.Context, id string) (jobs.Job, error) {
	var j jobs.Job
	err := s.db.QueryRow(ctx, s.q.job, id).Scan(append(jobFields(&j), &j.Request, &j.Result, &j.Problem)...)
	if errors.Is(err, sql.ErrNoRows) {
		return jobs.Job{}, &check.Error{Code: check.CodeNotFound, Message: fmt.Sprintf("no job %q", id)}
	}
	if err != nil {
		return jobs.Job{}, fmt.Errorf("%s: reading job %q: %w", s.d.Name, id, err)
	}
	return j, nil
}

// jobFields are the destinations of jobColumns.
func jobFields(j *jobs.Job) []any {
	return []any{&j.ID, &j.Kind, (*string)(&j.State), &j.Summary, &j.Done, &j.Total, &j.Owner, &j.Attempt,
		nullInstant{&j.LeaseUntil}, instant{&j.CreatedAt}, instant{&j.UpdatedAt}}
}

// Jobs lists jobs newest first, from the indexes jobs_listing and job_keys'
// primary key.
func (s *Store) Jobs(ctx context.Context, q jobs.Query) ([]jobs.Job, string, error) {
	l, err := s.listing(q.ListQuery, "")
	if err != nil {
		return nil, "", err
	}
	if q.Kind != "" {
		l.add("kind = ?", q.Kind)
	}
	for _, k := range []struct{ field, value string }{{"facility", q.Facility}, {"label", q.Label}} {
		if k.value != "" {
			l.add("EXISTS (SELECT 1 FROM job_keys k WHERE k.field = '"+k.field+"' AND k.value = ? AND k.job_id = jobs.id)", k.value)
		}
	}
	query, args := l.query(s, `SELECT `+strings.NewReplacer("{lease}", s.d.Schema.Lease, "{created}", s.d.Schema.Created,
		"{updated}", s.d.Schema.Updated).Replace(jobColumns)+` FROM jobs`)
	rows, err := s.db.Query(ctx, query, args...)
	if err != nil {
		return nil, "", s.wrapList("jobs", err)
	}
	defer rows.Close()
	var out []jobs.Job
	for rows.Next() {
		var j jobs.Job
		if err := rows.Scan(jobFields(&j)...); err != nil {
			return nil, "", s.wrapList("jobs", err)
		}
		out = append(out, j)
	}
	if err := rows.Err(); err != nil {
		return nil, "", s.wrapList("jobs", err)
	}
	out, next := page(out, l.limit, func(j jobs.Job) (time.Time, string) { return j.CreatedAt, j.ID })
	return out, next, nil
}

// Claim takes the oldest open job of kinds for owner: one UPDATE whose
// subquery picks the row (on PostgreSQL with FOR UPDATE SKIP LOCKED, so that
// concurrent claims take different rows without waiting; on SQLite inside the
// BEGIN IMMEDIATE transaction that holds the file).
func (s *Store) Claim(ctx context.Context, owner string, kinds []string, lease time.Duration) (jobs.Job, bool, error) {
	if len(kinds) == 0 || owner == "" || lease <= 0 {
		return jobs.Job{}, false, fmt.Errorf("%s: claim needs an owner, kinds and a lease", s.d.Name)
	}
	query := bind(s.d, strings.Replace(s.q.jobClaim, "{kinds}", strings.TrimSuffix(strings.Repeat("?, ", len(kinds)), ", "), 1))
	now := s.now()
	args := []any{owner, s.d.Instant(now.Add(lease)), s.d.Instant(now)}
	for _, k := range kinds {
		args = append(args, k)
	}
	args = append(args, s.d.Instant(now))
	var j jobs.Job
	found := false
	err := s.tx(ctx, "claim", func(tx Tx) error {
		err := tx.QueryRow(ctx, query, args...).Scan(append(jobFields(&j), &j.Request)...)
		if errors.Is(err, sql.ErrNoRows) {
			return nil
		}
		found = err == nil
		return err
	})
	if err != nil {
		return jobs.Job{}, false, fmt.Errorf("%s: claiming a job: %w", s.d.Name, err)
	}
	return j, found, nil
}

// Heartbeat renews a lease and records the progress.
func (s *Store) Heartbeat(ctx context.Context, l jobs.Lease, done, total int, lease time.Duration) error {
	now := s.now()
	return s.leaseWrite(ctx, "heartbeat", l, s.q.jobHeartbeat, s.d.Instant(now.Add(lease)), done, total, s.d.Instant(now))
}

// Finish stores the result and the state done in one statement.
func (s *Store) Finish(ctx context.Context, l jobs.Lease, done, total int, result []byte) error {
	return s.leaseWrite(ctx, "finish", l, s.q.jobFinish, nonNil(result), done, total, s.d.Instant(s.now()))
}

// Fail stores the problem and the state failed in one statement.
func (s *Store) Fail(ctx context.Context, l jobs.Lease, problem []byte) error {
	return s.leaseWrite(ctx, "fail", l, s.q.jobFail, nonNil(problem), s.d.Instant(s.now()))
}

// Release puts a job back in the queue.
func (s *Store) Release(ctx context.Context, l jobs.Lease) error {
	return s.leaseWrite(ctx, "release", l, s.q.jobRelease, s.d.Instant(s.now()))
}

// leaseWrite runs a write of the lease holder: query's own arguments, then the
// lease's. No row changed means the lease is not held: ErrCancelled when the job
// was cancelled, else ErrLost.
func (s *Store) leaseWrite(ctx context.Context, op string, l jobs.Lease, query string, args ...any) error {
	var state string
	err := s.tx(ctx, "job_"+op, func(tx Tx) error {
		n, err := tx.Exec(ctx, query, append(args, l.ID, l.Owner, l.Attempt)...)
		if err != nil || n == 1 {
			return err
		}
		err = tx.QueryRow(ctx, s.q.jobState, l.ID).Scan(&state)
		if errors.Is(err, sql.ErrNoRows) {
			return nil
		}
		return err
	})
	switch {
	case err != nil:
		return fmt.Errorf("%s: job %q: %s: %w", s.d.Name, l.ID, op, err)
	case state == string(jobs.Cancelled):
		return jobs.ErrCancelled
	case state != "":
		return jobs.ErrLost
	}
	return nil
}

// Cancel makes an open job cancelled.
func (s *Store) Cancel(ctx context.Context, id string) (jobs.Job, error) {
	var j jobs.Job
	var n int64
	err := s.tx(ctx, "cancel", func(tx Tx) error {
		var err error
		if n, err = tx.Exec(ctx, s.q.jobCancel, s.d.Instant(s.now()), id); err != nil {
			return err
		}
		return tx.QueryRow(ctx, s.q.job, id).Scan(append(jobFields(&j), &j.Request, &j.Result, &j.Problem)...)
	})
	if errors.Is(err, sql.ErrNoRows) {
		return jobs.Job{}, &check.Error{Code: check.CodeNotFound, Message: fmt.Sprintf("no job %q", id)}
	}
	if err != nil {
		return jobs.Job{}, fmt.Errorf("%s: cancelling job %q: %w", s.d.Name, id, err)
	}
	if n == 0 {
		return j, &check.Error{Code: check.CodeConflict, Message: fmt.Sprintf("job %q is %s already: only a queued or running job can be cancelled", id, j.State)}
	}
	return j, nil
}

// nullInstant scans an instant column that may be NULL (zero time).
type nullInstant struct{ t *time.Time }

func (n nullInstant) Scan(src any) error {
	if src == nil {
		*n.t = time.Time{}
		return nil
	}
	return instant(n).Scan(src)
}
