package loads_test

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// cautionFacility is an invented facility for the caution cases: medium, stagnation
// pressure range in Pa and stagnation temperature range in K.
func cautionFacility(id string, medium string, p, t facilities.Range) facilities.Facility {
	return facilities.Facility{ID: id, Medium: facilities.Medium{Kind: medium},
		StagnationPressure: p, StagnationTemperature: t}
}

// TestCautions checks that each danger gets its own caution, and only its own:
// fragments that must appear and fragments that must not, per case.
func TestCautions(t *testing.T) {
	t.Parallel()
	report := func(u float64, weight bool) loads.Report {
		return loads.Report{BalanceID: "bx", SafetyFactor: 1.5, AllowedUtilization: 1 / 1.5,
			MaxUtilization: u, WeightIncluded: weight,
			Limiting: loads.Limiting{Component: "pitching_moment", Alpha: 14}}
	}
	atm := facilities.Range{Min: 96000, Max: 96000}
	warm := facilities.Range{Min: 285, Max: 315}
	cases := []struct {
		name     string
		f        *facilities.Facility
		reports  []loads.Report
		want     []string
		wantNot  []string
		wantSize int
	}{
		{"no facility, no loads", nil, nil,
			[]string{facilities.CautionEstimate}, []string{"steady, static"}, 1},
		{"light loads with weight", nil, []loads.Report{report(0.3, true)},
			[]string{loads.CautionStaticLoads}, []string{"do not run", "unconservative"}, 2},
		{"near the allowed load", nil, []loads.Report{report(0.6, true)},
			[]string{"90 % of the 67 % allowed", "within the allowed load by this estimate only", "the safety factor as the only margin left"},
			[]string{"stepped", "do not run"}, 3},
		{"148 % of the rating", nil, []loads.Report{report(1.48, true)},
			[]string{"do not run the points above its allowed load", "148 % of its rating", "beyond the 67 % allowed"},
			[]string{"stepped", "monitoring"}, 3},
		{"weight left out", nil, []loads.Report{report(0.3, false), report(0.2, false)},
			[]string{loads.CautionWeightLeftOut}, nil, 3},
		{"atmospheric air", ptr2(cautionFacility("aa", facilities.MediumAir, atm, warm)), nil,
			nil, []string{"pressure vessel", "below atmospheric", "cold", "nitrogen", "water circuit"}, 1},
		{"pressurised air", ptr2(cautionFacility("pa", facilities.MediumAir, facilities.Range{Min: 101325, Max: 400000}, warm)), nil,
			[]string{"pressure vessel (stagnation pressure up to 400 kPa)"}, []string{"below atmospheric"}, 2},
		{"sub-atmospheric air", ptr2(cautionFacility("sa", facilities.MediumAir, facilities.Range{Min: 40000, Max: 180000}, warm)), nil,
			[]string{"pressure vessel", "runs below atmospheric pressure (stagnation pressure down to 40 kPa)", "buckle or implode"}, nil, 3},
		{"cold air: cold caution, no nitrogen", ptr2(cautionFacility("ca", facilities.MediumAir, atm, facilities.Range{Min: 150, Max: 300})), nil,
			[]string{"runs cold (stagnation temperature down to 150 K)", "embrittle"}, []string{"nitrogen", "oxygen"}, 2},
		{"warm nitrogen: asphyxiation, not cold", ptr2(cautionFacility("wn", facilities.MediumNitrogen, atm, warm)), nil,
			[]string{"runs on nitrogen", "displaces oxygen"}, []string{"runs cold", "cryogenic"}, 2},
		{"cold nitrogen: both", ptr2(cautionFacility("cn", facilities.MediumNitrogen, facilities.Range{Min: 120000, Max: 420000}, facilities.Range{Min: 105, Max: 300})), nil,
			[]string{"pressure vessel", "runs cold", "runs on nitrogen"}, []string{"below atmospheric"}, 4},
		{"water at atmospheric pressure", ptr2(cautionFacility("wa", facilities.MediumWater, facilities.Range{Min: 101000, Max: 101000}, facilities.Range{Min: 283, Max: 303})), nil,
			[]string{"is a water circuit"}, []string{"runs cold", "below atmospheric"}, 2},
		{"cavitation tunnel: water below and above ambient", ptr2(cautionFacility("cw", facilities.MediumWater, facilities.Range{Min: 15000, Max: 260000}, facilities.Range{Min: 281, Max: 307})), nil,
			[]string{"is a water circuit", "runs below atmospheric pressure", "pressure vessel"}, nil, 4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			got := loads.Cautions(c.f, c.reports...)
			require.Len(t, got, c.wantSize, "cautions: %q", got)
			assert.Equal(t, facilities.CautionEstimate, got[0])
			joined := strings.Join(got, " | ")
			for _, w := range c.want {
				assert.Contains(t, joined, w)
			}
			for _, w := range c.wantNot {
				assert.NotContains(t, joined, w)
			}
		})
	}
}

func ptr2(f facilities.Facility) *facilities.Facility { return &f }

// TestLoadWording checks the words of a load check that claim how safe it is: the
// balance choice says "by this estimate" and names the safety factor as the only
// margin, and a check without the model's weight says it is unconservative.
func TestLoadWording(t *testing.T) {
	t.Parallel()
	bal := facilities.Balance{ID: "bw", Limits: facilities.Limits{Normal: fptr(1000), PitchingMoment: fptr(100)}, SafetyFactor: 1.5}
	f := facilities.Facility{ID: "fw", Balances: []facilities.Balance{bal, {ID: "bv", Limits: facilities.Limits{Normal: fptr(5000)}, SafetyFactor: 1.5}}}
	cases := []struct {
		name    string
		mass    float64
		want    []string
		wantNot []string
	}{
		{"weight given", 5, []string{"within the allowed loads by this estimate", "the safety factor is the only margin left for the estimate's error"}, []string{"within its safety factor", "unconservative"}},
		{"weight left out", 0, []string{"within the allowed loads by this estimate", "left out of the balance loads, which makes the check unconservative"}, []string{"within its safety factor"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			lc := loads.Setup{ReferenceArea: 0.1, ReferenceLength: 0.2,
				Installation: loads.Installation{ModelMass: c.mass},
				Points:       onePoint(4, facilities.Coefficients{CL: 0.4, CD: 0.03})}
			ch, err := loads.Choose(&lc, &f, 2000)
			require.NoError(t, err)
			joined := ch.Reason + " | " + strings.Join(ch.Report.Warnings, " | ")
			for _, w := range c.want {
				assert.Contains(t, joined, w)
			}
			for _, w := range c.wantNot {
				assert.NotContains(t, joined, w)
			}
		})
	}
}
