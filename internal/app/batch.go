package app

import (
	"context"
	"encoding/json"
	"runtime"
	"sync"
	"time"

	"scalematch/api/schema"
	"scalematch/internal/unitjson"
)

// BatchPlan is the outcome of one request of a batch: the plan's JSON, exactly as
// PlanJSON returns it, or the error that request would have got on its own.
type BatchPlan struct {
	Plan []byte
	Err  error
}

// PlanBatch decodes each of reqs (unitjson.Decode, as a single plan request is
// decoded) and plans it, concurrently, with PlanJSON's answers: the results are
// in the order of reqs. observe, when not nil, is told how long each plan took
// (decoded request to encoded answer, without storing it). Use it on a planner
// from Batch, so that every plan of the batch uses one version of each facility.
// StreamBatch does the same holding only a few answers at a time.
func (p *Planner) PlanBatch(ctx context.Context, reqs []json.RawMessage, observe func(time.Duration)) []BatchPlan {
	out := make([]BatchPlan, len(reqs))
	p.StreamBatch(ctx, reqs, observe, func(i int, r BatchPlan) error { //nolint:errcheck // emit never fails
		out[i] = r
		return nil
	})
	return out
}

// BatchWindow is how many results of one batch StreamBatch holds at most: those
// being planned or stored and those finished but waiting for an earlier one to
// be handed on. A plan answer is about 50 kB, so a batch holds at most about
// 3 MB of answers whatever its length.
func BatchWindow() int { return max(16, 8*runtime.GOMAXPROCS(0)) }

// StreamBatch plans reqs as PlanBatch does and hands each result to emit, in
// the order of reqs, as soon as it and every one before it are ready (planned,
// and stored when new), so that the caller can send it on and let it go: at most
// BatchWindow results are held at once. emit runs on the caller's goroutine. An
// error from emit (the client is gone) stops the batch: no further request is
// planned, the plans under way finish, and StreamBatch returns that error.
func (p *Planner) StreamBatch(ctx context.Context, reqs []json.RawMessage, observe func(time.Duration), emit func(i int, r BatchPlan) error) error {
	n := len(reqs)
	window := min(BatchWindow(), n)
	// ready[i] is closed once result[i] is set; slots bounds the results held.
	result := make([]BatchPlan, n)
	ready := make([]chan struct{}, n)
	for i := range ready {
		ready[i] = make(chan struct{})
	}
	slots := make(chan struct{}, window)
	stop := make(chan struct{})
	// The workers plan; each new plan is then stored by a goroutine of its own, so
	// that the store can commit many of them together (group commit) while the
	// workers plan on.
	var work sync.WaitGroup
	plan := func(i int) {
		var req schema.PlanRequest
		// A bad item's problem names its fields as POST /v1/plans would; its
		// position in the results says which item it is.
		if err := unitjson.Decode(reqs[i], &req); err != nil {
			result[i].Err = err
			close(ready[i])
			return
		}
		t := time.Now()
		pj, err := p.planJSON(ctx, &req)
		if observe != nil {
			observe(time.Since(t))
		}
		switch {
		case err != nil:
			result[i].Err = err
		case pj.stored:
			result[i].Plan = pj.body
		default:
			work.Go(func() {
				result[i].Plan, result[i].Err = p.save(ctx, pj)
				close(ready[i])
			})
			return
		}
		close(ready[i])
	}
	// Slots are taken in the order of reqs, before an item goes to a worker, so
	// that the items held are always the next ones to emit: the one emit waits
	// for never waits for a slot.
	next := make(chan int)
	work.Go(func() {
		defer close(next)
		for i := range n {
			select {
			case slots <- struct{}{}:
				next <- i
			case <-stop:
				for j := i; j < n; j++ {
					result[j].Err = context.Canceled
					close(ready[j])
				}
				return
			}
		}
	})
	for range min(runtime.GOMAXPROCS(0), n) {
		work.Go(func() {
			for i := range next {
				plan(i)
			}
		})
	}
	var err error
	for i := range n {
		<-ready[i]
		if err == nil {
			if err = emit(i, result[i]); err != nil {
				close(stop)
			}
		}
		result[i] = BatchPlan{}
		select {
		case <-slots:
		default: // an item refused after the stop took no slot
		}
	}
	work.Wait()
	return err
}
