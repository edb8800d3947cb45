package facilities_test

import (
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

func mustDemo(t testing.TB, id string) facilities.Facility {
	t.Helper()
	f, ok := facilities.DemoFacility(id)
	require.True(t, ok, "demo facility %s", id)
	return f
}

// mustState returns f's test-section state at set, failing the test on an error.
func mustState(t testing.TB, f *facilities.Facility, set facilities.Setting) facilities.State {
	t.Helper()
	st, err := f.State(set)
	require.NoError(t, err)
	return st
}

// TestStateIsentropicNACA1135 checks the air state against the isentropic table of
// NACA Report 1135 (Ames Research Staff 1953, table I, γ = 1.4), printed to five
// digits; the table values are from memory.
func TestStateIsentropicNACA1135(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "tsw-1")
	const p0, t0 = 150000.0, 310.0
	rho0 := p0 / (atmosphere.R * t0)
	tests := []struct {
		name      string
		mach      float64
		p, T, rho float64 // p/p0, T/T0, ρ/ρ0; 0: not in the check list
		tol       float64 // absolute, half a unit of the table's last digit plus rounding
	}{
		{"M 0.5", 0.5, 0.84302, 0.95238, 0, 6e-6},
		{"M 1", 1, 0.52828, 0.83333, 0.63394, 6e-6},
		{"M 2", 2, 0.12780, 0.55556, 0, 6e-6},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			st := mustState(t, &f, facilities.Setting{Mach: tc.mach, StagnationPressure: p0, StagnationTemperature: t0})
			assert.InDelta(t, tc.p, st.Static.Pressure/p0, tc.tol, "p/p0, NACA 1135 table I")
			assert.InDelta(t, tc.T, st.Static.Temperature/t0, tc.tol, "T/T0, NACA 1135 table I")
			if tc.rho != 0 {
				assert.InDelta(t, tc.rho, st.Static.Density/rho0, tc.tol, "ρ/ρ0, NACA 1135 table I")
			}
		})
	}
}

// TestStateIdentities checks relations that hold by definition (physics.md §4–5):
// q = ½ρV², V = M·a, Re/m = ρV/μ, ρ = p/(Z·R·T); a = √(γRT) for the ideal gases and
// nitrogen's own equation-of-state speed of sound at the static state; for the
// ideal gases also q = γ/2·p·M²; and a Speed setting giving back the Mach number of
// the state it came from.
func TestStateIdentities(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		id   string
		set  facilities.Setting
		tol  float64 // relative
	}{
		{"air, transonic", "tsw-1", facilities.Setting{Mach: 0.85, StagnationPressure: 120000, StagnationTemperature: 310}, 1e-12},
		{"air, low speed", "plp-3", facilities.Setting{Mach: 0.2, StagnationPressure: 300000, StagnationTemperature: 300}, 1e-12},
		{"nitrogen, cold", "cn2-05", facilities.Setting{Mach: 0.8, StagnationPressure: 300000, StagnationTemperature: 130}, 1e-12},
		{"nitrogen, warm", "cn2-05", facilities.Setting{Mach: 0.3, StagnationPressure: 200000, StagnationTemperature: 300}, 1e-12},
		{"custom gas (argon) in tsw-1", "tsw-1/argon", facilities.Setting{Mach: 1.1, StagnationPressure: 150000, StagnationTemperature: 310}, 1e-12},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			var f facilities.Facility
			if tc.id == "tsw-1/argon" {
				f = mustDemo(t, "tsw-1")
				f.Medium = mArgon
			} else {
				f = mustDemo(t, tc.id)
			}
			st := mustState(t, &f, tc.set)
			g, r, s := f.Medium.Gamma(), f.Medium.GasConstant(), st.Static
			a := math.Sqrt(g * r * s.Temperature)
			qIdeal := g / 2 * s.Pressure * st.Mach * st.Mach
			if f.Medium.Kind == facilities.MediumNitrogen {
				a = facilities.NitrogenSpeedOfSound(s.Temperature, s.Pressure)
				qIdeal = st.DynamicPressure // no such identity for a real gas
			}
			checks := []struct {
				what      string
				got, want float64
			}{
				{"q", st.DynamicPressure, 0.5 * s.Density * st.Speed * st.Speed},
				{"q ideal", st.DynamicPressure, qIdeal},
				{"V", st.Speed, st.Mach * s.SpeedOfSound},
				{"a", s.SpeedOfSound, a},
				{"Re/m", st.ReynoldsPerMeter, s.Density * st.Speed / s.Viscosity},
				{"ρ", s.Density, s.Pressure / (s.Compressibility * r * s.Temperature)},
				{"μ", s.Viscosity, f.Medium.Viscosity(s.Temperature, s.Density)},
				{"Z", s.Compressibility, f.Medium.Compressibility(s.Temperature, s.Pressure)},
			}
			for _, c := range checks {
				assert.InEpsilon(t, c.want, c.got, tc.tol, "%s: its definition (physics.md §4–5)", c.what)
			}
			back := mustState(t, &f, facilities.Setting{Speed: st.Speed, StagnationPressure: tc.set.StagnationPressure, StagnationTemperature: tc.set.StagnationTemperature})
			assert.InEpsilon(t, st.Mach, back.Mach, 1e-12, "Mach number from speed %g m/s", st.Speed)
		})
	}
}

// TestStateNitrogen checks the real-gas density against NIST's (from memory:
// ρ(300 K, 0.1 MPa) ≈ 1.1233 kg/m³) at a free stream of about those conditions.
func TestStateNitrogen(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "cn2-05")
	// M 0.15, T0 and p0 chosen so that the free stream is near 300 K and 0.1 MPa.
	m := 0.15
	t0 := 300 * atmosphere.TemperatureRatio(m, 1.4)
	p0 := 1e5 * atmosphere.PressureRatio(m, 1.4)
	st := mustState(t, &f, facilities.Setting{Mach: m, StagnationPressure: p0, StagnationTemperature: t0})
	// The real-gas isentrope lands within 1e-5 of the ideal-gas ratios here.
	require.InEpsilon(t, 300, st.Static.Temperature, 1e-5, "free-stream temperature K")
	require.InEpsilon(t, 1e5, st.Static.Pressure, 1e-5, "free-stream pressure Pa")
	assert.InEpsilon(t, 1.1233, st.Static.Density, 0.005, "ρ kg/m³, NIST at 300 K, 0.1 MPa (from memory)")
	assert.Less(t, st.Static.Compressibility, 1.0, "Z at 300 K, 0.1 MPa: just below 1")
}

func TestStateWater(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "wtn-04")
	tests := []struct {
		name  string
		speed float64 // m/s
		T     float64 // K
		tol   float64 // relative
	}{
		{"2 m/s at 20 °C", 2, 293.15, 1e-12},
		{"0.2 m/s at 10 °C", 0.2, 283.15, 1e-12},
		{"at rest", 0, 300, 1e-12},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			st := mustState(t, &f, facilities.Setting{Speed: tc.speed, StagnationPressure: 101000, StagnationTemperature: tc.T})
			rho := facilities.WaterDensity(tc.T)
			q := 0.5 * rho * tc.speed * tc.speed
			assert.Equal(t, [3]float64{0, 0, 1}, [3]float64{st.Mach, st.Static.SpeedOfSound, st.Static.Compressibility},
				"Mach, speed of sound, Z of water")
			assert.Equal(t, [2]float64{tc.T, tc.speed}, [2]float64{st.Static.Temperature, st.Speed}, "T K, V m/s")
			assert.InDelta(t, q, st.DynamicPressure, tc.tol*(q+1), "q = ½ρV², Pa")
			assert.InDelta(t, 101000-q, st.Static.Pressure, tc.tol*101000, "p = p0 − q, Pa")
			want := rho * tc.speed / st.Static.Viscosity
			assert.InDelta(t, want, st.ReynoldsPerMeter, tc.tol*(want+1), "Re/m = ρV/μ, 1/m")
		})
	}
}

// TestStateBadSettings checks that every bad setting names its fields, with no
// state and no NaN.
func TestStateBadSettings(t *testing.T) {
	t.Parallel()
	nan, inf := math.NaN(), math.Inf(1)
	custom := mustDemo(t, "tsw-1")
	custom.Medium = facilities.Medium{Kind: facilities.MediumGas, Gas: &facilities.GasProperties{MolarMass: 0, Gamma: 1}}
	unknown := mustDemo(t, "tsw-1")
	unknown.Medium = facilities.Medium{Kind: "helium"}
	tests := []struct {
		name string
		id   string
		f    *facilities.Facility
		set  facilities.Setting
		want []string
	}{
		{"negative pressure", "tsw-1", nil, facilities.Setting{Mach: 0.5, StagnationPressure: -1, StagnationTemperature: 300}, []string{"stagnation_pressure"}},
		{"zero temperature", "tsw-1", nil, facilities.Setting{Mach: 0.5, StagnationPressure: 1e5}, []string{"stagnation_temperature"}},
		{"infinite temperature", "tsw-1", nil, facilities.Setting{Mach: 0.5, StagnationPressure: 1e5, StagnationTemperature: inf}, []string{"stagnation_temperature"}},
		{"NaN Mach", "tsw-1", nil, facilities.Setting{Mach: nan, StagnationPressure: 1e5, StagnationTemperature: 300}, []string{"mach"}},
		{"Mach above 5", "tsw-1", nil, facilities.Setting{Mach: 5.01, StagnationPressure: 1e5, StagnationTemperature: 300}, []string{"mach"}},
		{"negative Mach", "tsw-1", nil, facilities.Setting{Mach: -0.1, StagnationPressure: 1e5, StagnationTemperature: 300}, []string{"mach"}},
		{"negative speed", "lsw-2", nil, facilities.Setting{Speed: -3, StagnationPressure: 95500, StagnationTemperature: 300}, []string{"speed"}},
		{"NaN speed", "lsw-2", nil, facilities.Setting{Speed: nan, StagnationPressure: 95500, StagnationTemperature: 300}, []string{"speed"}},
		{"speed beyond the limiting expansion", "lsw-2", nil, facilities.Setting{Speed: 800, StagnationPressure: 95500, StagnationTemperature: 300}, []string{"speed"}},
		{"speed above Mach 5", "lsw-2", nil, facilities.Setting{Speed: 740, StagnationPressure: 95500, StagnationTemperature: 300}, []string{"speed"}},
		{"Mach and speed", "tsw-1", nil, facilities.Setting{Mach: 0.5, Speed: 170, StagnationPressure: 1e5, StagnationTemperature: 300}, []string{"speed"}},
		{"everything at once", "tsw-1", nil, facilities.Setting{Mach: 7, Speed: -1, StagnationPressure: nan, StagnationTemperature: -5}, []string{"stagnation_pressure", "stagnation_temperature", "mach", "speed"}},
		// Free stream at M 0.9 from 90 K and 390 kPa: about 77 K at 230 kPa, below
		// the saturation temperature (about 86 K) there.
		{"nitrogen below saturation", "cn2-05", nil, facilities.Setting{Mach: 0.9, StagnationPressure: 390000, StagnationTemperature: 90}, []string{"stagnation_temperature"}},
		{"water with Mach", "wtn-04", nil, facilities.Setting{Mach: 0.01, StagnationPressure: 101000, StagnationTemperature: 293}, []string{"mach"}},
		{"water too hot", "wtn-04", nil, facilities.Setting{Speed: 1, StagnationPressure: 101000, StagnationTemperature: 430}, []string{"stagnation_temperature"}},
		{"water frozen", "wtn-04", nil, facilities.Setting{Speed: 1, StagnationPressure: 101000, StagnationTemperature: 270}, []string{"stagnation_temperature"}},
		{"water q above p0", "wtn-04", nil, facilities.Setting{Speed: 15, StagnationPressure: 101000, StagnationTemperature: 293}, []string{"speed"}},
		{"custom gas out of range", "", &custom, facilities.Setting{Mach: 0.5, StagnationPressure: 1e5, StagnationTemperature: 300},
			[]string{"medium.gas.molar_mass", "medium.gas.gamma", "medium.gas.viscosity_reference", "medium.gas.temperature_reference"}},
		{"unknown medium", "", &unknown, facilities.Setting{Mach: 0.5, StagnationPressure: 1e5, StagnationTemperature: 300}, []string{"medium"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			f := tc.f
			if f == nil {
				d := mustDemo(t, tc.id)
				f = &d
			}
			st, err := f.State(tc.set)
			assert.Zero(t, st, "State with an error")
			require.Error(t, err)
			assert.Equal(t, tc.want, testfixture.InvalidFields(t, err), "fields (%v)", err)
		})
	}
}

func TestStateDoesNotAllocate(t *testing.T) {
	if testing.Short() {
		t.Skip("allocation counts are checked in the full run")
	}
	// Not parallel: AllocsPerRun counts every goroutine's allocations.
	for _, c := range sectionCases(t) {
		t.Run(c.name, func(t *testing.T) {
			n := testing.AllocsPerRun(100, func() {
				st, err := c.f.State(c.set)
				require.NoError(t, err)
				_ = c.f.CondensationMargin(st)
			})
			assert.Zero(t, n, "allocations per call of State and CondensationMargin")
		})
	}
}

// lowestT0 returns the lowest stagnation temperature in K at which the facility's
// condensation margin is 0 at Mach mach and stagnation pressure p0, by bisection
// between lo and hi.
func lowestT0(t *testing.T, f *facilities.Facility, mach, p0, lo, hi float64) float64 {
	t.Helper()
	margin := func(t0 float64) float64 {
		st, err := f.State(facilities.Setting{Mach: mach, StagnationPressure: p0, StagnationTemperature: t0})
		if err != nil {
			return -1 // the free stream itself is below saturation
		}
		return f.CondensationMargin(st)
	}
	require.Negative(t, margin(lo), "margin at %g K: a sign change between %g and %g K", lo, lo, hi)
	require.Positive(t, margin(hi), "margin at %g K: a sign change between %g and %g K", hi, lo, hi)
	_, hi = testfixture.Bisect(lo, hi, 5e-12, func(t0 float64) bool { return margin(t0) < 0 })
	return hi
}

// TestCondensationLowestT0 checks the demo world's hand estimate
// (docs/demo-world.md) that in cn2-05 at M 0.78, with p0 held by the 70 kPa
// dynamic-pressure limit (near 245 kPa by hand, 247 kPa with this model at 104 K),
// the condensation rule (local peak Mach 1.4) and not the 100 K floor sets the
// lowest usable T0 (near 104 K), and that the margin is 0 there and rises with T0.
// At the facility's lowest p0 (130 kPa) the floor binds instead; the cases record
// both sides.
func TestCondensationLowestT0(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "cn2-05")
	// p0 at which q reaches the facility's limit at M 0.78 and T0 = 104 K.
	qLimited := func() float64 {
		st := mustState(t, &f, facilities.Setting{Mach: 0.78, StagnationPressure: 1e5, StagnationTemperature: 104})
		p0 := 1e5 * *f.MaxDynamicPressure / st.DynamicPressure // q ∝ p0 but for Z
		for range 20 {
			st = mustState(t, &f, facilities.Setting{Mach: 0.78, StagnationPressure: p0, StagnationTemperature: 104})
			p0 *= *f.MaxDynamicPressure / st.DynamicPressure
		}
		return p0
	}()
	tests := []struct {
		name       string
		p0         float64 // Pa
		aboveFloor bool    // condensation binds above the facility's floor
	}{
		{"p0 390 kPa (facility maximum)", 390000, true},
		// The demo world's hand estimate: q_max holds p0 near 245 kPa and the
		// condensation rule, not the 100 K floor, sets the lowest T0 (near 104 K).
		{"p0 at the q limit", qLimited, true},
		{"p0 130 kPa (facility minimum)", 130000, false},
	}
	floor := f.StagnationTemperature.Min
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			t0 := lowestT0(t, &f, 0.78, tc.p0, 80, 200)
			t.Logf("lowest T0 free of condensation at M 0.78, p0 %.4g kPa: %.2f K (floor %g K)", tc.p0/1000, t0, floor)
			assert.Equal(t, tc.aboveFloor, t0 > floor, "lowest T0 %.2f K above the %g K floor", t0, floor)
			st := mustState(t, &f, facilities.Setting{Mach: 0.78, StagnationPressure: tc.p0, StagnationTemperature: t0 + 1})
			m := f.CondensationMargin(st)
			assert.Positive(t, m, "margin 1 K above the lowest T0")
			assert.Less(t, m, 0.05, "margin 1 K above the lowest T0")
		})
	}
}

// TestCondensationMarginNoSaturationLine: water has no condensation rule (+Inf);
// air at a wind tunnel's lowest stagnation temperature keeps a wide margin from its
// dew line (Lemmon et al. 2000), above 1 (more than twice the dew temperature).
func TestCondensationMarginNoSaturationLine(t *testing.T) {
	t.Parallel()
	air := mustDemo(t, "tsw-1")
	st := mustState(t, &air, facilities.Setting{Mach: 0.5, StagnationPressure: air.StagnationPressure.Min, StagnationTemperature: air.StagnationTemperature.Min})
	m := air.CondensationMargin(st)
	assert.Greater(t, m, 1.0, "tsw-1: margin from the dew line (Lemmon et al. 2000)")
	assert.False(t, math.IsInf(m, 1), "tsw-1: a finite margin")
	water := mustDemo(t, "wtn-04")
	st = mustState(t, &water, facilities.Setting{Speed: 1, StagnationPressure: water.StagnationPressure.Min, StagnationTemperature: water.StagnationTemperature.Min})
	assert.True(t, math.IsInf(water.CondensationMargin(st), 1), "wtn-04: no condensation rule in water, margin +Inf")
}

// TestCondensationPeakMach: a lower local peak Mach lowers the usable T0, and with
// the peak at the free-stream Mach the free stream alone decides.
func TestCondensationPeakMach(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "cn2-05")
	def := lowestT0(t, &f, 0.8, 390000, 70, 200)
	peak := 0.8
	f.CondensationPeakMach = &peak
	free := lowestT0(t, &f, 0.8, 390000, 70, 200)
	assert.Less(t, free, def, "lowest T0 K with peak Mach 0.8 against peak 1.4")
	// There the free stream sits on the saturation line.
	st := mustState(t, &f, facilities.Setting{Mach: 0.8, StagnationPressure: 390000, StagnationTemperature: free})
	tsat, _ := f.Medium.SaturationTemperature(st.Static.Pressure)
	testfixture.InRelative(t, tsat, st.Static.Temperature, 1e-8, "free stream K at the lowest T0 %.6f K: on the saturation line", free)
}

func TestWarnings(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "cn2-05")
	tests := []struct {
		name string
		set  facilities.Setting
		n    int
	}{
		{"warm", facilities.Setting{Mach: 0.5, StagnationPressure: 200000, StagnationTemperature: 300}, 0},
		// T0 just above the lowest usable at 390 kPa (about 111 K): near saturation.
		{"near saturation", facilities.Setting{Mach: 0.7, StagnationPressure: 390000, StagnationTemperature: 112}, 1},
		// Free stream about 97.5 K, margin about 10 %: Lemmon & Jacobsen's viscosity
		// holds down to the triple point, so no warning (Sutherland's law needed one
		// below 100 K).
		{"cold", facilities.Setting{Mach: 0.8, StagnationPressure: 130000, StagnationTemperature: 110}, 0},
		// Free stream below the triple point (63.151 K): extrapolated viscosity.
		{"below the triple point", facilities.Setting{Mach: 1.2, StagnationPressure: 20000, StagnationTemperature: 80}, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			st := mustState(t, &f, tc.set)
			assert.Len(t, f.Warnings(st), tc.n)
		})
	}
}

// ExampleFacility_State shows the state in the demo transonic tunnel at Mach 0.8.
func ExampleFacility_State() {
	f, _ := facilities.DemoFacility("tsw-1")
	st, err := f.State(facilities.Setting{Mach: 0.8, StagnationPressure: 150000, StagnationTemperature: 310})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("T %.4g K, p %.4g Pa, V %.4g m/s, q %.4g Pa, Re/m %.4g 1/m\n",
		st.Static.Temperature, st.Static.Pressure, st.Speed, st.DynamicPressure, st.ReynoldsPerMeter)
	fmt.Println("violations:", len(f.Violations(st)))
	// Output:
	// T 274.8 K, p 9.84e+04 Pa, V 265.9 m/s, q 4.408e+04 Pa, Re/m 1.923e+07 1/m
	// violations: 0
}

// ExampleFacility_CondensationMargin shows the margin to saturation in the demo
// cryogenic tunnel near its coldest setting at M 0.8 and the highest pressure.
func ExampleFacility_CondensationMargin() {
	f, _ := facilities.DemoFacility("cn2-05")
	for _, t0 := range []float64{105, 115} {
		st, err := f.State(facilities.Setting{Mach: 0.8, StagnationPressure: 390000, StagnationTemperature: t0})
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("T0 %g K: margin %.4g\n", t0, f.CondensationMargin(st))
	}
	// The output below is a regression value (the program's own output).

	// Output:
	// T0 105 K: margin -0.05565
	// T0 115 K: margin 0.03652
}

type sectionCase struct {
	name string
	f    *facilities.Facility
	set  facilities.Setting
}

func sectionCases(tb testing.TB) []sectionCase {
	tsw, cn2, wtn := mustDemo(tb, "tsw-1"), mustDemo(tb, "cn2-05"), mustDemo(tb, "wtn-04")
	return []sectionCase{
		{"air", &tsw, facilities.Setting{Mach: 0.8, StagnationPressure: 150000, StagnationTemperature: 310}},
		{"air from speed", &tsw, facilities.Setting{Speed: 250, StagnationPressure: 150000, StagnationTemperature: 310}},
		{"nitrogen", &cn2, facilities.Setting{Mach: 0.8, StagnationPressure: 300000, StagnationTemperature: 130}},
		{"water", &wtn, facilities.Setting{Speed: 1.5, StagnationPressure: 101000, StagnationTemperature: 293.15}},
	}
}

// BenchmarkTestSection measures one test-section state; the goal is under 300 ns
// and 0 allocations per state.
func BenchmarkTestSection(b *testing.B) {
	for _, c := range sectionCases(b) {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				if _, err := c.f.State(c.set); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkCondensationMargin measures the condensation check of an air state
// (its dew line, solved twice) and of a nitrogen state.
func BenchmarkCondensationMargin(b *testing.B) {
	for _, c := range sectionCases(b) {
		if c.name != "air" && c.name != "nitrogen" {
			continue
		}
		b.Run(c.name, func(b *testing.B) {
			st, err := c.f.State(c.set)
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			for b.Loop() {
				_ = c.f.CondensationMargin(st)
			}
		})
	}
}

// TestLiquidStateInOverwrites checks LiquidStateIn, which writes a water
// state into its caller's State, against the state written out from its
// definition (q = ½ρv², p = p0 − q, Re/m = ρv/μ, incompressible; Mach 0 and
// no speed of sound kept), over a State whose every field held something
// before: each field is set, none left over, and a state whose static
// pressure would not be positive leaves the zero State and false.
func TestLiquidStateInOverwrites(t *testing.T) {
	stale := facilities.State{Mach: 1, Speed: 2, StagnationPressure: 3, StagnationTemperature: 4,
		Static:          facilities.Static{Temperature: 5, Pressure: 6, Density: 7, Viscosity: 8, SpeedOfSound: 9, Compressibility: 10},
		DynamicPressure: 11, ReynoldsPerMeter: 12}
	for _, c := range []struct{ v, p0, t, rho, mu float64 }{
		{5, 2e5, 293.15, 998.2, 1.0016e-3},
		{0, 1e5, 280, 999.9, 1.43e-3},
		{12.5, 3.1e5, 305.5, 995.1, 7.7e-4},
	} {
		st := stale
		require.True(t, facilities.LiquidStateIn(&st, c.v, c.p0, c.t, c.rho, c.mu), "%+v", c)
		q := 0.5 * c.rho * c.v * c.v
		want := facilities.State{Speed: c.v, StagnationPressure: c.p0, StagnationTemperature: c.t,
			Static:          facilities.Static{Temperature: c.t, Pressure: c.p0 - q, Density: c.rho, Viscosity: c.mu, Compressibility: 1},
			DynamicPressure: q, ReynoldsPerMeter: c.rho * c.v / c.mu}
		require.Equal(t, want, st, "%+v", c)
		got, ok := facilities.LiquidState(c.v, c.p0, c.t, c.rho, c.mu)
		require.True(t, ok)
		require.Equal(t, want, got, "%+v", c)
	}
	st := stale
	require.False(t, facilities.LiquidStateIn(&st, 30, 1e5, 293.15, 998.2, 1.0016e-3), "q above p0")
	require.Equal(t, facilities.State{}, st)
}
