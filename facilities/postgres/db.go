package postgres

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
	"github.com/jackc/pgx/v5/pgxpool"

	"scalematch/facilities"
	"scalematch/facilities/internal/groupcommit"
	"scalematch/facilities/internal/sqlstore"
)

// migrationLock names the advisory lock held while migrations run; it is combined
// with the schema so separate schemas in one database do not wait for each other.
const migrationLock = "scalematch.migrate."

// maxGroup is the most plan records one group commit writes; a longer queue is
// committed in several groups, one after the other.
const maxGroup = 512

// dialect is PostgreSQL's: $n placeholders, jsonb and timestamptz columns, row
// locks (FOR UPDATE) so that concurrent writers of one facility queue, and
// unique-key races answered as conflicts.
var dialect = sqlstore.Dialect{
	Name:     "postgres",
	Numbered: true,
	Schema: sqlstore.Schema{Text: "text", Integer: "integer", JSON: "jsonb", Bytes: "bytea", Instant: "timestamptz",
		Deleted: "boolean NOT NULL DEFAULT false",
		At:      "at", Created: "created_at", Applied: "applied_at", Updated: "updated_at", Lease: "lease_until",
		// The store compresses plan bodies itself (S2): TOAST's pglz over them
		// cost server CPU for nothing (docs/performance.md).
		PlanBodyStorage: "ALTER TABLE plans ALTER COLUMN body SET STORAGE EXTERNAL;"},
	ForUpdate:       " FOR UPDATE",
	SkipLocked:      " FOR UPDATE SKIP LOCKED",
	Instant:         func(t time.Time) any { return t },
	UniqueViolation: func(err error) bool { var e *pgconn.PgError; return errors.As(err, &e) && e.Code == "23505" },
}

// store is the shared implementation that DB embeds.
type store = sqlstore.Store

// DB is a facility catalog in a PostgreSQL database. It is safe for concurrent use
// and for use by several processes over one database. Its methods are the shared
// store's (package facilities/internal/sqlstore), run through pgx's own
// interface (pgxDriver).
type DB struct {
	*store
}

var _ facilities.Catalog = (*DB)(nil)
var _ facilities.Seeder = (*DB)(nil)
var _ facilities.VersionReader = (*DB)(nil)

// Open connects to the database at url (postgres://user@host:port/db?...; a
// search_path parameter selects a schema) and applies any migrations it has not
// had yet, under an advisory lock so replicas starting together apply each once.
// It does not seed; see facilities.SeedDemo.
//
// Concurrent SavePlan calls share transactions (group commit): a call that finds
// no group committing starts a committer goroutine and waits for it, and a group
// waits for more plans as the shared store's ExpectPlan says (at most
// sqlstore.PlanGather).
func Open(ctx context.Context, url string) (*DB, error) {
	cfg, err := pgxpool.ParseConfig(url)
	if err != nil {
		return nil, fmt.Errorf("postgres: bad database URL: %w", err)
	}
	pool, err := pgxpool.NewWithConfig(ctx, cfg)
	if err != nil {
		return nil, fmt.Errorf("postgres: connecting: %w", err)
	}
	s, err := sqlstore.Open(ctx, sqlstore.Config{Dialect: dialect, Driver: pgxDriver{pgxRunner{pool}, pool}, Subject: "the database",
		GroupCommit: groupcommit.Config[sqlstore.QueuedPlan]{MaxGroup: maxGroup, Gather: sqlstore.PlanGather}})
	if err != nil {
		return nil, err
	}
	return &DB{s}, nil
}

// pgxDriver is the store's Driver over a pgx pool. pgx prepares and caches each
// statement on each connection by itself.
type pgxDriver struct {
	pgxRunner
	pool *pgxpool.Pool
}

func (pgxDriver) Prepare(context.Context, []string, []string) error { return nil }

func (d pgxDriver) Close() error {
	d.pool.Close()
	return nil
}

var _ sqlstore.GroupExecer = pgxDriver{}

// ExecGroup sends query once for each set of args in one pipelined batch: one
// round trip, run by the server as one implicit transaction, which has
// committed when the batch's results have all been read without an error.
func (d pgxDriver) ExecGroup(ctx context.Context, query string, args [][]any) ([]int64, error) {
	var b pgx.Batch
	for _, a := range args {
		b.Queue(query, a...)
	}
	br := d.pool.SendBatch(ctx, &b)
	n := make([]int64, len(args))
	for i := range args {
		tag, err := br.Exec()
		if err != nil {
			br.Close()
			return nil, err
		}
		n[i] = tag.RowsAffected()
	}
	if err := br.Close(); err != nil {
		return nil, err
	}
	return n, nil
}

// Migrate runs fn on one connection while holding a session advisory lock.
func (d pgxDriver) Migrate(ctx context.Context, fn func(sqlstore.Session) error) error {
	conn, err := d.pool.Acquire(ctx)
	if err != nil {
		return fmt.Errorf("migrations: %w", err)
	}
	defer conn.Release()
	const key = `hashtext($1 || coalesce(current_schema(), ''))`
	if _, err := conn.Exec(ctx, `SELECT pg_advisory_lock(`+key+`)`, migrationLock); err != nil {
		return fmt.Errorf("taking the migration lock: %w", err)
	}
	defer func() {
		// A failed unlock ends with the session; release the connection broken so
		// the pool does not reuse a session that still holds the lock.
		if _, err := conn.Exec(context.Background(), `SELECT pg_advisory_unlock(`+key+`)`, migrationLock); err != nil {
			conn.Conn().Close(context.Background())
		}
	}()
	return fn(pgxRunner{conn})
}

// pgxRunner is a pgx pool, connection or transaction as the store's Session.
type pgxRunner struct {
	q interface {
		Exec(context.Context, string, ...any) (pgconn.CommandTag, error)
		Query(context.Context, string, ...any) (pgx.Rows, error)
		QueryRow(context.Context, string, ...any) pgx.Row
		Begin(context.Context) (pgx.Tx, error)
	}
}

func (r pgxRunner) Exec(ctx context.Context, query string, args ...any) (int64, error) {
	tag, err := r.q.Exec(ctx, query, args...)
	return tag.RowsAffected(), err
}

func (r pgxRunner) QueryRow(ctx context.Context, query string, args ...any) sqlstore.Row {
	return r.q.QueryRow(ctx, query, args...)
}

func (r pgxRunner) Query(ctx context.Context, query string, args ...any) (sqlstore.Rows, error) {
	return r.q.Query(ctx, query, args...)
}

func (r pgxRunner) Begin(ctx context.Context) (sqlstore.Tx, error) {
	tx, err := r.q.Begin(ctx)
	if err != nil {
		return nil, err
	}
	return pgxTx{pgxRunner{tx}, tx}, nil
}

// pgxTx is a pgx transaction as the store's Tx.
type pgxTx struct {
	pgxRunner
	tx pgx.Tx
}

func (t pgxTx) Commit(ctx context.Context) error   { return t.tx.Commit(ctx) }
func (t pgxTx) Rollback(ctx context.Context) error { return t.tx.Rollback(ctx) }
