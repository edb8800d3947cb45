package similarity_test

import (
	"fmt"
	"math"
	"math/rand"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// TestPlanMarineReference compares the planner with a brute-force search on 60
// random seeded problems: a vessel in water (random water, temperature, depth,
// speed) in a random water facility, half of them with a test-section static
// pressure set independently of speed (a cavitation tunnel), half with a
// stagnation-pressure range, under the default objective (the cavitation number
// within ±0.02, then the Reynolds number). The brute force walks a 241 × 81 grid of
// speed and water temperature; at each point the static pressure that brings σ
// closest to the full scale's and the scale that brings Re closest (Re ∝ scale) are
// exact. The planner must reach the brute force's cavitation level (to 1e-6) and,
// where the levels tie, its Reynolds number within 0.1 %; its plan must break no
// facility limit and never put the static pressure below the vapour pressure.
func TestPlanMarineReference(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewSource(13))
	const cases = 60
	for i := 0; i < cases; i++ {
		held := i%2 == 0
		f := &facilities.Facility{ID: fmt.Sprintf("w%d", i), Name: "random water tunnel", Medium: facilities.Medium{Kind: facilities.MediumWater},
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
		}
		span := 0.2 + 2*rng.Float64()
		art := &similarity.Article{ReferenceLength: 0.2 + 3*rng.Float64(), ReferenceArea: 0.5, Span: span,
			FrontalArea: 0.02 + 0.3*rng.Float64(), WettedArea: 2}
		m := similarity.Marine{Water: similarity.WaterSea, Temperature: 275 + 30*rng.Float64(),
			Depth: 50 * rng.Float64() * rng.Float64(), Speed: 1 + 20*rng.Float64()}
		if rng.Intn(3) == 0 {
			m.Water = similarity.WaterFresh
		}
		fl, err := m.Resolve(art.ReferenceLength)
		require.NoError(t, err)
		name := fmt.Sprintf("case %d (held %v, σ %.3g)", i, held, fl.Marine.Cavitation)
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			res, err := similarity.Plan(&similarity.Problem{Flight: fl, Article: art, Facility: f},
				&similarity.Settings{NoGains: true, TradePoints: -1})
			require.NoError(t, err)
			st := res.Test.State
			assert.Empty(t, f.Violations(st), "the plan breaks a limit")
			pv := facilities.WaterVapourPressure(st.Static.Temperature)
			assert.GreaterOrEqual(t, st.Static.Pressure, pv*(1-1e-12), "static pressure below the vapour pressure")
			require.NotNil(t, res.Mismatch.CavitationDifference)
			tol := similarity.DefaultCavitationTolerance
			dist := func(d float64) float64 { return math.Max(0, math.Abs(d)-tol) }
			planDist, planRe := dist(*res.Mismatch.CavitationDifference), math.Abs(math.Log(res.Mismatch.ReynoldsRatio))

			bDist, bRe := brute(t, f, art, fl, tol)
			assert.LessOrEqual(t, planDist, bDist+1e-6, "cavitation level: plan %.6g, brute force %.6g", planDist, bDist)
			if math.Abs(planDist-bDist) <= 1e-6 {
				assert.LessOrEqual(t, planRe, bRe+1e-3, "Reynolds level |ln(Re/Re_full)|: plan %.6g, brute force %.6g", planRe, bRe)
			}
		})
	}
}

// brute returns the best (cavitation level, |ln(Re/Re_full)|) on a grid of speed
// and water temperature, with the static pressure and the scale exact.
func brute(t *testing.T, f *facilities.Facility, art *similarity.Article, fl similarity.FlightState, tol float64) (float64, float64) {
	t.Helper()
	sg := 0.8 * math.Inf(1)
	sg = f.TestSection.Width / art.Span
	if f.MaxSpanFraction != nil {
		sg *= *f.MaxSpanFraction
	}
	if b := f.MaxBlockage; b != nil {
		sg = math.Min(sg, math.Sqrt(*b*f.TestSection.CrossSection()/art.FrontalArea))
	}
	slo := similarity.DefaultScaleMin
	if slo > sg {
		slo = 1e-3 * sg
	}
	sf := fl.Marine.Cavitation
	bestD, bestR := math.Inf(1), math.Inf(1)
	const nu, nt = 241, 81
	for i := 0; i < nu; i++ {
		u := f.Speed.Min + (f.Speed.Max-f.Speed.Min)*float64(i)/(nu-1)
		for j := 0; j < nt; j++ {
			T := f.StagnationTemperature.Min + (f.StagnationTemperature.Max-f.StagnationTemperature.Min)*float64(j)/(nt-1)
			set := facilities.Setting{Speed: u, StagnationTemperature: T}
			if f.StaticPressure == nil {
				set.StagnationPressure = f.StagnationPressure.Max
			}
			st, err := f.State(set)
			if err != nil {
				continue
			}
			q, r := st.DynamicPressure, st.ReynoldsPerMeter
			pv := facilities.WaterVapourPressure(T)
			var lo, hi float64
			if f.StaticPressure != nil {
				lo, hi = f.StaticPressure.Min, f.StaticPressure.Max
			} else {
				lo, hi = f.StagnationPressure.Min-q, f.StagnationPressure.Max-q
			}
			lo = math.Max(lo, pv)
			if hi < lo {
				continue
			}
			p := math.Min(math.Max(pv+sf*q, lo), hi)
			d := math.Max(0, math.Abs((p-pv)/q-sf)-tol)
			s := math.Min(math.Max(fl.Reynolds/(r*art.ReferenceLength), slo), sg)
			re := math.Abs(math.Log(s * art.ReferenceLength * r / fl.Reynolds))
			if d < bestD-1e-12 || d <= bestD+1e-12 && re < bestR {
				bestD, bestR = d, re
			}
		}
	}
	require.False(t, math.IsInf(bestD, 1), "the brute force found no usable setting")
	return bestD, bestR
}
