package postgres_test

import (
	"testing"

	"scalematch/facilities/postgres"
	"scalematch/internal/jobs/jobstest"
)

func TestJobs(t *testing.T) {
	t.Parallel()
	jobstest.Run(t, openJobs)
}

// BenchmarkJobs runs the job store benchmarks (jobstest.Bench).
func BenchmarkJobs(b *testing.B) {
	jobstest.Bench(b, openJobs)
}

// openJobs makes a schema of its own for one test (schemaURL) and opens stores
// on it, as replicas sharing the database would.
var openJobs = jobstest.Opener(postgres.Open, schemaURL)
