package facilities

import (
	"context"
	"fmt"
)

// SeedActor is the actor recorded for the facilities a store is seeded with.
const SeedActor Actor = "seed"

// Seeder is implemented by stores that can record their first start. SeedOnce, in
// one transaction, stores each facility as version 1 by the given actor and records
// that the store has been seeded, but only when no seed was ever recorded; it
// reports whether it did. An empty list still records the first start, so a store
// first started without the demo catalog never receives it later.
type Seeder interface {
	SeedOnce(ctx context.Context, fs []Facility, by Actor) (bool, error)
}

// SeedDemo gives a store the demo facilities (Demo) on its first start, recorded so
// that it never happens again: a store whose demo facilities were deleted stays
// without them. With demo false (the --no-demo flag) the first start is recorded
// with no facilities. It reports whether the demo facilities were stored. The store
// must implement Seeder; both catalog engines do.
func SeedDemo(ctx context.Context, c Catalog, demo bool) (bool, error) {
	s, ok := c.(Seeder)
	if !ok {
		return false, fmt.Errorf("facilities: the catalog store %T cannot record a seed", c)
	}
	var fs []Facility
	if demo {
		fs = Demo()
	}
	seeded, err := s.SeedOnce(ctx, fs, SeedActor)
	if err != nil {
		return false, fmt.Errorf("facilities: seeding the catalog: %w", err)
	}
	return seeded && demo, nil
}
