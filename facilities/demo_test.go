package facilities_test

import (
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
