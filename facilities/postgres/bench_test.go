package postgres_test

import (
	"context"
	"fmt"
	"strings"
	"sync/atomic"
	"testing"

	"scalematch/facilities"
	"scalematch/facilities/postgres"
)

func benchDB(b *testing.B) *postgres.DB {
	b.Helper()
	db, err := postgres.Open(context.Background(), schemaURL(b))
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { db.Close() })
	if _, err := facilities.SeedDemo(context.Background(), db, true); err != nil {
		b.Fatal(err)
	}
	return db
}

// BenchmarkFacility reads the current version of one facility.
func BenchmarkFacility(b *testing.B) {
	db := benchDB(b)
	ctx := context.Background()
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := db.Facility(ctx, "tsw-1"); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCreateFacility measures committed creates.
func BenchmarkCreateFacility(b *testing.B) {
	db := benchDB(b)
	ctx := context.Background()
	f, _ := facilities.DemoFacility("tsw-1")
	b.ReportAllocs()
	b.ResetTimer()
	i := 0
	for b.Loop() {
		f.ID = fmt.Sprintf("bench-%d", i)
		i++
		if _, err := db.CreateFacility(ctx, f, "bench"); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkUpdateFacility measures committed updates under a row lock.
func BenchmarkUpdateFacility(b *testing.B) {
	db := benchDB(b)
	ctx := context.Background()
	f, err := db.Facility(ctx, "tsw-1")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		f.Operations.SecondsPerPoint++
		if f, err = db.UpdateFacility(ctx, f, f.Version, "bench"); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSavePlan measures durable plan saves of new ids, one caller at a time
// and from 16 callers at once per core (group commit: the calls that queue while
// one transaction commits share the next).
func BenchmarkSavePlan(b *testing.B) {
	body := []byte(`{"plan":"` + strings.Repeat("x", 18000) + `"}`)
	for _, c := range []struct {
		name        string
		parallelism int
	}{{"serial", 0}, {"parallel-16", 16}} {
		b.Run(c.name, func(b *testing.B) {
			db := benchDB(b)
			ctx := context.Background()
			var n atomic.Int64
			save := func() {
				id := fmt.Sprintf("plan-%d", n.Add(1))
				if _, err := db.SavePlan(ctx, facilities.PlanRecord{ID: id, FacilityID: "tsw-1", FacilityVersion: 1, Body: body}); err != nil {
					b.Error(err)
				}
			}
			b.ReportAllocs()
			b.ResetTimer()
			if c.parallelism == 0 {
				for b.Loop() {
					save()
				}
				return
			}
			b.SetParallelism(c.parallelism)
			b.RunParallel(func(pb *testing.PB) {
				for pb.Next() {
					save()
				}
			})
		})
	}
}
