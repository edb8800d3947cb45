package postgres_test

import (
	"context"
	"testing"

	"scalematch/facilities"
	"scalematch/facilities/catalogtest"
	"scalematch/facilities/postgres"
)

// BenchmarkCatalog runs the shared store benchmarks (catalogtest.Bench) on a new
// schema of the test database for each (SCALEMATCH_TEST_DATABASE_URL).
func BenchmarkCatalog(b *testing.B) {
	catalogtest.Bench(b, func(tb testing.TB) facilities.Catalog {
		db, err := postgres.Open(context.Background(), schemaURL(tb))
		if err != nil {
			tb.Fatal(err)
		}
		tb.Cleanup(func() { db.Close() })
		return db
	})
}
