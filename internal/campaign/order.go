package campaign

import (
	"math"
	"slices"
	"sort"

	"scalematch/facilities"
)

// bestOrder returns the order of the run sets that takes the fewest hours in
// facility f (facilities.ScheduleRuns), and its schedule. It compares the
// caller's order, the sets sorted by (temperature, pressure) both ways, and
// the grouped orders: the sets grouped by temperature level (within
// facilities.SameTemperature of the level's first), the groups in rising or
// falling temperature, with or without the group at the resting temperature
// first, and inside each group the pressures alternately rising and falling,
// so that the last pressure of one group is the first of the next. Ties go to
// the earlier of these in that list, so the answer is never worse than the
// caller's order or the sort by (temperature, pressure). Without operations
// figures a temperature change counts as 1000 pressure changes.
func bestOrder(f *facilities.Facility, sets []facilities.RunSet) ([]int, facilities.Schedule) {
	best, _ := bestOrderCost(f, sets)
	sch, _ := facilities.ScheduleRuns(f, permute(sets, best))
	return best, sch
}

// bestOrderCost returns bestOrder's order and its cost (hours, or without
// operations figures the weighted count of changes).
func bestOrderCost(f *facilities.Facility, sets []facilities.RunSet) ([]int, float64) {
	n := len(sets)
	identity := make([]int, n)
	for i := range identity {
		identity[i] = i
	}
	best := identity
	bestCost := cost(f, sets, best)
	try := func(o []int) {
		if c := cost(f, sets, o); c < bestCost {
			best, bestCost = o, c
		}
	}
	byTP := func(desc bool) []int {
		o := slices.Clone(identity)
		sort.SliceStable(o, func(i, j int) bool {
			a, b := sets[o[i]], sets[o[j]]
			if a.StagnationTemperature != b.StagnationTemperature {
				return (a.StagnationTemperature < b.StagnationTemperature) != desc
			}
			return (a.StagnationPressure < b.StagnationPressure) != desc
		})
		return o
	}
	try(byTP(false))
	try(byTP(true))
	groups := temperatureGroups(sets, byTP(false))
	rest := facilities.RestingCondition(f)
	for _, desc := range []bool{false, true} {
		for _, restFirst := range []bool{false, true} {
			gs := slices.Clone(groups)
			if desc {
				slices.Reverse(gs)
			}
			if restFirst {
				for k, g := range gs {
					if math.Abs(sets[g[0]].StagnationTemperature-rest.StagnationTemperature) <= facilities.SameTemperature {
						gs = append(append([][]int{g}, gs[:k]...), gs[k+1:]...)
						break
					}
				}
			}
			for _, firstDown := range []bool{false, true} {
				try(snake(sets, gs, firstDown))
			}
		}
	}
	return best, bestCost
}

// temperatureGroups splits the sets, in the order o of rising temperature, into
// groups whose temperatures lie within SameTemperature of the group's first.
func temperatureGroups(sets []facilities.RunSet, o []int) [][]int {
	var gs [][]int
	for _, i := range o {
		t := sets[i].StagnationTemperature
		if k := len(gs) - 1; k >= 0 && t-sets[gs[k][0]].StagnationTemperature <= facilities.SameTemperature {
			gs[k] = append(gs[k], i)
			continue
		}
		gs = append(gs, []int{i})
	}
	return gs
}

// snake orders each group's sets by pressure, alternately rising and falling
// (the first group falling when firstDown).
func snake(sets []facilities.RunSet, groups [][]int, firstDown bool) []int {
	var o []int
	down := firstDown
	for _, g := range groups {
		g := slices.Clone(g)
		sort.SliceStable(g, func(i, j int) bool {
			return (sets[g[i]].StagnationPressure < sets[g[j]].StagnationPressure) != down
		})
		o = append(o, g...)
		down = !down
	}
	return o
}

// permute returns the sets in order o.
func permute(sets []facilities.RunSet, o []int) []facilities.RunSet {
	out := make([]facilities.RunSet, len(o))
	for k, i := range o {
		out[k] = sets[i]
	}
	return out
}

// cost is the time of the sets in order o: the schedule's hours, or without
// operations figures the changes (a temperature change as 1000 pressure
// changes).
func cost(f *facilities.Facility, sets []facilities.RunSet, o []int) float64 {
	if f.Operations == nil {
		prev := facilities.RestingCondition(f)
		c := 0.0
		for _, i := range o {
			p, t := facilities.Changes(prev, sets[i].Condition)
			if p {
				c++
			}
			if t {
				c += 1000
			}
			prev = sets[i].Condition
		}
		return c
	}
	sch, _ := facilities.ScheduleRuns(f, permute(sets, o))
	return sch.Hours
}

// hoursOf is the schedule's hours of the sets in the caller's order (0 without
// operations figures).
func hoursOf(f *facilities.Facility, sets []facilities.RunSet) float64 {
	sch, _ := facilities.ScheduleRuns(f, sets)
	return sch.Hours
}
