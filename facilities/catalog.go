package facilities

import (
	"context"
	"time"
)

// Catalog stores facilities (with their balances), every version of each, and plan
// records. Implementations live in one subpackage per storage engine and pass the
// shared suite in facilities/catalogtest. Every write is one transaction and durable
// when it returns. Errors use *Error with CodeNotFound, CodeConflict,
// CodePreconditionFailed or CodeInvalid where those apply.
type Catalog interface {
	// Facilities lists the current, not deleted facilities ordered by id.
	Facilities(ctx context.Context) ([]Facility, error)
	// Facility returns the current version of a facility; CodeNotFound when it does not
	// exist or was deleted. The returned Facility.Version is set.
	Facility(ctx context.Context, id string) (Facility, error)
	// FacilityVersion returns one stored version of a facility, deleted or not.
	FacilityVersion(ctx context.Context, id string, version int) (Facility, error)
	// CreateFacility stores a new facility as version 1; CodeConflict when the id exists
	// (a deleted id may be created again, continuing its version numbers).
	CreateFacility(ctx context.Context, f Facility, by Actor) (Facility, error)
	// UpdateFacility replaces a facility when its current version equals ifMatch and
	// returns the new version; CodePreconditionFailed when it does not.
	UpdateFacility(ctx context.Context, f Facility, ifMatch int, by Actor) (Facility, error)
	// DeleteFacility marks a facility deleted when its current version equals ifMatch.
	// Its versions and plans stay readable.
	DeleteFacility(ctx context.Context, id string, ifMatch int, by Actor) error
	// Versions lists every change of a facility, oldest first.
	Versions(ctx context.Context, id string) ([]Change, error)
	// SavePlan stores a plan record; saving the same id again keeps the first record
	// and returns it (plans are idempotent).
	SavePlan(ctx context.Context, p PlanRecord) (PlanRecord, error)
	// Plan returns a stored plan record; CodeNotFound when there is none.
	Plan(ctx context.Context, id string) (PlanRecord, error)
	// Ping reports whether the store answers.
	Ping(ctx context.Context) error
	// Close releases the store.
	Close() error
}

// VersionReader is implemented by catalogs that can report a facility's current
// version more cheaply than reading the whole record, so that a caller keeping
// decoded copies of facility versions (which never change once stored) can check
// that its copy is current with one small query.
type VersionReader interface {
	// CurrentVersion returns the current version of a facility; CodeNotFound when it
	// does not exist or was deleted.
	CurrentVersion(ctx context.Context, id string) (int, error)
}

// Actor names who made a change: the name configured for a write token, never the
// token itself.
type Actor string

// Change is one entry of a facility's history.
type Change struct {
	Version int       `json:"version"`
	At      time.Time `json:"at"`
	By      Actor     `json:"by"`
	// Action is "create", "update" or "delete".
	Action string `json:"action"`
	// Fields lists the JSON paths that changed from the previous version.
	Fields []string `json:"fields"`
	// Facility is the record as of this version (nil for a delete).
	Facility *Facility `json:"facility,omitempty"`
}

// PlanRecord is a stored plan: the response body exactly as first returned.
type PlanRecord struct {
	ID              string `json:"id"`
	FacilityID      string `json:"facility_id"`
	FacilityVersion int    `json:"facility_version"`
	// Label is the caller's name for the plan's condition ("" none).
	Label     string    `json:"label,omitempty"`
	CreatedAt time.Time `json:"created_at"`
	// Body is the plan's JSON response, byte for byte.
	Body []byte `json:"-"`
}

// PlanLister is implemented by catalogs that keep plan records and can list
// them.
type PlanLister interface {
	// Plans lists plan records, newest first, without their bodies, and the
	// cursor of the next page ("" after the last); CodeInvalid for a bad cursor.
	Plans(ctx context.Context, q ListQuery) ([]PlanRecord, string, error)
}

// ListQuery selects stored records for a listing, newest first. Zero fields
// select everything.
type ListQuery struct {
	// Facility selects the records made against this facility id.
	Facility string
	// Label selects the records that carry this label.
	Label string
	// Since and Until bound the creation time: Since <= created < Until.
	Since, Until time.Time
	// Cursor continues a listing where its previous page ended (opaque).
	Cursor string
	// Limit is the most records of one page, at most MaxListLimit; 0:
	// DefaultListLimit.
	Limit int
}

// Listing page sizes.
const (
	// DefaultListLimit is the page size of a listing that names none.
	DefaultListLimit = 50
	// MaxListLimit is the largest page a listing gives.
	MaxListLimit = 500
)
