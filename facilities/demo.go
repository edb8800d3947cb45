package facilities

import (
	"bytes"
	"context"
	_ "embed"
	"encoding/json"
	"fmt"
	"sort"
)

// demoJSON holds the demo facilities of the invented demo world (docs/demo-world.md).
//
//go:embed demo.json
var demoJSON []byte

// Demo returns a fresh copy of the embedded demo facilities, ordered as listed,
// each at catalog version 1: the version a store seeded with them gives them, so
// the demo catalog and a freshly seeded store show the same versions and give the
// same plan ids. They are invented: none describes a real facility.
func Demo() []Facility {
	var v struct {
		Facilities []Facility `json:"facilities"`
	}
	dec := json.NewDecoder(bytes.NewReader(demoJSON))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&v); err != nil {
		// The file is embedded at build time and covered by TestDemo; a failure here
		// is a build defect, not user input.
		panic(fmt.Sprintf("facilities: embedded demo.json: %v", err))
	}
	for i := range v.Facilities {
		v.Facilities[i].Version = 1
	}
	return v.Facilities
}

// DemoFacility returns the demo facility with the given id.
func DemoFacility(id string) (Facility, bool) {
	for _, f := range Demo() {
		if f.ID == id {
			return f, true
		}
	}
	return Facility{}, false
}

// DemoCatalog is a read-only Catalog over the embedded demo facilities, for a service
// or tool run without a store: reads answer from Demo() (every facility at version 1),
// catalog changes are refused with CodeForbidden, and plans are not kept (SavePlan
// returns the record unchanged, Plan finds nothing).
type DemoCatalog struct{}

var _ Catalog = DemoCatalog{}

func errDemoReadOnly() error {
	return &Error{Code: CodeForbidden, Message: "the embedded demo catalog is read-only: run the service with a store to change facilities"}
}

// Facilities lists the demo facilities ordered by id.
func (DemoCatalog) Facilities(context.Context) ([]Facility, error) {
	fs := Demo()
	sort.Slice(fs, func(i, j int) bool { return fs[i].ID < fs[j].ID })
	return fs, nil
}

// Facility returns a demo facility; CodeNotFound for any other id.
func (DemoCatalog) Facility(_ context.Context, id string) (Facility, error) {
	if f, ok := DemoFacility(id); ok {
		return f, nil
	}
	return Facility{}, &Error{Code: CodeNotFound, Message: fmt.Sprintf("no facility %q in the demo catalog", id)}
}

// FacilityVersion returns version 1 of a demo facility; CodeNotFound otherwise.
func (c DemoCatalog) FacilityVersion(ctx context.Context, id string, version int) (Facility, error) {
	if version != 1 {
		return Facility{}, &Error{Code: CodeNotFound, Message: fmt.Sprintf("the demo catalog has only version 1 of %q", id)}
	}
	return c.Facility(ctx, id)
}

// CreateFacility is refused: the demo catalog is read-only.
func (DemoCatalog) CreateFacility(context.Context, Facility, Actor) (Facility, error) {
	return Facility{}, errDemoReadOnly()
}

// UpdateFacility is refused: the demo catalog is read-only.
func (DemoCatalog) UpdateFacility(context.Context, Facility, int, Actor) (Facility, error) {
	return Facility{}, errDemoReadOnly()
}

// DeleteFacility is refused: the demo catalog is read-only.
func (DemoCatalog) DeleteFacility(context.Context, string, int, Actor) error {
	return errDemoReadOnly()
}

// Versions lists the one version of a demo facility.
func (c DemoCatalog) Versions(ctx context.Context, id string) ([]Change, error) {
	f, err := c.Facility(ctx, id)
	if err != nil {
		return nil, err
	}
	return []Change{{Version: 1, By: "demo", Action: "create", Fields: []string{}, Facility: &f}}, nil
}

// SavePlan keeps nothing and returns p as given.
func (DemoCatalog) SavePlan(_ context.Context, p PlanRecord) (PlanRecord, error) { return p, nil }

// Plan finds nothing: the demo catalog keeps no plans.
func (DemoCatalog) Plan(_ context.Context, id string) (PlanRecord, error) {
	return PlanRecord{}, &Error{Code: CodeNotFound, Message: fmt.Sprintf("no stored plan %q: this service runs without a store", id)}
}

// Ping always answers: the demo catalog is in memory.
func (DemoCatalog) Ping(context.Context) error { return nil }

// Close does nothing.
func (DemoCatalog) Close() error { return nil }
