package facilities_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestScheduleTest works the demo operations figures by hand (20 s a point, 10 min a
// run, 30 min a pressure change, 90 min a temperature change; cn2-05: 240 min).
func TestScheduleTest(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name     string
		facility string
		test     facilities.Test
		want     facilities.Schedule
	}{{
		// 21 points: 7 min; 1 run: 10 min; atmospheric p0 and T0 inside the resting
		// state's 2 K: no change. 17 min = 0.28333 h.
		name: "atmospheric single sweep", facility: "lsw-2",
		test: facilities.Test{AlphaPoints: 21, Conditions: []facilities.Condition{{95500, 289}}},
		want: facilities.Schedule{Points: 21, Runs: 1, Hours: 17.0 / 60},
	}, {
		// 3 β runs of 21 points: 63 points = 21 min, 30 min of runs; from rest
		// (130 kPa, 288.15 K) to 300 kPa and 150 K: 30 + 240 min. 321 min = 5.35 h.
		name: "cryogenic, three sideslip runs", facility: "cn2-05",
		test: facilities.Test{AlphaPoints: 21, BetaValues: 3, Conditions: []facilities.Condition{{300000, 150}}},
		want: facilities.Schedule{Points: 63, Runs: 3, PressureChanges: 1, TemperatureChanges: 1, Hours: 321.0 / 60},
	}, {
		// Two pressures at one temperature: rest 101.325 kPa → 200 kPa → 101 kPa is
		// two changes; 290 K is within 2 K of the resting 288.15 K, so no temperature
		// change. 42 points = 14 min, 2 runs = 20 min, 60 min of changes: 94 min.
		name: "pressure sweep", facility: "plp-3",
		test: facilities.Test{AlphaPoints: 21, Conditions: []facilities.Condition{{200000, 290}, {101000, 290}}},
		want: facilities.Schedule{Points: 42, Runs: 2, PressureChanges: 2, Hours: 94.0 / 60},
	}}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			f := mustDemo(t, c.facility)
			got, err := facilities.ScheduleTest(&f, c.test)
			require.NoError(t, err)
			assert.InDelta(t, c.want.Hours, got.Hours, 1e-12, "hours, worked by hand")
			got.Hours = c.want.Hours
			assert.Equal(t, c.want, got, "points, runs and changes, worked by hand")
		})
	}
}

func TestScheduleErrors(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "lsw-2")
	_, err := facilities.ScheduleTest(&f, facilities.Test{AlphaPoints: -1})
	assert.Equal(t, facilities.CodeInvalid, facilities.ErrorCode(err), "negative points: %v", err)
	f.Operations = nil
	_, err = facilities.ScheduleTest(&f, facilities.Test{AlphaPoints: 3})
	assert.ErrorIs(t, err, facilities.ErrNoOperations, "no operations")
}
