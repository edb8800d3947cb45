package sqlite

import (
	"context"
	"database/sql"
	"embed"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"

	_ "modernc.org/sqlite" // registers the "sqlite" database/sql driver

	"scalematch/facilities"
)

// FileName is the name of the catalog file inside a data directory (--data).
const FileName = "catalog.db"

// busyTimeout is how long a connection waits for another process's write lock.
const busyTimeout = 10 * time.Second

//go:embed migrations/*.sql
var migrations embed.FS

// DB is a facility catalog in one SQLite file. It is safe for concurrent use; writes
// go through a single connection, reads through a small pool.
type DB struct {
	path string
	w    *sql.DB // the one writer connection
	r    *sql.DB // readers (WAL lets them run beside the writer)

	// Prepared reads on r, the ones every plan request makes.
	facilityStmt, versionStmt, planStmt *sql.Stmt
	// insertPlanStmt is the plan insert, prepared on w.
	insertPlanStmt *sql.Stmt
	// plans commits SavePlan calls in groups (plans.go).
	plans *planCommitter

	now func() time.Time
	// beforeCommit, when set by a test of this package, runs after a write's
	// statements and before its commit; an error aborts the write.
	beforeCommit func(op string) error
}

var _ facilities.Catalog = (*DB)(nil)
var _ facilities.Seeder = (*DB)(nil)
var _ facilities.VersionReader = (*DB)(nil)

// Path returns the catalog file inside the data directory dir.
func Path(dir string) string { return filepath.Join(dir, FileName) }

// Open opens the catalog file at path, creating the file and its directory when
// they do not exist, and applies any migrations it has not had yet. It does not
// seed; see facilities.SeedDemo.
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
	db := &DB{path: path, w: w, now: func() time.Time { return time.Now().UTC().Truncate(time.Microsecond) }}
	db.plans = newPlanCommitter(db)
	if err := db.migrate(ctx); err != nil {
		w.Close()
		return nil, err
	}
	if db.insertPlanStmt, err = w.PrepareContext(ctx, insertPlanQuery); err != nil {
		w.Close()
		return nil, fmt.Errorf("sqlite: preparing the plan insert of %s: %w", path, err)
	}
	r, err := sql.Open("sqlite", path+"?"+common+"&_pragma=query_only(1)")
	if err != nil {
		w.Close()
		return nil, fmt.Errorf("sqlite: opening %s for reading: %w", path, err)
	}
	r.SetMaxOpenConns(4)
	r.SetMaxIdleConns(4)
	db.r = r
	for _, ps := range []struct {
		stmt  **sql.Stmt
		query string
	}{{&db.facilityStmt, facilityQuery}, {&db.versionStmt, versionQuery}, {&db.planStmt, planQuery}} {
		if *ps.stmt, err = r.PrepareContext(ctx, ps.query); err != nil {
			db.Close()
			return nil, fmt.Errorf("sqlite: preparing reads of %s: %w", path, err)
		}
	}
	if err := db.Ping(ctx); err != nil {
		db.Close()
		return nil, err
	}
	return db, nil
}

// migrate applies the embedded migrations in order, each in its own BEGIN IMMEDIATE
// transaction that first checks schema_migrations, so two processes opening one
// file at once apply each migration once.
func (db *DB) migrate(ctx context.Context) error {
	if _, err := db.w.ExecContext(ctx, `CREATE TABLE IF NOT EXISTS schema_migrations (
		version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_us INTEGER NOT NULL)`); err != nil {
		return fmt.Errorf("sqlite: creating schema_migrations: %w", err)
	}
	names, err := fs.Glob(migrations, "migrations/*.sql")
	if err != nil {
		return fmt.Errorf("sqlite: listing migrations: %w", err)
	}
	sort.Strings(names)
	for _, name := range names {
		base := filepath.Base(name)
		n, err := strconv.Atoi(strings.SplitN(base, "_", 2)[0])
		if err != nil {
			return fmt.Errorf("sqlite: migration %s has no number: %w", base, err)
		}
		body, err := migrations.ReadFile(name)
		if err != nil {
			return fmt.Errorf("sqlite: reading migration %s: %w", base, err)
		}
		err = db.tx(ctx, "migrate", func(tx *sql.Tx) error {
			var done int
			if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM schema_migrations WHERE version = ?`, n).Scan(&done); err != nil {
				return err
			}
			if done > 0 {
				return nil
			}
			if _, err := tx.ExecContext(ctx, string(body)); err != nil {
				return err
			}
			_, err := tx.ExecContext(ctx, `INSERT INTO schema_migrations (version, name, applied_us) VALUES (?, ?, ?)`,
				n, base, db.now().UnixMicro())
			return err
		})
		if err != nil {
			return fmt.Errorf("sqlite: applying migration %s: %w", base, err)
		}
	}
	return nil
}

// tx runs fn in one BEGIN IMMEDIATE transaction on the writer connection and
// commits; any error (or a cancelled context) rolls everything back.
func (db *DB) tx(ctx context.Context, op string, fn func(*sql.Tx) error) error {
	tx, err := db.w.BeginTx(ctx, nil)
	if err != nil {
		return err
	}
	defer tx.Rollback() //nolint:errcheck // a no-op after Commit
	if err := fn(tx); err != nil {
		return err
	}
	if db.beforeCommit != nil {
		if err := db.beforeCommit(op); err != nil {
			return err
		}
	}
	return tx.Commit()
}

// Ping reports whether the store answers a query.
func (db *DB) Ping(ctx context.Context) error {
	var one int
	if err := db.r.QueryRowContext(ctx, `SELECT 1`).Scan(&one); err != nil {
		return fmt.Errorf("sqlite: %s does not answer: %w", db.path, err)
	}
	return nil
}

// Close closes the store; a WAL checkpoint runs as the last connection closes.
func (db *DB) Close() error {
	db.closePlans()
	var errs []error
	for _, st := range []*sql.Stmt{db.facilityStmt, db.versionStmt, db.planStmt, db.insertPlanStmt} {
		if st != nil {
			errs = append(errs, st.Close())
		}
	}
	if db.r != nil {
		errs = append(errs, db.r.Close())
	}
	errs = append(errs, db.w.Close())
	return errors.Join(errs...)
}

// Facilities lists the current, not deleted facilities ordered by id.
func (db *DB) Facilities(ctx context.Context) ([]facilities.Facility, error) {
	rows, err := db.r.QueryContext(ctx, `SELECT f.version, v.body FROM facilities f
		JOIN facility_versions v ON v.facility_id = f.id AND v.version = f.version
		WHERE f.deleted = 0 ORDER BY f.id`)
	if err != nil {
		return nil, fmt.Errorf("sqlite: listing facilities: %w", err)
	}
	defer rows.Close()
	out := []facilities.Facility{}
	for rows.Next() {
		var version int
		var body string
		if err := rows.Scan(&version, &body); err != nil {
			return nil, fmt.Errorf("sqlite: listing facilities: %w", err)
		}
		f, err := decodeFacility(body, version)
		if err != nil {
			return nil, err
		}
		out = append(out, f)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("sqlite: listing facilities: %w", err)
	}
	return out, nil
}

// Facility returns the current version of a facility.
func (db *DB) Facility(ctx context.Context, id string) (facilities.Facility, error) {
	var version int
	var body string
	err := db.facilityStmt.QueryRowContext(ctx, id).Scan(&version, &body)
	if errors.Is(err, sql.ErrNoRows) {
		return facilities.Facility{}, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return facilities.Facility{}, fmt.Errorf("sqlite: reading facility %q: %w", id, err)
	}
	return decodeFacility(body, version)
}

const facilityQuery = `SELECT f.version, v.body FROM facilities f
	JOIN facility_versions v ON v.facility_id = f.id AND v.version = f.version
	WHERE f.id = ? AND f.deleted = 0`

// CurrentVersion returns the current version of a facility without reading its
// record (one indexed row); CodeNotFound when it does not exist or was deleted.
func (db *DB) CurrentVersion(ctx context.Context, id string) (int, error) {
	var version int
	err := db.versionStmt.QueryRowContext(ctx, id).Scan(&version)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return 0, fmt.Errorf("sqlite: reading the version of facility %q: %w", id, err)
	}
	return version, nil
}

const versionQuery = `SELECT version FROM facilities WHERE id = ? AND deleted = 0`

// FacilityVersion returns one stored version of a facility, deleted or not. The
// version recording a deletion has no facility and is CodeNotFound.
func (db *DB) FacilityVersion(ctx context.Context, id string, version int) (facilities.Facility, error) {
	var body sql.NullString
	err := db.r.QueryRowContext(ctx, `SELECT body FROM facility_versions WHERE facility_id = ? AND version = ?`,
		id, version).Scan(&body)
	if errors.Is(err, sql.ErrNoRows) || (err == nil && !body.Valid) {
		return facilities.Facility{}, &facilities.Error{Code: facilities.CodeNotFound,
			Message: fmt.Sprintf("facility %q has no version %d", id, version)}
	}
	if err != nil {
		return facilities.Facility{}, fmt.Errorf("sqlite: reading facility %q version %d: %w", id, version, err)
	}
	return decodeFacility(body.String, version)
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
	err = db.tx(ctx, "create", func(tx *sql.Tx) error {
		version, err = db.create(ctx, tx, f.ID, body, by)
		return err
	})
	if err != nil {
		return facilities.Facility{}, wrap("creating facility", f.ID, err)
	}
	f.Version = version
	return f, nil
}

// create stores body as the next version of id inside tx.
func (db *DB) create(ctx context.Context, tx *sql.Tx, id string, body []byte, by facilities.Actor) (int, error) {
	var current, deleted int
	err := tx.QueryRowContext(ctx, `SELECT version, deleted FROM facilities WHERE id = ?`, id).Scan(&current, &deleted)
	version := 1
	switch {
	case errors.Is(err, sql.ErrNoRows):
		if _, err := tx.ExecContext(ctx, `INSERT INTO facilities (id, version, deleted) VALUES (?, 1, 0)`, id); err != nil {
			return 0, err
		}
	case err != nil:
		return 0, err
	case deleted == 0:
		return 0, &facilities.Error{Code: facilities.CodeConflict,
			Message: fmt.Sprintf("facility %q exists (version %d); change it with PUT and If-Match", id, current)}
	default:
		version = current + 1
		if _, err := tx.ExecContext(ctx, `UPDATE facilities SET version = ?, deleted = 0 WHERE id = ?`, version, id); err != nil {
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
	err = db.tx(ctx, "update", func(tx *sql.Tx) error {
		prev, err := db.current(ctx, tx, f.ID, ifMatch)
		if err != nil {
			return err
		}
		fields, err := facilities.ChangedFields(prev, body)
		if err != nil {
			return err
		}
		version = ifMatch + 1
		if _, err := tx.ExecContext(ctx, `UPDATE facilities SET version = ? WHERE id = ? AND version = ?`,
			version, f.ID, ifMatch); err != nil {
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
	err := db.tx(ctx, "delete", func(tx *sql.Tx) error {
		if _, err := db.current(ctx, tx, id, ifMatch); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE facilities SET version = ?, deleted = 1 WHERE id = ? AND version = ?`,
			ifMatch+1, id, ifMatch); err != nil {
			return err
		}
		return db.insertVersion(ctx, tx, id, ifMatch+1, "delete", by, []string{}, nil)
	})
	return wrap("deleting facility", id, err)
}

// current returns the body of id's current version inside tx after checking that
// the facility exists, is not deleted and is at version ifMatch.
func (db *DB) current(ctx context.Context, tx *sql.Tx, id string, ifMatch int) ([]byte, error) {
	var version, deleted int
	var body sql.NullString
	err := tx.QueryRowContext(ctx, `SELECT f.version, f.deleted, v.body FROM facilities f
		JOIN facility_versions v ON v.facility_id = f.id AND v.version = f.version
		WHERE f.id = ?`, id).Scan(&version, &deleted, &body)
	if errors.Is(err, sql.ErrNoRows) || (err == nil && deleted != 0) {
		return nil, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return nil, err
	}
	if version != ifMatch {
		return nil, facilities.StaleVersion(id, version, ifMatch)
	}
	return []byte(body.String), nil
}

func (db *DB) insertVersion(ctx context.Context, tx *sql.Tx, id string, version int, action string,
	by facilities.Actor, fields []string, body []byte) error {
	fj, err := json.Marshal(fields)
	if err != nil {
		return err
	}
	var b any
	if body != nil {
		b = string(body)
	}
	_, err = tx.ExecContext(ctx, `INSERT INTO facility_versions (facility_id, version, action, actor, fields, body, at_us)
		VALUES (?, ?, ?, ?, ?, ?, ?)`, id, version, action, string(by), string(fj), b, db.now().UnixMicro())
	return err
}

// Versions lists every change of a facility, oldest first.
func (db *DB) Versions(ctx context.Context, id string) ([]facilities.Change, error) {
	rows, err := db.r.QueryContext(ctx, `SELECT version, action, actor, fields, body, at_us
		FROM facility_versions WHERE facility_id = ? ORDER BY version`, id)
	if err != nil {
		return nil, fmt.Errorf("sqlite: listing versions of %q: %w", id, err)
	}
	defer rows.Close()
	out := []facilities.Change{}
	for rows.Next() {
		var c facilities.Change
		var actor, fields string
		var body sql.NullString
		var at int64
		if err := rows.Scan(&c.Version, &c.Action, &actor, &fields, &body, &at); err != nil {
			return nil, fmt.Errorf("sqlite: listing versions of %q: %w", id, err)
		}
		c.By = facilities.Actor(actor)
		c.At = time.UnixMicro(at).UTC()
		if err := json.Unmarshal([]byte(fields), &c.Fields); err != nil {
			return nil, fmt.Errorf("sqlite: version %d of %q: changed fields: %w", c.Version, id, err)
		}
		if body.Valid {
			f, err := decodeFacility(body.String, c.Version)
			if err != nil {
				return nil, err
			}
			c.Facility = &f
		}
		out = append(out, c)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("sqlite: listing versions of %q: %w", id, err)
	}
	if len(out) == 0 {
		return nil, facilities.FacilityNotFound(id)
	}
	return out, nil
}

const planQuery = `SELECT id, facility_id, facility_version, body, created_us FROM plans WHERE id = ?`

// Plan returns a stored plan record.
func (db *DB) Plan(ctx context.Context, id string) (facilities.PlanRecord, error) {
	p, err := scanPlan(db.planStmt.QueryRowContext(ctx, id))
	if errors.Is(err, sql.ErrNoRows) {
		return facilities.PlanRecord{}, &facilities.Error{Code: facilities.CodeNotFound, Message: fmt.Sprintf("no stored plan %q", id)}
	}
	if err != nil {
		return facilities.PlanRecord{}, fmt.Errorf("sqlite: reading plan %q: %w", id, err)
	}
	return p, nil
}

func scanPlan(row *sql.Row) (facilities.PlanRecord, error) {
	var p facilities.PlanRecord
	var created int64
	if err := row.Scan(&p.ID, &p.FacilityID, &p.FacilityVersion, &p.Body, &created); err != nil {
		return facilities.PlanRecord{}, err
	}
	p.CreatedAt = time.UnixMicro(created).UTC()
	return p, nil
}

// SeedOnce stores fs as version 1 each, by the given actor, and records the seed,
// all in one transaction, unless a seed was recorded before or the store already
// has facilities (then it records the seed and stores nothing).
func (db *DB) SeedOnce(ctx context.Context, fs []facilities.Facility, by facilities.Actor) (bool, error) {
	seeded := false
	err := db.tx(ctx, "seed", func(tx *sql.Tx) error {
		res, err := tx.ExecContext(ctx, `INSERT INTO store_meta (key, value) VALUES ('seeded', ?)
			ON CONFLICT (key) DO NOTHING`, db.now().Format(time.RFC3339Nano))
		if err != nil {
			return err
		}
		if n, err := res.RowsAffected(); err != nil || n == 0 {
			return err
		}
		// A store that already has a history (from before seeds were recorded)
		// is not empty: record the start, store nothing.
		var history int
		if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM facility_versions`).Scan(&history); err != nil || history > 0 {
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
		return false, fmt.Errorf("sqlite: seeding: %w", err)
	}
	return seeded, nil
}

func decodeFacility(body string, version int) (facilities.Facility, error) {
	var f facilities.Facility
	if err := json.Unmarshal([]byte(body), &f); err != nil {
		return facilities.Facility{}, fmt.Errorf("sqlite: stored facility version %d is unreadable: %w", version, err)
	}
	f.Version = version
	return f, nil
}

// wrap passes domain errors through unchanged and prefixes store errors.
func wrap(what, id string, err error) error {
	if err == nil {
		return nil
	}
	if facilities.ErrorCode(err) != "" {
		return err
	}
	return fmt.Errorf("sqlite: %s %q: %w", what, id, err)
}

func nonNil(b []byte) []byte {
	if b == nil {
		return []byte{}
	}
	return b
}
