package unitjson_test

import (
	"math"
	"os"
	"reflect"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/unitjson"
)

// finiteFloats reports the path of the first non-finite float in v, or "".
func finiteFloats(v reflect.Value, path string) string {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if math.IsNaN(v.Float()) || math.IsInf(v.Float(), 0) {
			return path
		}
	case reflect.Pointer, reflect.Interface:
		if !v.IsNil() {
			return finiteFloats(v.Elem(), path)
		}
	case reflect.Struct:
		for i := 0; i < v.NumField(); i++ {
			if v.Type().Field(i).IsExported() {
				if p := finiteFloats(v.Field(i), path+"."+v.Type().Field(i).Name); p != "" {
					return p
				}
			}
		}
	case reflect.Slice, reflect.Array:
		for i := 0; i < v.Len(); i++ {
			if p := finiteFloats(v.Index(i), path+"[]"); p != "" {
				return p
			}
		}
	case reflect.Map:
		iter := v.MapRange()
		for iter.Next() {
			if p := finiteFloats(iter.Value(), path+"{}"); p != "" {
				return p
			}
		}
	}
	return ""
}

// FuzzDecode decodes random bodies into the plan request and a facility. Decode
// must not panic; it either succeeds with every float finite, or fails with a
// *check.Error of CodeInvalid naming at least one field, leaves dst alone and
// says the same thing when asked twice.
func FuzzDecode(f *testing.F) {
	if b, err := os.ReadFile("../../api/testdata/load/plan-orrin-j16-tsw-1.json"); err == nil {
		f.Add(b)
	}
	for _, s := range []string{
		`{"flight":{"altitude":"35000 ft","mach":0.78},"model":{"scale":"1:16"}}`,
		`{"facility":{"id":"x","medium":{"gas":{"gamma":1.4}},"stagnation_pressure":{"min":"1 bar","max":"2 bar"},"balances":[{"id":"b","limits":{"normal":"400 lbf"}}]}}`,
		`{"flight":{"delta_isa":"18 degF"},"alpha":{"from":"-0.1 rad","to":16,"step":1}}`,
		`{"model":{"scales":["1:0",-1,"x:y",1e400]}}`,
		`{"article":{"aero":{"cl_maks":1,"table":[{"alpha":1,"cl":"2"}]}}}`,
		`{"objective":{"weights":{"reynolds":1,"mach":"2 m"}}}`,
		`{} {}`, `[]`, `null`, `"x"`, ``,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, body []byte) {
		var req schema.PlanRequest
		req.FacilityID = "before"
		err := unitjson.Decode(body, &req)
		if err == nil {
			require.Empty(t, finiteFloats(reflect.ValueOf(req), "req"), "non-finite float from %q", body)
			return
		}
		var de *check.Error
		require.ErrorAs(t, err, &de)
		require.Equal(t, check.CodeInvalid, de.Code, "an invalid-input error")
		require.NotEmpty(t, de.Fields, "an invalid-input error with fields")
		for _, fe := range de.Fields {
			require.NotEmpty(t, fe.Message, "message at %q", fe.Field)
		}
		require.Equal(t, "before", req.FacilityID, "dst changed on error")
		var again schema.PlanRequest
		err2 := unitjson.Decode(body, &again)
		require.EqualError(t, err2, err.Error(), "second decode against the first")

		var fac facilities.Facility
		_ = unitjson.Decode(body, &fac) // must not panic
	})
}
