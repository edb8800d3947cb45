package sqlite

import (
	"context"
	"fmt"
	"strings"
)

// QuickCheck runs SQLite's PRAGMA quick_check over the catalog file: the
// structure of every page, without comparing the indexes with their tables (the
// cost grows with the file; serve runs it at start and logs its time). It returns
// an error listing the first problems found, or nil.
func (db *DB) QuickCheck(ctx context.Context) error {
	return db.check(ctx, "quick_check")
}

// IntegrityCheck runs PRAGMA integrity_check, the full check: every page, every
// index against its table, and PRAGMA foreign_key_check. scalematch check runs it.
func (db *DB) IntegrityCheck(ctx context.Context) error {
	if err := db.check(ctx, "integrity_check"); err != nil {
		return err
	}
	rows, err := db.r.QueryContext(ctx, `PRAGMA foreign_key_check`)
	if err != nil {
		return fmt.Errorf("sqlite foreign_key_check: %w", err)
	}
	defer rows.Close()
	var bad []string
	for rows.Next() {
		var table, parent string
		var rowid, fkid any
		if err := rows.Scan(&table, &rowid, &parent, &fkid); err != nil {
			return err
		}
		bad = append(bad, fmt.Sprintf("%s row %v refers to a missing %s", table, rowid, parent))
	}
	if err := rows.Err(); err != nil {
		return err
	}
	if len(bad) > 0 {
		return fmt.Errorf("sqlite foreign_key_check: %s", strings.Join(bad, "; "))
	}
	return nil
}

// maxCheckMessages is how many of the check's messages an error lists.
const maxCheckMessages = 10

func (db *DB) check(ctx context.Context, pragma string) error {
	rows, err := db.r.QueryContext(ctx, fmt.Sprintf(`PRAGMA %s(%d)`, pragma, maxCheckMessages))
	if err != nil {
		return fmt.Errorf("sqlite %s: the file is damaged: %w", pragma, err)
	}
	defer rows.Close()
	var msgs []string
	for rows.Next() {
		var m string
		if err := rows.Scan(&m); err != nil {
			return err
		}
		msgs = append(msgs, m)
	}
	if err := rows.Err(); err != nil {
		return fmt.Errorf("sqlite %s: the file is damaged: %w", pragma, err)
	}
	if len(msgs) == 1 && msgs[0] == "ok" {
		return nil
	}
	return fmt.Errorf("sqlite %s: the file is damaged: %s", pragma, strings.Join(msgs, "; "))
}
