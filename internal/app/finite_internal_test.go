package app

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/check"
	"scalematch/internal/loads"
)

func TestCheckFinite(t *testing.T) {
	t.Parallel()
	type inner struct {
		Values []float64 `json:"values"`
	}
	type resp struct {
		Mach  float64  `json:"mach"`
		Loads *inner   `json:"loads"`
		Other *float64 `json:"other,omitempty"`
	}
	inf := math.Inf(-1)
	cases := []struct {
		name  string
		v     resp
		path  string // "" when finite
		input string
	}{
		{"finite", resp{Mach: 0.8, Loads: &inner{Values: []float64{1, 2}}}, "", ""},
		{"NaN at the top", resp{Mach: math.NaN()}, "mach", "test"},
		{"deep in a list", resp{Loads: &inner{Values: []float64{1, math.Inf(1)}}}, "loads.values[1]", "installation"},
		{"behind a pointer", resp{Other: &inf}, "other", "test"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			err := CheckFinite(tc.v, loadsInputs)
			if tc.path == "" {
				require.NoError(t, err)
				return
			}
			var de *check.Error
			require.ErrorAs(t, err, &de)
			assert.Equal(t, check.CodeUnprocessable, de.Code)
			assert.Contains(t, de.Message, tc.path)
			require.Len(t, de.Fields, 1)
			assert.Equal(t, tc.input, de.Fields[0].Field)
		})
	}
}

func TestCollapseWarnings(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		in   []string
		want []string
	}{
		{"none", nil, nil},
		{"distinct stay", []string{"a", "b"}, []string{"a", "b"}},
		{"repeats become one with a count", []string{"a", "b", "a", "a"}, []string{"a (given 3 times)", "b"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			assert.Equal(t, tc.want, collapseWarnings(tc.in))
		})
	}
}

// TestCheckFiniteCeiling: a load report without a bound on the dynamic pressure
// (loads.Ceiling +Inf, written as null) is finite; a NaN there is not.
func TestCheckFiniteCeiling(t *testing.T) {
	t.Parallel()
	r := loads.Report{MaxSafeDynamicPressure: loads.Ceiling(math.Inf(1))}
	require.NoError(t, CheckFinite(&r, nil))
	r.MaxSafeDynamicPressure = loads.Ceiling(math.NaN())
	require.Error(t, CheckFinite(&r, nil))
}
