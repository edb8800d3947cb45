// Package sqlstore is the facility catalog and plan store that the SQLite and
// PostgreSQL engines share: one implementation of the statements, the migrations
// (migrations/*.sql, text/template documents written in each engine's words),
// the plan group commit (package groupcommit) and the errors. What an engine
// does its own way is its Dialect (placeholders, column types, instants, row
// locks, the unique-key error) and its Driver: database/sql for SQLite (DBSQL),
// pgx's own interface for PostgreSQL (facilities/postgres), because pgx's
// database/sql adapter cost the PostgreSQL store more client CPU per write
// (DEVELOPERS.md, "The stores", has the figures). The engine packages open the
// connections, choose the group-commit settings and add what only they offer.
package sqlstore

import (
	"bytes"
	"context"
	"embed"
	"errors"
	"fmt"
	"io/fs"
	"path"
	"sort"
	"strconv"
	"strings"
	"text/template"
	"time"

	"scalematch/facilities"
	"scalematch/facilities/internal/groupcommit"
)

//go:embed migrations/*.sql
var migrations embed.FS

// Config is what Open needs from an engine package.
type Config struct {
	Dialect Dialect
	// Driver reaches the database. The Store owns it from Open on, and closes it,
	// also when Open fails.
	Driver Driver
	// Subject is what Ping's error names: the file, or "the database".
	Subject string
	// GroupCommit configures the plan group commit; Commit is the store's own.
	GroupCommit groupcommit.Config[QueuedPlan]
}

// Store is a facility catalog in one SQL database. It is safe for concurrent use.
type Store struct {
	d       Dialect
	q       queries
	subject string
	db      Driver
	// plans commits SavePlan calls in groups (plans.go).
	plans *groupcommit.Committer[QueuedPlan]
	// closed answers SavePlan calls made after Close or still queued when it ran.
	closed error
	// planArgs is the plan group commit's statements' arguments (only one
	// group commits at a time).
	planArgs [][]any

	now func() time.Time
	// beforeCommit, when set by a test (Hooks), runs after a write's statements
	// and before its commit; an error aborts the write.
	beforeCommit func(op string) error
}

var _ facilities.Catalog = (*Store)(nil)
var _ facilities.Seeder = (*Store)(nil)
var _ facilities.VersionReader = (*Store)(nil)

// Open checks that the database answers, applies any migrations it has not had
// yet and prepares the store's frequent statements. It does not seed; see
// facilities.SeedDemo.
func Open(ctx context.Context, cfg Config) (*Store, error) {
	s := &Store{d: cfg.Dialect, q: newQueries(cfg.Dialect), subject: cfg.Subject, db: cfg.Driver,
		closed: errors.New(cfg.Dialect.Name + ": the store is closed"),
		now:    func() time.Time { return time.Now().UTC().Truncate(time.Microsecond) }}
	gc := cfg.GroupCommit
	gc.Commit = s.commitGroup
	s.plans = groupcommit.New(gc)
	if err := s.open(ctx); err != nil {
		s.Close()
		return nil, err
	}
	return s, nil
}

func (s *Store) open(ctx context.Context) error {
	if err := s.Ping(ctx); err != nil {
		return err
	}
	if err := s.migrate(ctx); err != nil {
		return err
	}
	// The reads every plan request makes, and the plan insert.
	if err := s.db.Prepare(ctx, []string{s.q.facility, s.q.version, s.q.plan}, []string{s.q.planInsert}); err != nil {
		return fmt.Errorf("%s: preparing the statements of %s: %w", s.d.Name, s.subject, err)
	}
	return nil
}

// migrate applies the embedded migrations in order, each in its own transaction
// that first checks schema_migrations, on one session holding the driver's
// migration lock, so that processes opening one database at once apply each
// migration once.
func (s *Store) migrate(ctx context.Context) error {
	names, err := fs.Glob(migrations, "migrations/*.sql")
	if err != nil {
		return fmt.Errorf("%s: listing migrations: %w", s.d.Name, err)
	}
	sort.Strings(names)
	err = s.db.Migrate(ctx, func(conn Session) error {
		if _, err := conn.Exec(ctx, s.q.migrations); err != nil {
			return fmt.Errorf("creating schema_migrations: %w", err)
		}
		for _, name := range names {
			if err := s.apply(ctx, conn, name); err != nil {
				return fmt.Errorf("applying migration %s: %w", path.Base(name), err)
			}
		}
		return nil
	})
	if err != nil {
		return fmt.Errorf("%s: %w", s.d.Name, err)
	}
	return nil
}

// apply runs the migration in file name, written in the dialect's words, unless
// schema_migrations records it.
func (s *Store) apply(ctx context.Context, conn Session, name string) error {
	base := path.Base(name)
	n, err := strconv.Atoi(strings.SplitN(base, "_", 2)[0])
	if err != nil {
		return fmt.Errorf("no number: %w", err)
	}
	tmpl, err := template.ParseFS(migrations, name)
	if err != nil {
		return err
	}
	var body bytes.Buffer
	if err := tmpl.Option("missingkey=error").Execute(&body, s.d.Schema); err != nil {
		return err
	}
	return s.inTx(ctx, "migrate", conn.Begin, func(tx Tx) error {
		var done bool
		if err := tx.QueryRow(ctx, s.q.migrationDone, n).Scan(&done); err != nil || done {
			return err
		}
		// A migration can be comments only in one engine's words (0003 in
		// SQLite's): it is recorded as applied without running it.
		if hasStatements(body.String()) {
			if _, err := tx.Exec(ctx, body.String()); err != nil {
				return err
			}
		}
		_, err := tx.Exec(ctx, s.q.migrationDoneInsert, n, base, s.d.Instant(s.now()))
		return err
	})
}

// hasStatements reports whether the SQL text holds more than blank lines and
// -- comments.
func hasStatements(text string) bool {
	for line := range strings.Lines(text) {
		if l := strings.TrimSpace(line); l != "" && !strings.HasPrefix(l, "--") {
			return true
		}
	}
	return false
}

// tx runs fn in one write transaction and commits; any error (or a cancelled
// context) rolls everything back.
func (s *Store) tx(ctx context.Context, op string, fn func(Tx) error) error {
	return s.inTx(ctx, op, s.db.Begin, fn)
}

func (s *Store) inTx(ctx context.Context, op string, begin func(context.Context) (Tx, error), fn func(Tx) error) error {
	tx, err := begin(ctx)
	if err != nil {
		return err
	}
	defer tx.Rollback(context.Background()) //nolint:errcheck // a no-op after Commit
	if err := fn(tx); err != nil {
		return err
	}
	if s.beforeCommit != nil {
		if err := s.beforeCommit(op); err != nil {
			return err
		}
	}
	return tx.Commit(ctx)
}

// Ping reports whether the store answers a query.
func (s *Store) Ping(ctx context.Context) error {
	var one int
	if err := s.db.QueryRow(ctx, s.q.ping).Scan(&one); err != nil {
		return fmt.Errorf("%s: %s does not answer: %w", s.d.Name, s.subject, err)
	}
	return nil
}

// Close refuses further plans, lets a running group commit finish, and closes
// the driver.
func (s *Store) Close() error {
	s.plans.Close()
	return s.db.Close()
}

// Hooks are a store's insides, for the tests of the engine packages.
type Hooks struct {
	// BeforeCommit, when set, runs after a write's statements and before its
	// commit; an error aborts the write.
	BeforeCommit *func(op string) error
	// Plans is the plan group committer.
	Plans *groupcommit.Committer[QueuedPlan]
	// Closed is the error of a SavePlan call after Close.
	Closed error
}

// HooksOf returns s's insides, for the tests of the engine packages.
func HooksOf(s *Store) Hooks {
	return Hooks{BeforeCommit: &s.beforeCommit, Plans: s.plans, Closed: s.closed}
}
