package postgres_test

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"net/url"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/catalogtest"
	"scalematch/facilities/postgres"
	"scalematch/internal/jobs/jobstest"
)

// schemaURL creates a schema of its own for one test and returns a URL whose
// search_path selects it; the schema is dropped when the test ends.
func schemaURL(t testing.TB) string {
	t.Helper()
	raw := postgres.ServerURL(t)
	ctx := context.Background()
	admin, err := pgx.Connect(ctx, raw)
	require.NoError(t, err, "connecting to the test server")
	t.Cleanup(func() { admin.Close(context.Background()) })
	var b [6]byte
	rand.Read(b[:])
	schema := "scalematch_test_" + hex.EncodeToString(b[:])
	_, err = admin.Exec(ctx, "CREATE SCHEMA "+schema)
	require.NoError(t, err)
	t.Cleanup(func() {
		_, err := admin.Exec(context.Background(), "DROP SCHEMA "+schema+" CASCADE")
		assert.NoError(t, err, "dropping %s", schema)
	})
	u, _ := url.Parse(raw)
	q := u.Query()
	q.Set("search_path", schema)
	u.RawQuery = q.Encode()
	return u.String()
}

// open opens a store on a new schema of its own for one test.
var open = catalogtest.Opener(postgres.Open, schemaURL)

// TestStore runs the shared suites of the catalog and the job queue on a schema
// of its own for each test (schemaURL), which one or more stores open as
// replicas sharing the database would; BenchmarkJobs runs the job queue's
// benchmarks the same way.
func TestStore(t *testing.T) {
	t.Parallel()
	catalogtest.RunEngine(t, postgres.Open, schemaURL)
}

func BenchmarkJobs(b *testing.B) { jobstest.Bench(b, jobstest.Opener(postgres.Open, schemaURL)) }

// TestReplicasStartTogether opens several stores on one empty schema at once, as
// replicas do: the migrations must be applied once and the demo seeded once.
func TestReplicasStartTogether(t *testing.T) {
	t.Parallel()
	const replicas = 4
	dsn := schemaURL(t)
	ctx := context.Background()
	type result struct {
		db     *postgres.DB
		seeded bool
		err    error
	}
	results := make(chan result, replicas)
	for i := 0; i < replicas; i++ {
		go func() {
			db, err := postgres.Open(ctx, dsn)
			if err != nil {
				results <- result{err: err}
				return
			}
			seeded, err := facilities.SeedDemo(ctx, db, true)
			results <- result{db: db, seeded: seeded, err: err}
		}()
	}
	var dbs []*postgres.DB
	seeds := 0
	for i := 0; i < replicas; i++ {
		r := <-results
		if !assert.NoError(t, r.err, "replica") {
			continue
		}
		dbs = append(dbs, r.db)
		if r.seeded {
			seeds++
		}
	}
	defer func() {
		for _, db := range dbs {
			db.Close()
		}
	}()
	assert.Equal(t, 1, seeds, "replicas that seeded the demo catalog")
	require.NotEmpty(t, dbs, "replicas started")
	fs, err := dbs[0].Facilities(ctx)
	require.NoError(t, err)
	assert.Len(t, fs, len(facilities.Demo()), "facilities after the replicas started")
	conn, err := pgx.Connect(ctx, dsn)
	require.NoError(t, err)
	defer conn.Close(ctx)
	var rows, versions int
	require.NoError(t, conn.QueryRow(ctx, "SELECT count(*), count(DISTINCT version) FROM schema_migrations").Scan(&rows, &versions))
	assert.Equal(t, [2]int{4, 4}, [2]int{rows, versions}, "schema_migrations rows and distinct versions: 0001 to 0004, each once")
}

func TestOpenErrors(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		url  string
	}{
		{"not a URL", "postgres://%zz"},
		{"nothing listening", "postgres://postgres@127.0.0.1:1/test?sslmode=disable&connect_timeout=2"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
			defer cancel()
			db, err := postgres.Open(ctx, tt.url)
			if err == nil {
				db.Close()
			}
			assert.Error(t, err, "Open(%q)", tt.url)
		})
	}
}
