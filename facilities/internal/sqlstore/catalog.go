package sqlstore

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"scalematch/facilities"
	"scalematch/internal/check"
)

// Facilities lists the current, not deleted facilities ordered by id.
func (s *Store) Facilities(ctx context.Context) ([]facilities.Facility, error) {
	rows, err := s.db.Query(ctx, s.q.facilities)
	if err != nil {
		return nil, fmt.Errorf("%s: listing facilities: %w", s.d.Name, err)
	}
	defer rows.Close()
	out := []facilities.Facility{}
	for rows.Next() {
		var version int
		var body []byte
		if err := rows.Scan(&version, &body); err != nil {
			return nil, fmt.Errorf("%s: listing facilities: %w", s.d.Name, err)
		}
		f, err := s.decodeFacility(body, version)
		if err != nil {
			return nil, err
		}
		out = append(out, f)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("%s: listing facilities: %w", s.d.Name, err)
	}
	return out, nil
}

// Facility returns the current version of a facility.
func (s *Store) Facility(ctx context.Context, id string) (facilities.Facility, error) {
	var version int
	var body []byte
	err := s.db.QueryRow(ctx, s.q.facility, id).Scan(&version, &body)
	if errors.Is(err, sql.ErrNoRows) {
		return facilities.Facility{}, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return facilities.Facility{}, fmt.Errorf("%s: reading facility %q: %w", s.d.Name, id, err)
	}
	return s.decodeFacility(body, version)
}

// CurrentVersion returns the current version of a facility without reading its
// record (one indexed row); CodeNotFound when it does not exist or was deleted.
func (s *Store) CurrentVersion(ctx context.Context, id string) (int, error) {
	var version int
	err := s.db.QueryRow(ctx, s.q.version, id).Scan(&version)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return 0, fmt.Errorf("%s: reading the version of facility %q: %w", s.d.Name, id, err)
	}
	return version, nil
}

// FacilityVersion returns one stored version of a facility, deleted or not. The
// version recording a deletion has no facility and is CodeNotFound.
func (s *Store) FacilityVersion(ctx context.Context, id string, version int) (facilities.Facility, error) {
	var body []byte
	err := s.db.QueryRow(ctx, s.q.facilityVersion, id, version).Scan(&body)
	if errors.Is(err, sql.ErrNoRows) || (err == nil && body == nil) {
		return facilities.Facility{}, &check.Error{Code: check.CodeNotFound,
			Message: fmt.Sprintf("facility %q has no version %d", id, version)}
	}
	if err != nil {
		return facilities.Facility{}, fmt.Errorf("%s: reading facility %q version %d: %w", s.d.Name, id, version, err)
	}
	return s.decodeFacility(body, version)
}

// CreateFacility stores a new facility as version 1, or a deleted id again as its
// next version.
func (s *Store) CreateFacility(ctx context.Context, f facilities.Facility, by facilities.Actor) (facilities.Facility, error) {
	return s.writeFacility(ctx, "create", "creating facility", f, func(tx Tx, body []byte) (int, error) {
		return s.create(ctx, tx, f.ID, body, by)
	})
}

// writeFacility checks the whole record (facilities.CheckRecord), stores it as
// canonical JSON with write in one transaction (op names it for tests), and
// returns f at the version write stored.
func (s *Store) writeFacility(ctx context.Context, op, what string, f facilities.Facility,
	write func(tx Tx, body []byte) (int, error)) (facilities.Facility, error) {
	if err := facilities.CheckRecord(f); err != nil {
		return facilities.Facility{}, err
	}
	body, err := facilities.CanonicalJSON(f)
	if err != nil {
		return facilities.Facility{}, err
	}
	var version int
	err = s.tx(ctx, op, func(tx Tx) error {
		version, err = write(tx, body)
		return err
	})
	if err != nil {
		return facilities.Facility{}, s.wrap(what, f.ID, err)
	}
	f.Version = version
	return f, nil
}

// create stores body as the next version of id inside tx. A concurrent create of
// the same new id waits on the primary key and then finds the row.
func (s *Store) create(ctx context.Context, tx Tx, id string, body []byte, by facilities.Actor) (int, error) {
	n, err := tx.Exec(ctx, s.q.facilityInsert, id)
	if err != nil {
		return 0, err
	}
	version := 1
	if n == 0 {
		var current int
		var deleted bool
		if err := tx.QueryRow(ctx, s.q.facilityRow, id).Scan(&current, &deleted); err != nil {
			return 0, err
		}
		if !deleted {
			return 0, &check.Error{Code: check.CodeConflict,
				Message: fmt.Sprintf("facility %q exists (version %d); change it with PUT and If-Match", id, current)}
		}
		version = current + 1
		if _, err := tx.Exec(ctx, s.q.facilityUndelete, version, id); err != nil {
			return 0, err
		}
	}
	fields, err := facilities.ChangedFields(nil, body)
	if err != nil {
		return 0, err
	}
	return version, s.insertVersion(ctx, tx, id, version, "create", by, fields, body)
}

// UpdateFacility replaces a facility when its current version equals ifMatch.
func (s *Store) UpdateFacility(ctx context.Context, f facilities.Facility, ifMatch int, by facilities.Actor) (facilities.Facility, error) {
	return s.writeFacility(ctx, "update", "updating facility", f, func(tx Tx, body []byte) (int, error) {
		prev, err := s.current(ctx, tx, f.ID, ifMatch)
		if err != nil {
			return 0, err
		}
		fields, err := facilities.ChangedFields(prev, body)
		if err != nil {
			return 0, err
		}
		version := ifMatch + 1
		if _, err := tx.Exec(ctx, s.q.facilityUpdate, version, f.ID, ifMatch); err != nil {
			return 0, err
		}
		return version, s.insertVersion(ctx, tx, f.ID, version, "update", by, fields, body)
	})
}

// DeleteFacility marks a facility deleted when its current version equals ifMatch;
// the deletion is recorded as the next version, without a body.
func (s *Store) DeleteFacility(ctx context.Context, id string, ifMatch int, by facilities.Actor) error {
	err := s.tx(ctx, "delete", func(tx Tx) error {
		if _, err := s.current(ctx, tx, id, ifMatch); err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, s.q.facilityDelete, ifMatch+1, id, ifMatch); err != nil {
			return err
		}
		return s.insertVersion(ctx, tx, id, ifMatch+1, "delete", by, []string{}, nil)
	})
	return s.wrap("deleting facility", id, err)
}

// current locks id's row for the rest of tx (Dialect.ForUpdate), checks that the
// facility exists, is not deleted and is at version ifMatch, and returns its
// current body. Concurrent writers queue on the lock and each sees the version
// its predecessor committed.
func (s *Store) current(ctx context.Context, tx Tx, id string, ifMatch int) ([]byte, error) {
	var version int
	var deleted bool
	err := tx.QueryRow(ctx, s.q.facilityRow, id).Scan(&version, &deleted)
	if errors.Is(err, sql.ErrNoRows) || (err == nil && deleted) {
		return nil, facilities.FacilityNotFound(id)
	}
	if err != nil {
		return nil, err
	}
	if version != ifMatch {
		return nil, facilities.StaleVersion(id, version, ifMatch)
	}
	var body []byte
	if err := tx.QueryRow(ctx, s.q.facilityVersion, id, version).Scan(&body); err != nil {
		return nil, err
	}
	return body, nil
}

func (s *Store) insertVersion(ctx context.Context, tx Tx, id string, version int, action string,
	by facilities.Actor, fields []string, body []byte) error {
	fj, err := json.Marshal(fields)
	if err != nil {
		return err
	}
	var b any
	if body != nil {
		b = string(body)
	}
	_, err = tx.Exec(ctx, s.q.versionInsert, id, version, action, string(by), string(fj), b, s.d.Instant(s.now()))
	return err
}

// Versions lists every change of a facility, oldest first.
func (s *Store) Versions(ctx context.Context, id string) ([]facilities.Change, error) {
	rows, err := s.db.Query(ctx, s.q.versions, id)
	if err != nil {
		return nil, fmt.Errorf("%s: listing versions of %q: %w", s.d.Name, id, err)
	}
	defer rows.Close()
	out := []facilities.Change{}
	for rows.Next() {
		var c facilities.Change
		var actor string
		var fields, body []byte
		if err := rows.Scan(&c.Version, &c.Action, &actor, &fields, &body, instant{&c.At}); err != nil {
			return nil, fmt.Errorf("%s: listing versions of %q: %w", s.d.Name, id, err)
		}
		c.By = facilities.Actor(actor)
		if err := json.Unmarshal(fields, &c.Fields); err != nil {
			return nil, fmt.Errorf("%s: version %d of %q: changed fields: %w", s.d.Name, c.Version, id, err)
		}
		if body != nil {
			f, err := s.decodeFacility(body, c.Version)
			if err != nil {
				return nil, err
			}
			c.Facility = &f
		}
		out = append(out, c)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("%s: listing versions of %q: %w", s.d.Name, id, err)
	}
	if len(out) == 0 {
		return nil, facilities.FacilityNotFound(id)
	}
	return out, nil
}

// SeedOnce stores fs as version 1 each, by the given actor, and records the seed,
// all in one transaction, unless a seed was recorded before or the store already
// has facilities (then it records the seed and stores nothing). Stores starting
// together queue on the seed record; one seeds, the others find it.
func (s *Store) SeedOnce(ctx context.Context, fs []facilities.Facility, by facilities.Actor) (bool, error) {
	seeded := false
	err := s.tx(ctx, "seed", func(tx Tx) error {
		n, err := tx.Exec(ctx, s.q.seedMark, s.now().Format(time.RFC3339Nano))
		if err != nil || n == 0 {
			return err
		}
		// A store that already has a history (from before seeds were recorded)
		// is not empty: record the start, store nothing.
		var history bool
		if err := tx.QueryRow(ctx, s.q.history).Scan(&history); err != nil || history {
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
			if _, err := s.create(ctx, tx, f.ID, body, by); err != nil {
				return err
			}
		}
		seeded = true
		return nil
	})
	if err != nil {
		return false, fmt.Errorf("%s: seeding: %w", s.d.Name, err)
	}
	return seeded, nil
}

func (s *Store) decodeFacility(body []byte, version int) (facilities.Facility, error) {
	var f facilities.Facility
	if err := json.Unmarshal(body, &f); err != nil {
		return facilities.Facility{}, fmt.Errorf("%s: stored facility version %d is unreadable: %w", s.d.Name, version, err)
	}
	f.Version = version
	return f, nil
}

// wrap passes domain errors through unchanged, turns a unique-key race into a
// conflict and prefixes other store errors.
func (s *Store) wrap(what, id string, err error) error {
	if err == nil {
		return nil
	}
	if check.ErrorCode(err) != "" {
		return err
	}
	if s.d.UniqueViolation != nil && s.d.UniqueViolation(err) {
		return &check.Error{Code: check.CodeConflict, Message: fmt.Sprintf("%s %q: written at the same time by someone else", what, id)}
	}
	return fmt.Errorf("%s: %s %q: %w", s.d.Name, what, id, err)
}
