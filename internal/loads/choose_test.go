package loads_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/loads"
)

func fptr(v float64) *float64 { return &v }

// j16Case is the 1:24 demo business jet (S = 36.5/576 = 0.0633681 m², c = 0.1 m)
// at the given points, no wall correction, weight 20 kg.
func j16Case(res *loads.Resolution, pts ...facilities.Point) loads.Setup {
	return loads.Setup{ReferenceArea: 36.5 / 576, ReferenceLength: 0.1,
		Installation: loads.Installation{ModelMass: 20}, Points: pts, Resolution: res}
}

// TestChooseBalance uses the demo facility lsw-2 (ext-6c and int-a, both with a
// safety factor of 1.5).
func TestChooseBalance(t *testing.T) {
	t.Parallel()
	f := demoPtr(t, "lsw-2")
	lc := loads.Setup{ReferenceArea: 0.3, ReferenceLength: 0.25,
		Points: []facilities.Point{{Alpha: 0, Coefficients: facilities.Coefficients{CL: 0.2, CD: 0.03}},
			{Alpha: 12, Coefficients: facilities.Coefficients{CL: 1.2, CD: 0.08, Cm: -0.1}}}}
	cases := []struct {
		name    string
		q       float64
		id      string
		want    string
		code    check.Code
		inWords string
	}{
		// N ≈ 1.2·q·0.3: at q = 2000 Pa, about 730 N: int-a (3600 N) is used more and safe.
		{"small loads pick the finer balance", 2000, "", "int-a", "", "most heavily used"},
		// At 9000 Pa int-a's normal rating is exceeded over its safety factor.
		{"large loads pick the stronger balance", 9000, "", "ext-6c", "", "most heavily used"},
		{"named balance", 2000, "ext-6c", "ext-6c", "", "as requested"},
		{"unknown balance", 2000, "nope", "", check.CodeInvalid, ""},
		{"nothing carries it", 200000, "", "", check.CodeUnprocessable, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			lc := lc // each case names its own balance
			lc.Installation.BalanceID = c.id
			ch, err := loads.Choose(&lc, f, c.q)
			if c.code != "" {
				assert.Equal(t, c.code, check.ErrorCode(err), "%v", err)
				return
			}
			require.NoError(t, err)
			assert.Equal(t, c.want, ch.Report.BalanceID, "chosen balance (%s)", ch.Reason)
			assert.Contains(t, ch.Reason, c.inWords)
		})
	}
	_, err := loads.CheckAll(&lc, &facilities.Facility{}, 1000)
	assert.ErrorIs(t, err, loads.ErrNoBalance, "no balances")
}

// TestChooseBalancePrefersResolution: without a resolution, the balance choice
// in tsw-1 takes the most heavily used balance within its allowed loads; with
// one, of the balances within their allowed loads, the one that resolves it
// with the most margin, and loads.ResolutionState says so.
func TestChooseBalancePrefersResolution(t *testing.T) {
	t.Parallel()
	f, ok := facilities.DemoFacility("tsw-1")
	require.True(t, ok)
	pts := []facilities.Point{{Alpha: 0, Coefficients: facilities.Coefficients{CL: 0.3, CD: 0.03}},
		{Alpha: 8, Coefficients: facilities.Coefficients{CL: 0.9, CD: 0.06, Cm: -0.05}}}
	const q = 20000
	plain := j16Case(nil, pts...)
	all, err := loads.CheckAll(&plain, &f, q)
	require.NoError(t, err)
	res := &loads.Resolution{CDCounts: fptr(30)}
	lc := j16Case(res, pts...)
	withRes, err := loads.CheckAll(&lc, &f, q)
	require.NoError(t, err)
	best, bestMargin := "", 0.0
	for _, r := range withRes {
		if r.WithinLimits && r.Resolution.State == loads.ResolutionResolved && r.Resolution.Margin > bestMargin {
			best, bestMargin = r.BalanceID, r.Resolution.Margin
		}
	}
	require.NotEmpty(t, best, "a balance of tsw-1 resolves 30 counts at 20 kPa")
	ch, err := loads.Choose(&lc, &f, q)
	require.NoError(t, err)
	assert.Equal(t, best, ch.Report.BalanceID)
	assert.Contains(t, ch.Reason, "most margin")
	assert.Equal(t, loads.ResolutionResolved, loads.ResolutionState(withRes))
	assert.Len(t, all, len(withRes))

	// Finer than either balance resolves at this q: no balance resolves.
	fine := j16Case(&loads.Resolution{CDCounts: fptr(0.5)}, pts...)
	none, err := loads.CheckAll(&fine, &f, q)
	require.NoError(t, err)
	assert.Equal(t, loads.ResolutionNoBalance, loads.ResolutionState(none))
}
