package sqlite

import (
	"context"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestExpectPlan checks how a group commit waits for announced plans: an
// announced plan that arrives joins the group of the one before it, a withdrawn
// announcement releases the group, an announcement that never settles delays the
// group by the gathering limit and no more, and every announcement is counted
// out exactly once however it settles.
func TestExpectPlan(t *testing.T) {
	t.Parallel()
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
	// The cases run one after another: each measures how long a group waits.
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
			require.NoError(t, <-first, "first plan")
			waited := time.Since(start)
			require.NoError(t, <-second, "second announcement")
			withdrawA()
			withdrawA()
			withdrawB()
			assert.GreaterOrEqual(t, waited, tt.minWait, "the first plan's wait")
			assert.LessOrEqual(t, waited, tt.gatherMax+5*time.Second, "the first plan's wait: the gathering limit and no more")
			g, r := db.PlanGroups()
			assert.Equal(t, [2]int64{tt.wantGroups, tt.wantRecords}, [2]int64{g, r}, "groups and records")
			coming, settled := hooks(db).Plans.Announced()
			assert.Equal(t, 0, coming, "announcements outstanding after settling")
			assert.Equal(t, int64(2), settled, "announcements settled")
		})
	}
}

// TestExpectPlanLoneCall checks that a SavePlan call with nothing announced
// besides its own is not delayed by the gathering limit.
func TestExpectPlanLoneCall(t *testing.T) {
	t.Parallel()
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
		require.NoError(t, err)
	case <-time.After(30 * time.Second):
		require.Fail(t, "a lone announced plan waited for the gathering limit")
	}
}
