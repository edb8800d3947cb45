package unitjson_test

import (
	"bytes"
	"encoding/json"
	"os"
	"testing"

	"scalematch/api/schema"
	"scalematch/internal/unitjson"
)

// BenchmarkDecode decodes the load test's plan request (the Orrin J16 in tsw-1, a
// 21-point α sweep, unit strings in four fields) and, for comparison, the same
// request with every value already SI, which takes the decoder's fast path.
func BenchmarkDecode(b *testing.B) {
	withUnits, err := os.ReadFile("../../api/testdata/load/plan-orrin-j16-tsw-1.json")
	if err != nil {
		b.Fatal(err)
	}
	siOnly := []byte(`{"flight":{"altitude":12000,"mach":0.78},
		"article":{"reference_length":2.4,"reference_area":36.5,"span":16.4,"length":19.6,"frontal_area":4.4,"wetted_area":228,
		"aero":{"lift_slope":5,"zero_lift_alpha":-1.5,"cl_max":1.3,"cd_min":0.022,"cl_at_cd_min":0.14,"induced_drag_factor":0.057,"cm_zero":0.03,"cm_slope":-1.05}},
		"facility_id":"tsw-1","model":{"scale_min":0.016666666666666666,"scale_max":0.1},
		"installation":{"balance_id":"int-b1","balance_offset":{"x":0,"z":0},"model_mass":20,"cg_offset":{"x":-0.02,"z":0}},
		"alpha":{"from":-4,"to":16,"step":1},"objective":{"priority":["mach","reynolds"],"mach_tolerance":0.005}}`)
	for _, bc := range []struct {
		name string
		body []byte
		std  bool // encoding/json instead of Decode
	}{
		{"plan/units", withUnits, false},
		{"plan/si", siOnly, false},
		// The same SI body through encoding/json with unknown fields refused: what
		// Decode is measured against (encoding/json cannot read the unit strings).
		{"plan/si/encoding-json", siOnly, true},
	} {
		decode := unitjson.Decode
		if bc.std {
			decode = func(body []byte, dst any) error {
				dec := json.NewDecoder(bytes.NewReader(body))
				dec.DisallowUnknownFields()
				return dec.Decode(dst)
			}
		}
		b.Run(bc.name, func(b *testing.B) {
			var req schema.PlanRequest
			if err := decode(bc.body, &req); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.SetBytes(int64(len(bc.body)))
			b.ResetTimer()
			for b.Loop() {
				var req schema.PlanRequest
				if err := decode(bc.body, &req); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
