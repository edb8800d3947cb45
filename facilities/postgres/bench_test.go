package postgres_test

import (
	"testing"

	"scalematch/facilities/catalogtest"
)

// BenchmarkCatalog runs the shared store benchmarks (catalogtest.Bench) on a new
// schema of the test database for each (SCALEMATCH_TEST_DATABASE_URL).
func BenchmarkCatalog(b *testing.B) {
	catalogtest.Bench(b, open)
}
