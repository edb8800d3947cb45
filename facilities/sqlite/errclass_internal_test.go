package sqlite

import (
	"context"
	"encoding/base64"
	"errors"
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	sqlite3 "modernc.org/sqlite/lib"

	"scalematch/facilities"
)

// TestFullDatabaseIsStorageFull fills a real catalog: PRAGMA max_page_count caps
// the file a few pages above its size, so that SQLite itself answers SQLITE_FULL,
// as on a full disk (https://www.sqlite.org/pragma.html#pragma_max_page_count).
// The plan save that fails is classified facilities.ErrStorageFull, and a read
// still works.
func TestFullDatabaseIsStorageFull(t *testing.T) {
	t.Parallel()
	db := openInternal(t)
	ctx := context.Background()
	var pages int
	require.NoError(t, db.w.QueryRowContext(ctx, `PRAGMA page_count`).Scan(&pages))
	_, err := db.w.ExecContext(ctx, fmt.Sprintf(`PRAGMA max_page_count = %d`, pages+4))
	require.NoError(t, err)
	// Random text, which the store's compression cannot shrink much.
	noise := make([]byte, 48<<10)
	rng := rand.New(rand.NewPCG(1, 2))
	for i := range noise {
		noise[i] = byte(rng.Uint32())
	}
	body := []byte(`{"plan":"` + base64.StdEncoding.EncodeToString(noise) + `"}`)
	var saveErr error
	for i := range 64 {
		_, saveErr = db.SavePlan(ctx, facilities.PlanRecord{ID: fmt.Sprintf("p%03d", i), Body: body})
		if saveErr != nil {
			break
		}
	}
	require.Error(t, saveErr, "64 plans of 64 KiB fitted in 4 pages")
	got := db.ClassifyError(saveErr)
	assert.ErrorIs(t, got, facilities.ErrStorageFull, "%v", saveErr)
	assert.NotErrorIs(t, got, facilities.ErrUnavailable)
	_, err = db.Facilities(ctx)
	assert.NoError(t, err, "reads go on while the disk is full")
}

func TestClassOf(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		code int
		want error
	}{
		{"full", sqlite3.SQLITE_FULL, facilities.ErrStorageFull},
		{"busy", sqlite3.SQLITE_BUSY, facilities.ErrUnavailable},
		{"busy, extended (snapshot)", sqlite3.SQLITE_BUSY_SNAPSHOT, facilities.ErrUnavailable},
		{"locked", sqlite3.SQLITE_LOCKED, facilities.ErrUnavailable},
		{"cannot open", sqlite3.SQLITE_CANTOPEN, facilities.ErrUnavailable},
		{"corrupt is a fault, not a class", sqlite3.SQLITE_CORRUPT, nil},
		{"constraint", sqlite3.SQLITE_CONSTRAINT, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			assert.True(t, errors.Is(classOf(tc.code), tc.want) || classOf(tc.code) == tc.want)
		})
	}
}
