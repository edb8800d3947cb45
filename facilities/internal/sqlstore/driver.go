package sqlstore

import (
	"context"
	"database/sql"
	"errors"
)

// Driver is how the store reaches its database: database/sql for SQLite (DBSQL),
// pgx's own interface for PostgreSQL (facilities/postgres). Errors for a missing
// row are sql.ErrNoRows or wrap it.
type Driver interface {
	// Querier runs the reads outside transactions.
	Querier
	// Begin starts a write transaction.
	Begin(ctx context.Context) (Tx, error)
	// Prepare readies the frequent reads and writes for repeated use, where the
	// driver does not do so itself.
	Prepare(ctx context.Context, reads, writes []string) error
	// Migrate runs fn on one session holding the engine's migration lock, if it
	// has one, so that processes opening one database at once run it in turn.
	Migrate(ctx context.Context, fn func(Session) error) error
	// Close releases the prepared statements and connections.
	Close() error
}

// Querier runs statements: Exec returns how many rows a statement changed.
type Querier interface {
	Exec(ctx context.Context, query string, args ...any) (int64, error)
	QueryRow(ctx context.Context, query string, args ...any) Row
	Query(ctx context.Context, query string, args ...any) (Rows, error)
}

// Row is one row of a query; Scan returns sql.ErrNoRows when there is none.
type Row interface{ Scan(dest ...any) error }

// Rows are the rows of a query.
type Rows interface {
	Next() bool
	Scan(dest ...any) error
	Err() error
	Close()
}

// Tx is one transaction.
type Tx interface {
	Querier
	Commit(ctx context.Context) error
	Rollback(ctx context.Context) error
}

// GroupExecer is a Driver that can run one statement with many sets of
// arguments as a transaction of its own in one round trip to the database
// (PostgreSQL's pipelined batch, an implicit transaction), returning how many
// rows each run changed once the transaction has committed; on an error
// nothing of it is stored. The plan group commit uses it where the driver
// offers it.
type GroupExecer interface {
	ExecGroup(ctx context.Context, query string, args [][]any) ([]int64, error)
}

// Session is one connection.
type Session interface {
	Querier
	Begin(ctx context.Context) (Tx, error)
}

// DBSQL is the Driver over database/sql pools: writes and migrations on w (one
// connection), reads on r, with the frequent statements prepared on each.
func DBSQL(w, r *sql.DB) Driver {
	return &dbsql{runner: runner{q: w}, w: w, r: r, reads: map[string]*sql.Stmt{}, writes: map[string]*sql.Stmt{}}
}

type dbsql struct {
	runner
	w, r          *sql.DB
	reads, writes map[string]*sql.Stmt
}

// runner is a database/sql pool, connection or transaction as a Querier. In a
// transaction (tx set) it runs the prepared writes through the transaction's
// copies of them (inTx, made on first use by tx.StmtContext).
type runner struct {
	q interface {
		ExecContext(context.Context, string, ...any) (sql.Result, error)
		QueryContext(context.Context, string, ...any) (*sql.Rows, error)
		QueryRowContext(context.Context, string, ...any) *sql.Row
	}
	tx           *sql.Tx
	writes, inTx map[string]*sql.Stmt
}

func (r runner) Exec(ctx context.Context, query string, args ...any) (int64, error) {
	var res sql.Result
	var err error
	if st := r.writes[query]; st != nil && r.tx != nil {
		if r.inTx[query] == nil {
			r.inTx[query] = r.tx.StmtContext(ctx, st)
		}
		res, err = r.inTx[query].ExecContext(ctx, args...)
	} else {
		res, err = r.q.ExecContext(ctx, query, args...)
	}
	if err != nil {
		return 0, err
	}
	return res.RowsAffected()
}

func (r runner) QueryRow(ctx context.Context, query string, args ...any) Row {
	return r.q.QueryRowContext(ctx, query, args...)
}

func (r runner) Query(ctx context.Context, query string, args ...any) (Rows, error) {
	rows, err := r.q.QueryContext(ctx, query, args...)
	if err != nil {
		return nil, err
	}
	return sqlRows{rows}, nil
}

// sqlRows drops the error of Close, which Err reports.
type sqlRows struct{ *sql.Rows }

func (r sqlRows) Close() { r.Rows.Close() }

// sqlTx is a database/sql transaction as a Tx.
type sqlTx struct{ runner }

func (t sqlTx) Commit(context.Context) error   { return t.tx.Commit() }
func (t sqlTx) Rollback(context.Context) error { return t.tx.Rollback() }

func (d *dbsql) Begin(ctx context.Context) (Tx, error) { return d.begin(ctx, d.w.BeginTx) }

func (d *dbsql) begin(ctx context.Context, begin func(context.Context, *sql.TxOptions) (*sql.Tx, error)) (Tx, error) {
	tx, err := begin(ctx, nil)
	if err != nil {
		return nil, err
	}
	return sqlTx{runner{q: tx, tx: tx, writes: d.writes, inTx: map[string]*sql.Stmt{}}}, nil
}

// QueryRow and Query read on r, through the prepared statement where there is one.
func (d *dbsql) QueryRow(ctx context.Context, query string, args ...any) Row {
	if st := d.reads[query]; st != nil {
		return st.QueryRowContext(ctx, args...)
	}
	return d.r.QueryRowContext(ctx, query, args...)
}

func (d *dbsql) Query(ctx context.Context, query string, args ...any) (Rows, error) {
	return runner{q: d.r}.Query(ctx, query, args...)
}

func (d *dbsql) Prepare(ctx context.Context, reads, writes []string) error {
	for _, set := range []struct {
		db      *sql.DB
		queries []string
		stmts   map[string]*sql.Stmt
	}{{d.r, reads, d.reads}, {d.w, writes, d.writes}} {
		for _, q := range set.queries {
			st, err := set.db.PrepareContext(ctx, q)
			if err != nil {
				return err
			}
			set.stmts[q] = st
		}
	}
	return nil
}

// Migrate runs fn on the writer's connection; SQLite's BEGIN IMMEDIATE
// transactions serialise processes.
func (d *dbsql) Migrate(ctx context.Context, fn func(Session) error) error {
	conn, err := d.w.Conn(ctx)
	if err != nil {
		return err
	}
	defer conn.Close()
	return fn(session{runner{q: conn}, d, conn})
}

type session struct {
	runner
	d    *dbsql
	conn *sql.Conn
}

func (s session) Begin(ctx context.Context) (Tx, error) { return s.d.begin(ctx, s.conn.BeginTx) }

func (d *dbsql) Close() error {
	var errs []error
	for _, stmts := range []map[string]*sql.Stmt{d.reads, d.writes} {
		for _, st := range stmts {
			errs = append(errs, st.Close())
		}
	}
	if d.r != d.w {
		errs = append(errs, d.r.Close())
	}
	return errors.Join(append(errs, d.w.Close())...)
}
