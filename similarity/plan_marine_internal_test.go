package similarity

import (
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestWaterStateMatchesFacility checks the cavitation search's own water state
// (waterState, from the properties waterPropsAt and the grids keep) against
// facilities.Facility.State: the same usable settings, and the same q and Re/m
// to the bit, in a facility that holds its static pressure (cvt-07, also with a
// stagnation pressure given, which State refuses) and in one that does not
// (wtn-04, also at speeds whose q exceeds p0), at temperatures inside and
// outside the water model.
func TestWaterStateMatchesFacility(t *testing.T) {
	rng := rand.New(rand.NewSource(17))
	for _, id := range []string{"cvt-07", "wtn-04"} {
		f, ok := facilities.DemoFacility(id)
		require.True(t, ok, id)
		sv := &solver{f: &f, liquid: true, held: f.StaticPressure != nil}
		grids := &waterGrids{}
		for i := 0; i < 4000; i++ {
			tlo, thi := facilities.WaterMinTemperature-5, facilities.WaterMaxTemperature+5
			ta := tlo + (thi-tlo)*rng.Float64()
			tb := ta + (thi-ta)*rng.Float64()
			j := rng.Intn(cavGrid)
			temp := cavGridT(ta, tb, j)
			wp := waterPropsAt(temp)
			if rng.Intn(2) == 0 {
				wp = grids.grid(ta, tb).wp[j]
			}
			v := 40 * rng.Float64()
			if rng.Intn(8) == 0 {
				v = 20 * (rng.Float64() - 0.5)
			}
			p0 := f.StagnationPressure.Max
			if sv.held && rng.Intn(8) == 0 {
				p0 = 150000
			}
			st, err := f.State(facilities.Setting{Speed: v, StagnationPressure: p0, StagnationTemperature: temp})
			q, r, ok := sv.waterState(v, p0, temp, wp.rho, wp.mu)
			require.Equal(t, err == nil, ok, "%s at %g m/s, p0 %g Pa, %g K: %v", id, v, p0, temp, err)
			if ok {
				require.Equal(t, st.DynamicPressure, q, "%s q at %g m/s, %g K", id, v, temp)
				require.Equal(t, st.ReynoldsPerMeter, r, "%s Re/m at %g m/s, %g K", id, v, temp)
				require.Equal(t, facilities.WaterVapourPressure(temp), wp.pv, "%s vapour pressure at %g K", id, temp)
			}
		}
	}
}

// TestWaterGridFalls checks the certificate of the cavitation search's ends
// (waterGrid.falls): where it holds, (k − p_v)/ρ falls over 4000 temperatures
// of the grid's range; it holds for the demo tunnels' pressures over their
// temperature ranges, and not where k is so high that the water's expansion
// outweighs the vapour pressure's rise, nor outside the water model.
func TestWaterGridFalls(t *testing.T) {
	rng := rand.New(rand.NewSource(19))
	ratio := func(k, temp float64) float64 {
		return (k - facilities.WaterVapourPressure(temp)) / facilities.WaterDensity(temp)
	}
	grids := &waterGrids{}
	shown := 0
	for i := 0; i < 400; i++ {
		ta := facilities.WaterMinTemperature + 100*rng.Float64()
		tb := ta + 50*rng.Float64()
		k := math.Exp(math.Log(1e3) + math.Log(1e4)*rng.Float64())
		if !grids.grid(ta, tb).falls(k) {
			continue
		}
		shown++
		prev := math.Inf(1)
		for j := 0; j <= 4000; j++ {
			r := ratio(k, ta+(tb-ta)*float64(j)/4000)
			require.Less(t, r, prev, "k %g Pa over %g–%g K, point %d", k, ta, tb, j)
			prev = r
		}
	}
	require.Greater(t, shown, 100)
	for _, id := range []string{"cvt-07", "wtn-04"} {
		f, ok := facilities.DemoFacility(id)
		require.True(t, ok, id)
		g := grids.grid(f.StagnationTemperature.Min, f.StagnationTemperature.Max)
		lo, hi := f.StagnationPressure.Min, f.StagnationPressure.Max
		if f.StaticPressure != nil {
			lo, hi = f.StaticPressure.Min, f.StaticPressure.Max
		}
		require.True(t, g.falls(lo), "%s at %g Pa", id, lo)
		require.True(t, g.falls(hi), "%s at %g Pa", id, hi)
	}
	// At 50 MPa the density's fall (ρ′/ρ ≈ −2.6e-4 /K near 300 K) outweighs
	// p_v′/(k − p_v) ≈ 4e-6 /K: the ratio rises.
	require.False(t, grids.grid(290, 310).falls(5e7))
	require.Greater(t, ratio(5e7, 310), ratio(5e7, 290))
	require.False(t, grids.grid(facilities.WaterMinTemperature-1, 300).falls(1e5))
	require.False(t, grids.grid(400, facilities.WaterMaxTemperature+1).falls(1e6))
}

// TestCavEndMatchesGrid checks the cavitation search's certificates of an
// end temperature (cavEnd, cavEndWeighted) against the full search they
// replace (noCavEnd): on random vessels in random water tunnels (as
// TestPlanMarineReference draws them; half hold their static pressure, a
// quarter have a fixed stagnation pressure),
// under the default priority and three weighted objectives, at random speeds
// (half of them where σ at some temperature lies at an end of the band) and
// scales with and without a target Re/m, the candidate found is the same,
// and the certificates settle a good share of the searches. The same means
// to the bit, or, where the full search's refinement met a tie of its keys
// by rounding next to the end (a weighted sum whose temperature-dependent
// part lies below the rounding of a larger constant term, the Froude
// number's: the lower q of a point just inside wins it), the same key and
// every figure within 1e-9 relative.
func TestCavEndMatchesGrid(t *testing.T) {
	rng := rand.New(rand.NewSource(29))
	objectives := []Objective{{}, {Weights: map[string]float64{"reynolds": 1, "cavitation": 4}},
		{Weights: map[string]float64{"reynolds": 1, "cavitation": 0.05}}, {Weights: map[string]float64{"cavitation": 1, "froude": 1}}}
	searches, settled, near := 0, 0, 0
	for i := 0; i < 1000; i++ {
		f, art, fl := randomVessel(t, rng, i)
		held := f.StaticPressure != nil
		for _, obj := range objectives {
			sv, err := newSolver(&Problem{Flight: fl, Article: art, Facility: f, Objective: obj})
			require.NoError(t, err)
			for j := 0; j < 40; j++ {
				u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
				if j >= 20 {
					// A speed at which σ at some temperature of the range
					// lies at an end of the cavitation band, held at the
					// highest or the lowest pressure k: σ = 2(k − p_v)/(ρV²) − c.
					temp := f.StagnationTemperature.Min + (f.StagnationTemperature.Max-f.StagnationTemperature.Min)*rng.Float64()
					k, c := f.StagnationPressure.Max, 1.0
					if held {
						k, c = f.StaticPressure.Max, 0
					}
					edge := fl.Marine.Cavitation - DefaultCavitationTolerance
					if j%4 >= 2 {
						k, edge = f.StagnationPressure.Min, fl.Marine.Cavitation+DefaultCavitationTolerance
						if held {
							k = f.StaticPressure.Min
						}
					}
					u = math.Sqrt(2*(k-facilities.WaterVapourPressure(temp))/(facilities.WaterDensity(temp)*(edge+c))) * (1 + 1e-3*(rng.Float64()-0.5))
					if !(u >= sv.machOrSpeedMin && u <= sv.machOrSpeedMax) {
						continue
					}
				}
				s := sv.sLo * math.Pow(sv.sHi/sv.sLo, rng.Float64())
				target := math.Inf(1)
				if j%2 == 0 {
					target = fl.Reynolds / (s * sv.L)
				}
				c := sv.prepare(u)
				e0 := sv.evals
				got := sv.atTarget(&c, s, target)
				e1 := sv.evals
				sv.noCavEnd = true
				want := sv.atTarget(&c, s, target)
				sv.noCavEnd = false
				searches++
				if got != want {
					near++
					require.True(t, got.ok == want.ok && got.fail == want.fail && got.capHi == want.capHi && got.top == want.top && got.bandOK == want.bandOK,
						"case %d, %+v, %g m/s, scale %g, target %g: %+v, want %+v", i, obj, u, s, target, got, want)
					require.Equal(t, want.k.v, got.k.v, "case %d, %+v, %g m/s, scale %g, target %g: %+v, want %+v", i, obj, u, s, target, got, want)
					for _, f := range [][2]float64{{got.t0, want.t0}, {got.r, want.r}, {got.rlo, want.rlo}, {got.rhi, want.rhi},
						{got.q, want.q}, {got.p0, want.p0}, {got.ps, want.ps}, {got.sig, want.sig}, {got.band, want.band},
						{got.bandLo, want.bandLo}} {
						require.InEpsilon(t, f[1], f[0], 1e-9, "case %d, %+v, %g m/s, scale %g, target %g: %+v, want %+v", i, obj, u, s, target, got, want)
					}
				}
				if e1-e0 < sv.evals-e1 {
					settled++
				}
			}
		}
	}
	t.Logf("%d of %d searches settled by a certificate; %d not the same to the bit", settled, searches, near)
	require.Greater(t, settled, searches/4)
	require.Less(t, near, searches/100)
}

// randomVessel draws the i-th random vessel and water tunnel of the tests
// below, as TestPlanMarineReference draws them: half hold their static
// pressure (i even), a quarter have a fixed stagnation pressure (i = 1 mod 4).
func randomVessel(t *testing.T, rng *rand.Rand, i int) (*facilities.Facility, *Article, FlightState) {
	t.Helper()
	held := i%2 == 0
	f := &facilities.Facility{ID: "w", Name: "random water tunnel", Medium: facilities.Medium{Kind: facilities.MediumWater},
		TestSection: facilities.TestSection{Width: 0.3 + rng.Float64(), Height: 0.3 + rng.Float64(), Length: 3, Walls: "closed"}}
	vlo := 0.3 + 2*rng.Float64()
	f.Speed = &facilities.Range{Min: vlo, Max: vlo + 1 + 15*rng.Float64()}
	tlo := 278 + 10*rng.Float64()
	f.StagnationTemperature = facilities.Range{Min: tlo, Max: tlo + 1 + 25*rng.Float64()}
	if held {
		f.StaticPressure = &facilities.Range{Min: 5e3 + 4e4*rng.Float64(), Max: 1.2e5 + 3e5*rng.Float64()}
	} else {
		plo := 1.5e5 + 1e5*rng.Float64()
		f.StagnationPressure = facilities.Range{Min: plo, Max: plo * (1 + rng.Float64())}
		if i%4 == 1 {
			// A fixed stagnation pressure: σ crosses the band as T moves.
			f.StagnationPressure.Max = plo
		}
	}
	art := &Article{ReferenceLength: 0.2 + 3*rng.Float64(), ReferenceArea: 0.5, Span: 0.2 + 2*rng.Float64(),
		FrontalArea: 0.02 + 0.3*rng.Float64(), WettedArea: 2}
	m := Marine{Water: WaterSea, Temperature: 275 + 30*rng.Float64(), Depth: 50 * rng.Float64() * rng.Float64(), Speed: 1 + 20*rng.Float64()}
	fl, err := m.Resolve(art.ReferenceLength)
	require.NoError(t, err)
	return f, art, fl
}

// TestCavSlopeRoot checks the trade curve's refinement of a weighted
// cavitation search (cavSlopeRoot, slopeRoot) against Brent's method on the
// weighted sum it replaces: on random vessels and tunnels (randomVessel), two
// weighted objectives, random speeds and scales, the candidate found has a
// weighted sum no higher than Brent's but for its rounding (1e-12 relative)
// and lies within 1e-6 relative of it in temperature (the flat minimum's
// position, which W places only to about 1e-8 relative, the slope to about
// 1e-13), and the root settles some of the searches (the others: an end, or
// the band reached).
func TestCavSlopeRoot(t *testing.T) {
	rng := rand.New(rand.NewSource(31))
	objectives := []Objective{{Weights: map[string]float64{"reynolds": 1, "cavitation": 4}},
		{Weights: map[string]float64{"reynolds": 1, "cavitation": 0.05, "froude": 0.5}}}
	searches, rooted, worst := 0, 0, 0.0
	for i := 0; i < 300; i++ {
		f, art, fl := randomVessel(t, rng, i)
		for _, obj := range objectives {
			sv, err := newSolver(&Problem{Flight: fl, Article: art, Facility: f, Objective: obj})
			require.NoError(t, err)
			for j := 0; j < 20; j++ {
				u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
				s := sv.sLo * math.Pow(sv.sHi/sv.sLo, rng.Float64())
				c := sv.prepare(u)
				sv.slopeRoot = true
				e0 := sv.evals
				got := sv.atTarget(&c, s, math.Inf(1))
				e1 := sv.evals
				sv.slopeRoot = false
				want := sv.atTarget(&c, s, math.Inf(1))
				searches++
				if got == want {
					continue
				}
				if e1-e0 < sv.evals-e1 {
					rooted++
				}
				require.Equal(t, want.ok, got.ok)
				require.LessOrEqual(t, got.k.v[0], want.k.v[0]*(1+1e-12), "case %d, %+v, %g m/s, scale %g: %+v, want %+v", i, obj, u, s, got, want)
				require.InEpsilon(t, want.t0, got.t0, 1e-6, "case %d, %+v, %g m/s, scale %g", i, obj, u, s)
				worst = max(worst, math.Abs(got.t0/want.t0-1))
			}
		}
	}
	t.Logf("%d of %d searches refined by the slope's root with fewer states; temperatures within %.2g relative of Brent's", rooted, searches, worst)
	require.Greater(t, rooted, 50)
}

// TestCavSpeedBound checks the weighted speed search's bound (cavSpeedBound)
// and its cut (cavSpeedCut): on random vessels and tunnels (randomVessel),
// three weighted objectives and random speeds, the bound never exceeds the
// weighted sum the search finds at that speed, so that a speed cut could not
// have been the grid's best; and whole solves with their binding gains' re-solves
// give the same plans and gains to the bit with the cut and without it
// (noSpeedCut), with fewer states.
func TestCavSpeedBound(t *testing.T) {
	rng := rand.New(rand.NewSource(37))
	objectives := []Objective{{Weights: map[string]float64{"reynolds": 1, "cavitation": 4}},
		{Weights: map[string]float64{"reynolds": 1, "cavitation": 0.05}}, {Weights: map[string]float64{"reynolds": 1, "cavitation": 1, "froude": 0.5}}}
	bounded, speeds, plans, fewer := 0, 0, 0, 0
	for i := 0; i < 120; i++ {
		f, art, fl := randomVessel(t, rng, i)
		for _, obj := range objectives {
			p := &Problem{Flight: fl, Article: art, Facility: f, Objective: obj}
			sv, err := newSolver(p)
			require.NoError(t, err)
			for j := 0; j < 10; j++ {
				u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
				c := sv.prepare(u)
				if !c.ok {
					continue
				}
				lb := sv.cavSpeedBound(&c)
				x := sv.bestOverScalesAt(&c, true)
				speeds++
				if !x.ok {
					continue
				}
				require.LessOrEqual(t, lb, x.k.v[0], "case %d, %+v, %g m/s", i, obj, u)
				if lb > 0 {
					bounded++
				}
			}
			solve := func(noCut bool) (candidate, []float64, int) {
				sv, err := newSolver(p)
				require.NoError(t, err)
				sv.noSpeedCut = noCut
				best, err := sv.solveCorrected()
				if err != nil {
					return candidate{}, nil, sv.evals
				}
				res := sv.result(best)
				var gains []float64
				n := sv.evals
				for _, b := range res.Binding {
					g, e, err := sv.gain(b.Constraint, best)
					if err == nil {
						gains = append(gains, g)
					}
					n += e
				}
				return best, gains, n
			}
			got, gotGains, gotN := solve(false)
			want, wantGains, wantN := solve(true)
			require.Equal(t, want, got, "case %d, %+v", i, obj)
			require.Equal(t, wantGains, gotGains, "case %d, %+v", i, obj)
			require.LessOrEqual(t, gotN, wantN, "case %d, %+v", i, obj)
			plans++
			if gotN < wantN {
				fewer++
			}
		}
	}
	t.Logf("%d of %d speeds bounded above 0; %d of %d solves with fewer states", bounded, speeds, fewer, plans)
	require.Greater(t, bounded, speeds/10)
	require.Greater(t, fewer, plans/4)
}

// TestCavKeyMatchesKeyOf holds cavKey to keyOf (the same key to the bit) and
// its logarithms to the ones the Reynolds and cavitation terms read: random
// vessels (randomVessel), four weighted objectives, random speeds, scales,
// Re/m and cavitation numbers, an eighth of them within 1e-6 of both targets,
// others exactly on one, or with σ below the key's floor of 1e-9·σ_full.
func TestCavKeyMatchesKeyOf(t *testing.T) {
	rng := rand.New(rand.NewSource(41))
	objectives := []Objective{{Weights: map[string]float64{"reynolds": 1, "cavitation": 4}},
		{Weights: map[string]float64{"reynolds": 1, "cavitation": 0.05, "froude": 0.5}},
		{Weights: map[string]float64{"cavitation": 1, "froude": 1}}, {Weights: map[string]float64{"reynolds": 2}}}
	exact, keys := 0, 0
	for i := 0; i < 200; i++ {
		f, art, fl := randomVessel(t, rng, i)
		for _, obj := range objectives {
			sv, err := newSolver(&Problem{Flight: fl, Article: art, Facility: f, Objective: obj})
			require.NoError(t, err)
			sf := fl.Marine.Cavitation
			for j := 0; j < 50; j++ {
				u := sv.machOrSpeedMin + (sv.machOrSpeedMax-sv.machOrSpeedMin)*rng.Float64()
				s := sv.sLo * math.Pow(sv.sHi/sv.sLo, rng.Float64())
				ref := fl.Reynolds / (s * sv.L)
				r, sig := ref*math.Exp(4*(rng.Float64()-0.5)), sf*math.Exp(6*(rng.Float64()-0.5))
				switch j % 8 {
				case 0:
					r, sig = ref*(1+1e-6*(rng.Float64()-0.5)), sf*(1+1e-6*(rng.Float64()-0.5))
				case 1:
					r = ref
				case 2:
					sig = sf
				case 3:
					sig = 1e-12 * sf * rng.Float64()
				}
				q := 1e3 + 1e5*rng.Float64()
				want := sv.keyOf(u, s, r, q, u, false, sig)
				got, lnRe, lnSig := sv.cavKey(u, s, r, q, u, sig)
				keys++
				require.Equal(t, want, got, "case %d, %+v", i, obj)
				if obj.Weights["reynolds"] > 0 {
					require.Equal(t, math.Log(s*sv.L*r/sv.fl.Reynolds), lnRe)
				} else {
					require.True(t, math.IsNaN(lnRe))
				}
				if obj.Weights["cavitation"] > 0 {
					require.Equal(t, math.Log(math.Max(sig, 1e-9*sf)/sf), lnSig)
				} else {
					require.True(t, math.IsNaN(lnSig))
				}
				if got.v[0] == 0 {
					exact++
				}
			}
		}
	}
	t.Logf("%d of %d keys exactly 0 (every target met)", exact, keys)
	require.Positive(t, exact)
}
