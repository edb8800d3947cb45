package postgres

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"testing"

	"github.com/jackc/pgx/v5/pgxpool"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestExecGroup checks the plan group commit's one round trip: every insert's
// count of rows comes back in order (a repeated key inserts nothing), and a
// group with one failing insert stores none of its rows, because the batch is
// one implicit transaction.
func TestExecGroup(t *testing.T) {
	t.Parallel()
	raw := serverURL(t)

	ctx := context.Background()
	pool, err := pgxpool.New(ctx, raw)
	require.NoError(t, err)
	t.Cleanup(pool.Close)
	var b [6]byte
	rand.Read(b[:])
	schema := "scalematch_test_" + hex.EncodeToString(b[:])
	_, err = pool.Exec(ctx, "CREATE SCHEMA "+schema)
	require.NoError(t, err)
	t.Cleanup(func() {
		_, err := pool.Exec(context.Background(), "DROP SCHEMA "+schema+" CASCADE")
		assert.NoError(t, err, "dropping %s", schema)
	})
	_, err = pool.Exec(ctx, "CREATE TABLE "+schema+".t (id text PRIMARY KEY)")
	require.NoError(t, err)

	d := pgxDriver{pgxRunner{pool}, pool}
	insert := "INSERT INTO " + schema + ".t (id) VALUES ($1) ON CONFLICT (id) DO NOTHING"
	n, err := d.ExecGroup(ctx, insert, [][]any{{"a"}, {"b"}, {"a"}})
	require.NoError(t, err)
	assert.Equal(t, []int64{1, 1, 0}, n, "rows inserted by each statement")

	// text cannot hold a zero byte: the second insert fails, and the first with it.
	_, err = d.ExecGroup(ctx, insert, [][]any{{"c"}, {"bad\x00id"}})
	require.Error(t, err)
	var rows int
	require.NoError(t, pool.QueryRow(ctx, "SELECT count(*) FROM "+schema+".t WHERE id = 'c'").Scan(&rows))
	assert.Zero(t, rows, "a failed group stores nothing")
}
