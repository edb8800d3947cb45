package facilities_test

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"scalematch/facilities"
)

// reportByReflection is the load report as encoding/json writes it by reflection,
// with an unbounded MaxSafeDynamicPressure as null: the reference the hand-written
// LoadReport.MarshalJSON must equal byte for byte.
func reportByReflection(r facilities.LoadReport) ([]byte, error) {
	type plain facilities.LoadReport
	v := struct {
		plain
		MaxSafe *float64 `json:"max_safe_dynamic_pressure"`
	}{plain: plain(r)}
	if !math.IsInf(r.MaxSafeDynamicPressure, 0) {
		v.MaxSafe = &r.MaxSafeDynamicPressure
	}
	return json.Marshal(v)
}

// randomReport draws a report whose figures cover both of encoding/json's float
// formats and their edges, and whose strings need every kind of escaping.
func randomReport(rng *rand.Rand) facilities.LoadReport {
	floats := []float64{0, math.Copysign(0, -1), 1, -1, 54000, 0.6666666666666666, 1e-6, 9.999999999999999e-7,
		1e-7, 1e21, 9.99999999999999e20, 1.5e-300, 5e-324, math.MaxFloat64, -2.5e-8, 123456789012345678}
	fl := func() float64 {
		if rng.IntN(3) == 0 {
			return floats[rng.IntN(len(floats))]
		}
		return (rng.Float64() - 0.5) * math.Pow(10, float64(rng.IntN(40)-20))
	}
	strs := []string{"", "axial", "normal", "forward gauge", `a "quoted" \ name`, "<b>&amp;</b>", "α 12°, β 0°",
		"line\nbreak\ttab\x01", "sep\u2028para\u2029", "bad \xff utf-8", "\ufffd replacement", "🙂"}
	st := func() string { return strs[rng.IntN(len(strs))] }
	r := facilities.LoadReport{BalanceID: st(), SafetyFactor: fl(), AllowedUtilization: fl(), DynamicPressure: fl(),
		MaxUtilization: fl(), WithinLimits: rng.IntN(2) == 0, Limiting: facilities.Limiting{Component: st(), Alpha: fl(), Beta: fl()},
		MaxSafeDynamicPressure: fl(), MaxSafeLimiting: facilities.Limiting{Component: st(), Alpha: fl(), Beta: fl()},
		WeightIncluded: rng.IntN(2) == 0}
	switch rng.IntN(4) {
	case 0:
		r.MaxSafeDynamicPressure = math.Inf(1)
	case 1:
		r.MaxSafeDynamicPressure = math.Inf(-1)
	}
	switch n := rng.IntN(5); n {
	case 0: // nil points: null
	default:
		r.Points = make([]facilities.LoadPoint, n-1)
		for i := range r.Points {
			r.Points[i] = facilities.LoadPoint{Alpha: fl(), Beta: fl(), DynamicPressure: fl(), Normal: fl(), Axial: fl(),
				Side: fl(), PitchingMoment: fl(), RollingMoment: fl(), YawingMoment: fl(), Utilization: fl(), Limiting: st()}
		}
	}
	switch n := rng.IntN(4); n {
	case 0: // nil warnings: left out
	default:
		r.Warnings = make([]string, n-1) // empty: left out too
		for i := range r.Warnings {
			r.Warnings[i] = st()
		}
	}
	return r
}

// TestLoadReportJSON checks LoadReport.MarshalJSON against encoding/json's
// reflection on seeded random reports, alone, by pointer and inside a struct (where
// encoding/json compacts and escapes a marshaller's output again), and that a NaN
// or infinite figure is an error in both.
func TestLoadReportJSON(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	for i := range 2000 {
		r := randomReport(rng)
		want, werr := reportByReflection(r)
		for _, c := range []struct {
			name string
			v    any
		}{{"value", r}, {"pointer", &r}, {"field", struct {
			L *facilities.LoadReport `json:"loads"`
		}{&r}}} {
			got, gerr := json.Marshal(c.v)
			if (gerr == nil) != (werr == nil) {
				t.Fatalf("report %d, %s: error %v, want %v", i, c.name, gerr, werr)
			}
			if c.name == "field" && gerr == nil {
				got = bytes.TrimSuffix(bytes.TrimPrefix(got, []byte(`{"loads":`)), []byte("}"))
			}
			if gerr == nil && !bytes.Equal(got, want) {
				t.Fatalf("report %d, %s:\n got %s\nwant %s", i, c.name, got, want)
			}
		}
	}
	bad := []struct {
		name string
		edit func(*facilities.LoadReport)
	}{
		{"NaN utilisation", func(r *facilities.LoadReport) { r.MaxUtilization = math.NaN() }},
		{"infinite point load", func(r *facilities.LoadReport) { r.Points = []facilities.LoadPoint{{Normal: math.Inf(1)}} }},
		{"NaN limiting angle", func(r *facilities.LoadReport) { r.Limiting.Alpha = math.NaN() }},
	}
	for _, c := range bad {
		r := facilities.LoadReport{MaxSafeDynamicPressure: math.Inf(1)}
		c.edit(&r)
		if _, err := json.Marshal(r); err == nil {
			t.Errorf("%s: no error", c.name)
		}
		if _, err := reportByReflection(r); err == nil {
			t.Errorf("%s: the reference gives no error", c.name)
		}
	}
}

// BenchmarkLoadReportJSON encodes a 21-point load report.
func BenchmarkLoadReportJSON(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	r := facilities.LoadReport{BalanceID: "int-b1", SafetyFactor: 1.5, AllowedUtilization: 1 / 1.5, DynamicPressure: 54000,
		MaxSafeDynamicPressure: 54000.00000000001, Points: make([]facilities.LoadPoint, 21)}
	for i := range r.Points {
		r.Points[i] = facilities.LoadPoint{Alpha: float64(i - 4), DynamicPressure: 54000, Normal: 6000 * rng.Float64(),
			Axial: 800 * rng.Float64(), PitchingMoment: 100 * rng.Float64(), Utilization: rng.Float64(), Limiting: "axial"}
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := json.Marshal(&r); err != nil {
			b.Fatal(err)
		}
	}
}
