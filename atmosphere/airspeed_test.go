package atmosphere_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/atmosphere"
	"scalematch/internal/testfixture"
)

// knot is one international knot in m/s (1852 m per hour, exact; GNU units:
// `units -t '250 knot' 'm/s'` gives 128.61111).
const knot = 1852.0 / 3600.0

func mustAt(t testing.TB, z, dt float64) atmosphere.State {
	t.Helper()
	s, err := atmosphere.At(z, dt)
	require.NoError(t, err)
	return s
}

func TestSeaLevelSpeedsAgree(t *testing.T) {
	t.Parallel()
	// At sea level on a standard day CAS = EAS = TAS at every speed (definition,
	// physics.md §2). The definitions use the tabulated a_SL = 340.294 m/s and
	// ρ_SL = 1.2250 kg/m³, which are the model's 340.29411 m/s and 1.2249992 kg/m³
	// rounded; so CAS/TAS is exactly 340.294/a(0) and EAS/TAS exactly
	// √(ρ(0)/1.2250), and the three agree to that rounding, 4e-7.
	s := mustAt(t, 0, 0)
	casRatio := atmosphere.SeaLevelSpeedOfSound / s.SpeedOfSound
	easRatio := math.Sqrt(s.Density / atmosphere.SeaLevelDensity)
	for _, m := range []float64{0.01, 0.1, 0.3, 0.5, 0.8, 0.99, 1, 1.01, 1.5, 2, 3, 4.5} {
		t.Run(fmt.Sprintf("M=%g", m), func(t *testing.T) {
			t.Parallel()
			v, err := s.Airspeeds(atmosphere.Mach, m)
			require.NoError(t, err)
			assert.InEpsilon(t, v.True*casRatio, v.Calibrated, 1e-12, "CAS = TAS·a_SL/a (definition)")
			assert.InEpsilon(t, v.True*easRatio, v.Equivalent, 1e-14, "EAS = TAS·√(ρ/ρ_SL) (definition)")
			assert.InEpsilon(t, v.True, v.Calibrated, 4e-7, "CAS = TAS at sea level to the tabulated rounding")
			assert.InEpsilon(t, v.True, v.Equivalent, 4e-7, "EAS = TAS at sea level to the tabulated rounding")
		})
	}
}

func TestAirspeedRoundTrips(t *testing.T) {
	t.Parallel()
	// Every conversion, started from each kind, gives back the same Mach number and
	// the same four speeds to 1e-10 relative, subsonic and supersonic, at several
	// altitudes and offsets. Random Mach numbers from a seeded generator.
	rng := rand.New(rand.NewPCG(1976, 1135))
	places := []struct {
		name string
		z    float64 // m
		dt   float64 // K
	}{
		{"-5 km", -5000, 0},
		{"sea level +15 K", 0, 15},
		{"3048 m", 3048, 0},
		{"11 km -15 K", 11000, -15},
		{"20 km", 20000, 0},
		{"50 km +20 K", 50000, 20},
		{"86 km", 86000, 0},
	}
	kinds := []atmosphere.SpeedKind{atmosphere.Mach, atmosphere.TrueAirspeed, atmosphere.CalibratedAirspeed, atmosphere.EquivalentAirspeed}
	for _, p := range places {
		t.Run(p.name, func(t *testing.T) {
			s := mustAt(t, p.z, p.dt)
			machs := []float64{0, 1e-4, 0.3, 0.999999, 1, 1.000001, 2, 4.9999}
			for range 40 {
				machs = append(machs, 5*rng.Float64())
			}
			for _, m := range machs {
				ref, err := s.Airspeeds(atmosphere.Mach, m)
				require.NoError(t, err, "M %g", m)
				for _, k := range kinds {
					in := [...]float64{ref.Mach, ref.True, ref.Calibrated, ref.Equivalent}[k]
					got, err := s.Airspeeds(k, in)
					require.NoError(t, err, "M %g from %v %g", m, k, in)
					pairs := [][2]float64{{got.Mach, ref.Mach}, {got.True, ref.True}, {got.Calibrated, ref.Calibrated},
						{got.Equivalent, ref.Equivalent}, {got.DynamicPressure, ref.DynamicPressure}, {got.ImpactPressure, ref.ImpactPressure}}
					for i, pr := range pairs {
						testfixture.InRelative(t, pr[1], pr[0], 1e-10, "M %.9g from %v: field %d", m, k, i)
					}
				}
			}
		})
	}
}

func TestKnownAirspeeds(t *testing.T) {
	t.Parallel()
	// 250 kt CAS at FL100 (pressure altitude 3048 m) on a standard day. Worked
	// independently from physics.md §2 with 1 kt = 1852/3600 m/s:
	//   T = 288.15 − 0.0065·3048 = 268.338 K; p = 101325·(288.15/T)^(−g0M0/(R*·L))
	//   = 69 681.66 Pa; qc = 101325·((1 + 0.2·(128.6111/340.294)²)^3.5 − 1)
	//   = 10 498.22 Pa; M = √(5·((qc/p + 1)^(2/7) − 1)) = 0.452275;
	//   a = √(1.4·287.0529·T) = 328.3872 m/s; TAS = 148.5213 m/s = 288.702 kt;
	//   EAS = TAS·√(ρ/1.225) = 248.096 kt. (The pilot's rule of thumb, TAS ≈ CAS
	//   plus 2 % per 1000 ft, gives 300 kt; common practice.)
	s, err := atmosphere.AtPressureAltitude(3048, 0)
	require.NoError(t, err)
	v, err := s.Airspeeds(atmosphere.CalibratedAirspeed, 250*knot)
	require.NoError(t, err)
	cases := []struct {
		name      string
		got, want float64
		tol       float64 // relative, the digits worked above
	}{
		{"Mach", v.Mach, 0.452275, 2e-6},
		{"TAS kt", v.True / knot, 288.702, 2e-6},
		{"EAS kt", v.Equivalent / knot, 248.096, 2e-6},
		{"impact pressure Pa", v.ImpactPressure, 10498.22, 1e-6},
		{"dynamic pressure = ½γpM²", v.DynamicPressure, 0.5 * atmosphere.Gamma * s.Pressure * v.Mach * v.Mach, 1e-14},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			assert.InEpsilon(t, c.want, c.got, c.tol, "worked from physics.md §2 (above)")
		})
	}
}

func TestAirspeedErrors(t *testing.T) {
	t.Parallel()
	s := mustAt(t, 11000, 0)
	cases := []struct {
		name  string
		kind  atmosphere.SpeedKind
		value float64
		want  string
	}{
		{"negative Mach", atmosphere.Mach, -0.1, "Mach number -0.1 is outside 0 to 5"},
		{"Mach above 5", atmosphere.Mach, 5.01, "Mach number 5.01 is outside 0 to 5"},
		{"Mach NaN", atmosphere.Mach, math.NaN(), "Mach number NaN"},
		{"negative TAS", atmosphere.TrueAirspeed, -1, "true airspeed -1 m/s is outside 0 m/s to"},
		{"TAS beyond Mach 5", atmosphere.TrueAirspeed, 2000, "Mach 5 at this altitude"},
		{"CAS beyond Mach 5", atmosphere.CalibratedAirspeed, 1200, "calibrated airspeed 1200 m/s"},
		{"CAS +Inf", atmosphere.CalibratedAirspeed, math.Inf(1), "calibrated airspeed +Inf"},
		{"EAS beyond Mach 5", atmosphere.EquivalentAirspeed, 900, "equivalent airspeed 900 m/s"},
		{"EAS NaN", atmosphere.EquivalentAirspeed, math.NaN(), "equivalent airspeed NaN"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			v, err := s.Airspeeds(c.kind, c.value)
			require.ErrorIs(t, err, atmosphere.ErrRange, "got %+v", v)
			assert.ErrorContains(t, err, c.want)
		})
	}
	// The edge itself is accepted for every kind.
	edge, err := s.Airspeeds(atmosphere.Mach, 5)
	require.NoError(t, err)
	for k, v := range []float64{edge.Mach, edge.True, edge.Calibrated, edge.Equivalent} {
		_, err := s.Airspeeds(atmosphere.SpeedKind(k), v)
		assert.NoError(t, err, "%v %g at Mach 5", atmosphere.SpeedKind(k), v)
	}
	_, err = (atmosphere.State{}).Airspeeds(atmosphere.Mach, 0.5)
	assert.ErrorIs(t, err, atmosphere.ErrRange, "zero State")
	_, err = s.Airspeeds(atmosphere.SpeedKind(9), 1)
	assert.Error(t, err, "unknown kind")
}

func TestParseSpeedKind(t *testing.T) {
	t.Parallel()
	cases := []struct {
		in   string
		want atmosphere.SpeedKind
		name string // what String gives back; empty when parsing fails
	}{
		{"mach", atmosphere.Mach, "mach"},
		{"true_airspeed", atmosphere.TrueAirspeed, "true_airspeed"},
		{"tas", atmosphere.TrueAirspeed, "true_airspeed"},
		{"calibrated_airspeed", atmosphere.CalibratedAirspeed, "calibrated_airspeed"},
		{"cas", atmosphere.CalibratedAirspeed, "calibrated_airspeed"},
		{"equivalent_airspeed", atmosphere.EquivalentAirspeed, "equivalent_airspeed"},
		{"eas", atmosphere.EquivalentAirspeed, "equivalent_airspeed"},
		{"knots", 0, ""},
	}
	for _, c := range cases {
		t.Run(c.in, func(t *testing.T) {
			t.Parallel()
			got, err := atmosphere.ParseSpeedKind(c.in)
			if c.name == "" {
				assert.Error(t, err, "ParseSpeedKind(%q) = %v", c.in, got)
				return
			}
			require.NoError(t, err)
			assert.Equal(t, c.want, got)
			assert.Equal(t, c.name, got.String())
		})
	}
}
