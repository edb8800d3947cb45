package postgres_test

import (
	"context"
	"fmt"
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
