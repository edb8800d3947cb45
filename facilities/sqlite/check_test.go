package sqlite_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/sqlite"
)

// fillCatalog writes n plan records of about size bytes into a new catalog file
// and closes it; it returns the file's path.
func fillCatalog(tb testing.TB, n, size int) string {
	tb.Helper()
	path := filepath.Join(tb.TempDir(), sqlite.FileName)
	ctx := context.Background()
	db, err := sqlite.Open(ctx, path)
	require.NoError(tb, err)
	_, err = facilities.SeedDemo(ctx, db, true)
	require.NoError(tb, err)
	body := `{"x":"` + strings.Repeat("p", size) + `"}`
	for i := range n {
		_, err := db.SavePlan(ctx, facilities.PlanRecord{ID: fmt.Sprintf("plan-%05d", i), Body: []byte(body)})
		require.NoError(tb, err)
	}
	require.NoError(tb, db.Close())
	return path
}

// TestIntegrityChecks: damage inside catalog.db went unnoticed until a damaged
// plan was read; both checks find it at once.
func TestIntegrityChecks(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	path := fillCatalog(t, 200, 8000)
	db, err := sqlite.Open(ctx, path)
	require.NoError(t, err)
	require.NoError(t, db.QuickCheck(ctx), "a sound file")
	require.NoError(t, db.IntegrityCheck(ctx), "a sound file")
	require.NoError(t, db.Close())

	// Overwrite four pages in the middle of the file (4096-byte pages) with
	// garbage, as a failing disk or a careless copy might.
	f, err := os.OpenFile(path, os.O_RDWR, 0)
	require.NoError(t, err)
	st, err := f.Stat()
	require.NoError(t, err)
	page := st.Size() / 4096 / 2
	_, err = f.WriteAt([]byte(strings.Repeat("\xde\xad\xbe\xef", 4*1024)), page*4096)
	require.NoError(t, err)
	require.NoError(t, f.Close())

	db, err = sqlite.Open(ctx, path)
	require.NoError(t, err, "the damage is inside: the file still opens")
	defer db.Close()
	qerr := db.QuickCheck(ctx)
	require.Error(t, qerr)
	assert.Contains(t, qerr.Error(), "damaged")
	assert.Error(t, db.IntegrityCheck(ctx))
}

// BenchmarkQuickCheck measures serve's start-up check on a catalog of 2000 plans
// of 20 kB (about 40 MB); BenchmarkIntegrityCheck the full one.
func BenchmarkQuickCheck(b *testing.B) { benchCheck(b, (*sqlite.DB).QuickCheck) }

func BenchmarkIntegrityCheck(b *testing.B) { benchCheck(b, (*sqlite.DB).IntegrityCheck) }

func benchCheck(b *testing.B, check func(*sqlite.DB, context.Context) error) {
	path := fillCatalog(b, 2000, 20000)
	ctx := context.Background()
	db, err := sqlite.Open(ctx, path)
	require.NoError(b, err)
	defer db.Close()
	st, _ := os.Stat(path)
	b.ReportMetric(float64(st.Size())/1e6, "MB")
	b.ResetTimer()
	for b.Loop() {
		if err := check(db, ctx); err != nil {
			b.Fatal(err)
		}
	}
}
