package app_test

import (
	"context"
	"encoding/json"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/internal/app"
)

// TestPlansAgreeUnderConcurrency plans every demo facility kind of
// BenchmarkPlanKinds (priority and weighted, cruise and 45 km) one at a time,
// then again from several goroutines at once in shuffled orders, and requires
// every answer to be the same, byte for byte, as the one planned alone. The
// planner keeps its solvers, load checks and test points in pooled scratch
// (sync.Pool) that the next plan reuses: an answer that still pointed into a
// scratch it gave back would change when another plan reused it, and one plan
// writing into another's scratch is a data race the race detector reports.
func TestPlansAgreeUnderConcurrency(t *testing.T) {
	t.Parallel()
	cases := planKindCases(t)
	var p app.Planner
	ctx := context.Background()
	alone := make([][]byte, len(cases))
	for i, c := range cases {
		res, err := p.Plan(ctx, c.req)
		require.NoError(t, err, c.name)
		alone[i], err = json.Marshal(res)
		require.NoError(t, err, c.name)
	}

	workers, rounds := 6, 2
	if testing.Short() {
		rounds = 1
	}
	type result struct {
		i   int
		res *schema.PlanResponse
		err error
	}
	results := make(chan result, workers*rounds*len(cases))
	var wg sync.WaitGroup
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			r := rand.New(rand.NewPCG(uint64(w), 17))
			for range rounds {
				for _, i := range r.Perm(len(cases)) {
					// The answers are encoded only once every plan is made:
					// one that pointed into a scratch given back would show
					// what later plans wrote there.
					res, err := p.Plan(ctx, cases[i].req)
					results <- result{i, res, err}
				}
			}
		}()
	}
	wg.Wait()
	close(results)
	n := 0
	for r := range results {
		n++
		if !assert.NoError(t, r.err, cases[r.i].name) {
			continue
		}
		b, err := json.Marshal(r.res)
		require.NoError(t, err, cases[r.i].name)
		assert.Equal(t, string(alone[r.i]), string(b), "%s planned alongside others differs from the same plan alone", cases[r.i].name)
	}
	require.Equal(t, workers*rounds*len(cases), n)
}
