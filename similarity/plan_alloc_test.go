package similarity_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/similarity"
)

// TestPlanAllocations guards the planner's allocations: the Orrin J16 at
// M 0.78 at 12 000 m in tsw-1 (docs/planner.md, worked example), the whole
// plan with its binding gains' re-solves and 41-point trade curve. The
// per-Mach set-ups and candidates live on the stack; when a root finder's
// closure escaped (a finder called through a function value), each of them
// moved to the heap and this plan made 234 allocations instead of 36
// (docs/performance.md, "The root finders' closures kept off the heap").
func TestPlanAllocations(t *testing.T) {
	fs := planFlight(t, &orrinJ16, 12000, 0.78, 0)
	p := &similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: planDemo(t, "tsw-1")}
	_, err := similarity.Plan(p, nil)
	require.NoError(t, err)
	n := testing.AllocsPerRun(20, func() { _, _ = similarity.Plan(p, nil) })
	t.Logf("%.0f allocations a plan", n)
	assert.LessOrEqual(t, n, 80.0, "allocations a plan (36 here, 45 with the race detector)")
}
