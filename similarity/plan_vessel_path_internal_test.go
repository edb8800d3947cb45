package similarity

import (
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// fixedLoad is a load limit whose q ceiling in Pa the test sets at each
// search.
type fixedLoad struct{ q float64 }

func (l *fixedLoad) Name() string { return facilities.ConstraintBalance }

func (l *fixedLoad) MaxDynamicPressure(float64, facilities.State) float64 { return l.q }

// TestVesselShortcutsMatch checks the vessel's short paths against the
// general ones they skip (common practice: a shortcut held to the path it
// replaces, to the bit): prepare's water set-up against prepareNow's, and
// atTarget's candidate, straight from the cavitation search, against
// bestOfWindows over atWindow (its one window without a load floor). Random
// vessels and tunnels (randomVessel) with the vessel's priority and a
// weighted objective, at random speeds, scales and targets; half the
// searches without a load limit, half with a q ceiling drawn around the
// search's q range (below it, inside it, above it).
func TestVesselShortcutsMatch(t *testing.T) {
	rng := rand.New(rand.NewSource(41))
	objectives := []Objective{{}, {Weights: map[string]float64{"reynolds": 1, "cavitation": 4}}}
	searches, inside, below := 0, 0, 0
	for i := 0; i < 300; i++ {
		f, art, fl := randomVessel(t, rng, i)
		for _, obj := range objectives {
			load := &fixedLoad{q: math.Inf(1)}
			sv, err := newSolver(&Problem{Flight: fl, Article: art, Facility: f, Objective: obj, LoadLimit: load})
			require.NoError(t, err)
			require.True(t, sv.liquid && sv.cav && sv.floor == nil, "case %d: not a vessel's cavitation search", i)
			for j := 0; j < 10; j++ {
				u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
				s := sv.sLo * math.Pow(sv.sHi/sv.sLo, rng.Float64())
				target := math.Inf(1)
				if j%2 == 0 {
					target = fl.Reynolds / (s * sv.L)
				}
				c := sv.prepare(u)
				require.True(t, c == sv.prepareNow(u), "case %d, %g m/s: set-up %+v", i, u, c)
				load.q, sv.loadMemo = math.Inf(1), loadMemo{}
				if j >= 5 && c.ok {
					// q falls as the water warms: from q at the warmest water
					// less 1 % to q at the coldest plus 1 %.
					lo, hi := 0.99*c.qWater[1], 1.01*c.qWater[0]
					load.q = lo + (hi-lo)*rng.Float64()
					switch {
					case load.q < c.qWater[1]:
						below++
					case load.q < c.qWater[0]:
						inside++
					}
				}
				got := sv.atTarget(&c, s, target)
				want := sv.bestOfWindows(&c, s, func(w Window) candidate { return sv.atWindow(&c, s, target, w) })
				require.True(t, got == want, "case %d, %+v, %g m/s, scale %g, target %g, q ceiling %g Pa: %+v, want %+v",
					i, obj, u, s, target, load.q, got, want)
				searches++
			}
		}
	}
	t.Logf("%d searches; q ceiling below the search's q range in %d, inside it in %d", searches, below, inside)
	require.Greater(t, below, searches/50, "too few searches the load limit rules out")
	require.Greater(t, inside, searches/50, "too few searches the load limit narrows")
}

// TestVesselSearchAllocatesNothing checks that a vessel's cavitation search
// keeps its candidates on the stack (regression value: a pointer to the
// coldest water's candidate returned through a function value moved it to
// the heap, one allocation a search, 86 more a Tarn A2 plan): atTarget on
// random vessels and tunnels, with the vessel's priority and a weighted
// objective, allocates nothing once its grids exist.
func TestVesselSearchAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewSource(43))
	for i := 0; i < 40; i++ {
		f, art, fl := randomVessel(t, rng, i)
		for _, obj := range []Objective{{}, {Weights: map[string]float64{"reynolds": 1, "cavitation": 4}}} {
			sv, err := newSolver(&Problem{Flight: fl, Article: art, Facility: f, Objective: obj})
			require.NoError(t, err)
			u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
			s := sv.sLo * math.Pow(sv.sHi/sv.sLo, rng.Float64())
			c := sv.prepare(u)
			allocs := testing.AllocsPerRun(20, func() { sv.atTarget(&c, s, fl.Reynolds/(s*sv.L)) })
			require.Zero(t, allocs, "case %d, %+v, %g m/s, scale %g: allocations a search", i, obj, u, s)
		}
	}
}

// TestWaterStateInMatchesState checks the water set-up's straight state
// (stateIn, written into its caller's State) against the general path it
// skips, state through stateNow (common practice: a shortcut held to the path
// it replaces, to the bit): random vessels and tunnels (randomVessel), half
// holding their static pressure, at random speeds, stagnation pressures (0,
// as a held static pressure's set-ups give it, and given ones, which State
// refuses there) and temperatures inside and outside the water model's range;
// the state, its error and the states counted (solver.evals) the same. Then
// whole set-ups (prepareWater) with the solver's states kept (memo set: every
// state through state) against without (the straight path).
func TestWaterStateInMatchesState(t *testing.T) {
	rng := rand.New(rand.NewSource(47))
	states, refused, setups, failed := 0, 0, 0, 0
	for i := 0; i < 200; i++ {
		f, art, fl := randomVessel(t, rng, i)
		sv, err := newSolver(&Problem{Flight: fl, Article: art, Facility: f})
		require.NoError(t, err)
		require.True(t, sv.water != nil && sv.memo == nil, "case %d: not the straight path's solver", i)
		for j := 0; j < 20; j++ {
			u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
			if j == 0 {
				u = sv.machOrSpeedMax * (1 + rng.Float64()) // fast enough to fail somewhere
			}
			p0 := f.StagnationPressure.Min + (f.StagnationPressure.Max-f.StagnationPressure.Min)*rng.Float64()
			if f.StaticPressure != nil && j%2 == 0 {
				p0 = 0
			}
			temp := f.StagnationTemperature.Min - 5 + (f.StagnationTemperature.Max-f.StagnationTemperature.Min+10)*rng.Float64()
			if j%5 == 4 {
				temp = facilities.WaterMaxTemperature + 1 + 20*rng.Float64()
			}
			e0 := sv.evals
			want, wantErr := sv.state(u, p0, temp)
			e1 := sv.evals
			var got facilities.State
			gotErr := sv.stateIn(&got, u, p0, temp)
			require.Equal(t, e1-e0, sv.evals-e1, "case %d: states counted", i)
			require.True(t, got == want, "case %d, %g m/s, p0 %g Pa, %g K: %+v, want %+v", i, u, p0, temp, got, want)
			require.Equal(t, wantErr, gotErr, "case %d, %g m/s, p0 %g Pa, %g K", i, u, p0, temp)
			states++
			if wantErr != nil {
				refused++
			}
			var straight, general machSetup
			sv.prepareWater(&straight, u)
			sv.memo = &stateMemos{}
			sv.prepareWater(&general, u)
			sv.memo = nil
			require.True(t, straight == general, "case %d, %g m/s: set-up %+v, want %+v", i, u, straight, general)
			setups++
			if !straight.ok {
				failed++
			}
		}
	}
	t.Logf("%d states, %d refused; %d set-ups, %d failed", states, refused, setups, failed)
	require.Greater(t, refused, states/20, "too few states refused")
	require.Greater(t, failed, 5, "too few set-ups fail")
}

// TestWaterMarginOfMatchesMargins checks waterMarginOf's water states, whose
// vapour pressure it looks up once, against boilingMargin and
// cavitationMargin less their minimums (the rule it shortcuts), to the bit:
// random vessels and tunnels (randomVessel), with cavitation in the test
// section allowed and not, the minimums 0 and lowered, at random speeds and temperatures inside and
// outside the usable range, so that either margin binds or neither does.
func TestWaterMarginOfMatchesMargins(t *testing.T) {
	rng := rand.New(rand.NewSource(53))
	names := map[string]int{}
	for i := 0; i < 200; i++ {
		f, art, fl := randomVessel(t, rng, i)
		sv, err := newSolver(&Problem{Flight: fl, Article: art, Facility: f})
		require.NoError(t, err)
		for j := 0; j < 20; j++ {
			sv.cavAllowed = j%2 == 1
			// The minimums as given or as a relaxed copy lowers them
			// (relaxed: 0.01 less).
			sv.boilMin, sv.cavMin = 0, 0
			if j%4 >= 2 {
				sv.boilMin, sv.cavMin = -0.01*rng.Float64(), -0.01*rng.Float64()
			}
			u := sv.machOrSpeedMin + (sv.machOrSpeedMax*1.5-sv.machOrSpeedMin)*rng.Float64()
			temp := f.StagnationTemperature.Min + (facilities.WaterMaxTemperature-f.StagnationTemperature.Min)*rng.Float64()
			var st facilities.State
			if sv.stateIn(&st, u, f.StagnationPressure.Max, temp) != nil {
				continue
			}
			m, name := sv.waterMarginOf(&st, nil)
			want, wantName := sv.boilingMargin(&st)-sv.boilMin, facilities.ConstraintBoiling
			if c := sv.cavitationMargin(&st) - sv.cavMin; !sv.cavAllowed && c < want {
				want, wantName = c, facilities.ConstraintCavitation
			}
			require.Equal(t, math.Float64bits(want), math.Float64bits(m), "case %d, %g m/s, %g K: margin %g, want %g", i, u, temp, m, want)
			require.Equal(t, wantName, name, "case %d, %g m/s, %g K", i, u, temp)
			if m < 0 {
				names[name]++
			}
		}
	}
	t.Logf("binding below 0: %v", names)
	require.Positive(t, names[facilities.ConstraintBoiling], "no state boils")
	require.Positive(t, names[facilities.ConstraintCavitation], "no state cavitates")
}
