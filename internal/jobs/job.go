package jobs

import (
	"context"
	"errors"
	"time"

	"scalematch/facilities"
)

// State is where a job is in its lifecycle.
type State string

// The states of a job. Queued and Running are open; Done, Failed and Cancelled
// are final and never change again.
const (
	// Queued: stored, waiting for a worker (also after a worker released it).
	Queued State = "queued"
	// Running: claimed by the worker named in Owner until LeaseUntil.
	Running State = "running"
	// Done: finished; Result holds the answer.
	Done State = "done"
	// Failed: the runner refused the job (Problem says why) or it was abandoned
	// after MaxAttempts attempts.
	Failed State = "failed"
	// Cancelled: a caller cancelled it before it finished.
	Cancelled State = "cancelled"
)

// Final reports whether s is a state a job never leaves.
func (s State) Final() bool { return s == Done || s == Failed || s == Cancelled }

// Job is one stored job.
type Job struct {
	// ID identifies the job; the caller of Enqueue chooses it.
	ID string
	// Kind names the Runner that works it ("campaign").
	Kind  string
	State State
	// Request is what the runner is given, as stored (JSON).
	Request []byte
	// Summary is a small JSON object the listings show (facilities, counts);
	// written at Enqueue, never changed.
	Summary []byte
	// Facilities and Labels are the values the listings filter on; written at
	// Enqueue. Job and Jobs do not read them back.
	Facilities, Labels []string
	// Done and Total are the progress of the current attempt, in the runner's
	// units (a campaign's conditions).
	Done, Total int
	// Result is the answer of a Done job (JSON); nil otherwise.
	Result []byte
	// Problem says why a Failed job failed (an RFC 9457 problem, JSON); nil
	// otherwise.
	Problem []byte
	// Owner names the worker that holds (Running) or last held the job; "" when
	// none ever did.
	Owner string
	// Attempt counts the claims of the job: 1 on its first run.
	Attempt int
	// LeaseUntil is when a Running job's lease ends; zero in the other states.
	LeaseUntil time.Time
	// CreatedAt is when the job was enqueued; UpdatedAt when it last changed
	// (state, progress or lease), UTC to the microsecond.
	CreatedAt, UpdatedAt time.Time
}

// Lease is a worker's claim on one attempt of a job: the fencing token that
// every write of the worker names, so that a worker whose lease has expired and
// been taken over can no longer change the job.
type Lease struct {
	ID, Owner string
	Attempt   int
}

// Lease returns the claim a Running job's owner holds.
func (j Job) Lease() Lease { return Lease{ID: j.ID, Owner: j.Owner, Attempt: j.Attempt} }

// Errors of the writes a lease holder makes.
var (
	// ErrLost: the lease is no longer the job's (it expired and another worker
	// claimed the job, or the job was released); nothing was written.
	ErrLost = errors.New("jobs: the lease is lost")
	// ErrCancelled: the job was cancelled; nothing was written.
	ErrCancelled = errors.New("jobs: the job was cancelled")
)

// Query selects jobs for a listing, newest first.
type Query struct {
	// Kind selects the jobs of one kind; "" any.
	Kind string
	facilities.ListQuery
}

// Store keeps jobs durably. Every method is one transaction; a write is
// durable when it returns. Implementations pass the suite in package jobstest.
type Store interface {
	// Enqueue stores a new Queued job (ID, Kind, Request, Summary, Facilities,
	// Labels, Total are taken from j) and returns it as stored; CodeConflict when
	// the id exists.
	Enqueue(ctx context.Context, j Job) (Job, error)
	// Record stores a job that was run at once, Done with j.Result and j.Total
	// conditions done, as Enqueue stores a queued one; CodeConflict when the id
	// exists.
	Record(ctx context.Context, j Job) (Job, error)
	// Job returns a job with its request and result; CodeNotFound when none.
	Job(ctx context.Context, id string) (Job, error)
	// Jobs lists jobs newest first without their request, result and problem,
	// and the cursor of the next page ("" after the last).
	Jobs(ctx context.Context, q Query) ([]Job, string, error)
	// Claim takes the oldest job of one of kinds that is Queued, or Running with
	// an expired lease, makes it Running for owner until now+lease with its
	// Attempt counted up, and returns it; false when there is none. Concurrent
	// claims, also from other processes, never take one job twice.
	Claim(ctx context.Context, owner string, kinds []string, lease time.Duration) (Job, bool, error)
	// Heartbeat renews l until now+lease and records the progress.
	Heartbeat(ctx context.Context, l Lease, done, total int, lease time.Duration) error
	// Finish makes l's job Done with result and its last progress, in one write.
	Finish(ctx context.Context, l Lease, done, total int, result []byte) error
	// Fail makes l's job Failed with problem.
	Fail(ctx context.Context, l Lease, problem []byte) error
	// Release puts l's job back in the queue (a worker shutting down).
	Release(ctx context.Context, l Lease) error
	// Cancel makes an open job Cancelled and returns it; CodeNotFound when there
	// is no such job, CodeConflict when it is already final.
	Cancel(ctx context.Context, id string) (Job, error)
}

// The lease holder's writes (Heartbeat, Finish, Fail, Release) return ErrCancelled
// when the job was cancelled and ErrLost when the lease is no longer the job's.
