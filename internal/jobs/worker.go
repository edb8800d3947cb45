package jobs

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"log/slog"
	"os"
	"sync"
	"sync/atomic"
	"time"
)

// Runner works one job: it computes the result of job.Request from the start,
// reporting its progress (done of total, in its own units) as it goes, and
// stops early with ctx's error when ctx ends (the job was cancelled, its lease
// was lost, or the process is shutting down). A runner must be deterministic:
// a job whose worker died is run again from the start by another worker, and
// its result must be the same.
type Runner func(ctx context.Context, job Job, progress func(done, total int)) ([]byte, error)

// Config is what a Worker needs. Zero durations and counts take the defaults
// named beside them.
type Config struct {
	Store Store
	// Runners maps each job kind the worker takes to its runner.
	Runners map[string]Runner
	// Owner names the worker in the jobs it holds; "": host name, process id
	// and a random suffix.
	Owner string
	// Lease is how long a claim holds without a heartbeat: a worker that stops
	// renewing (its process died) loses its jobs after this long. Default 30 s.
	Lease time.Duration
	// Renew is how often a worker renews the leases of its jobs. Default Lease/3.
	Renew time.Duration
	// ProgressEvery is the least time between two progress writes of one job.
	// Default 1 s.
	ProgressEvery time.Duration
	// Poll is how often an idle worker looks for jobs enqueued elsewhere (Wake
	// tells it at once of jobs enqueued by its own process). Default 1 s.
	Poll time.Duration
	// Slots is how many jobs the worker runs at once. Default 1.
	Slots int
	// MaxAttempts is how many claims a job gets: one claimed more often (its
	// runs kept dying with their process) is failed. Default 5.
	MaxAttempts int
	// Problem turns a runner's error on job into what a failed job stores (an
	// RFC 9457 problem, JSON) and says whether the failure is final; a failure
	// that is not (a store that did not answer) releases the job to be tried
	// again. nil: every error is final, stored as {"title": "job failed",
	// "detail": message}.
	Problem func(job Job, err error) (problem []byte, final bool)
	// Logger receives a line per job claimed, finished, failed, released or
	// lost; nil: slog.Default().
	Logger *slog.Logger
}

// Worker claims and runs jobs. Build it with NewWorker; Run works until its
// context ends.
type Worker struct {
	cfg   Config
	kinds []string
	wake  chan struct{}
}

// NewWorker returns a worker for cfg with its defaults filled in.
func NewWorker(cfg Config) *Worker {
	if cfg.Lease <= 0 {
		cfg.Lease = 30 * time.Second
	}
	if cfg.Renew <= 0 {
		cfg.Renew = cfg.Lease / 3
	}
	if cfg.ProgressEvery <= 0 {
		cfg.ProgressEvery = time.Second
	}
	if cfg.Poll <= 0 {
		cfg.Poll = time.Second
	}
	if cfg.Slots <= 0 {
		cfg.Slots = 1
	}
	if cfg.MaxAttempts <= 0 {
		cfg.MaxAttempts = 5
	}
	if cfg.Owner == "" {
		cfg.Owner = NewOwner()
	}
	if cfg.Logger == nil {
		cfg.Logger = slog.Default()
	}
	if cfg.Problem == nil {
		cfg.Problem = func(_ Job, err error) ([]byte, bool) {
			b, _ := json.Marshal(map[string]string{"title": "job failed", "detail": err.Error()})
			return b, true
		}
	}
	w := &Worker{cfg: cfg, wake: make(chan struct{}, 1)}
	for k := range cfg.Runners {
		w.kinds = append(w.kinds, k)
	}
	return w
}

// NewOwner returns a worker name unique to this process: host name, process id
// and 4 random bytes.
func NewOwner() string {
	host, _ := os.Hostname()
	var b [4]byte
	rand.Read(b[:])
	return fmt.Sprintf("%s-%d-%s", host, os.Getpid(), hex.EncodeToString(b[:]))
}

// Owner returns the name the worker claims jobs under.
func (w *Worker) Owner() string { return w.cfg.Owner }

// Wake tells an idle worker to look for jobs now (one was just enqueued).
func (w *Worker) Wake() {
	select {
	case w.wake <- struct{}{}:
	default:
	}
}

// Run claims and runs jobs until ctx ends. It then stops the jobs it is
// running and releases them to the queue, so that another worker (or this
// process after a restart) takes them at once, and returns when they are
// released.
func (w *Worker) Run(ctx context.Context) {
	if len(w.kinds) == 0 {
		<-ctx.Done()
		return
	}
	slots := make(chan struct{}, w.cfg.Slots)
	var running sync.WaitGroup
	defer running.Wait()
	for {
		select {
		case slots <- struct{}{}:
		case <-ctx.Done():
			return
		}
		job, ok, err := w.cfg.Store.Claim(ctx, w.cfg.Owner, w.kinds, w.cfg.Lease)
		if err != nil && ctx.Err() == nil {
			w.cfg.Logger.Warn("job claim failed", "owner", w.cfg.Owner, "err", err)
		}
		if !ok {
			<-slots
			select {
			case <-ctx.Done():
				return
			case <-w.wake:
			case <-time.After(w.cfg.Poll):
			}
			continue
		}
		running.Add(1)
		go func() {
			defer func() { <-slots; running.Done() }()
			w.work(ctx, job)
		}()
	}
}

// work runs one claimed job and writes its outcome.
func (w *Worker) work(ctx context.Context, job Job) {
	log := w.cfg.Logger.With("job", job.ID, "kind", job.Kind, "attempt", job.Attempt, "owner", w.cfg.Owner)
	lease := job.Lease()
	// The outcome is written even when ctx has ended: a shutdown releases the
	// job rather than leaving it to its lease.
	store := context.WithoutCancel(ctx)
	if job.Attempt > w.cfg.MaxAttempts {
		problem, _ := json.Marshal(map[string]string{"title": "job abandoned",
			"detail": fmt.Sprintf("the job was claimed %d times and never finished: its runs ended with their process each time", job.Attempt-1)})
		log.Warn("job abandoned", "err", w.cfg.Store.Fail(store, lease, problem))
		return
	}
	log.Info("job claimed")
	run, stop := context.WithCancelCause(ctx)
	defer stop(nil)
	var done, total atomic.Int64
	done.Store(int64(job.Done))
	total.Store(int64(job.Total))
	beat := make(chan struct{})
	go func() {
		defer close(beat)
		w.heartbeat(run, store, lease, &done, &total, stop, log)
	}()
	result, err := w.cfg.Runners[job.Kind](run, job, func(d, t int) {
		done.Store(int64(d))
		total.Store(int64(t))
	})
	stop(nil)
	<-beat
	cause := context.Cause(run)
	switch {
	case errors.Is(cause, ErrCancelled):
		log.Info("job cancelled")
	case errors.Is(cause, ErrLost):
		log.Warn("job lease lost: another worker has it")
	case err == nil:
		w.outcome(log, "job done", w.cfg.Store.Finish(store, lease, int(done.Load()), int(total.Load()), result))
	case ctx.Err() != nil:
		log.Info("job released at shutdown", "err", w.cfg.Store.Release(store, lease))
	default:
		problem, final := w.cfg.Problem(job, err)
		if !final {
			log.Warn("job released after a passing failure", "cause", err, "err", w.cfg.Store.Release(store, lease))
			return
		}
		w.outcome(log.With("cause", err), "job failed", w.cfg.Store.Fail(store, lease, problem))
	}
}

func (w *Worker) outcome(log *slog.Logger, msg string, err error) {
	if err != nil {
		log.Warn(msg+": not written", "err", err)
		return
	}
	log.Info(msg)
}

// heartbeat renews the lease every Renew and writes progress at most every
// ProgressEvery until run ends; it stops the run (stop with ErrCancelled or
// ErrLost) when the job is no longer this worker's.
func (w *Worker) heartbeat(run, store context.Context, lease Lease, done, total *atomic.Int64, stop context.CancelCauseFunc, log *slog.Logger) {
	tick := time.NewTicker(min(w.cfg.Renew, w.cfg.ProgressEvery))
	defer tick.Stop()
	last := time.Now()
	wrote := [2]int64{done.Load(), total.Load()}
	for {
		select {
		case <-run.Done():
			return
		case <-tick.C:
		}
		now := [2]int64{done.Load(), total.Load()}
		if now == wrote && time.Since(last) < w.cfg.Renew {
			continue
		}
		err := w.cfg.Store.Heartbeat(store, lease, int(now[0]), int(now[1]), w.cfg.Lease)
		switch {
		case errors.Is(err, ErrCancelled), errors.Is(err, ErrLost):
			stop(err)
			return
		case err != nil:
			// Try again at the next tick; the lease outlives a few failures.
			log.Warn("job heartbeat failed", "err", err)
			continue
		}
		wrote, last = now, time.Now()
	}
}
