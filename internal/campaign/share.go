package campaign

import (
	"math"
	"sort"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// shareTries is how many existing levels, the nearest first, a condition tries
// before it opens a level of its own.
const shareTries = 8

// share lets the conditions idx served by facility fi at scale s take each
// other's stagnation levels, the temperature (temperature true: the conditions
// by falling temperature; each tries the nearest levels opened so far,
// re-planned with the temperature held there) or, within each temperature
// level, the pressure (by rising pressure, re-planned with both held). A
// condition takes a level when its plan there keeps its Mach match and loses
// at most the sharing cost of its Reynolds closeness before any sharing
// (orig); otherwise it opens a level.
func (e *engine) share(fi int, s float64, idx []int, fin []final, orig map[int]point, temperature bool) {
	f := e.pr.facs[fi].f
	cost := e.pr.share
	// accept re-plans ci with facility g and keeps the plan when good enough.
	accept := func(ci int, g *facilities.Facility) bool {
		e.plans.Add(1)
		res, err := e.solve(ci, fi, similarity.Model{Scale: &s}, g)
		if err != nil {
			if check.ErrorCode(err) != check.CodeUnprocessable {
				e.fail(err)
			}
			return false
		}
		p := e.pointOf(ci, fi, res, nil)
		o := orig[ci]
		if !p.ok || o.machOK && !p.machOK || p.close < o.close*(1-cost) {
			return false
		}
		fin[ci].pt, fin[ci].res, fin[ci].shared = p, res, true
		return true
	}
	held := func(t, p float64) *facilities.Facility {
		g := *f
		if t > 0 {
			g.StagnationTemperature = facilities.Range{Min: t, Max: t}
		}
		if p > 0 {
			g.StagnationPressure = facilities.Range{Min: p, Max: p}
		}
		return &g
	}
	// Temperature levels.
	if temperature && !f.StagnationTemperature.Fixed() {
		order := append([]int{}, idx...)
		sort.SliceStable(order, func(a, b int) bool { return fin[order[a]].pt.t0 > fin[order[b]].pt.t0 })
		var levels []float64
		for _, ci := range order {
			t := fin[ci].pt.t0
			if e.ctx.Err() != nil {
				return
			}
			if _, ok := nearestWithin(levels, t, facilities.SameTemperature, false); ok {
				continue
			}
			joined := false
			for _, l := range nearest(levels, t, shareTries) {
				if accept(ci, held(l, 0)) {
					joined = true
					break
				}
			}
			if !joined {
				levels = append(levels, t)
			}
		}
		return
	}
	// Pressure levels within each temperature level.
	if !temperature && f.StagnationPressure.Max > 0 && !f.StagnationPressure.Fixed() {
		sets := make([]facilities.RunSet, len(idx))
		byT := make([]int, len(idx))
		for k, ci := range idx {
			sets[k].StagnationTemperature = fin[ci].pt.t0
			byT[k] = k
		}
		sort.SliceStable(byT, func(a, b int) bool { return sets[byT[a]].StagnationTemperature < sets[byT[b]].StagnationTemperature })
		for _, g := range temperatureGroups(sets, byT) {
			group := make([]int, len(g))
			for k, i := range g {
				group[k] = idx[i]
			}
			sort.SliceStable(group, func(a, b int) bool { return fin[group[a]].pt.p0 < fin[group[b]].pt.p0 })
			var levels []float64
			for _, ci := range group {
				if e.ctx.Err() != nil {
					return
				}
				p := fin[ci].pt.p0
				if _, ok := nearestWithin(levels, p, facilities.SamePressureFraction, true); ok {
					continue
				}
				joined := false
				for _, l := range nearest(levels, p, shareTries) {
					tt := 0.0
					if !f.StagnationTemperature.Fixed() {
						tt = fin[ci].pt.t0
					}
					if accept(ci, held(tt, l)) {
						joined = true
						break
					}
				}
				if !joined {
					levels = append(levels, p)
				}
			}
		}
	}
}

// nearestWithin returns the level nearest v when it lies within tol of it
// (relative to the level when rel).
func nearestWithin(levels []float64, v, tol float64, rel bool) (float64, bool) {
	for _, l := range nearest(levels, v, 1) {
		lim := tol
		if rel {
			lim = tol * math.Abs(l)
		}
		if math.Abs(v-l) <= lim {
			return l, true
		}
	}
	return 0, false
}

// nearest returns up to k levels, the nearest v first (ties: the earlier).
func nearest(levels []float64, v float64, k int) []float64 {
	ls := append([]float64{}, levels...)
	sort.SliceStable(ls, func(i, j int) bool { return math.Abs(ls[i]-v) < math.Abs(ls[j]-v) })
	return ls[:min(k, len(ls))]
}
