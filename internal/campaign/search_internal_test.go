package campaign

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// randomCampaign returns a seeded random campaign: an airliner-like article
// scaled at random, 3 to 8 conditions, and one to three demo facilities of one
// medium (air, nitrogen with an air tunnel beside it, water), with their
// balances (the planner choosing one) or without any balance limit.
func randomCampaign(seed uint64) Request {
	rng := rand.New(rand.NewPCG(seed, 99))
	k := 0.5 + rng.Float64()
	art := similarity.Article{ReferenceLength: 2.4 * k, ReferenceArea: 36.5 * k * k, Span: 16.4 * k, Length: 19.6 * k,
		FrontalArea: 4.4 * k * k, WettedArea: 228 * k * k,
		Aero: similarity.Aero{LiftSlope: 4.9, ZeroLiftAlpha: -1.6, CLMax: 1.25, CDMin: 0.022, CLAtCDMin: 0.14, InducedDragFactor: 0.057, CmZero: 0.03, CmSlope: -1.05}}
	demo := map[string]facilities.Facility{}
	for _, f := range facilities.Demo() {
		demo[f.ID] = f
	}
	var pool []string
	var cond func() Condition
	switch seed % 3 {
	case 0:
		pool = []string{"tsw-1", "plp-3", "lsw-2"}
		cond = func() Condition {
			h, m := rng.Float64()*12000, 0.1+rng.Float64()*0.75
			return Condition{Flight: similarity.Flight{Altitude: &h, Mach: &m}}
		}
	case 1:
		pool = []string{"cn2-05", "tsw-1"}
		cond = func() Condition {
			h, m := rng.Float64()*12000, 0.25+rng.Float64()*0.6
			return Condition{Flight: similarity.Flight{Altitude: &h, Mach: &m}}
		}
	default:
		pool = []string{"wtn-04", "cvt-07"}
		cond = func() Condition {
			h, v := rng.Float64()*2000, 5+rng.Float64()*55
			return Condition{Flight: similarity.Flight{Altitude: &h, TrueAirspeed: &v}}
		}
	}
	nf := 1 + rng.IntN(len(pool))
	balance := seed/3%2 == 0
	var fcs []FacilityChoice
	for _, i := range rng.Perm(len(pool))[:nf] {
		f := demo[pool[i]]
		fc := FacilityChoice{}
		if balance {
			fc.FacilityID = f.ID
			fc.Installation.ModelMass = 20 * k * k * k * math.Pow(GeometricScaleOf(&f, &art), 3) / 1e-3
		} else {
			f.Balances = nil
			fc.Facility = &f
		}
		fcs = append(fcs, fc)
	}
	req := Request{Article: art, Alpha: similarity.Sweep{From: -4, To: 12, Step: 2}, Facilities: fcs}
	for range 3 + rng.IntN(6) {
		req.Conditions = append(req.Conditions, cond())
	}
	if seed/6%2 == 1 {
		req.Objective.Aim = AimMean
	}
	return req
}

// GeometricScaleOf is similarity.GeometricScale's scale alone.
func GeometricScaleOf(f *facilities.Facility, a *similarity.Article) float64 {
	s, _ := similarity.GeometricScale(f, a)
	return s
}

// bruteScore scores the campaign with one model of scale s in every facility,
// straight from the definition: each condition's best fixed-scale plan over the
// facilities (similarity.Plan), then conditions served, Mach matched, and the
// lowest or mean Reynolds closeness.
func bruteScore(pr *prepared, s float64) (score, error) {
	var sc score
	lowest, sum := math.Inf(1), 0.0
	for ci, c := range pr.conds {
		best := point{fi: -1}
		for fi, fc := range pr.facs {
			p := &similarity.Problem{Flight: c.flight, Article: &pr.req.Article, Facility: fc.f, Model: similarity.Model{Scale: &s},
				Objective: c.obj, MatrixDrag: c.mx.DragRange()}
			if ll := fc.limits[c.sweep]; ll != nil {
				p.LoadLimit = ll
			}
			res, err := similarity.Plan(p, &similarity.Settings{NoGains: true, TradePoints: -1})
			if err != nil {
				if check.ErrorCode(err) != check.CodeUnprocessable {
					return score{}, fmt.Errorf("condition %d, scale %g: %w", ci, s, err)
				}
				continue
			}
			r := res.Mismatch.ReynoldsRatio
			pt := point{ok: true, machOK: res.Mismatch.MachMatched == nil || *res.Mismatch.MachMatched, close: math.Min(r, 1/r), fi: fi}
			if pt.better(best) {
				best = pt
			}
		}
		if best.ok {
			sc.served++
			if best.machOK {
				sc.matched++
			}
			lowest, sum = math.Min(lowest, best.close), sum+best.close
		}
	}
	if sc.served > 0 {
		sc.value = lowest
		if pr.aim == AimMean {
			sc.value = sum / float64(sc.served)
		}
	}
	return sc, nil
}

// TestSharedScaleIsOptimal checks the shared-scale search against a brute-force
// scan: over 50 seeded random campaigns (12 with -short) in air, nitrogen and
// water, with one to three facilities, with and without balance limits, and
// both aims, no scale of a 2000-point geometric scan from 1:1000 of the
// smallest facility's largest scale up to the largest facility's, each scored
// with the fixed-scale planner, beats the campaign's scale: it serves no more
// conditions, matches no more Mach numbers, and its aim value is at most 0.1 %
// higher.
func TestSharedScaleIsOptimal(t *testing.T) {
	t.Parallel()
	cases := 50
	if testing.Short() {
		cases = 12
	}
	const scan = 2000
	worst := 0.0
	for seed := range uint64(cases) {
		t.Run(fmt.Sprint(seed), func(t *testing.T) { // in turn: the cases share worst, and each scans on every core
			req := randomCampaign(seed)
			ctx := context.Background()
			pr, err := prepare(ctx, &app.Planner{}, &req)
			require.NoError(t, err)
			res, err := Run(ctx, nil, req, nil)
			require.NoError(t, err)
			s := 0.0
			for _, fp := range res.Facilities {
				if fp.Scale > 0 {
					s = fp.Scale
				}
			}
			got, err := bruteScore(pr, s)
			require.NoError(t, err)
			require.Equal(t, got.served, res.Summary.ConditionsServed)
			lo, hi := math.Inf(1), 0.0
			for _, fc := range pr.facs {
				lo, hi = math.Min(lo, fc.geom/100), math.Max(hi, fc.geom)
			}
			lo = math.Max(lo, similarity.DefaultScaleMin)
			scores := make([]score, scan)
			errs := make([]error, scan)
			xs := make([]float64, scan)
			each(scan, func(k int) {
				xs[k] = lo * math.Pow(hi/lo, float64(k)/(scan-1))
				scores[k], errs[k] = bruteScore(pr, xs[k])
			})
			var best score
			bestS := 0.0
			for k, sc := range scores {
				require.NoError(t, errs[k])
				if best.less(sc) {
					best, bestS = sc, xs[k]
				}
			}
			require.LessOrEqual(t, best.served, got.served, "scan scale %.6g serves more than campaign scale %.6g", bestS, s)
			if best.served == got.served {
				require.LessOrEqual(t, best.matched, got.matched, "scan scale %.6g matches more Mach numbers than campaign scale %.6g", bestS, s)
				if best.matched == got.matched && got.value > 0 {
					gap := best.value/got.value - 1
					worst = math.Max(worst, gap)
					require.LessOrEqual(t, gap, 1e-3, "scan scale %.6g: %.6g, campaign scale %.6g: %.6g", bestS, best.value, s, got.value)
				}
			}
		})
	}
	t.Logf("largest gain of the scan over the campaign's scale: %.3g %%", 100*worst)
}

// TestSharedScaleSeed20 keeps the campaign that once found a local maximum
// 0.18 % below the best (water, balance, mean aim): the scan's scale 0.0238
// against the search's 0.0361 then; within 0.1 % now.
func TestSharedScaleSeed20(t *testing.T) {
	t.Parallel()
	req := randomCampaign(20)
	res, err := Run(context.Background(), nil, req, nil)
	require.NoError(t, err)
	pr, err := prepare(context.Background(), &app.Planner{}, &req)
	require.NoError(t, err)
	got, err := bruteScore(pr, res.Summary.ModelScales[0])
	require.NoError(t, err)
	at, err := bruteScore(pr, 0.0238174)
	require.NoError(t, err)
	require.Equal(t, at.served, got.served)
	require.Equal(t, at.matched, got.matched)
	require.LessOrEqual(t, at.value/got.value-1, 1e-3, "%+v at %g against %+v", got, res.Summary.ModelScales[0], at)
}
