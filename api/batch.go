package api

import (
	"encoding/json"
	"fmt"
	"net/http"
	"runtime"
	"sync"
	"time"

	"github.com/gin-gonic/gin"
)

// MaxBatch is the largest number of plan requests one POST /v1/plans/batch takes.
const MaxBatch = 1000

// batchBody is the batch as first decoded: each request kept raw, so that a bad
// item fails alone with its own problem.
type batchBody struct {
	Requests []json.RawMessage `json:"requests"`
}

// batchItem is one result as written: the plan's exact bytes, or a problem.
type batchItem struct {
	Plan  json.RawMessage `json:"plan,omitempty"`
	Error *Problem        `json:"error,omitempty"`
}

// postPlanBatch answers POST /v1/plans/batch.
//
//	@Summary		Plan many tests at once
//	@Description	Up to 1000 plan requests, each exactly as POST /v1/plans takes it (SI numbers or strings with units), planned concurrently. The results are in the order of the requests; each is {"plan": …} with the plan exactly as POST /v1/plans would answer it, or {"error": problem} with the status that request would have got on its own. The batch itself fails (400) only when it is not {"requests": [...]} or has more than 1000 items.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		BatchRequest	true	"requests: a list of plan requests"
//	@Success		200		{object}	BatchResponse
//	@Failure		400		{object}	Problem	"not a batch, or more than 1000 requests"
//	@Failure		413		{object}	Problem	"body too large"
//	@Router			/v1/plans/batch [post]
func (s *Server) postPlanBatch(c *gin.Context) {
	var b batchBody
	if !s.decodeBody(c, &b) {
		return
	}
	switch {
	case b.Requests == nil:
		s.fail(c, (fieldErrors{{Field: "requests", Message: "required: a list of plan requests"}}).err())
		return
	case len(b.Requests) > MaxBatch:
		s.fail(c, (fieldErrors{{Field: "requests", Message: fmt.Sprintf("%d requests: at most %d per batch", len(b.Requests), MaxBatch)}}).err())
		return
	}
	p := s.planner().Batch()
	ctx := c.Request.Context()
	out := make([]batchItem, len(b.Requests))
	var mu sync.Mutex // guards s.problem's use of c (logging and request id)
	fail := func(i int, err error) {
		mu.Lock()
		pr := s.problem(c, err)
		mu.Unlock()
		out[i].Error = &pr
	}
	// The workers plan; each new plan is then stored by a goroutine of its own, so
	// that the store can commit many of them together (group commit) while the
	// workers plan on. The answer waits for every save.
	var saves sync.WaitGroup
	each(len(b.Requests), func(i int) {
		var req PlanRequest
		// A bad item's problem names its fields as POST /v1/plans would; its
		// position in the results says which item it is.
		if err := Decode(b.Requests[i], &req); err != nil {
			fail(i, err)
			return
		}
		t := time.Now()
		pj, err := p.planJSON(ctx, &req)
		s.observePlanner(time.Since(t))
		switch {
		case err != nil:
			fail(i, err)
		case pj.stored:
			out[i].Plan = pj.body
		default:
			saves.Go(func() {
				body, err := p.save(ctx, pj)
				if err != nil {
					fail(i, err)
					return
				}
				out[i].Plan = body
			})
		}
	})
	saves.Wait()
	body, err := batchJSON(out)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answerBytes(c, http.StatusOK, "application/json; charset=utf-8", body)
}

// batchJSON writes {"results": [...]} with each plan's bytes as they are: they are
// json.Marshal's compact output already (or the stored copy of it), so they are
// not scanned and compacted again as encoding/json does with a json.RawMessage.
func batchJSON(items []batchItem) ([]byte, error) {
	n := len(`{"results":[]}`)
	for _, it := range items {
		n += len(`{"plan":},`) + len(it.Plan)
	}
	b := make([]byte, 0, n)
	b = append(b, `{"results":[`...)
	for i, it := range items {
		if i > 0 {
			b = append(b, ',')
		}
		if it.Plan != nil {
			b = append(b, `{"plan":`...)
			b = append(b, it.Plan...)
			b = append(b, '}')
			continue
		}
		e, err := json.Marshal(batchItem{Error: it.Error})
		if err != nil {
			return nil, err
		}
		b = append(b, e...)
	}
	return append(b, `]}`...), nil
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
