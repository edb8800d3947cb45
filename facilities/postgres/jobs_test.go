package postgres_test

import (
	"context"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities/postgres"
	"scalematch/internal/jobs"
	"scalematch/internal/jobs/jobstest"
)

func TestJobs(t *testing.T) {
	jobstest.Run(t, openJobs)
}

// BenchmarkJobs runs the job store benchmarks (jobstest.Bench).
func BenchmarkJobs(b *testing.B) {
	jobstest.Bench(b, openJobs)
}

// openJobs makes a schema of its own for one test and opens stores on it, as
// replicas sharing the database would.
func openJobs(tb testing.TB) func() jobs.Store {
	url := schemaURL(tb)
	return func() jobs.Store {
		db, err := postgres.Open(context.Background(), url)
		require.NoError(tb, err)
		tb.Cleanup(func() { require.NoError(tb, db.Close()) })
		return db
	}
}
