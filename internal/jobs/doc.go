// Package jobs is the durable queue of the service's long requests: a job is
// stored (Store, implemented by the catalog's SQLite and PostgreSQL stores),
// claimed by one worker at a time under a lease that the worker renews, run by
// the Runner registered for its kind, and finished with its result in the same
// transaction that marks it done. A job whose worker died (its lease expired) is
// claimed again by another worker, or by the same process after a restart, and
// run again from the start: runners are deterministic, so the result is the
// same. docs/jobs.md describes the lifecycle.
package jobs
