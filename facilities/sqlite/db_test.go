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

// newFile names a new catalog file in a directory of its own for one test.
func newFile(tb testing.TB) string { return filepath.Join(tb.TempDir(), "data", sqlite.FileName) }

// open opens a store on a new catalog file for one test.
var open = catalogtest.Opener(sqlite.Open, newFile)

// TestStore runs the shared suites of the catalog and the job queue, each test
// on a file of its own that one or more stores open, as processes sharing it
// would; BenchmarkJobs runs the job queue's benchmarks, every write waiting for
// its fsync (synchronous=FULL).
func TestStore(t *testing.T) {
	t.Parallel()
	catalogtest.RunEngine(t, sqlite.Open, newFile)
}

func BenchmarkJobs(b *testing.B) { jobstest.Bench(b, jobstest.Opener(sqlite.Open, newFile)) }

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
