package sqlite

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	_ "modernc.org/sqlite" // registers the "sqlite" database/sql driver

	"scalematch/facilities"
	"scalematch/facilities/internal/groupcommit"
	"scalematch/facilities/internal/sqlstore"
)

// FileName is the name of the catalog file inside a data directory (--data).
const FileName = "catalog.db"

// busyTimeout is how long a connection waits for another process's write lock.
const busyTimeout = 10 * time.Second

// maxGroup is the most plan records one group commit writes; a longer queue is
// committed in several groups, one after the other.
const maxGroup = 512

// dialect is SQLite's: ? placeholders, instants as microseconds since 1970 UTC,
// and no row locks (every write is one BEGIN IMMEDIATE transaction, which holds
// the whole file).
var dialect = sqlstore.Dialect{
	Name: "sqlite",
	Schema: sqlstore.Schema{Text: "TEXT", Integer: "INTEGER", JSON: "TEXT", Bytes: "BLOB", Instant: "INTEGER",
		Deleted: "INTEGER NOT NULL DEFAULT 0 CHECK (deleted IN (0, 1))",
		At:      "at_us", Created: "created_us", Applied: "applied_us", Updated: "updated_us", Lease: "lease_us"},
	Instant: func(t time.Time) any { return t.UnixMicro() },
}

// store is the shared implementation that DB embeds.
type store = sqlstore.Store

// DB is a facility catalog in one SQLite file. It is safe for concurrent use; writes
// go through a single connection, reads through a small pool. Its methods are the
// shared store's (package facilities/internal/sqlstore).
type DB struct {
	*store
	w, r *sql.DB // the one writer connection; the readers (WAL lets them run beside it)
}

var _ facilities.Catalog = (*DB)(nil)
var _ facilities.Seeder = (*DB)(nil)
var _ facilities.VersionReader = (*DB)(nil)

// Path returns the catalog file inside the data directory dir.
func Path(dir string) string { return filepath.Join(dir, FileName) }

// Open opens the catalog file at path, creating the file and its directory when
// they do not exist, and applies any migrations it has not had yet. It does not
// seed; see facilities.SeedDemo.
//
// Writes are durable with synchronous=FULL. Concurrent SavePlan calls share
// transactions (group commit): a call that finds no group committing commits its
// own on its goroutine, and a group waits for more plans as the shared store's
// ExpectPlan says (at most sqlstore.PlanGather).
func Open(ctx context.Context, path string) (*DB, error) {
	if path == "" {
		return nil, errors.New("sqlite: empty catalog path")
	}
	if strings.ContainsAny(path, "?#") {
		return nil, fmt.Errorf("sqlite: catalog path %q must not contain '?' or '#'", path)
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o750); err != nil {
		return nil, fmt.Errorf("sqlite: creating the data directory: %w", err)
	}
	ms := strconv.FormatInt(busyTimeout.Milliseconds(), 10)
	common := "_pragma=busy_timeout(" + ms + ")&_pragma=foreign_keys(1)&_pragma=synchronous(FULL)"
	w, err := sql.Open("sqlite", path+"?"+common+"&_pragma=journal_mode(WAL)&_txlock=immediate")
	if err != nil {
		return nil, fmt.Errorf("sqlite: opening %s: %w", path, err)
	}
	w.SetMaxOpenConns(1)
	w.SetMaxIdleConns(1)
	w.SetConnMaxLifetime(0)
	w.SetConnMaxIdleTime(0)
	r, err := sql.Open("sqlite", path+"?"+common+"&_pragma=query_only(1)")
	if err != nil {
		w.Close()
		return nil, fmt.Errorf("sqlite: opening %s for reading: %w", path, err)
	}
	r.SetMaxOpenConns(4)
	r.SetMaxIdleConns(4)
	s, err := sqlstore.Open(ctx, sqlstore.Config{Dialect: dialect, Driver: sqlstore.DBSQL(w, r), Subject: path,
		GroupCommit: groupcommit.Config[sqlstore.QueuedPlan]{MaxGroup: maxGroup, Gather: sqlstore.PlanGather, Inline: true}})
	if err != nil {
		return nil, err
	}
	return &DB{store: s, w: w, r: r}, nil
}
