package sqlstore

import (
	"encoding/base64"
	"fmt"
	"strconv"
	"strings"
	"time"

	"scalematch/facilities"
	"scalematch/internal/check"
)

// listing is the WHERE clause of a listing, newest first by (created, id), with
// its arguments and page size.
type listing struct {
	where []string
	args  []any
	limit int
}

func (l *listing) add(cond string, args ...any) {
	l.where = append(l.where, cond)
	l.args = append(l.args, args...)
}

// listing starts the listing of q: the time range, the cursor and the page size
// (a bad cursor or limit is CodeInvalid). prefix qualifies the columns ("j.").
func (s *Store) listing(q facilities.ListQuery, prefix string) (*listing, error) {
	l := &listing{limit: q.Limit}
	var fe []check.FieldError
	switch {
	case l.limit == 0:
		l.limit = facilities.DefaultListLimit
	case l.limit < 0 || l.limit > facilities.MaxListLimit:
		fe = append(fe, check.FieldError{Field: "limit", Message: fmt.Sprintf("%d is outside 1 to %d", q.Limit, facilities.MaxListLimit)})
	}
	created := prefix + s.d.Schema.Created
	if !q.Since.IsZero() {
		l.add(created+" >= ?", s.d.Instant(q.Since.UTC().Truncate(time.Microsecond)))
	}
	if !q.Until.IsZero() {
		l.add(created+" < ?", s.d.Instant(q.Until.UTC().Truncate(time.Microsecond)))
	}
	if q.Cursor != "" {
		at, id, err := decodeCursor(q.Cursor)
		if err != nil {
			fe = append(fe, check.FieldError{Field: "cursor", Message: "not a cursor this service gave: start again without it"})
		} else {
			l.add("("+created+", "+prefix+"id) < (?, ?)", s.d.Instant(at), id)
		}
	}
	if err := check.Invalid("bad listing query", fe); err != nil {
		return nil, err
	}
	return l, nil
}

// query is sel (with {created} for the instant column) with the listing's
// conditions, newest first, one row more than a page so that page can tell
// whether another follows.
func (l *listing) query(s *Store, sel string) (string, []any) {
	var b strings.Builder
	b.WriteString(sel)
	for i, w := range l.where {
		if i == 0 {
			b.WriteString(" WHERE ")
		} else {
			b.WriteString(" AND ")
		}
		b.WriteString(w)
	}
	b.WriteString(" ORDER BY {created} DESC, id DESC LIMIT " + strconv.Itoa(l.limit+1))
	q := strings.ReplaceAll(b.String(), "{created}", s.d.Schema.Created)
	return bind(s.d, q), l.args
}

// page cuts rows to limit and returns the cursor after the last one kept; ""
// when no row follows.
func page[T any](rows []T, limit int, key func(T) (time.Time, string)) ([]T, string) {
	if len(rows) <= limit {
		return rows, ""
	}
	rows = rows[:limit]
	at, id := key(rows[limit-1])
	return rows, encodeCursor(at, id)
}

// A cursor is the creation instant (µs since 1970 UTC) and id of the last
// record of a page, base64url-encoded: opaque to callers.
func encodeCursor(at time.Time, id string) string {
	return base64.RawURLEncoding.EncodeToString([]byte(strconv.FormatInt(at.UnixMicro(), 10) + ":" + id))
}

func decodeCursor(c string) (time.Time, string, error) {
	b, err := base64.RawURLEncoding.DecodeString(c)
	if err != nil {
		return time.Time{}, "", err
	}
	us, id, ok := strings.Cut(string(b), ":")
	if !ok || id == "" {
		return time.Time{}, "", fmt.Errorf("no id")
	}
	n, err := strconv.ParseInt(us, 10, 64)
	if err != nil {
		return time.Time{}, "", err
	}
	return time.UnixMicro(n).UTC(), id, nil
}

// wrapList names the listing a read error came from.
func (s *Store) wrapList(what string, err error) error {
	return fmt.Errorf("%s: listing %s: %w", s.d.Name, what, err)
}
