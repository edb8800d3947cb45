package sqlite_test

import (
	"testing"

	"scalematch/facilities/catalogtest"
)

// BenchmarkCatalog runs the shared store benchmarks (catalogtest.Bench) on a new
// catalog file for each; its writes are durable with synchronous=FULL, so each
// commit waits for its fsync.
func BenchmarkCatalog(b *testing.B) {
	catalogtest.Bench(b, open)
}
