package similarity_test

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/testfixture"
	"scalematch/similarity"
)

// Demo aircraft of the invented demo world (docs/demo-world.md), full scale.
var (
	orrinJ16  = similarity.Article{ReferenceLength: 2.4, ReferenceArea: 36.5, Span: 16.4, Length: 19.6, FrontalArea: 4.4, WettedArea: 228}
	velmarT64 = similarity.Article{ReferenceLength: 2.1, ReferenceArea: 46.5, Span: 23.4, Length: 23.9, FrontalArea: 7.6, WettedArea: 305}
	pellinP3  = similarity.Article{ReferenceLength: 1.42, ReferenceArea: 13.4, Span: 9.6, Length: 7.9, FrontalArea: 1.7, WettedArea: 45}
)

// planDemo returns a copy of a demo facility.
func planDemo(t testing.TB, id string) *facilities.Facility {
	t.Helper()
	f, ok := facilities.DemoFacility(id)
	require.True(t, ok, "no demo facility %q", id)
	return &f
}

// planFlight resolves a flight at geometric altitude z (m) with a Mach number or, when
// mach is 0, a true airspeed tas (m/s), on the article's reference length.
func planFlight(t testing.TB, a *similarity.Article, z, mach, tas float64) similarity.FlightState {
	t.Helper()
	fl := similarity.Flight{Altitude: &z}
	if mach > 0 {
		fl.Mach = &mach
	} else {
		fl.TrueAirspeed = &tas
	}
	fs, err := fl.Resolve(a.ReferenceLength)
	require.NoError(t, err)
	return fs
}

// planBound reports whether the binding list holds the named constraint.
func planBound(r *similarity.Result, name string) bool {
	return slices.ContainsFunc(r.Binding, func(b similarity.Binding) bool { return b.Constraint == name })
}

// TestPlanHandChecks are cases whose answer follows from the physics written out
// beside each.
func TestPlanHandChecks(t *testing.T) {
	t.Parallel()
	t.Run("atmospheric tunnel: the speed limit sets the Mach number", func(t *testing.T) {
		t.Parallel()
		// The Velmar T64 cruises at M 0.47; lsw-2 runs at 4–84 m/s at the site's
		// ambient p0 = 95.5 kPa. With q_max raised out of the way (to 6 kPa), the
		// nearest usable Mach number is the one 84 m/s gives in the coldest air, since
		// at a fixed speed M falls as T0 rises. From T0/T = 1 + (γ−1)/2·M² and
		// V = M·√(γRT):  M = V/√(γ·R·T0 − (γ−1)/2·V²)  (NACA 1135 relations).
		f := planDemo(t, "lsw-2")
		f.MaxDynamicPressure = fp(6000)
		fs := planFlight(t, &velmarT64, 6100, 0.47, 0)
		r, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &velmarT64, Facility: f}, nil)
		require.NoError(t, err)
		const v, t0 = 84.0, 286.0
		wantM := v / math.Sqrt(1.4*atmosphere.R*t0-0.2*v*v)
		assert.InDelta(t, wantM, r.Test.Mach, 1e-9, "Mach number of 84 m/s at T0 286 K")
		assert.InDelta(t, v, r.Test.Speed, 1e-7, "speed, m/s")
		assert.InDelta(t, t0, r.Test.StagnationTemperature, 1e-7, "T0, K")
		// The model sits on the span limit: 0.8·2.6 m / 23.4 m = 0.0889.
		assert.InEpsilon(t, 0.8*2.6/23.4, r.Model.Scale, 1e-12, "scale on the span limit")
		for _, c := range []string{facilities.ConstraintSpeedMax, facilities.ConstraintTempMin, facilities.ConstraintSpan} {
			assert.True(t, planBound(r, c), "binding %v lacks %s", r.Binding, c)
		}
	})

	t.Run("pressurised tunnel: flight Reynolds number reached at the lowest q", func(t *testing.T) {
		t.Parallel()
		// The Quill U5 at 30 m/s at 1 000 m has M ≈ 0.088 and Re ≈ 7.8e5 on its
		// 0.41 m chord. In plp-3 (p0 100–340 kPa, q ≤ 12.5 kPa) the largest model
		// (span limit: 0.8·2.8/3.45 = 0.649) needs Re/m ≈ 2.9e6, about 1.6 times the
		// Re/m at one atmosphere at M 0.078: reachable. At a fixed Re/m,
		// q = ½·(Re/m)·μ·V, so the lowest q comes with the lowest speed (the lower edge
		// of the Mach band), the coldest gas (T0 = 288 K) and the largest model.
		f := planDemo(t, "plp-3")
		fs := planFlight(t, &quillU5, 1000, 0, 30)
		r, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &quillU5, Facility: f}, nil)
		require.NoError(t, err)
		cases := []struct {
			name      string
			got, want float64
			tol       float64
		}{
			{"Reynolds ratio", r.Mismatch.ReynoldsRatio, 1, 1e-9},
			{"Mach", r.Test.Mach, fs.Mach - similarity.DefaultMachTolerance, 1e-8},
			{"T0", r.Test.StagnationTemperature, 288, 1e-9},
			{"scale", r.Model.Scale, 0.8 * 2.8 / 3.45, 1e-12},
			{"q = ½·Re/m·μ·V", r.Test.DynamicPressure, 0.5 * r.Test.ReynoldsPerMeter * r.Test.Static.Viscosity * r.Test.Speed, 1e-9},
		}
		for _, c := range cases {
			assert.InEpsilon(t, c.want, c.got, c.tol, "%s (hand check above)", c.name)
		}
		// Matching Re at the flight's own Mach number costs more q.
		p0 := r.Test.StagnationPressure
		hi, err := f.State(facilities.Setting{Mach: fs.Mach, StagnationPressure: p0, StagnationTemperature: 288})
		require.NoError(t, err)
		qAtFlightMach := hi.DynamicPressure * (r.Test.ReynoldsPerMeter / hi.ReynoldsPerMeter)
		assert.Less(t, r.Test.DynamicPressure, qAtFlightMach, "q, Pa, against q at the flight Mach number")
		for _, b := range r.Binding {
			assert.InDelta(t, 0, b.ReynoldsGainPerPercent, 1e-9, "%s: gain, %%, with the flight Re already met", b.Constraint)
		}
	})

	t.Run("q-limited transonic: the lower edge of the Mach band", func(t *testing.T) {
		t.Parallel()
		// On the q ceiling Re/m = 2q/(V·μ): at fixed q a higher Mach number means a
		// faster, so thinner, stream and less Re/m. In tsw-1 at M 0.78 the q limit
		// (54 kPa) binds before p0 max (205 kPa) does, so the best Mach number inside
		// the ±0.005 band is its lower edge, 0.775, not the flight's 0.78.
		f := planDemo(t, "tsw-1")
		fs := planFlight(t, &orrinJ16, 12000, 0.78, 0)
		r, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: f}, nil)
		require.NoError(t, err)
		assert.InDelta(t, 0.775, r.Test.Mach, 1e-8, "Mach number")
		assert.InEpsilon(t, 54000, r.Test.DynamicPressure, 1e-9, "q, Pa: the q limit")
		assert.Less(t, r.Test.StagnationPressure, 205000.0, "p0, Pa: below p0 max")
		// q = γ/2·p·M² holds exactly for air.
		assert.InEpsilon(t, r.Test.DynamicPressure, 0.7*r.Test.Static.Pressure*r.Test.Mach*r.Test.Mach, 1e-12, "γ/2·p·M² against q")
	})
}

// TestPlanDemo checks the rough figures the demo world gives for the Orrin J16
// (docs/demo-world.md). They are hand estimates with ideal-gas relations, so the
// tolerances are loose and say so.
func TestPlanDemo(t *testing.T) {
	t.Parallel()
	fs := planFlight(t, &orrinJ16, 12000, 0.78, 0)
	// "the Orrin J16 at cruise has Re ≈ 12×10⁶ on its MAC" (hand estimate):
	// within 10 %.
	assert.InEpsilon(t, 12e6, fs.Reynolds, 0.10, "Orrin J16 cruise Re (demo-world hand estimate)")
	r, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: planDemo(t, "tsw-1")}, nil)
	require.NoError(t, err)
	// "in tsw-1 with Mach matched, the span limit gives a scale near 1:24 and q_max
	// limits p0 (near 190 kPa at T0 300 K), so the model reaches about a fifth of
	// flight Re" (hand estimate): scale within 5 % of 1/24, p0 within 5 % of
	// 190 kPa, Re ratio 0.15–0.25.
	assert.InEpsilon(t, 1.0/24, r.Model.Scale, 0.05, "scale (demo-world hand estimate)")
	assert.True(t, planBound(r, facilities.ConstraintSpan), "binding %v: want the span limit", r.Binding)
	assert.InEpsilon(t, 190e3, r.Test.StagnationPressure, 0.05, "p0, Pa (demo-world hand estimate)")
	assert.Equal(t, 300.0, r.Test.StagnationTemperature, "T0, K")
	assert.GreaterOrEqual(t, r.Mismatch.ReynoldsRatio, 0.15, "Re ratio: about a fifth (demo-world hand estimate)")
	assert.LessOrEqual(t, r.Mismatch.ReynoldsRatio, 0.25, "Re ratio: about a fifth (demo-world hand estimate)")
	assert.True(t, planBound(r, facilities.ConstraintDynamic), "binding %v: want q-limited", r.Binding)
	// "In cn2-05 at M 0.78, q_max holds p0 near 245 kPa and the condensation rule,
	// not the 100 K floor, sets the lowest usable T0 (near 104 K)" (hand
	// estimate): the Mach-first plan sits on q_max with p0 within 5 % of 245 kPa,
	// and at that p0 the condensation rule sets the lowest T0, above the floor and
	// within 3 % of 104 K.
	cn2 := planDemo(t, "cn2-05")
	rc, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: cn2}, nil)
	require.NoError(t, err)
	p0 := rc.Test.StagnationPressure
	assert.InEpsilon(t, 245e3, p0, 0.05, "cn2-05: p0, Pa (demo-world hand estimate)")
	assert.True(t, planBound(rc, facilities.ConstraintDynamic), "cn2-05: binding %v: want q_max", rc.Binding)
	t0, lim, err := similarity.LowestStagnationTemperature(cn2, rc.Test.Mach, p0)
	require.NoError(t, err)
	assert.Equal(t, facilities.ConstraintCondensation, lim, "limit that sets the lowest T0")
	assert.Greater(t, t0, cn2.StagnationTemperature.Min, "lowest T0, K: above the floor")
	assert.InEpsilon(t, 104, t0, 0.03, "lowest T0, K (demo-world hand estimate)")
	st, err := cn2.State(facilities.Setting{Mach: rc.Test.Mach, StagnationPressure: p0, StagnationTemperature: t0})
	require.NoError(t, err)
	m := cn2.CondensationMargin(st)
	assert.GreaterOrEqual(t, m, 0.0, "condensation margin at the lowest T0")
	assert.LessOrEqual(t, m, 1e-9, "condensation margin at the lowest T0")
}

// TestPlanBindingGains re-solves with each binding limit relaxed by 1 %, building
// the relaxed problem here, and compares the Reynolds gain with the reported one.
func TestPlanBindingGains(t *testing.T) {
	t.Parallel()
	fs := planFlight(t, &orrinJ16, 12000, 0.78, 0)
	cases := []struct {
		name string
		fac  string
		load similarity.LoadLimit
		edit func(*facilities.Facility)
	}{
		{"tsw-1", "tsw-1", nil, nil},
		{"tsw-1 with a balance", "tsw-1", quadLoad{K: 1, Limit: 60}, nil},
		// The condensation rule binds in cn2-05 and has no facility field to relax
		// here; an invented 115 K floor, above where condensation sets in, makes
		// the floor bind instead.
		{"cn2-05 with a 115 K floor", "cn2-05", nil, func(f *facilities.Facility) { f.StagnationTemperature.Min = 115 }},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			f := planDemo(t, c.fac)
			if c.edit != nil {
				c.edit(f)
			}
			p := similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: f, LoadLimit: c.load}
			r, err := similarity.Plan(&p, &similarity.Settings{TradePoints: -1})
			require.NoError(t, err)
			require.NotEmpty(t, r.Binding, "binding limits")
			for _, b := range r.Binding {
				g := *f
				q := p
				q.Facility = &g
				up := func(v float64) *float64 { v *= 1.01; return &v }
				switch b.Constraint {
				case facilities.ConstraintSpan:
					g.MaxSpanFraction = up(*f.MaxSpanFraction)
				case facilities.ConstraintBlockage:
					g.MaxBlockage = up(*f.MaxBlockage)
				case facilities.ConstraintDynamic:
					g.MaxDynamicPressure = up(*f.MaxDynamicPressure)
				case facilities.ConstraintPressureMax:
					g.StagnationPressure.Max *= 1.01
				case facilities.ConstraintTempMin:
					g.StagnationTemperature.Min *= 0.99
				case facilities.ConstraintBalance:
					q.LoadLimit = quadLoad{K: 1, Limit: 60 * 1.01}
				default:
					require.FailNow(t, "no hand relaxation", "%s", b.Constraint)
				}
				r2, err := similarity.Plan(&q, &similarity.Settings{TradePoints: -1, NoGains: true})
				require.NoError(t, err)
				want := 100 * (r2.Test.Reynolds/r.Test.Reynolds - 1)
				assert.InDelta(t, want, b.ReynoldsGainPerPercent, 1e-6, "%s: gain, %%, against the re-solve", b.Constraint)
				assert.Greater(t, want, 0.0, "%s: gain, %%, of relaxing a binding limit", b.Constraint)
			}
		})
	}
}

// TestPlanInfeasible checks the 422 cases and the limits they name.
func TestPlanInfeasible(t *testing.T) {
	t.Parallel()
	fs := planFlight(t, &orrinJ16, 12000, 0.78, 0)
	cases := []struct {
		name   string
		edit   func(*similarity.Problem)
		limits []string
	}{
		{"fixed scale too wide", func(p *similarity.Problem) { p.Model.Scale = fp(0.1) },
			[]string{facilities.ConstraintSpan}},
		{"no model fits the scale range", func(p *similarity.Problem) { p.Model.ScaleMin, p.Model.ScaleMax = fp(0.2), fp(0.3) },
			[]string{facilities.ConstraintSpan, facilities.ConstraintScaleMin}},
		{"every listed model too big", func(p *similarity.Problem) { p.Model.Scales = []float64{0.1, 0.2} },
			[]string{facilities.ConstraintSpan}},
		{"load limit allows no q", func(p *similarity.Problem) { p.LoadLimit = quadLoad{K: 1, Limit: 1e-6} },
			[]string{facilities.ConstraintBalance}},
		{"Mach and speed ranges apart", func(p *similarity.Problem) {
			f := *p.Facility
			f.Speed = &facilities.Range{Min: 500, Max: 600}
			p.Facility = &f
		}, []string{facilities.ConstraintSpeedMin}},
		{"condensation everywhere", func(p *similarity.Problem) {
			f, _ := facilities.DemoFacility("cn2-05")
			f.StagnationTemperature = facilities.Range{Min: 80, Max: 85}
			p.Facility = &f
		}, []string{facilities.ConstraintCondensation}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			p := similarity.Problem{Flight: fs, Article: &orrinJ16, Facility: planDemo(t, "tsw-1")}
			c.edit(&p)
			_, err := similarity.Plan(&p, nil)
			var de *check.Error
			require.ErrorAs(t, err, &de)
			require.Equal(t, check.CodeUnprocessable, de.Code, "%v", err)
			assert.Subset(t, de.Limits, c.limits, "the conflicting limits named")
		})
	}
}

// TestFlightValidate checks that bad flights name their fields.
func TestFlightValidate(t *testing.T) {
	t.Parallel()
	z, m, v := 1000.0, 0.5, 100.0
	cases := []struct {
		name  string
		fl    similarity.Flight
		field string
	}{
		{"no altitude", similarity.Flight{Mach: &m}, "flight.altitude"},
		{"both altitudes", similarity.Flight{Altitude: &z, PressureAltitude: &z, Mach: &m}, "flight.pressure_altitude"},
		{"no speed", similarity.Flight{Altitude: &z}, "flight.mach"},
		{"two speeds", similarity.Flight{Altitude: &z, Mach: &m, TrueAirspeed: &v}, "flight.mach"},
		{"altitude too high", similarity.Flight{Altitude: fp(90000), Mach: &m}, "flight.altitude"},
		{"negative speed", similarity.Flight{Altitude: &z, EquivalentAirspeed: fp(-3)}, "flight.equivalent_airspeed"},
		{"NaN Mach", similarity.Flight{Altitude: &z, Mach: fp(math.NaN())}, "flight.mach"},
		{"delta ISA", similarity.Flight{Altitude: &z, Mach: &m, DeltaISA: 150}, "flight.delta_isa"},
		{"CAS beyond Mach 5", similarity.Flight{Altitude: &z, CalibratedAirspeed: fp(5000)}, "flight.calibrated_airspeed"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := c.fl.Resolve(2)
			assert.Contains(t, testfixture.InvalidFields(t, err), c.field)
		})
	}
}

// TestFlightResolve checks the flight state against the standard atmosphere.
func TestFlightResolve(t *testing.T) {
	t.Parallel()
	// Sea level, standard day, 100 m/s EAS: TAS = EAS (definition), Re = ρVL/μ with
	// the 1976 standard's sea-level ρ = 1.2250 kg/m³ and μ = 1.7894e-5 Pa·s (from
	// memory, physics.md §1).
	fs, err := (&similarity.Flight{Altitude: fp(0), EquivalentAirspeed: fp(100)}).Resolve(2)
	require.NoError(t, err)
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		// ρ_SL = 1.2250 kg/m³ is the standard's rounded value; p/(R·T) differs by 3e-7.
		{"true airspeed", fs.TrueAirspeed, 100, 1e-6},
		{"Reynolds", fs.Reynolds, 1.2250 * 100 * 2 / 1.7894e-5, 1e-4},
		{"Froude", fs.Froude, fs.TrueAirspeed / math.Sqrt(9.80665*2), 1e-12},
		{"dynamic pressure", fs.DynamicPressure, 0.5 * 1.2250 * 100 * 100, 1e-4},
	}
	for _, c := range cases {
		assert.InEpsilon(t, c.want, c.got, c.tol, "%s: U.S. Standard Atmosphere 1976 sea level (from memory)", c.name)
	}
}

// ExamplePlan plans the Orrin J16 at cruise in the transonic demo tunnel.
func ExamplePlan() {
	z, m := 12000.0, 0.78
	art := similarity.Article{ReferenceLength: 2.4, ReferenceArea: 36.5, Span: 16.4, FrontalArea: 4.4, WettedArea: 228}
	fs, err := (&similarity.Flight{Altitude: &z, Mach: &m}).Resolve(art.ReferenceLength)
	if err != nil {
		fmt.Println(err)
		return
	}
	f, _ := facilities.DemoFacility("tsw-1")
	r, err := similarity.Plan(&similarity.Problem{Flight: fs, Article: &art, Facility: &f}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("scale 1:%.4g, M %.4g, p0 %.4g Pa, T0 %.4g K\n", 1/r.Model.Scale, r.Test.Mach, r.Test.StagnationPressure, r.Test.StagnationTemperature)
	fmt.Printf("Re %.4g of flight %.4g (ratio %.4g)\n", r.Test.Reynolds, fs.Reynolds, r.Mismatch.ReynoldsRatio)
	for _, b := range r.Binding {
		fmt.Printf("%s: +%.4g %% Re per %% relaxed\n", b.Constraint, b.ReynoldsGainPerPercent)
	}
	// The output below is a regression value (the program's own output).

	// Output:
	// scale 1:24.03, M 0.775, p0 1.91e+05 Pa, T0 300 K
	// Re 2.511e+06 of flight 1.212e+07 (ratio 0.2072)
	// max_dynamic_pressure: +1 % Re per % relaxed
	// max_span_fraction: +1 % Re per % relaxed
	// stagnation_temperature_min: +1.308 % Re per % relaxed
}
