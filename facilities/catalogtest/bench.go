package catalogtest

import (
	"context"
	_ "embed"
	"fmt"
	"sync/atomic"
	"testing"

	"scalematch/facilities"
)

// Bench runs the store benchmarks that every facilities.Catalog engine shares, as
// sub-benchmarks of b: Facility, CreateFacility, UpdateFacility and SavePlan
// (serial and parallel-16). open must return a new, empty store for each call and
// arrange for it to be closed and removed when its testing.TB ends (Opener does);
// Bench seeds it with the demo facilities. Times are per operation (ns/op); every write is
// measured as acknowledged, that is after the engine's commit.
func Bench(b *testing.B, open func(testing.TB) facilities.Catalog) {
	seeded := func(b *testing.B) facilities.Catalog {
		b.Helper()
		c := open(b)
		if _, err := facilities.SeedDemo(context.Background(), c, true); err != nil {
			b.Fatal(err)
		}
		return c
	}
	b.Run("Facility", func(b *testing.B) { benchFacility(b, seeded(b)) })
	b.Run("CreateFacility", func(b *testing.B) { benchCreateFacility(b, seeded(b)) })
	b.Run("UpdateFacility", func(b *testing.B) { benchUpdateFacility(b, seeded(b)) })
	b.Run("SavePlan", func(b *testing.B) { benchSavePlan(b, seeded) })
}

// benchFacility is the catalog's share of planning against a stored facility:
// reading its current version (goal: well under 1 ms).
func benchFacility(b *testing.B, c facilities.Catalog) {
	ctx := context.Background()
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := c.Facility(ctx, "tsw-1"); err != nil {
			b.Fatal(err)
		}
	}
}

// benchCreateFacility measures durable creates, each waiting for its commit.
func benchCreateFacility(b *testing.B, c facilities.Catalog) {
	ctx := context.Background()
	f, _ := facilities.DemoFacility("tsw-1")
	b.ReportAllocs()
	b.ResetTimer()
	i := 0
	for b.Loop() {
		f.ID = fmt.Sprintf("bench-%d", i)
		i++
		if _, err := c.CreateFacility(ctx, f, "bench"); err != nil {
			b.Fatal(err)
		}
	}
}

// benchUpdateFacility measures durable updates with If-Match and change diffs.
func benchUpdateFacility(b *testing.B, c facilities.Catalog) {
	ctx := context.Background()
	f, err := c.Facility(ctx, "tsw-1")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		f.Operations.SecondsPerPoint++
		if f, err = c.UpdateFacility(ctx, f, f.Version, "bench"); err != nil {
			b.Fatal(err)
		}
	}
}

// planAnswer is a plan answer as the service stores it (testdata/gen.sh writes
// it): 48 kB of JSON, which the stores' compression shrinks as it shrinks real
// answers.
//
//go:embed testdata/plan-answer.json
var planAnswer []byte

// benchSavePlan measures durable plan saves of new ids (planAnswer), one
// caller at a time (each waits for its own commit) and from 16 callers at once
// per core (group commit: the calls that queue while one transaction commits
// share the next). Each sub-benchmark has a store of its own.
func benchSavePlan(b *testing.B, seeded func(*testing.B) facilities.Catalog) {
	body := planAnswer
	for _, tc := range []struct {
		name        string
		parallelism int
	}{{"serial", 0}, {"parallel-16", 16}} {
		b.Run(tc.name, func(b *testing.B) {
			c := seeded(b)
			ctx := context.Background()
			var n atomic.Int64
			save := func() {
				id := fmt.Sprintf("plan-%d", n.Add(1))
				if _, err := c.SavePlan(ctx, facilities.PlanRecord{ID: id, FacilityID: "tsw-1", FacilityVersion: 1, Body: body}); err != nil {
					b.Error(err)
				}
			}
			b.ReportAllocs()
			b.ResetTimer()
			if tc.parallelism == 0 {
				for b.Loop() {
					save()
				}
				return
			}
			b.SetParallelism(tc.parallelism)
			b.RunParallel(func(pb *testing.PB) {
				for pb.Next() {
					save()
				}
			})
		})
	}
}
