package atmosphere_test

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"scalematch/internal/testfixture"
	"strings"
	"testing"

	"scalematch/atmosphere"
)

// knot is one international knot in m/s (1852 m per hour, exact; GNU units:
// `units -t '250 knot' 'm/s'` gives 128.61111).
const knot = 1852.0 / 3600.0

func mustAt(t testing.TB, z, dt float64) atmosphere.State {
	t.Helper()
	s, err := atmosphere.At(z, dt)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestSeaLevelSpeedsAgree(t *testing.T) {
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
			v, err := s.Airspeeds(atmosphere.Mach, m)
			if err != nil {
				t.Fatal(err)
			}
			if e := testfixture.RelErr(v.Calibrated, v.True*casRatio); e > 1e-12 {
				t.Errorf("CAS %.12g, TAS·a_SL/a %.12g", v.Calibrated, v.True*casRatio)
			}
			if e := testfixture.RelErr(v.Equivalent, v.True*easRatio); e > 1e-14 {
				t.Errorf("EAS %.12g, TAS·√(ρ/ρ_SL) %.12g", v.Equivalent, v.True*easRatio)
			}
			if testfixture.RelErr(v.Calibrated, v.True) > 4e-7 || testfixture.RelErr(v.Equivalent, v.True) > 4e-7 {
				t.Errorf("CAS %.9g, EAS %.9g, TAS %.9g differ", v.Calibrated, v.Equivalent, v.True)
			}
		})
	}
}

func TestAirspeedRoundTrips(t *testing.T) {
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
				if err != nil {
					t.Fatalf("M %g: %v", m, err)
				}
				for _, k := range kinds {
					in := [...]float64{ref.Mach, ref.True, ref.Calibrated, ref.Equivalent}[k]
					got, err := s.Airspeeds(k, in)
					if err != nil {
						t.Fatalf("M %g from %v %g: %v", m, k, in, err)
					}
					pairs := [][2]float64{{got.Mach, ref.Mach}, {got.True, ref.True}, {got.Calibrated, ref.Calibrated},
						{got.Equivalent, ref.Equivalent}, {got.DynamicPressure, ref.DynamicPressure}, {got.ImpactPressure, ref.ImpactPressure}}
					for i, pr := range pairs {
						if e := testfixture.RelErr(pr[0], pr[1]); e > 1e-10 {
							t.Errorf("M %.9g from %v: field %d %.15g, want %.15g (relative %.2g)", m, k, i, pr[0], pr[1], e)
						}
					}
				}
			}
		})
	}
}

func TestKnownAirspeeds(t *testing.T) {
	// 250 kt CAS at FL100 (pressure altitude 3048 m) on a standard day. Worked
	// independently from physics.md §2 with 1 kt = 1852/3600 m/s:
	//   T = 288.15 − 0.0065·3048 = 268.338 K; p = 101325·(288.15/T)^(−g0M0/(R*·L))
	//   = 69 681.66 Pa; qc = 101325·((1 + 0.2·(128.6111/340.294)²)^3.5 − 1)
	//   = 10 498.22 Pa; M = √(5·((qc/p + 1)^(2/7) − 1)) = 0.452275;
	//   a = √(1.4·287.0529·T) = 328.3872 m/s; TAS = 148.5213 m/s = 288.702 kt;
	//   EAS = TAS·√(ρ/1.225) = 248.096 kt. (The pilot's rule of thumb, TAS ≈ CAS
	//   plus 2 % per 1000 ft, gives 300 kt; common practice.)
	s, err := atmosphere.AtPressureAltitude(3048, 0)
	if err != nil {
		t.Fatal(err)
	}
	v, err := s.Airspeeds(atmosphere.CalibratedAirspeed, 250*knot)
	if err != nil {
		t.Fatal(err)
	}
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
			if e := testfixture.RelErr(c.got, c.want); e > c.tol {
				t.Errorf("got %.9g, want %.9g", c.got, c.want)
			}
		})
	}
}

func TestAirspeedErrors(t *testing.T) {
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
			v, err := s.Airspeeds(c.kind, c.value)
			if !errors.Is(err, atmosphere.ErrRange) {
				t.Fatalf("got %+v, %v; want an error wrapping ErrRange", v, err)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not say %q", err, c.want)
			}
		})
	}
	// The edge itself is accepted for every kind.
	edge, err := s.Airspeeds(atmosphere.Mach, 5)
	if err != nil {
		t.Fatal(err)
	}
	for k, v := range []float64{edge.Mach, edge.True, edge.Calibrated, edge.Equivalent} {
		if _, err := s.Airspeeds(atmosphere.SpeedKind(k), v); err != nil {
			t.Errorf("%v %g at Mach 5: %v", atmosphere.SpeedKind(k), v, err)
		}
	}
	if _, err := (atmosphere.State{}).Airspeeds(atmosphere.Mach, 0.5); !errors.Is(err, atmosphere.ErrRange) {
		t.Errorf("zero State: %v, want an error", err)
	}
	if _, err := s.Airspeeds(atmosphere.SpeedKind(9), 1); err == nil {
		t.Error("unknown kind: no error")
	}
}

func TestParseSpeedKind(t *testing.T) {
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
			got, err := atmosphere.ParseSpeedKind(c.in)
			if c.name == "" {
				if err == nil {
					t.Errorf("ParseSpeedKind(%q) = %v, want an error", c.in, got)
				}
				return
			}
			if err != nil || got != c.want || got.String() != c.name {
				t.Errorf("ParseSpeedKind(%q) = %v (%q), %v", c.in, got, got.String(), err)
			}
		})
	}
}
