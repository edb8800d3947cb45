package sqlite_test

import (
	"context"
	"path/filepath"
	"testing"

	"scalematch/facilities"
	"scalematch/facilities/catalogtest"
	"scalematch/facilities/sqlite"
)

// BenchmarkCatalog runs the shared store benchmarks (catalogtest.Bench) on a new
// catalog file for each; its writes are durable with synchronous=FULL, so each
// commit waits for its fsync.
func BenchmarkCatalog(b *testing.B) {
	catalogtest.Bench(b, func(tb testing.TB) facilities.Catalog {
		db, err := sqlite.Open(context.Background(), filepath.Join(tb.TempDir(), sqlite.FileName))
		if err != nil {
			tb.Fatal(err)
		}
		tb.Cleanup(func() { db.Close() })
		return db
	})
}
