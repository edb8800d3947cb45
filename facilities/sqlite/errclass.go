package sqlite

import (
	"errors"

	"modernc.org/sqlite"
	sqlite3 "modernc.org/sqlite/lib"

	"scalematch/facilities"
)

// ClassifyError marks the errors of a full disk (SQLITE_FULL, and an I/O error
// whose extended code is a failed write or a short write on a full file system)
// with facilities.ErrStorageFull, and those of a database that cannot be opened or
// stays locked (SQLITE_CANTOPEN, SQLITE_BUSY, SQLITE_LOCKED, SQLITE_NOMEM) with
// facilities.ErrUnavailable (result codes: https://www.sqlite.org/rescode.html).
// Anything else, corruption included, is returned as it is.
func (db *DB) ClassifyError(err error) error { return classify(err) }

func classify(err error) error {
	var se *sqlite.Error
	if !errors.As(err, &se) {
		return err
	}
	return facilities.Classify(err, classOf(se.Code()))
}

// classOf returns the class of an SQLite result code (primary or extended), or
// nil.
func classOf(code int) error {
	switch code & 0xff {
	case sqlite3.SQLITE_FULL:
		return facilities.ErrStorageFull
	case sqlite3.SQLITE_CANTOPEN, sqlite3.SQLITE_BUSY, sqlite3.SQLITE_LOCKED, sqlite3.SQLITE_NOMEM:
		return facilities.ErrUnavailable
	}
	return nil
}
