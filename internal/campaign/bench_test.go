package campaign_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"scalematch/internal/campaign"
	"scalematch/similarity"
)

// benchRequest returns a campaign of n seeded random conditions (altitude 0 to
// 12 km, Mach 0.3 to 0.85, 7 α points) of the Orrin J16 in the first nf of
// tsw-1, cn2-05 and plp-3, with their demo balances, one model.
func benchRequest(n, nf int) campaign.Request {
	rng := rand.New(rand.NewPCG(1, uint64(n)))
	req := campaign.Request{
		Article: similarity.Article{ReferenceLength: 2.4, ReferenceArea: 36.5, Span: 16.4, Length: 19.6, FrontalArea: 4.4, WettedArea: 228,
			Aero: similarity.Aero{LiftSlope: 4.9, ZeroLiftAlpha: -1.6, CLMax: 1.25, CDMin: 0.022, CLAtCDMin: 0.14, InducedDragFactor: 0.057, CmZero: 0.03, CmSlope: -1.05}},
		Alpha: similarity.Sweep{From: -2, To: 10, Step: 2},
	}
	fcs := []campaign.FacilityChoice{
		{FacilityID: "tsw-1"}, {FacilityID: "cn2-05"}, {FacilityID: "plp-3"},
	}
	fcs[0].Installation.BalanceID, fcs[0].Installation.ModelMass = "int-b1", 14
	fcs[1].Installation.BalanceID, fcs[1].Installation.ModelMass = "int-k", 2.5
	fcs[2].Installation.ModelMass = 40
	req.Facilities = fcs[:nf]
	for i := range n {
		h, m := rng.Float64()*12000, 0.3+rng.Float64()*0.55
		req.Conditions = append(req.Conditions, campaign.Condition{Label: fmt.Sprint("c", i), Flight: similarity.Flight{Altitude: &h, Mach: &m}})
	}
	return req
}

// BenchmarkCampaign runs campaigns with one shared model: 1000 conditions in
// three facilities (the size the service answers in one request), and smaller
// ones to show how the time grows with conditions and facilities. It reports
// the bytes allocated per condition and the fixed-scale plans of the search per
// condition and facility.
func BenchmarkCampaign(b *testing.B) {
	for _, c := range []struct{ n, nf int }{{1000, 3}, {250, 3}, {500, 3}, {1000, 1}, {1000, 2}} {
		b.Run(fmt.Sprintf("conditions=%d/facilities=%d", c.n, c.nf), func(b *testing.B) {
			req := benchRequest(c.n, c.nf)
			b.ReportAllocs()
			b.ResetTimer()
			var plans, cands int
			for b.Loop() {
				res, err := campaign.Run(context.Background(), nil, req, nil)
				if err != nil {
					b.Fatal(err)
				}
				plans, cands = res.Search.FixedScalePlans, res.Search.CandidateScales
			}
			b.ReportMetric(float64(plans)/float64(c.n*c.nf), "plans/pair")
			b.ReportMetric(float64(cands), "scales")
		})
	}
}
