package postgres

import (
	"context"
	"embed"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"path"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
	"github.com/jackc/pgx/v5/pgxpool"

	"scalematch/facilities"
)

//go:embed migrations/*.sql
var migrations embed.FS

// migrationLock names the advisory lock held while migrations run; it is combined
// with the schema so separate schemas in one database do not wait for each other.
const migrationLock = "scalematch.migrate."

// DB is a facility catalog in a PostgreSQL database. It is safe for concurrent use
// and for use by several processes over one database.
type DB struct {
	pool *pgxpool.Pool
	// plans commits SavePlan calls in groups (plans.go).
	plans *planCommitter
	now   func() time.Time
	// beforeCommit, when set by a test of this package, runs after a write's
	// statements and before its commit; an error aborts the write.
	beforeCommit func(op string) error
}

var _ facilities.Catalog = (*DB)(nil)
var _ facilities.Seeder = (*DB)(nil)
var _ facilities.VersionReader = (*DB)(nil)

// CurrentVersion returns the current version of a facility without reading its
// record (one indexed row); CodeNotFound when it does not exist or was deleted.
func (db *DB) CurrentVersion(ctx context.Context, id string) (int, error) {
	var version int
	err := db.pool.QueryRow(ctx, `SELECT version FROM facilities WHERE id = $1 AND NOT deleted`, id).Scan(&version)
	if errors.Is(err, pgx.ErrNoRows) {
		return 0, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return 0, fmt.Errorf("postgres: reading the version of facility %q: %w", id, err)
	}
	return version, nil
}

// Open connects to the database at url (postgres://user@host:port/db?...; a
// search_path parameter selects a schema) and applies any migrations it has not
// had yet, under an advisory lock so replicas starting together apply each once.
// It does not seed; see facilities.SeedDemo.
func Open(ctx context.Context, url string) (*DB, error) {
	cfg, err := pgxpool.ParseConfig(url)
	if err != nil {
		return nil, fmt.Errorf("postgres: bad database URL: %w", err)
	}
	pool, err := pgxpool.NewWithConfig(ctx, cfg)
	if err != nil {
		return nil, fmt.Errorf("postgres: connecting: %w", err)
	}
	db := &DB{pool: pool, now: func() time.Time { return time.Now().UTC().Truncate(time.Microsecond) }}
	db.plans = newPlanCommitter(db)
	if err := db.Ping(ctx); err != nil {
		pool.Close()
		return nil, err
	}
	if err := db.migrate(ctx); err != nil {
		pool.Close()
		return nil, err
	}
	return db, nil
}

// migrate applies the embedded migrations in order, each in its own transaction,
// while holding a session advisory lock.
func (db *DB) migrate(ctx context.Context) error {
	conn, err := db.pool.Acquire(ctx)
	if err != nil {
		return fmt.Errorf("postgres: migrations: %w", err)
	}
	defer conn.Release()
	const key = `hashtext($1 || coalesce(current_schema(), ''))`
	if _, err := conn.Exec(ctx, `SELECT pg_advisory_lock(`+key+`)`, migrationLock); err != nil {
		return fmt.Errorf("postgres: taking the migration lock: %w", err)
	}
	defer func() {
		// A failed unlock ends with the session; release the connection broken so
		// the pool does not reuse a session that still holds the lock.
		if _, err := conn.Exec(context.Background(), `SELECT pg_advisory_unlock(`+key+`)`, migrationLock); err != nil {
			conn.Conn().Close(context.Background())
		}
	}()
	if _, err := conn.Exec(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (
		version integer PRIMARY KEY, name text NOT NULL, applied_at timestamptz NOT NULL)`); err != nil {
		return fmt.Errorf("postgres: creating schema_migrations: %w", err)
	}
	names, err := fs.Glob(migrations, "migrations/*.sql")
	if err != nil {
		return fmt.Errorf("postgres: listing migrations: %w", err)
	}
	sort.Strings(names)
	for _, name := range names {
		base := path.Base(name)
		n, err := strconv.Atoi(strings.SplitN(base, "_", 2)[0])
		if err != nil {
			return fmt.Errorf("postgres: migration %s has no number: %w", base, err)
		}
		body, err := migrations.ReadFile(name)
		if err != nil {
			return fmt.Errorf("postgres: reading migration %s: %w", base, err)
		}
		err = pgx.BeginFunc(ctx, conn, func(tx pgx.Tx) error {
			var done bool
			if err := tx.QueryRow(ctx, `SELECT EXISTS (SELECT 1 FROM schema_migrations WHERE version = $1)`, n).Scan(&done); err != nil {
				return err
			}
			if done {
				return nil
			}
			if _, err := tx.Exec(ctx, string(body)); err != nil {
				return err
			}
			_, err := tx.Exec(ctx, `INSERT INTO schema_migrations (version, name, applied_at) VALUES ($1, $2, $3)`, n, base, db.now())
			return err
		})
		if err != nil {
			return fmt.Errorf("postgres: applying migration %s: %w", base, err)
		}
	}
	return nil
}

// tx runs fn in one transaction and commits; any error (or a cancelled context)
// rolls everything back.
func (db *DB) tx(ctx context.Context, op string, fn func(pgx.Tx) error) error {
	tx, err := db.pool.Begin(ctx)
	if err != nil {
		return err
	}
	defer tx.Rollback(context.Background()) //nolint:errcheck // a no-op after Commit
	if err := fn(tx); err != nil {
		return err
	}
	if db.beforeCommit != nil {
		if err := db.beforeCommit(op); err != nil {
			return err
		}
	}
	return tx.Commit(ctx)
}

// Ping reports whether the database answers a query.
func (db *DB) Ping(ctx context.Context) error {
	var one int
	if err := db.pool.QueryRow(ctx, `SELECT 1`).Scan(&one); err != nil {
		return fmt.Errorf("postgres: the database does not answer: %w", err)
	}
	return nil
}

// Close closes every connection of the pool.
func (db *DB) Close() error {
	db.closePlans()
	db.pool.Close()
	return nil
}

const currentQuery = `SELECT f.version, v.body FROM facilities f
	JOIN facility_versions v ON v.facility_id = f.id AND v.version = f.version
	WHERE NOT f.deleted`

// Facilities lists the current, not deleted facilities ordered by id.
func (db *DB) Facilities(ctx context.Context) ([]facilities.Facility, error) {
	rows, err := db.pool.Query(ctx, currentQuery+` ORDER BY f.id`)
	if err != nil {
		return nil, fmt.Errorf("postgres: listing facilities: %w", err)
	}
	defer rows.Close()
	out := []facilities.Facility{}
	for rows.Next() {
		var version int
		var body []byte
		if err := rows.Scan(&version, &body); err != nil {
			return nil, fmt.Errorf("postgres: listing facilities: %w", err)
		}
		f, err := decodeFacility(body, version)
		if err != nil {
			return nil, err
		}
		out = append(out, f)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("postgres: listing facilities: %w", err)
	}
	return out, nil
}

// Facility returns the current version of a facility.
func (db *DB) Facility(ctx context.Context, id string) (facilities.Facility, error) {
	var version int
	var body []byte
	err := db.pool.QueryRow(ctx, currentQuery+` AND f.id = $1`, id).Scan(&version, &body)
	if errors.Is(err, pgx.ErrNoRows) {
		return facilities.Facility{}, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return facilities.Facility{}, fmt.Errorf("postgres: reading facility %q: %w", id, err)
	}
	return decodeFacility(body, version)
}

// FacilityVersion returns one stored version of a facility, deleted or not. The
// version recording a deletion has no facility and is CodeNotFound.
func (db *DB) FacilityVersion(ctx context.Context, id string, version int) (facilities.Facility, error) {
	var body []byte
	err := db.pool.QueryRow(ctx, `SELECT body FROM facility_versions WHERE facility_id = $1 AND version = $2`,
		id, version).Scan(&body)
	if errors.Is(err, pgx.ErrNoRows) || (err == nil && body == nil) {
		return facilities.Facility{}, &facilities.Error{Code: facilities.CodeNotFound,
			Message: fmt.Sprintf("facility %q has no version %d", id, version)}
	}
	if err != nil {
		return facilities.Facility{}, fmt.Errorf("postgres: reading facility %q version %d: %w", id, version, err)
	}
	return decodeFacility(body, version)
}

// CreateFacility stores a new facility as version 1, or a deleted id again as its
// next version.
func (db *DB) CreateFacility(ctx context.Context, f facilities.Facility, by facilities.Actor) (facilities.Facility, error) {
	if err := facilities.CheckRecord(f); err != nil {
		return facilities.Facility{}, err
	}
	body, err := facilities.CanonicalJSON(f)
	if err != nil {
		return facilities.Facility{}, err
	}
	var version int
	err = db.tx(ctx, "create", func(tx pgx.Tx) error {
		version, err = db.create(ctx, tx, f.ID, body, by)
		return err
	})
	if err != nil {
		return facilities.Facility{}, wrap("creating facility", f.ID, err)
	}
	f.Version = version
	return f, nil
}

// create stores body as the next version of id inside tx. A concurrent create of
// the same new id waits on the primary key and then finds the row.
func (db *DB) create(ctx context.Context, tx pgx.Tx, id string, body []byte, by facilities.Actor) (int, error) {
	tag, err := tx.Exec(ctx, `INSERT INTO facilities (id, version, deleted) VALUES ($1, 1, false) ON CONFLICT (id) DO NOTHING`, id)
	if err != nil {
		return 0, err
	}
	version := 1
	if tag.RowsAffected() == 0 {
		var current int
		var deleted bool
		if err := tx.QueryRow(ctx, `SELECT version, deleted FROM facilities WHERE id = $1 FOR UPDATE`, id).Scan(&current, &deleted); err != nil {
			return 0, err
		}
		if !deleted {
			return 0, &facilities.Error{Code: facilities.CodeConflict,
				Message: fmt.Sprintf("facility %q exists (version %d); change it with PUT and If-Match", id, current)}
		}
		version = current + 1
		if _, err := tx.Exec(ctx, `UPDATE facilities SET version = $1, deleted = false WHERE id = $2`, version, id); err != nil {
			return 0, err
		}
	}
	fields, err := facilities.ChangedFields(nil, body)
	if err != nil {
		return 0, err
	}
	return version, db.insertVersion(ctx, tx, id, version, "create", by, fields, body)
}

// UpdateFacility replaces a facility when its current version equals ifMatch.
func (db *DB) UpdateFacility(ctx context.Context, f facilities.Facility, ifMatch int, by facilities.Actor) (facilities.Facility, error) {
	if err := facilities.CheckRecord(f); err != nil {
		return facilities.Facility{}, err
	}
	body, err := facilities.CanonicalJSON(f)
	if err != nil {
		return facilities.Facility{}, err
	}
	var version int
	err = db.tx(ctx, "update", func(tx pgx.Tx) error {
		prev, err := db.current(ctx, tx, f.ID, ifMatch)
		if err != nil {
			return err
		}
		fields, err := facilities.ChangedFields(prev, body)
		if err != nil {
			return err
		}
		version = ifMatch + 1
		if _, err := tx.Exec(ctx, `UPDATE facilities SET version = $1 WHERE id = $2`, version, f.ID); err != nil {
			return err
		}
		return db.insertVersion(ctx, tx, f.ID, version, "update", by, fields, body)
	})
	if err != nil {
		return facilities.Facility{}, wrap("updating facility", f.ID, err)
	}
	f.Version = version
	return f, nil
}

// DeleteFacility marks a facility deleted when its current version equals ifMatch;
// the deletion is recorded as the next version, without a body.
func (db *DB) DeleteFacility(ctx context.Context, id string, ifMatch int, by facilities.Actor) error {
	err := db.tx(ctx, "delete", func(tx pgx.Tx) error {
		if _, err := db.current(ctx, tx, id, ifMatch); err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, `UPDATE facilities SET version = $1, deleted = true WHERE id = $2`, ifMatch+1, id); err != nil {
			return err
		}
		return db.insertVersion(ctx, tx, id, ifMatch+1, "delete", by, []string{}, nil)
	})
	return wrap("deleting facility", id, err)
}

// current locks id's row for the rest of tx, checks that the facility exists, is
// not deleted and is at version ifMatch, and returns its current body. Concurrent
// writers queue on the lock and each sees the version its predecessor committed.
func (db *DB) current(ctx context.Context, tx pgx.Tx, id string, ifMatch int) ([]byte, error) {
	var version int
	var deleted bool
	err := tx.QueryRow(ctx, `SELECT version, deleted FROM facilities WHERE id = $1 FOR UPDATE`, id).Scan(&version, &deleted)
	if errors.Is(err, pgx.ErrNoRows) || (err == nil && deleted) {
		return nil, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return nil, err
	}
	if version != ifMatch {
		return nil, facilities.StaleVersion(id, version, ifMatch)
	}
	var body []byte
	if err := tx.QueryRow(ctx, `SELECT body FROM facility_versions WHERE facility_id = $1 AND version = $2`, id, version).Scan(&body); err != nil {
		return nil, err
	}
	return body, nil
}

func (db *DB) insertVersion(ctx context.Context, tx pgx.Tx, id string, version int, action string,
	by facilities.Actor, fields []string, body []byte) error {
	fj, err := json.Marshal(fields)
	if err != nil {
		return err
	}
	var b any
	if body != nil {
		b = string(body)
	}
	_, err = tx.Exec(ctx, `INSERT INTO facility_versions (facility_id, version, action, actor, fields, body, at)
		VALUES ($1, $2, $3, $4, $5::jsonb, $6::jsonb, $7)`, id, version, action, string(by), string(fj), b, db.now())
	return err
}

// Versions lists every change of a facility, oldest first.
func (db *DB) Versions(ctx context.Context, id string) ([]facilities.Change, error) {
	rows, err := db.pool.Query(ctx, `SELECT version, action, actor, fields, body, at
		FROM facility_versions WHERE facility_id = $1 ORDER BY version`, id)
	if err != nil {
		return nil, fmt.Errorf("postgres: listing versions of %q: %w", id, err)
	}
	defer rows.Close()
	out := []facilities.Change{}
	for rows.Next() {
		var c facilities.Change
		var actor string
		var fields, body []byte
		if err := rows.Scan(&c.Version, &c.Action, &actor, &fields, &body, &c.At); err != nil {
			return nil, fmt.Errorf("postgres: listing versions of %q: %w", id, err)
		}
		c.By = facilities.Actor(actor)
		c.At = c.At.UTC()
		if err := json.Unmarshal(fields, &c.Fields); err != nil {
			return nil, fmt.Errorf("postgres: version %d of %q: changed fields: %w", c.Version, id, err)
		}
		if body != nil {
			f, err := decodeFacility(body, c.Version)
			if err != nil {
				return nil, err
			}
			c.Facility = &f
		}
		out = append(out, c)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("postgres: listing versions of %q: %w", id, err)
	}
	if len(out) == 0 {
		return nil, facilities.FacilityNotFound(id)
	}
	return out, nil
}

const planQuery = `SELECT id, facility_id, facility_version, body, created_at FROM plans WHERE id = $1`

// Plan returns a stored plan record.
func (db *DB) Plan(ctx context.Context, id string) (facilities.PlanRecord, error) {
	p, err := scanPlan(db.pool.QueryRow(ctx, planQuery, id))
	if errors.Is(err, pgx.ErrNoRows) {
		return facilities.PlanRecord{}, &facilities.Error{Code: facilities.CodeNotFound, Message: fmt.Sprintf("no stored plan %q", id)}
	}
	if err != nil {
		return facilities.PlanRecord{}, fmt.Errorf("postgres: reading plan %q: %w", id, err)
	}
	return p, nil
}

func scanPlan(row pgx.Row) (facilities.PlanRecord, error) {
	var p facilities.PlanRecord
	if err := row.Scan(&p.ID, &p.FacilityID, &p.FacilityVersion, &p.Body, &p.CreatedAt); err != nil {
		return facilities.PlanRecord{}, err
	}
	if p.Body == nil {
		p.Body = []byte{}
	}
	p.CreatedAt = p.CreatedAt.UTC()
	return p, nil
}

// SeedOnce stores fs as version 1 each, by the given actor, and records the seed,
// all in one transaction, unless a seed was recorded before or the store already
// has facilities (then it records the seed and stores nothing). Replicas starting
// together queue on the seed record; one seeds, the others find it.
func (db *DB) SeedOnce(ctx context.Context, fs []facilities.Facility, by facilities.Actor) (bool, error) {
	seeded := false
	err := db.tx(ctx, "seed", func(tx pgx.Tx) error {
		tag, err := tx.Exec(ctx, `INSERT INTO store_meta (key, value) VALUES ('seeded', $1) ON CONFLICT (key) DO NOTHING`,
			db.now().Format(time.RFC3339Nano))
		if err != nil || tag.RowsAffected() == 0 {
			return err
		}
		var history bool
		if err := tx.QueryRow(ctx, `SELECT EXISTS (SELECT 1 FROM facility_versions)`).Scan(&history); err != nil || history {
			return err
		}
		for _, f := range fs {
			if err := facilities.CheckRecord(f); err != nil {
				return err
			}
			body, err := facilities.CanonicalJSON(f)
			if err != nil {
				return err
			}
			if _, err := db.create(ctx, tx, f.ID, body, by); err != nil {
				return err
			}
		}
		seeded = true
		return nil
	})
	if err != nil {
		return false, fmt.Errorf("postgres: seeding: %w", err)
	}
	return seeded, nil
}

func decodeFacility(body []byte, version int) (facilities.Facility, error) {
	var f facilities.Facility
	if err := json.Unmarshal(body, &f); err != nil {
		return facilities.Facility{}, fmt.Errorf("postgres: stored facility version %d is unreadable: %w", version, err)
	}
	f.Version = version
	return f, nil
}

// wrap passes domain errors through unchanged, turns a unique-key race into a
// conflict and prefixes other store errors.
func wrap(what, id string, err error) error {
	if err == nil {
		return nil
	}
	if facilities.ErrorCode(err) != "" {
		return err
	}
	var pgErr *pgconn.PgError
	if errors.As(err, &pgErr) && pgErr.Code == "23505" {
		return &facilities.Error{Code: facilities.CodeConflict, Message: fmt.Sprintf("%s %q: written at the same time by someone else", what, id)}
	}
	return fmt.Errorf("postgres: %s %q: %w", what, id, err)
}
