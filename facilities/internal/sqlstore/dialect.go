package sqlstore

import (
	"fmt"
	"strconv"
	"strings"
	"time"
)

// Dialect is what one SQL engine does its own way; everything else about the
// store is the same for every engine.
type Dialect struct {
	// Name prefixes the store's own errors ("sqlite", "postgres").
	Name string
	// Numbered says the engine's placeholders are $1, $2, … rather than ?.
	Numbered bool
	// Schema names the engine's column types and the instant columns.
	Schema Schema
	// ForUpdate ends the reads that lock a facility's row for the rest of a write
	// (" FOR UPDATE"); empty where a write transaction holds the whole store.
	ForUpdate string
	// SkipLocked ends the read of a job claim so that concurrent claims pass
	// over the rows another claim has locked (" FOR UPDATE SKIP LOCKED"); empty
	// where a write transaction holds the whole store.
	SkipLocked string
	// Instant is the value an instant is stored as (the Schema.Instant type).
	Instant func(time.Time) any
	// UniqueViolation, when set, reports whether err is a unique-key violation: a
	// concurrent write of the same new key, answered as a conflict.
	UniqueViolation func(err error) bool
}

// Schema holds the engine's words for the migrations (migrations/*.sql are
// text/template documents over it) and the names of its instant columns.
type Schema struct {
	Text, Integer, JSON, Bytes string
	// Instant is the type of the instant columns: microseconds since 1970 UTC or
	// a time stamp with its zone.
	Instant string
	// Deleted is the whole definition of the facilities.deleted flag column.
	Deleted string
	// At, Created and Applied name the instant columns of facility_versions,
	// plans (and jobs) and schema_migrations; Updated and Lease those of jobs.
	At, Created, Applied, Updated, Lease string
	// PlanBodyStorage is the statement (or nothing) that stops the engine from
	// compressing plans.body again: the store writes it compressed already.
	PlanBodyStorage string
}

// queries are the store's SQL statements in one dialect.
type queries struct {
	migrations, migrationDone, migrationDoneInsert string

	facilities, facility, version, facilityVersion, versions string

	facilityInsert, facilityRow, facilityUndelete string
	facilityUpdate, facilityDelete, versionInsert string

	plan, planInsert string

	jobInsert, jobKeyInsert, job, jobClaim                            string
	jobHeartbeat, jobFinish, jobFail, jobRelease, jobCancel, jobState string

	seedMark, history, ping string
}

// jobColumns are the columns of a job that a listing reads, in scanJob's order.
const jobColumns = `id, kind, state, summary, done, total, owner, attempt, {lease}, {created}, {updated}`

// leaseHeld selects a running job by the lease its worker holds.
const leaseHeld = `WHERE id = ? AND owner = ? AND attempt = ? AND state = 'running'`

// newQueries writes the statements in d's words: instant column names in place of
// {at}, {created} and {applied}, d.ForUpdate in place of {for update}, and
// numbered placeholders where d uses them.
func newQueries(d Dialect) queries {
	words := strings.NewReplacer("{at}", d.Schema.At, "{created}", d.Schema.Created,
		"{applied}", d.Schema.Applied, "{for update}", d.ForUpdate,
		"{updated}", d.Schema.Updated, "{lease}", d.Schema.Lease, "{skip locked}", d.SkipLocked,
		"{text}", d.Schema.Text, "{integer}", d.Schema.Integer, "{instant}", d.Schema.Instant)
	q := func(s string) string { return bind(d, words.Replace(s)) }
	const current = `SELECT f.version, v.body FROM facilities f
	JOIN facility_versions v ON v.facility_id = f.id AND v.version = f.version
	WHERE NOT f.deleted`
	return queries{
		migrations: q(`CREATE TABLE IF NOT EXISTS schema_migrations (
		version {integer} PRIMARY KEY, name {text} NOT NULL, {applied} {instant} NOT NULL)`),
		migrationDone:       q(`SELECT EXISTS (SELECT 1 FROM schema_migrations WHERE version = ?)`),
		migrationDoneInsert: q(`INSERT INTO schema_migrations (version, name, {applied}) VALUES (?, ?, ?)`),

		facilities:      q(current + ` ORDER BY f.id`),
		facility:        q(current + ` AND f.id = ?`),
		version:         q(`SELECT version FROM facilities WHERE id = ? AND NOT deleted`),
		facilityVersion: q(`SELECT body FROM facility_versions WHERE facility_id = ? AND version = ?`),
		versions: q(`SELECT version, action, actor, fields, body, {at}
		FROM facility_versions WHERE facility_id = ? ORDER BY version`),

		facilityInsert:   q(`INSERT INTO facilities (id, version, deleted) VALUES (?, 1, false) ON CONFLICT (id) DO NOTHING`),
		facilityRow:      q(`SELECT version, deleted FROM facilities WHERE id = ?{for update}`),
		facilityUndelete: q(`UPDATE facilities SET version = ?, deleted = false WHERE id = ?`),
		facilityUpdate:   q(`UPDATE facilities SET version = ? WHERE id = ? AND version = ?`),
		facilityDelete:   q(`UPDATE facilities SET version = ?, deleted = true WHERE id = ? AND version = ?`),
		versionInsert: q(`INSERT INTO facility_versions (facility_id, version, action, actor, fields, body, {at})
		VALUES (?, ?, ?, ?, ?, ?, ?)`),

		plan: q(`SELECT id, facility_id, facility_version, label, body, {created} FROM plans WHERE id = ?`),
		planInsert: q(`INSERT INTO plans (id, facility_id, facility_version, label, body, {created})
	VALUES (?, ?, ?, ?, ?, ?) ON CONFLICT (id) DO NOTHING`),

		jobInsert: q(`INSERT INTO jobs (id, kind, state, request, summary, done, total, result, {created}, {updated})
	VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT (id) DO NOTHING`),
		jobKeyInsert: q(`INSERT INTO job_keys (job_id, field, value) VALUES (?, ?, ?) ON CONFLICT DO NOTHING`),
		job:          q(`SELECT ` + jobColumns + `, request, result, problem FROM jobs WHERE id = ?`),
		// The oldest open job: queued, or running on a lease that has ended. Claim
		// writes in the kinds' placeholders ({kinds}) and binds the statement.
		jobClaim: words.Replace(`UPDATE jobs SET state = 'running', owner = ?, attempt = attempt + 1, {lease} = ?, {updated} = ?
	WHERE id = (SELECT id FROM jobs WHERE kind IN ({kinds}) AND (state = 'queued' OR (state = 'running' AND {lease} < ?))
		ORDER BY {created}, id LIMIT 1{skip locked})
	RETURNING ` + jobColumns + `, request`),
		jobHeartbeat: q(`UPDATE jobs SET {lease} = ?, done = ?, total = ?, {updated} = ? ` + leaseHeld),
		jobFinish:    q(`UPDATE jobs SET state = 'done', result = ?, done = ?, total = ?, {lease} = NULL, {updated} = ? ` + leaseHeld),
		jobFail:      q(`UPDATE jobs SET state = 'failed', problem = ?, {lease} = NULL, {updated} = ? ` + leaseHeld),
		jobRelease:   q(`UPDATE jobs SET state = 'queued', {lease} = NULL, {updated} = ? ` + leaseHeld),
		jobCancel: q(`UPDATE jobs SET state = 'cancelled', {lease} = NULL, {updated} = ?
	WHERE id = ? AND state IN ('queued', 'running')`),
		jobState: q(`SELECT state FROM jobs WHERE id = ?`),

		seedMark: q(`INSERT INTO store_meta (key, value) VALUES ('seeded', ?) ON CONFLICT (key) DO NOTHING`),
		history:  q(`SELECT EXISTS (SELECT 1 FROM facility_versions)`),
		ping:     `SELECT 1`,
	}
}

// bind numbers the ? placeholders of query when d uses numbered ones. The
// statements here hold no ? inside a string literal.
func bind(d Dialect, query string) string {
	if !d.Numbered {
		return query
	}
	var b strings.Builder
	n := 0
	for _, r := range query {
		if r != '?' {
			b.WriteRune(r)
			continue
		}
		n++
		b.WriteString("$" + strconv.Itoa(n))
	}
	return b.String()
}

// instant scans an instant column in either of its stored forms.
type instant struct{ t *time.Time }

// Scan reads microseconds since 1970 UTC (int64) or a time stamp, as UTC.
func (i instant) Scan(src any) error {
	switch v := src.(type) {
	case int64:
		*i.t = time.UnixMicro(v).UTC()
	case time.Time:
		*i.t = v.UTC()
	default:
		return fmt.Errorf("an instant stored as %T", src)
	}
	return nil
}
