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
func (p *Planner) PlanBatch(ctx context.Context, reqs []json.RawMessage, observe func(time.Duration)) []BatchPlan {
	out := make([]BatchPlan, len(reqs))
	// The workers plan; each new plan is then stored by a goroutine of its own, so
	// that the store can commit many of them together (group commit) while the
	// workers plan on. The answer waits for every save.
	var saves sync.WaitGroup
	each(len(reqs), func(i int) {
		var req schema.PlanRequest
		// A bad item's problem names its fields as POST /v1/plans would; its
		// position in the results says which item it is.
		if err := unitjson.Decode(reqs[i], &req); err != nil {
			out[i].Err = err
			return
		}
		t := time.Now()
		pj, err := p.planJSON(ctx, &req)
		if observe != nil {
			observe(time.Since(t))
		}
		switch {
		case err != nil:
			out[i].Err = err
		case pj.stored:
			out[i].Plan = pj.body
		default:
			saves.Go(func() {
				out[i].Plan, out[i].Err = p.save(ctx, pj)
			})
		}
	})
	saves.Wait()
	return out
}

// each calls fn(i) for i in [0, n) on a bounded pool of runtime.GOMAXPROCS(0)
// goroutines and returns when all calls have.
func each(n int, fn func(i int)) {
	workers := min(runtime.GOMAXPROCS(0), n)
	if workers <= 1 {
		for i := range n {
			fn(i)
		}
		return
	}
	next := make(chan int)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				fn(i)
			}
		}()
	}
	for i := range n {
		next <- i
	}
	close(next)
	wg.Wait()
}
