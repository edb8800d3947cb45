package app

import (
	"context"
	"math"
	"os"
	"reflect"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
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

// TestAllFiniteShapes: the compiled walk (allFinite) and the path-naming walk
// (nonFinite) agree on every shape a response takes: interfaces, maps, arrays,
// recursive types, embedded structs, fields the JSON leaves out, and a Ceiling's
// +Inf (no bound) against its -Inf.
func TestAllFiniteShapes(t *testing.T) {
	t.Parallel()
	type node struct {
		V    float64 `json:"v"`
		Next *node   `json:"next"`
	}
	type Embedded struct {
		E float64 `json:"e"`
	}
	// row holds numbers alone, read in place in a slice (and behind a pointer).
	type row struct {
		Name string        `json:"name"`
		Load float64       `json:"load"`
		Top  loads.Ceiling `json:"top"`
		On   bool          `json:"on"`
	}
	type shape struct {
		Embedded
		Rows    []row              `json:"rows"`
		One     *row               `json:"one"`
		Any     any                `json:"any"`
		ByName  map[string]float64 `json:"by_name"`
		Fixed   [2]float64         `json:"fixed"`
		List    *node              `json:"list"`
		Skipped float64            `json:"-"`
		hidden  float64
		Ceiling loads.Ceiling `json:"ceiling"`
		Text    []string      `json:"text"`
	}
	// point and plain hold no interface, map or array: walked in place
	// whole, their numbers behind pointers and in slices of slices too.
	type point struct {
		V    float64        `json:"v"`
		Gain *float64       `json:"gain"`
		Cap  *loads.Ceiling `json:"cap"`
		Note string         `json:"note"`
		Rows []row          `json:"rows"`
	}
	type plain struct {
		Points []point `json:"points"`
		P      *point  `json:"p"`
		Names  []string
	}
	nan := math.NaN()
	f := func(v float64) *float64 { return &v }
	c := func(v float64) *loads.Ceiling { x := loads.Ceiling(v); return &x }
	cases := []struct {
		name string
		v    any
		path string // "" when finite
	}{
		{"zero", shape{}, ""},
		{"nil", nil, ""},
		{"skipped and unexported are not answered", shape{Skipped: nan, hidden: nan}, ""},
		{"a ceiling without a bound", shape{Ceiling: loads.Ceiling(math.Inf(1))}, ""},
		{"a ceiling at -Inf", shape{Ceiling: loads.Ceiling(math.Inf(-1))}, "ceiling"},
		{"embedded", shape{Embedded: Embedded{E: nan}}, "e"},
		{"in an interface", shape{Any: []any{1.0, map[string]any{"x": nan}}}, "any[1].x"},
		{"in a map", shape{ByName: map[string]float64{"a": math.Inf(1)}}, "by_name.a"},
		{"in an array", shape{Fixed: [2]float64{0, nan}}, "fixed[1]"},
		{"deep in a recursive type", shape{List: &node{V: 1, Next: &node{V: 2, Next: &node{V: nan}}}}, "list.next.next.v"},
		{"rows read in place", shape{Rows: []row{{Load: 1, Top: loads.Ceiling(math.Inf(1))}, {Load: 2}}}, ""},
		{"in a row read in place", shape{Rows: []row{{Load: 1}, {Load: 2}, {Load: nan}}}, "rows[2].load"},
		{"a row's ceiling at -Inf", shape{Rows: []row{{Top: loads.Ceiling(math.Inf(-1))}}}, "rows[0].top"},
		{"behind a pointer, read in place", shape{One: &row{Load: math.Inf(1)}}, "one.load"},
		{"a struct on its own, not addressable", row{Load: nan}, "load"},
		{"a bare float", nan, ""},
		{"in place, finite", &plain{Points: []point{{V: 1, Gain: f(2), Cap: c(math.Inf(1)), Rows: []row{{Load: 3}}}, {}}, P: &point{}}, ""},
		{"in place, in a row of a point", &plain{Points: []point{{V: 1}, {Rows: []row{{Load: 1}, {Load: nan}}}}}, "points[1].rows[1].load"},
		{"in place, behind a pointer to a float", &plain{Points: []point{{Gain: f(math.Inf(-1))}}}, "points[0].gain"},
		{"in place, a ceiling behind a pointer at -Inf", &plain{P: &point{Cap: c(math.Inf(-1))}}, "p.cap"},
		{"in place, behind a pointer to a struct", plain{P: &point{V: nan}}, "p.v"},
		{"behind a pointer to a float, not addressable", point{Gain: f(nan)}, "gain"},
		{"a ceiling behind a pointer, not addressable", point{Cap: c(math.Inf(1))}, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			rv := reflect.ValueOf(tc.v)
			path, ok := nonFinite(rv, "")
			assert.Equal(t, ok, allFinite(rv), "allFinite against nonFinite")
			if tc.name == "a bare float" {
				assert.False(t, ok)
				return
			}
			assert.Equal(t, tc.path == "", ok)
			assert.Equal(t, tc.path, path)
		})
	}
}

// TestAllFiniteEveryNumberOfAnswers: in the plan answers of the examples (an
// aircraft in air, a vessel in water, with a required resolution) every
// number the answer writes, set in turn to NaN, +Inf, −Inf and back, makes the
// compiled walk (allFinite, which reads runs of fields and whole slices of
// them in place) agree with the path-naming walk (nonFinite) and name that
// number: no field of a run, an element of a slice read whole, nor a Ceiling
// is skipped or read as another.
func TestAllFiniteEveryNumberOfAnswers(t *testing.T) {
	// Not parallel: the answers are written in place while the test runs.
	for _, file := range []string{"examples/orrin-j16-tsw-1.json", "examples/tarn-a2-wtn-04.json",
		"examples/pellin-p3-lsw-2.json"} {
		t.Run(file, func(t *testing.T) {
			body, err := os.ReadFile("../../" + file)
			require.NoError(t, err)
			var req schema.PlanRequest
			require.NoError(t, unitjson.Decode(body, &req))
			resp, err := (&Planner{}).Plan(context.Background(), &req)
			require.NoError(t, err)
			rv := reflect.ValueOf(resp)
			require.True(t, allFinite(rv))
			var nums []reflect.Value
			answeredFloats(rv, &nums)
			require.Greater(t, len(nums), 500)
			ceilings := 0
			for _, x := range nums {
				old := x.Float()
				for _, bad := range []float64{math.NaN(), math.Inf(1), math.Inf(-1), -math.MaxFloat64} {
					x.SetFloat(bad)
					_, ok := nonFinite(rv, "")
					if !assert.Equal(t, ok, allFinite(rv), "%v in a %s", bad, x.Type()) {
						return
					}
					if x.Type() == ceilingType && math.IsInf(bad, 1) {
						ceilings++
						require.True(t, ok, "a Ceiling's +Inf is no bound")
					} else {
						require.Equal(t, math.Abs(bad) == math.MaxFloat64, ok)
					}
				}
				x.SetFloat(old)
			}
			require.Positive(t, ceilings)
			require.True(t, allFinite(rv))
		})
	}
}

// answeredFloats appends every settable float64 the JSON writes in v.
func answeredFloats(v reflect.Value, out *[]reflect.Value) {
	switch v.Kind() {
	case reflect.Float64:
		if v.CanSet() {
			*out = append(*out, v)
		}
	case reflect.Pointer, reflect.Interface:
		if !v.IsNil() {
			answeredFloats(v.Elem(), out)
		}
	case reflect.Struct:
		for i := range v.NumField() {
			if sf := v.Type().Field(i); sf.IsExported() && sf.Tag.Get("json") != "-" {
				answeredFloats(v.Field(i), out)
			}
		}
	case reflect.Slice, reflect.Array:
		for i := range v.Len() {
			answeredFloats(v.Index(i), out)
		}
	}
}
