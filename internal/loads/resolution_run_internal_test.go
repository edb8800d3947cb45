package loads

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestResolutionRunMatchesNeed: the check's resolution, built point by point
// from the sines the check takes for the loads (resolutionRun), is the
// ResolutionCheck the per-point Need and a fresh uncertainty for the limiting
// name give (resolutionByNeed, the check before), field for field and to the
// bit, over 3000 random set-ups: points with sideslip and wall corrections,
// every subset of the asked coefficients, balances with no accuracy, with a
// fraction of their ratings and with some components' accuracies alone.
func TestResolutionRunMatchesNeed(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(17, 2026))
	f := func(v float64) *float64 { return &v }
	states := map[string]int{}
	for range 3000 {
		lc := Setup{ReferenceArea: 0.01 + rng.Float64(), ReferenceLength: 0.05 + rng.Float64(),
			Installation: Installation{ModelMass: 20 * rng.Float64()}}
		for range 1 + rng.IntN(25) {
			p := facilities.Point{Alpha: 40 * (rng.Float64() - 0.3), Beta: 10 * (rng.Float64() - 0.5)}
			p.CL, p.CD, p.Cm = rng.NormFloat64(), 0.05*rng.Float64(), 0.1*rng.NormFloat64()
			if rng.IntN(3) > 0 {
				p.DynamicPressureFactor = 1 + 0.05*rng.Float64()
			}
			lc.Points = append(lc.Points, p)
		}
		res := &Resolution{}
		for k, v := range []**float64{&res.CL, &res.CDCounts, &res.Cm, &res.CY, &res.Cl, &res.Cn} {
			if rng.IntN(2) == 0 || k == 0 && res.Empty() {
				*v = f(math.Exp(-1 - 5*rng.Float64()))
			}
		}
		lc.Resolution = res
		b := facilities.Balance{ID: "b", SafetyFactor: 1.5, Limits: facilities.Limits{Normal: f(5000), Axial: f(900),
			Side: f(2000), RollingMoment: f(300), PitchingMoment: f(400), YawingMoment: f(250)}}
		switch rng.IntN(3) {
		case 1:
			b.Accuracy = &facilities.Accuracy{FractionOfRating: 1e-4 + 1e-3*rng.Float64()}
		case 2:
			c := &facilities.Limits{}
			for _, v := range []**float64{&c.Normal, &c.Axial, &c.Side, &c.RollingMoment, &c.PitchingMoment, &c.YawingMoment} {
				if rng.IntN(4) > 0 {
					*v = f(rng.Float64())
				}
			}
			b.Accuracy = &facilities.Accuracy{Components: c}
		}
		q := math.Exp(2 + 8*rng.Float64())
		r, err := lc.Check(&b, q)
		require.NoError(t, err)
		want := lc.resolutionByNeed(&b, q)
		require.Equal(t, want, r.Resolution)
		require.Equal(t, math.Float64bits(want.MinDynamicPressure), math.Float64bits(r.Resolution.MinDynamicPressure))
		require.Equal(t, math.Float64bits(want.Margin), math.Float64bits(r.Resolution.Margin))
		states[r.Resolution.State]++
	}
	require.Len(t, states, 3, "%v", states)
}

// resolutionByNeed is the check's resolution as it was computed after the
// loads: Need at every point, and the limiting name from the uncertainty
// computed again.
func (lc *Setup) resolutionByNeed(b *facilities.Balance, q float64) *ResolutionCheck {
	res := lc.Resolution
	rc := &ResolutionCheck{Required: *res}
	var d Vector
	var known [6]bool
	if b.Accuracy != nil {
		d, known = AccuracyOf(b)
	}
	seen := map[string]bool{}
	for i, p := range lc.Points {
		force, moment, unk := res.Need(d, known, p.Alpha)
		for _, n := range unk {
			if !seen[n] {
				seen[n] = true
				rc.Unknown = append(rc.Unknown, n)
			}
		}
		if len(unk) > 0 {
			continue
		}
		f := lc.Points[i].DynamicPressureFactor
		if f == 0 {
			f = 1
		}
		qf := force / (f * lc.ReferenceArea)
		qm := moment / (f * lc.ReferenceArea * lc.ReferenceLength)
		u, _ := CoefficientUncertainty(d, known, p.Alpha, 1, 1, 1)
		figs := u.figures()
		best, name := -1.0, ""
		for _, t := range res.terms() {
			if t.moment == (qf >= qm) {
				continue
			}
			if v := figs[t.index] / t.v; v > best {
				best, name = v, t.name
			}
		}
		if qn := math.Max(qf, qm); qn > rc.MinDynamicPressure {
			rc.MinDynamicPressure = qn
			rc.Limiting = Limiting{Component: name, Alpha: p.Alpha, Beta: p.Beta}
		}
	}
	switch {
	case len(rc.Unknown) > 0:
		rc.State, rc.MinDynamicPressure, rc.Limiting = ResolutionAccuracyUnknown, 0, Limiting{}
	case q >= rc.MinDynamicPressure*(1-1e-12):
		rc.State = ResolutionResolved
	default:
		rc.State = ResolutionTooCoarse
	}
	if rc.MinDynamicPressure > 0 {
		rc.Margin = q / rc.MinDynamicPressure
	}
	return rc
}

// TestCheckAllMatchesEachBalance: CheckAll, which takes every point's sines
// and loads once for all the balances (pointsLoads), gives each balance the
// report its own check gives (CheckBalance), to the bit, over 500 random
// set-ups on a facility of three balances (a gauge row, accuracies or none,
// a required resolution or none).
func TestCheckAllMatchesEachBalance(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(7, 17))
	f := func(v float64) *float64 { return &v }
	fac := facilities.Facility{ID: "f", Balances: []facilities.Balance{
		{ID: "a", SafetyFactor: 1.5, Limits: facilities.Limits{Normal: f(5000), Axial: f(900), PitchingMoment: f(400)},
			Accuracy: &facilities.Accuracy{FractionOfRating: 5e-4}},
		{ID: "b", Limits: facilities.Limits{Normal: f(900), Axial: f(200), Side: f(300)},
			Combined: []facilities.CombinedLimit{{Name: "fwd", Limit: 700, Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": 8}}}},
		{ID: "c", SafetyFactor: 2, Limits: facilities.Limits{Normal: f(20000), Axial: f(3000), Side: f(8000),
			RollingMoment: f(900), PitchingMoment: f(1500), YawingMoment: f(900)},
			Accuracy: &facilities.Accuracy{Components: &facilities.Limits{Normal: f(2), Axial: f(0.5), PitchingMoment: f(0.3)}}},
	}}
	for range 500 {
		lc := Setup{ReferenceArea: 0.01 + rng.Float64(), ReferenceLength: 0.05 + rng.Float64(),
			Installation: Installation{ModelMass: 20 * rng.Float64(), CGOffset: Offset{X: 0.1 * rng.NormFloat64(), Z: 0.02 * rng.NormFloat64()},
				BalanceOffset: Offset{X: 0.1 * rng.NormFloat64()}}}
		for range 1 + rng.IntN(25) {
			p := facilities.Point{Alpha: 40 * (rng.Float64() - 0.3), Beta: 10 * (rng.Float64() - 0.5)}
			p.CL, p.CD, p.Cm, p.CY = rng.NormFloat64(), 0.05*rng.Float64(), 0.1*rng.NormFloat64(), 0.1*rng.NormFloat64()
			if rng.IntN(3) > 0 {
				p.DynamicPressureFactor = 1 + 0.05*rng.Float64()
			}
			lc.Points = append(lc.Points, p)
		}
		if rng.IntN(2) == 0 {
			lc.Resolution = &Resolution{CL: f(0.01), CDCounts: f(2)}
		}
		q := math.Exp(2 + 8*rng.Float64())
		all, err := CheckAll(&lc, &fac, q)
		require.NoError(t, err)
		require.Len(t, all, len(fac.Balances))
		for i := range fac.Balances {
			r, err := lc.CheckBalance(&fac, i, q)
			require.NoError(t, err)
			require.Equal(t, r, all[i], "balance %d", i)
		}
	}
}
