package atmosphere_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/atmosphere"
)

// FuzzAirspeeds checks that no input makes the package panic or return NaN: either
// the error wraps ErrRange, or every output is finite and non-negative and the
// speed converts back. `go test` runs the seeds; `go test -fuzz FuzzAirspeeds`
// explores further.
func FuzzAirspeeds(f *testing.F) {
	f.Add(0.0, 0.0, 0, 0.5)
	f.Add(11000.0, -15.0, 2, 128.6)
	f.Add(86000.0, 100.0, 1, 1370.0)
	f.Add(-5000.0, -100.0, 3, 0.0)
	f.Add(50000.0, 20.0, 2, 1e300)
	f.Add(math.NaN(), 0.0, 0, 1.0)
	f.Add(0.0, math.Inf(-1), 1, -1.0)
	f.Fuzz(func(t *testing.T, z, dt float64, kind int, v float64) {
		s, err := atmosphere.At(z, dt)
		if err != nil {
			require.ErrorIs(t, err, atmosphere.ErrRange, "At(%g, %g)", z, dt)
			return
		}
		k := atmosphere.SpeedKind(((kind % 4) + 4) % 4)
		a, err := s.Airspeeds(k, v)
		if err != nil {
			require.ErrorIs(t, err, atmosphere.ErrRange, "Airspeeds(%v, %g)", k, v)
			return
		}
		out := []float64{a.Mach, a.True, a.Calibrated, a.Equivalent, a.DynamicPressure, a.ImpactPressure}
		for _, x := range out {
			if !(x >= 0) || math.IsInf(x, 0) {
				t.Fatalf("z %g ΔT %g %v %g: %+v", z, dt, k, v, a)
			}
		}
		if in := out[k]; math.Abs(in-v) > 1e-9*math.Max(v, 1e-300) && math.Abs(in-v) > 1e-300 {
			t.Fatalf("z %g ΔT %g: %v %g comes back as %g", z, dt, k, v, in)
		}
	})
}

func TestMach5EdgeAccepted(t *testing.T) {
	t.Parallel()
	// The highest speed of each kind, the one that gives exactly Mach 5, is in range
	// at every altitude and offset; a hair above it is not.
	for _, z := range []float64{-5000, 0, 11000, 30000, 60000, 86000} {
		for _, dt := range []float64{-100, 0, 100} {
			s := mustAt(t, z, dt)
			edge, err := s.Airspeeds(atmosphere.Mach, atmosphere.MaxMach)
			require.NoError(t, err)
			for k, v := range []float64{edge.Mach, edge.True, edge.Calibrated, edge.Equivalent} {
				kind := atmosphere.SpeedKind(k)
				got, err := s.Airspeeds(kind, v)
				if !assert.NoError(t, err, "z %g ΔT %g: %v %.17g at Mach 5", z, dt, kind, v) {
					continue
				}
				assert.LessOrEqual(t, got.Mach, atmosphere.MaxMach, "z %g ΔT %g: %v", z, dt, kind)
				_, err = s.Airspeeds(kind, v*(1+1e-9))
				assert.ErrorIs(t, err, atmosphere.ErrRange, "z %g ΔT %g: %v 1e-9 above Mach 5", z, dt, kind)
			}
		}
	}
}
