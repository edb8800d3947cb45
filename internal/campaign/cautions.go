package campaign

import (
	"fmt"
	"sync"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// cautions gathers the cautions of a campaign's load checks: the load check's
// own (a model that does not fit, loads not verified), each facility's worst
// load report, and how many conditions go over the allowed load.
type cautions struct {
	mu    sync.Mutex
	fixed []string
	worst map[int]worstReport // by facility index
	over  map[int]int         // conditions over the allowed load, by facility
	water map[int]bool
}

type worstReport struct {
	ci     int
	report loads.Report
}

func newCautions() *cautions {
	return &cautions{worst: map[int]worstReport{}, over: map[int]int{}, water: map[int]bool{}}
}

// add takes condition ci's load check in facility f (index key).
func (c *cautions) add(f *facilities.Facility, key, ci int, lr *loads.Result) {
	fixed := lr.Cautions()
	c.mu.Lock()
	defer c.mu.Unlock()
	c.fixed = appendUniq(c.fixed, fixed...)
	if len(lr.Reports) == 0 {
		return
	}
	r := lr.Reports[0]
	if r.MaxUtilization > r.AllowedUtilization*(1+1e-12) {
		c.over[key]++
	}
	w, ok := c.worst[key]
	share := func(x loads.Report) float64 { return x.MaxUtilization / x.AllowedUtilization }
	if !ok || share(r) > share(w.report) || share(r) == share(w.report) && ci < w.ci {
		c.worst[key] = worstReport{ci: ci, report: r}
	}
	if f.Medium.IsLiquid() {
		c.water[key] = true
	}
}

// list returns the campaign's cautions: every facility's standing cautions,
// then each facility's worst load report's, the count over the allowed load,
// and the load check's own.
func (c *cautions) list(pr *prepared) []string {
	out := []string{}
	for key, fc := range pr.facs {
		w, ok := c.worst[key]
		if !ok {
			out = appendUniq(out, facilities.Cautions(fc.f)...)
			continue
		}
		for _, s := range loads.Cautions(fc.f, w.report) {
			if s == facilities.CautionEstimate || s == loads.CautionStaticLoads || s == loads.CautionWeightLeftOut {
				out = appendUniq(out, s)
				continue
			}
			if _, isFacility := indexOf(facilities.Cautions(fc.f), s); isFacility {
				out = appendUniq(out, s)
				continue
			}
			out = appendUniq(out, fmt.Sprintf("Facility %s, worst condition %s: %s", fc.f.ID, pr.conds[w.ci].label, s))
		}
		if n := c.over[key]; n > 0 {
			out = append(out, fmt.Sprintf("Facility %s: %d conditions go over the balance's allowed load by this estimate; do not run their points above it (each condition's plan.verdict says which).", fc.f.ID, n))
		}
		if c.water[key] {
			out = appendUniq(out, facilities.CautionWaterLoads)
		}
	}
	return appendUniq(out, c.fixed...)
}

// indexOf returns the position of s in list.
func indexOf(list []string, s string) (int, bool) {
	for i, x := range list {
		if x == s {
			return i, true
		}
	}
	return -1, false
}
