package sqlite

import (
	"context"
	"testing"
	"time"

	"scalematch/facilities"
)

// TestExpectPlan checks how a group commit waits for announced plans: an
// announced plan that arrives joins the group of the one before it, a withdrawn
// announcement releases the group, an announcement that never settles delays the
// group by the gathering limit and no more, and every announcement is counted
// out exactly once however it settles.
func TestExpectPlan(t *testing.T) {
	tests := []struct {
		name      string
		gatherMax time.Duration
		// settleB settles the second announcement while the first plan's group
		// waits; nil leaves it outstanding until the first plan is stored.
		settleB     func(db *DB, ctxB context.Context, withdrawB func()) error
		wantGroups  int64
		wantRecords int64
		minWait     time.Duration // the first plan waits at least this long
	}{
		{"announced plan joins the group", time.Minute, func(db *DB, ctxB context.Context, _ func()) error {
			_, err := db.SavePlan(ctxB, facilities.PlanRecord{ID: "b", Body: []byte(`{}`)})
			return err
		}, 1, 2, 0},
		{"withdrawn announcement releases the group", time.Minute, func(_ *DB, _ context.Context, withdrawB func()) error {
			withdrawB()
			return nil
		}, 1, 1, 0},
		{"outstanding announcement delays by the limit", 30 * time.Millisecond, nil, 1, 1, 30 * time.Millisecond},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			db := openInternal(t)
			hooks(db).Plans.SetGather(tt.gatherMax)
			ctxA, withdrawA := db.ExpectPlan(context.Background())
			ctxB, withdrawB := db.ExpectPlan(context.Background())
			ctxA, cancel := context.WithTimeout(ctxA, 10*time.Second) // a derived context still carries it
			defer cancel()
			start := time.Now()
			first := make(chan error, 1)
			go func() {
				_, err := db.SavePlan(ctxA, facilities.PlanRecord{ID: "a", Body: []byte(`{}`)})
				first <- err
			}()
			// Wait until the first plan is queued or being committed.
			for {
				coming, _ := hooks(db).Plans.Announced()
				if coming == 1 {
					break
				}
				time.Sleep(100 * time.Microsecond)
			}
			second := make(chan error, 1)
			if tt.settleB != nil {
				go func() { second <- tt.settleB(db, ctxB, withdrawB) }()
			} else {
				second <- nil
			}
			if err := <-first; err != nil {
				t.Fatalf("first plan: %v", err)
			}
			waited := time.Since(start)
			if err := <-second; err != nil {
				t.Fatalf("second announcement: %v", err)
			}
			withdrawA()
			withdrawA()
			withdrawB()
			if waited < tt.minWait {
				t.Errorf("the first plan was stored after %v, want at least %v", waited, tt.minWait)
			}
			if waited > tt.gatherMax+5*time.Second {
				t.Errorf("the first plan was stored after %v, more than the gathering limit %v", waited, tt.gatherMax)
			}
			if g, r := db.PlanGroups(); g != tt.wantGroups || r != tt.wantRecords {
				t.Errorf("%d records in %d groups, want %d in %d", r, g, tt.wantRecords, tt.wantGroups)
			}
			coming, settled := hooks(db).Plans.Announced()
			if coming != 0 || settled != 2 {
				t.Errorf("after settling: %d announcements outstanding, %d settled; want 0 and 2", coming, settled)
			}
		})
	}
}

// TestExpectPlanLoneCall checks that a SavePlan call with nothing announced
// besides its own is not delayed by the gathering limit.
func TestExpectPlanLoneCall(t *testing.T) {
	db := openInternal(t)
	hooks(db).Plans.SetGather(time.Minute)
	ctx, withdraw := db.ExpectPlan(context.Background())
	defer withdraw()
	done := make(chan error, 1)
	go func() {
		_, err := db.SavePlan(ctx, facilities.PlanRecord{ID: "lone", Body: []byte(`{}`)})
		done <- err
	}()
	select {
	case err := <-done:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(30 * time.Second):
		t.Fatal("a lone announced plan waited for the gathering limit")
	}
}
