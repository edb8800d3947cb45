package similarity

import (
	"fmt"
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// forceLoad is a force-limited balance for the tests below: q·s²·K ≤ limit.
type forceLoad struct{ k, limit float64 }

func (l forceLoad) Name() string { return facilities.ConstraintBalance }

func (l forceLoad) MaxDynamicPressure(s float64, _ facilities.State) float64 {
	return l.limit / (l.k * s * s)
}

// randomFroudeProblem draws the i-th aircraft in the demo water tunnel wtn-04
// with the weights reynolds and froude: a random article, flight (a fifth at
// 45 km, where both numbers can be met together), scale range (half the
// time), q ceiling (a quarter) and force-limited balance (a third).
func randomFroudeProblem(t *testing.T, rng *rand.Rand, i int) *Problem {
	t.Helper()
	f, ok := facilities.DemoFacility("wtn-04")
	require.True(t, ok)
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	if rng.Intn(4) == 0 {
		f.MaxDynamicPressure = fp(u(300, 2000))
	}
	span := u(1, 30)
	art := &Article{ReferenceLength: span / u(4, 10), Span: span, ReferenceArea: span * span / u(6, 10),
		FrontalArea: span * span * u(0.005, 0.03), WettedArea: span * span * u(0.6, 1.2)}
	fl := Flight{Altitude: fp(u(0, 13000)), TrueAirspeed: fp(u(5, 60))}
	if i%5 == 0 {
		fl.Altitude = fp(45000)
	}
	fs, err := fl.Resolve(art.ReferenceLength)
	require.NoError(t, err)
	p := &Problem{Flight: fs, Article: art, Facility: &f,
		Objective: Objective{Weights: map[string]float64{"reynolds": u(0.1, 2), "froude": u(0.1, 5)}}}
	g := math.Min(0.65*f.TestSection.Width/span, math.Sqrt(0.01*f.TestSection.CrossSection()/art.FrontalArea))
	if rng.Intn(2) == 0 {
		p.Model.ScaleMin, p.Model.ScaleMax = fp(g*u(0.01, 0.3)), fp(g*u(0.4, 2))
	}
	if rng.Intn(3) == 0 {
		p.LoadLimit = forceLoad{k: 1, limit: 1000 * g * g * u(0.1, 1.2)}
	}
	return p
}

func fp(v float64) *float64 { return &v }

// TestFroudeScaleMatchesGolden checks froudeScale, the best scale at a speed
// in closed form, against the golden section over the scales it replaces, on
// random Reynolds- and Froude-weighted aircraft in wtn-04
// (randomFroudeProblem) at random speeds: where it answers, its weighted sum
// is no higher than the golden section's but for rounding (1e-12 relative)
// and its scale lies within the golden section's tolerance (1e-10 of the
// range of ln s, twice over) of the golden section's; where a load limit
// leaves it no answer, the golden section decides as before. The whole
// search with and without it (noFroudeScale) then gives plans of the same
// weighted sum within 1e-9 relative, with their speed, scale and
// temperature within 1e-6 relative.
func TestFroudeScaleMatchesGolden(t *testing.T) {
	rng := rand.New(rand.NewSource(17))
	speeds, answered, plans, refined := 0, 0, 0, 0
	worstS, worstU := 0.0, ""
	worstLn, worstSum, flat, worstPlan, worstGain := 0.0, -1.0, 0, -1.0, 0.0
	for i := 0; i < 300; i++ {
		p := randomFroudeProblem(t, rng, i)
		sv, err := newSolver(p)
		require.NoError(t, err)
		la, lb := math.Log(sv.sLo), math.Log(sv.sHi)
		eps := 1e-10 * math.Max(math.Max(math.Abs(la), math.Abs(lb)), lb-la)
		for j := 0; j < 10; j++ {
			v := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
			c := sv.prepare(v)
			if !c.ok {
				continue
			}
			speeds++
			x, ok := sv.froudeScale(&c)
			if !ok {
				continue
			}
			answered++
			g := sv.golden(func(ls float64) candidate { return sv.at(&c, math.Exp(ls)) }, la, lb, 9, 1e-10)
			require.True(t, g.ok, "case %d, %g m/s", i, v)
			require.LessOrEqual(t, x.k.v[0], g.k.v[0]*(1+1e-12)+1e-300, "case %d, %g m/s: sum", i, v)
			d := math.Abs(math.Log(g.s) - math.Log(x.s))
			require.LessOrEqual(t, d, 1e-6, "case %d, %g m/s: ln s", i, v)
			if d > 2*eps+1e-15 {
				flat++
			}
			worstLn = math.Max(worstLn, d)
			if g.k.v[0] > 0 {
				worstSum = math.Max(worstSum, x.k.v[0]/g.k.v[0]-1)
			}
		}
		solve := func(golden bool) (candidate, *solver, []float64) {
			sv, err := newSolver(p)
			require.NoError(t, err)
			sv.noFroudeScale = golden
			best, err := sv.solveCorrected()
			if err != nil {
				return candidate{}, sv, nil
			}
			polished := sv.polishEvals
			var gains []float64
			for _, b := range sv.result(best).Binding {
				g, _, err := sv.gain(b.Constraint, best)
				require.NoError(t, err)
				gains = append(gains, g)
			}
			sv.polishEvals = polished
			return best, sv, gains
		}
		got, svGot, gotGains := solve(false)
		want, svWant, wantGains := solve(true)
		require.Equal(t, want.ok, got.ok, "case %d", i)
		if !got.ok {
			continue
		}
		plans++
		if svWant.polishEvals > 0 && svGot.polishEvals == 0 {
			refined++
		}
		name := fmt.Sprintf("case %d", i)
		assert.LessOrEqual(t, got.k.v[0], want.k.v[0]*(1+1e-9)+1e-300, "%s: sum", name)
		if want.k.v[0] > 0 {
			worstPlan = math.Max(worstPlan, got.k.v[0]/want.k.v[0]-1)
		}
		for _, d := range [...]struct {
			what string
			a, b float64
		}{{"speed", got.machOrSpeed, want.machOrSpeed}, {"scale", got.s, want.s}, {"T0", got.t0, want.t0}} {
			rel := math.Abs(d.a/d.b - 1)
			assert.LessOrEqual(t, rel, 1e-7, "%s: %s", name, d.what)
			if rel > worstS {
				worstS, worstU = rel, name+" "+d.what
			}
		}
		require.Len(t, gotGains, len(wantGains), "%s: binding limits", name)
		for k := range gotGains {
			d := math.Abs(gotGains[k] - wantGains[k])
			assert.LessOrEqual(t, d, 1e-5, "%s: gain %d, %%", name, k)
			worstGain = math.Max(worstGain, d)
		}
	}
	t.Logf("ln s: largest difference %.3g, %d beyond 2·eps; sum: largest closed/golden − 1 %.3g; plans' sums, largest new/old − 1 %.3g", worstLn, flat, worstSum, worstPlan)
	t.Logf("%d of %d speeds answered in closed form; %d plans, %d without the refinement now; largest move %.3g relative (%s); gains, largest move %.3g percentage points",
		answered, speeds, plans, refined, worstS, worstU, worstGain)
	require.Greater(t, answered, speeds/2)
}
