package sqlite_test

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/catalogtest"
	"scalematch/facilities/sqlite"
	"scalematch/internal/jobs/jobstest"
)

// open opens a new catalog file in a directory of its own for one test.
var open = catalogtest.Opener(sqlite.Open, func(tb testing.TB) string {
	return filepath.Join(tb.TempDir(), "data", sqlite.FileName)
})

func TestCatalog(t *testing.T) {
	t.Parallel()
	catalogtest.Run(t, open)
}

// openJobs makes a new catalog file for one test and opens stores on it, as
// processes sharing the file would.
var openJobs = jobstest.Opener(sqlite.Open, func(tb testing.TB) string {
	return filepath.Join(tb.TempDir(), sqlite.FileName)
})

func TestJobs(t *testing.T) {
	t.Parallel()
	jobstest.Run(t, openJobs)
}

// BenchmarkJobs runs the job store benchmarks (jobstest.Bench); every write
// waits for its fsync (synchronous=FULL).
func BenchmarkJobs(b *testing.B) {
	jobstest.Bench(b, openJobs)
}

// TestReopen checks that a closed store opens again with its data, that the
// migrations are recorded once, and that a reopened store is not seeded again.
func TestReopen(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "nested", "dir", sqlite.FileName)
	db, err := sqlite.Open(ctx, path)
	require.NoError(t, err)
	seeded, err := facilities.SeedDemo(ctx, db, true)
	require.NoError(t, err)
	require.True(t, seeded, "first start seeds the demo catalog")
	f, err := db.Facility(ctx, "tsw-1")
	require.NoError(t, err)
	f.Name = "edited before the restart"
	_, err = db.UpdateFacility(ctx, f, f.Version, "staff")
	require.NoError(t, err)
	require.NoError(t, db.Close())

	db, err = sqlite.Open(ctx, path)
	require.NoError(t, err, "reopening")
	defer db.Close()
	seeded, err = facilities.SeedDemo(ctx, db, true)
	require.NoError(t, err)
	assert.False(t, seeded, "second start: no seed")
	got, err := db.Facility(ctx, "tsw-1")
	require.NoError(t, err)
	assert.Equal(t, 2, got.Version, "version after reopening")
	assert.Equal(t, f.Name, got.Name, "name after reopening")
	fs, err := db.Facilities(ctx)
	require.NoError(t, err)
	assert.Len(t, fs, len(facilities.Demo()), "facilities after reopening")
}

func TestOpenErrors(t *testing.T) {
	t.Parallel()
	file := filepath.Join(t.TempDir(), "a-file")
	require.NoError(t, os.WriteFile(file, []byte(strings.Repeat("not a database file ", 400)), 0o600))
	tests := []struct {
		name string
		path string
	}{
		{"empty path", ""},
		{"query characters", filepath.Join(t.TempDir(), "x?mode=ro")},
		{"directory under a file", filepath.Join(file, sqlite.FileName)},
		{"not a database", file},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			db, err := sqlite.Open(context.Background(), tt.path)
			if err == nil {
				db.Close()
			}
			assert.Error(t, err, "Open(%q)", tt.path)
		})
	}
}

func TestPath(t *testing.T) {
	t.Parallel()
	assert.Equal(t, filepath.Join("/srv/data", "catalog.db"), sqlite.Path("/srv/data"))
}
