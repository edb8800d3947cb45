package sqlite

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"
	"time"

	"scalematch/facilities"
)

func cpuNow() time.Duration {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func TestTmpStoreCPU(t *testing.T) {
	body, err := os.ReadFile("/tmp/ans.json")
	if err != nil {
		t.Skip()
	}
	type cfg struct {
		name, page, ckpt string
		drop             bool
	}
	cfgs := []cfg{{"base", "", "", false}, {"p8k", "8192", "", false}, {"p16k", "16384", "", false}, {"ckpt8000", "", "8000", false}, {"dropidx", "", "", true}, {"all8k", "8192", "8000", true}}
	ctx := context.Background()
	dbs := make([]*DB, len(cfgs))
	for i, c := range cfgs {
		os.Setenv("TMP_PAGESIZE", c.page)
		os.Setenv("TMP_CKPT", c.ckpt)
		db, err := Open(ctx, filepath.Join(t.TempDir(), FileName))
		if err != nil {
			t.Fatal(err)
		}
		defer db.Close()
		if c.drop {
			if _, err := db.w.Exec("DROP INDEX plans_facility"); err != nil {
				t.Fatal(err)
			}
		}
		dbs[i] = db
	}
	workers := 4
	if v := os.Getenv("TMP_WORKERS"); v != "" {
		fmt.Sscan(v, &workers)
	}
	per := 400
	cpu := make([]time.Duration, len(cfgs))
	wall := make([]time.Duration, len(cfgs))
	var n atomic.Int64
	for round := 0; round < 10; round++ {
		for i, db := range dbs {
			c0, t0 := cpuNow(), time.Now()
			var wg sync.WaitGroup
			for range workers {
				wg.Add(1)
				go func() {
					defer wg.Done()
					for range per / workers {
						id := fmt.Sprintf("plan-%d", n.Add(1))
						if _, err := db.SavePlan(ctx, facilities.PlanRecord{ID: id, FacilityID: "tsw-1", FacilityVersion: 1, Body: body}); err != nil {
							t.Error(err)
						}
					}
				}()
			}
			wg.Wait()
			cpu[i] += cpuNow() - c0
			wall[i] += time.Since(t0)
		}
	}
	for i, c := range cfgs {
		g, r := dbs[i].PlanGroups()
		t.Logf("%-10s CPU %6.0f µs/plan  wall %6.0f µs/plan  group %.2f", c.name, float64(cpu[i].Microseconds())/1000, float64(wall[i].Microseconds())/1000, float64(r)/float64(g))
	}
}
