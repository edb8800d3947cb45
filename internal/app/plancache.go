package app

import (
	"context"
	"sync"
	"time"

	"scalematch/facilities"
)

// maxCachedFacilities bounds the facility versions a facilityCache keeps; past it
// the cache starts again empty.
const maxCachedFacilities = 1024

// DefaultFacilityRecheck is how long a service plans with a cached facility
// version before it asks the catalog again whether that version is still current
// (NewPlanner).
const DefaultFacilityRecheck = 50 * time.Millisecond

// facilityCache keeps the newest decoded version of each catalog facility a
// service has read. A stored version never changes, so a copy is good for as long
// as the catalog says that version is current. The cache asks the catalog for the
// current version (one small indexed read, facilities.VersionReader) when its last
// answer is older than recheck, and reads and decodes the record only when the
// version has changed. A change made through this service (forget) is seen by the
// next request; one made by another replica within recheck. Every plan records the
// version it was planned with.
//
// The facilities handed out share their pointers and slices with the cache: the
// planner only reads them, as it does the decoded-once demo table.
type facilityCache struct {
	recheck time.Duration // ≤ 0: ask on every lookup
	mu      sync.RWMutex
	m       map[string]cachedFacility
}

// cachedFacility is a facility version and when the catalog last said it was
// current.
type cachedFacility struct {
	f       facilities.Facility
	checked time.Time
}

func newFacilityCache(recheck time.Duration) *facilityCache {
	return &facilityCache{recheck: recheck, m: map[string]cachedFacility{}}
}

// get returns the current version of facility id in catalog c (as of at most
// recheck ago). A catalog that cannot report versions cheaply is read every time.
func (fc *facilityCache) get(ctx context.Context, c facilities.Catalog, id string) (facilities.Facility, error) {
	vr, ok := c.(facilities.VersionReader)
	if fc == nil || !ok {
		return checkedFacility(c.Facility(ctx, id))
	}
	fc.mu.RLock()
	e, ok := fc.m[id]
	fc.mu.RUnlock()
	if ok && time.Since(e.checked) < fc.recheck {
		return e.f, nil
	}
	now := time.Now()
	v, err := vr.CurrentVersion(ctx, id)
	if err != nil {
		return facilities.Facility{}, err
	}
	if !ok || e.f.Version != v {
		if e.f, err = checkedFacility(c.Facility(ctx, id)); err != nil {
			return facilities.Facility{}, err
		}
	}
	fc.mu.Lock()
	if cur, ok := fc.m[id]; !ok || cur.f.Version < e.f.Version || (cur.f.Version == e.f.Version && cur.checked.Before(now)) {
		if !ok && len(fc.m) >= maxCachedFacilities {
			clear(fc.m)
		}
		fc.m[id] = cachedFacility{f: e.f, checked: now}
	}
	fc.mu.Unlock()
	return e.f, nil
}

// checkedFacility passes on a catalog read, refusing a record that Validate
// refuses (stored before its fields had their present ranges) with
// facilities.StoredRecordInvalid.
func checkedFacility(f facilities.Facility, err error) (facilities.Facility, error) {
	if err != nil {
		return f, err
	}
	if verr := f.Validate(); verr != nil {
		return facilities.Facility{}, facilities.StoredRecordInvalid(f, verr)
	}
	return f, nil
}

// NewPlanner returns a planner over catalog c for a long-running service: it keeps
// the decoded facility versions it reads, asking c whether a version is still
// current when its last answer is older than recheck (0: DefaultFacilityRecheck;
// negative: on every plan), and the bodies of the plans it stores (at most
// storedPlanBytes), so that a repeated request is answered with the stored bytes.
func NewPlanner(c facilities.Catalog, recheck time.Duration) *Planner {
	if recheck == 0 {
		recheck = DefaultFacilityRecheck
	}
	return &Planner{Catalog: c, cache: newFacilityCache(recheck), stored: newStoredPlans(storedPlanBytes)}
}

// Forget drops the cached version of facility id, so that the next plan asks the
// catalog: the service's catalog handlers call it on every change they make. It
// does nothing on a nil planner or one without caches.
func (p *Planner) Forget(id string) {
	if p == nil {
		return
	}
	p.cache.forget(id)
}

// forget drops facility id, so that the next lookup asks the catalog.
func (fc *facilityCache) forget(id string) {
	if fc == nil {
		return
	}
	fc.mu.Lock()
	delete(fc.m, id)
	fc.mu.Unlock()
}

// storedPlanBytes bounds the bodies a storedPlans keeps, in bytes (32 MiB, about
// 1600 plans of a 21-point sweep).
const storedPlanBytes = 32 << 20

// storedPlans keeps the bodies of plans this service has stored (or found stored)
// by id, oldest dropped first past storedPlanBytes. A stored plan never changes and
// its id covers the whole decoded request and the facility version, so a request
// whose id is here is answered with these bytes, exactly as the store would, after
// it has been decoded and validated and its id computed; a request never seen is
// always planned.
type storedPlans struct {
	mu    sync.Mutex
	m     map[string][]byte
	order []string // ids, oldest first
	size  int
	limit int
}

func newStoredPlans(limit int) *storedPlans {
	return &storedPlans{m: map[string][]byte{}, limit: limit}
}

// get returns the stored body of plan id, if it is kept.
func (sp *storedPlans) get(id string) ([]byte, bool) {
	if sp == nil {
		return nil, false
	}
	sp.mu.Lock()
	b, ok := sp.m[id]
	sp.mu.Unlock()
	return b, ok
}

// put keeps body, the stored record of plan id; callers never change it.
func (sp *storedPlans) put(id string, body []byte) {
	if sp == nil || len(body) > sp.limit {
		return
	}
	sp.mu.Lock()
	defer sp.mu.Unlock()
	if _, ok := sp.m[id]; ok {
		return
	}
	sp.m[id] = body
	sp.order = append(sp.order, id)
	sp.size += len(body)
	for sp.size > sp.limit {
		old := sp.order[0]
		sp.order[0] = ""
		sp.order = sp.order[1:]
		sp.size -= len(sp.m[old])
		delete(sp.m, old)
	}
}
