package jobstest

import (
	"context"
	"fmt"
	"testing"
	"time"

	"scalematch/facilities"
	"scalematch/internal/jobs"
)

// Bench runs the job store benchmarks as sub-benchmarks of b: Enqueue (a job
// with three facility and ten label keys), ClaimFinish (the claim of the
// oldest queued job and its finish, each a durable write), Heartbeat, and the
// listing of a page of 50 jobs among 2000, without a filter and by facility.
// open is Run's.
func Bench(b *testing.B, open func(testing.TB) func() jobs.Store) {
	ctx := context.Background()
	request := make([]byte, 4<<10) // a campaign request of a few conditions
	for i := range request {
		request[i] = 'x'
	}
	job := func(i int) jobs.Job {
		labels := make([]string, 10)
		for k := range labels {
			labels[k] = fmt.Sprintf("condition-%d", (i+k)%40)
		}
		return jobs.Job{ID: fmt.Sprintf("bench-%08d", i), Kind: "sum", Request: request,
			Facilities: []string{"tsw-1", "cn2-05", fmt.Sprintf("f-%d", i%7)}, Labels: labels}
	}
	b.Run("Enqueue", func(b *testing.B) {
		s := open(b)()
		b.ReportAllocs()
		i := 0
		for b.Loop() {
			if _, err := s.Enqueue(ctx, job(i)); err != nil {
				b.Fatal(err)
			}
			i++
		}
	})
	b.Run("ClaimFinish", func(b *testing.B) {
		s := open(b)()
		for i := range b.N {
			if _, err := s.Enqueue(ctx, job(i)); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportAllocs()
		b.ResetTimer()
		for range b.N {
			j, ok, err := s.Claim(ctx, "bench", []string{"sum"}, time.Minute)
			if err != nil || !ok {
				b.Fatal(ok, err)
			}
			if err := s.Finish(ctx, j.Lease(), 1, 1, []byte(`{"sum":1}`)); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("Heartbeat", func(b *testing.B) {
		s := open(b)()
		if _, err := s.Enqueue(ctx, job(0)); err != nil {
			b.Fatal(err)
		}
		j, _, err := s.Claim(ctx, "bench", []string{"sum"}, time.Minute)
		if err != nil {
			b.Fatal(err)
		}
		b.ReportAllocs()
		i := 0
		for b.Loop() {
			i++
			if err := s.Heartbeat(ctx, j.Lease(), i, 1<<30, time.Minute); err != nil {
				b.Fatal(err)
			}
		}
	})
	for _, q := range []struct {
		name string
		q    facilities.ListQuery
	}{{"List", facilities.ListQuery{}}, {"ListByFacility", facilities.ListQuery{Facility: "f-3"}}} {
		b.Run(q.name, func(b *testing.B) {
			s := open(b)()
			for i := range 2000 {
				if _, err := s.Enqueue(ctx, job(i)); err != nil {
					b.Fatal(err)
				}
			}
			q.q.Limit = 50
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				page, _, err := s.Jobs(ctx, jobs.Query{Kind: "sum", ListQuery: q.q})
				if err != nil || len(page) != 50 {
					b.Fatal(len(page), err)
				}
			}
		})
	}
}
