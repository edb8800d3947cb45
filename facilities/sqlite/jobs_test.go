package sqlite_test

import (
	"path/filepath"
	"testing"

	"scalematch/facilities/sqlite"
	"scalematch/internal/jobs/jobstest"
)

func TestJobs(t *testing.T) {
	t.Parallel()
	jobstest.Run(t, openJobs)
}

// BenchmarkJobs runs the job store benchmarks (jobstest.Bench); every write
// waits for its fsync (synchronous=FULL).
func BenchmarkJobs(b *testing.B) {
	jobstest.Bench(b, openJobs)
}

// openJobs makes a new catalog file for one test and opens stores on it, as
// processes sharing the file would.
var openJobs = jobstest.Opener(sqlite.Open, func(tb testing.TB) string {
	return filepath.Join(tb.TempDir(), sqlite.FileName)
})
