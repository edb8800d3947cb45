package sqlite_test

import (
	"context"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities/sqlite"
	"scalematch/internal/jobs"
	"scalematch/internal/jobs/jobstest"
)

func TestJobs(t *testing.T) {
	jobstest.Run(t, openJobs)
}

// BenchmarkJobs runs the job store benchmarks (jobstest.Bench); every write
// waits for its fsync (synchronous=FULL).
func BenchmarkJobs(b *testing.B) {
	jobstest.Bench(b, openJobs)
}

// openJobs makes a new catalog file for one test and opens stores on it, as
// processes sharing the file would.
func openJobs(tb testing.TB) func() jobs.Store {
	path := filepath.Join(tb.TempDir(), sqlite.FileName)
	return func() jobs.Store {
		db, err := sqlite.Open(context.Background(), path)
		require.NoError(tb, err)
		tb.Cleanup(func() { require.NoError(tb, db.Close()) })
		return db
	}
}
