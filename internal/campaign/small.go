package campaign

// SmallPairs is the most condition-facility pairs a campaign may have to be
// answered at once (Small). Measured with BenchmarkCampaign on the 2-core
// development machine: 1000 conditions in three facilities (3000 pairs) take
// about 0.65 s, so 600 pairs take about 0.13 s, a plan batch's time; larger
// campaigns run as jobs.
const SmallPairs = 600

// Small reports whether req is small enough to answer at once: its conditions
// (explicit and grid) times its facilities at most SmallPairs, with level
// sharing counted double (its re-plans).
func Small(req *Request) bool {
	pairs := req.ConditionCount() * max(len(req.Facilities), 1)
	if req.LevelSharing.ReynoldsCostPercent > 0 {
		pairs *= 2
	}
	return pairs <= SmallPairs
}

// ConditionCount returns the number of conditions req names, explicit and grid.
func (req *Request) ConditionCount() int {
	n := len(req.Conditions)
	if g := req.Grid; g != nil {
		n += len(g.Altitudes) * len(g.Machs)
	}
	return n
}
