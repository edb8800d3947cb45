package loads_test

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/loads"
)

// TestCeilingJSON checks how a load report writes and reads its
// max_safe_dynamic_pressure (a Ceiling): a number as encoding/json writes a
// float64, no bound (+Inf) as null, and null read back as +Inf; last in the
// report's object, as the report has always written it; NaN and -Inf refused
// as encoding/json refuses them.
func TestCeilingJSON(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		name string
		v    float64
		want string
	}{
		{"number", 54000.00000000001, "54000.00000000001"},
		{"small", 1e-7, "1e-7"},
		{"zero", 0, "0"},
		{"no bound", math.Inf(1), "null"},
	} {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			r := loads.Report{BalanceID: "int-b1", MaxSafeDynamicPressure: loads.Ceiling(c.v),
				Points: []loads.PointResult{{Alpha: 2}}}
			b, err := json.Marshal(&r)
			require.NoError(t, err)
			assert.True(t, bytes.HasSuffix(b, []byte(`,"max_safe_dynamic_pressure":`+c.want+"}")), "%s", b)
			var back loads.Report
			require.NoError(t, json.Unmarshal(b, &back))
			assert.Equal(t, c.v, float64(back.MaxSafeDynamicPressure))
		})
	}
	for _, v := range []float64{math.NaN(), math.Inf(-1)} {
		_, err := json.Marshal(loads.Report{MaxSafeDynamicPressure: loads.Ceiling(v)})
		assert.Error(t, err, "%g", v)
	}
	_, err := json.Marshal(loads.Report{MaxUtilization: math.NaN(), MaxSafeDynamicPressure: loads.Ceiling(math.Inf(1))})
	assert.Error(t, err, "a NaN elsewhere in the report")
}

// BenchmarkReportJSON encodes a 21-point load report (encoding/json).
func BenchmarkReportJSON(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	r := loads.Report{BalanceID: "int-b1", SafetyFactor: 1.5, AllowedUtilization: 1 / 1.5, DynamicPressure: 54000,
		MaxSafeDynamicPressure: 54000.00000000001, Points: make([]loads.PointResult, 21)}
	for i := range r.Points {
		r.Points[i] = loads.PointResult{Alpha: float64(i - 4), DynamicPressure: 54000, Normal: 6000 * rng.Float64(),
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
