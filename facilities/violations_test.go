package facilities_test

import (
	"encoding/json"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestViolations triggers each constraint with a targeted setting and checks the
// exact list of constraints reported.
func TestViolations(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		id     string
		modify func(f *facilities.Facility)
		set    facilities.Setting
		want   []string
	}{
		{"inside every limit", "tsw-1", nil, facilities.Setting{Mach: 0.8, StagnationPressure: 150000, StagnationTemperature: 310}, nil},
		{"Mach below", "tsw-1", nil, facilities.Setting{Mach: 0.1, StagnationPressure: 150000, StagnationTemperature: 310},
			[]string{facilities.ConstraintMachMin}},
		// M 1.2 at 100 kPa: q = 0.7·p·M² ≈ 42 kPa, under the 54 kPa limit.
		{"Mach above", "tsw-1", nil, facilities.Setting{Mach: 1.2, StagnationPressure: 100000, StagnationTemperature: 310},
			[]string{facilities.ConstraintMachMax}},
		{"speed below", "lsw-2", nil, facilities.Setting{Speed: 3, StagnationPressure: 95500, StagnationTemperature: 300},
			[]string{facilities.ConstraintSpeedMin}},
		// 95 m/s: q ≈ ½·1.1·95² ≈ 5 kPa, also above the 4.1 kPa limit.
		{"speed above", "lsw-2", nil, facilities.Setting{Speed: 95, StagnationPressure: 95500, StagnationTemperature: 300},
			[]string{facilities.ConstraintSpeedMax, facilities.ConstraintDynamic}},
		{"pressure below", "tsw-1", nil, facilities.Setting{Mach: 0.5, StagnationPressure: 40000, StagnationTemperature: 310},
			[]string{facilities.ConstraintPressureMin}},
		{"pressure above", "plp-3", nil, facilities.Setting{Mach: 0.1, StagnationPressure: 500000, StagnationTemperature: 300},
			[]string{facilities.ConstraintPressureMax}},
		{"temperature below", "tsw-1", nil, facilities.Setting{Mach: 0.5, StagnationPressure: 150000, StagnationTemperature: 290},
			[]string{facilities.ConstraintTempMin}},
		{"temperature above", "wtn-04", nil, facilities.Setting{Speed: 1, StagnationPressure: 101000, StagnationTemperature: 310},
			[]string{facilities.ConstraintTempMax}},
		// M 1.1 at 200 kPa: p ≈ 94 kPa, q ≈ 79 kPa > 54 kPa.
		{"dynamic pressure", "tsw-1", nil, facilities.Setting{Mach: 1.1, StagnationPressure: 200000, StagnationTemperature: 310},
			[]string{facilities.ConstraintDynamic}},
		{"Reynolds number per metre", "tsw-1", func(f *facilities.Facility) { f.MaxReynoldsPerMeter = fp(1.5e7) },
			facilities.Setting{Mach: 0.8, StagnationPressure: 150000, StagnationTemperature: 310},
			[]string{facilities.ConstraintReynoldsUnit}},
		// cn2-05 at 390 kPa: the local expansion to M 1.4 condenses below about
		// 110 K whatever the free-stream Mach; 108 K is above the 100 K floor. At
		// M 0.5, q ≈ 58 kPa stays under the 70 kPa limit (at M 0.8 it would not).
		{"condensation", "cn2-05", nil, facilities.Setting{Mach: 0.5, StagnationPressure: 390000, StagnationTemperature: 108},
			[]string{facilities.ConstraintCondensation}},
		{"condensation, q and the temperature floor", "cn2-05", nil, facilities.Setting{Mach: 0.8, StagnationPressure: 390000, StagnationTemperature: 98},
			[]string{facilities.ConstraintTempMin, facilities.ConstraintDynamic, facilities.ConstraintCondensation}},
		{"no condensation at low pressure", "cn2-05", nil, facilities.Setting{Mach: 0.78, StagnationPressure: 130000, StagnationTemperature: 100}, nil},
		{"on the limits", "plp-3", nil, facilities.Setting{Mach: 0.29, StagnationPressure: 100000 * (1 - 1e-12), StagnationTemperature: 311}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			f := mustDemo(t, tc.id)
			if tc.modify != nil {
				tc.modify(&f)
			}
			v := f.Violations(mustState(t, &f, tc.set))
			require.NotNil(t, v, "Violations: a non-nil (possibly empty) list")
			var got []string
			for _, x := range v {
				got = append(got, x.Constraint)
				assert.NotEmpty(t, x.Message, x.Constraint)
			}
			assert.Equal(t, tc.want, got, "constraints (%+v)", v)
		})
	}
}

func TestViolationsEncodeEmptyList(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "tsw-1")
	st := mustState(t, &f, facilities.Setting{Mach: 0.8, StagnationPressure: 150000, StagnationTemperature: 310})
	b, err := json.Marshal(f.Violations(st))
	require.NoError(t, err)
	assert.JSONEq(t, "[]", string(b))
}

func TestViolationValues(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "tsw-1")
	st := mustState(t, &f, facilities.Setting{Mach: 1.1, StagnationPressure: 200000, StagnationTemperature: 310})
	v := f.Violations(st)
	require.Len(t, v, 1, "%+v", v)
	assert.Equal(t, st.DynamicPressure, v[0].Value, "q Pa")
	assert.Equal(t, 54000.0, v[0].Limit, "tsw-1's q limit, Pa")
}
