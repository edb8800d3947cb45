package postgres_test

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"net"
	"net/url"
	"os"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"

	"scalematch/facilities"
	"scalematch/facilities/catalogtest"
	"scalematch/facilities/postgres"
)

const defaultURL = "postgres://postgres@127.0.0.1:5432/test?sslmode=disable"

// serverURL returns the test database URL, skipping the test only when no server
// answers at its address.
func serverURL(t testing.TB) string {
	t.Helper()
	raw := os.Getenv("SCALEMATCH_TEST_DATABASE_URL")
	if raw == "" {
		raw = defaultURL
	}
	u, err := url.Parse(raw)
	if err != nil {
		t.Fatalf("SCALEMATCH_TEST_DATABASE_URL: %v", err)
	}
	host := u.Host
	if u.Port() == "" {
		host = net.JoinHostPort(u.Hostname(), "5432")
	}
	conn, err := net.DialTimeout("tcp", host, 3*time.Second)
	if err != nil {
		t.Skipf("no PostgreSQL server reachable at %s (set SCALEMATCH_TEST_DATABASE_URL): %v", host, err)
	}
	conn.Close()
	return raw
}

// schemaURL creates a schema of its own for one test and returns a URL whose
// search_path selects it; the schema is dropped when the test ends.
func schemaURL(t testing.TB) string {
	t.Helper()
	raw := serverURL(t)
	ctx := context.Background()
	admin, err := pgx.Connect(ctx, raw)
	if err != nil {
		t.Fatalf("connecting to the test server: %v", err)
	}
	var b [6]byte
	rand.Read(b[:])
	schema := "scalematch_test_" + hex.EncodeToString(b[:])
	if _, err := admin.Exec(ctx, "CREATE SCHEMA "+schema); err != nil {
		admin.Close(ctx)
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if _, err := admin.Exec(context.Background(), "DROP SCHEMA "+schema+" CASCADE"); err != nil {
			t.Errorf("dropping %s: %v", schema, err)
		}
		admin.Close(context.Background())
	})
	u, _ := url.Parse(raw)
	q := u.Query()
	q.Set("search_path", schema)
	u.RawQuery = q.Encode()
	return u.String()
}

// open opens a store on a new schema of its own for one test.
var open = catalogtest.Opener(postgres.Open, schemaURL)

func TestCatalog(t *testing.T) {
	catalogtest.Run(t, open)
}

// TestReplicasStartTogether opens several stores on one empty schema at once, as
// replicas do: the migrations must be applied once and the demo seeded once.
func TestReplicasStartTogether(t *testing.T) {
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
		if r.err != nil {
			t.Errorf("replica: %v", r.err)
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
	if seeds != 1 {
		t.Errorf("%d replicas seeded the demo catalog, want exactly 1", seeds)
	}
	if len(dbs) == 0 {
		return
	}
	fs, err := dbs[0].Facilities(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(fs) != len(facilities.Demo()) {
		t.Errorf("%d facilities after the replicas started, want %d", len(fs), len(facilities.Demo()))
	}
	conn, err := pgx.Connect(ctx, dsn)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close(ctx)
	var rows, versions int
	if err := conn.QueryRow(ctx, "SELECT count(*), count(DISTINCT version) FROM schema_migrations").Scan(&rows, &versions); err != nil {
		t.Fatal(err)
	}
	if rows != versions || rows != 3 {
		t.Errorf("schema_migrations has %d rows of %d migrations, want 3 (0001 to 0003, each once)", rows, versions)
	}
}

func TestOpenErrors(t *testing.T) {
	tests := []struct {
		name string
		url  string
	}{
		{"not a URL", "postgres://%zz"},
		{"nothing listening", "postgres://postgres@127.0.0.1:1/test?sslmode=disable&connect_timeout=2"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
			defer cancel()
			db, err := postgres.Open(ctx, tt.url)
			if err == nil {
				db.Close()
				t.Fatalf("Open(%q) succeeded", tt.url)
			}
		})
	}
}
