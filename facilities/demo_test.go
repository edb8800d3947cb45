package facilities_test

import (
	"context"
	"testing"

	"scalematch/facilities"
)

func TestDemoDecodes(t *testing.T) {
	got := facilities.Demo()
	if len(got) != 5 {
		t.Fatalf("demo catalog has %d facilities, want 5", len(got))
	}
	if _, ok := facilities.DemoFacility("tsw-1"); !ok {
		t.Fatal("tsw-1 missing from the demo catalog")
	}
}

func TestDemoCatalogIsReadOnly(t *testing.T) {
	ctx := context.Background()
	var c facilities.DemoCatalog
	fs, err := c.Facilities(ctx)
	if err != nil || len(fs) != 5 {
		t.Fatalf("Facilities: %d, %v; want the 5 demo facilities", len(fs), err)
	}
	for i := 1; i < len(fs); i++ {
		if fs[i-1].ID >= fs[i].ID {
			t.Errorf("not ordered by id: %q before %q", fs[i-1].ID, fs[i].ID)
		}
	}
	f, err := c.Facility(ctx, "cn2-05")
	if err != nil || f.Version != 1 {
		t.Fatalf("Facility(cn2-05): version %d, %v; want version 1", f.Version, err)
	}
	if _, err := c.Facility(ctx, "nope"); facilities.ErrorCode(err) != facilities.CodeNotFound {
		t.Errorf("unknown id: %v, want not_found", err)
	}
	if err := c.DeleteFacility(ctx, "cn2-05", 1, "x"); facilities.ErrorCode(err) != facilities.CodeForbidden {
		t.Errorf("delete: %v, want forbidden", err)
	}
	if _, err := c.UpdateFacility(ctx, f, 1, "x"); facilities.ErrorCode(err) != facilities.CodeForbidden {
		t.Errorf("update: %v, want forbidden", err)
	}
	if _, err := c.CreateFacility(ctx, f, "x"); facilities.ErrorCode(err) != facilities.CodeForbidden {
		t.Errorf("create: %v, want forbidden", err)
	}
	if _, err := c.Plan(ctx, "abc"); facilities.ErrorCode(err) != facilities.CodeNotFound {
		t.Errorf("plan: %v, want not_found", err)
	}
}
