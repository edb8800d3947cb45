package similarity

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestRaiseFloorForgetsQAtOldFloor: a cn2-05 set-up whose lowest stagnation
// pressure a load floor raises (raiseFloor) answers q on the T0 floor at its
// new lowest p0 from the state there, not the q it kept for the old one
// (qa), at five Mach numbers and two floors between the set-up's least q and
// its top's.
func TestRaiseFloorForgetsQAtOldFloor(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("cn2-05")
	require.True(t, ok)
	raised := 0
	for i := range 5 {
		sv := tradeSolver(t, &f)
		u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*(0.1+0.2*float64(i))
		var c machSetup
		sv.prepareIn(&c, u)
		if c.fail != "" || !c.qaOK {
			continue
		}
		tp := sv.top(&c)
		for _, frac := range []float64{0.3, 0.7} {
			lo := c.qLow + frac*(tp.q-c.qLow)
			c2, ok := sv.raiseFloor(&c, lo, tp)
			if !ok || c2.pa == c.pa {
				continue
			}
			raised++
			st, err := sv.stateNow(u, c2.pa, sv.tfloor(&c2, c2.pa))
			require.NoError(t, err)
			assert.Equal(t, st.DynamicPressure, sv.qcurve(&c2, c2.pa), "Mach %g, floor %g Pa: q at the raised p0 min %g Pa", u, lo, c2.pa)
		}
	}
	assert.Greater(t, raised, 4, "set-ups raised")
}
