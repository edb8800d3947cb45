package loads_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// orrinJ16 is the demo world's business jet (full scale: MAC 2.40 m, S 36.5 m²,
// span 16.4 m, length 19.6 m, frontal area 4.4 m²) with its aerodynamic estimate.
func orrinJ16() similarity.Article {
	return similarity.Article{ReferenceLength: 2.4, ReferenceArea: 36.5, Span: 16.4, Length: 19.6, FrontalArea: 4.4, WettedArea: 228,
		Aero: similarity.Aero{LiftSlope: 4.9, ZeroLiftAlpha: -1.6, CLMax: 1.25, CDMin: 0.022, CLAtCDMin: 0.14,
			InducedDragFactor: 0.057, CmZero: 0.03, CmSlope: -1.05}}
}

func demo(t *testing.T, id string) facilities.Facility {
	t.Helper()
	f, ok := facilities.DemoFacility(id)
	require.True(t, ok, id)
	return f
}

// TestFit checks the fit of the demo business jet in tsw-1 (1.05 × 0.95 × 2.9 m,
// span ≤ 0.65 w, blockage ≤ 1 %) against hand arithmetic:
//
//	1:2   span 16.4/2 = 8.2 m, 8.2/1.05 = 7.810 > 0.65; frontal 4.4/4 = 1.1 m²,
//	      1.1/(1.05·0.95) = 1.1028 > 0.01; length 19.6/2 = 9.8 m > 2.9 m
//	24:1  span 393.6/1.05 = 374.86; blockage 2534.4/0.9975 = 2540.8; length 470.4 m
//	1:22  span 0.74545/1.05 = 0.70996 > 0.65; blockage 0.0090909/0.9975 = 0.0091137
//	      (fits); length 0.8909 m (fits)
//	1:24  span 0.68333/1.05 = 0.65079 > 0.65 (just); blockage 0.0076389/0.9975
//	1:26  span 0.63077/1.05 = 0.60073: fits
func TestFit(t *testing.T) {
	t.Parallel()
	f := demo(t, "tsw-1")
	a := orrinJ16()
	type want struct {
		name         string
		value, limit float64
	}
	cases := []struct {
		name  string
		scale float64
		want  []want
	}{
		{"1:2", 0.5, []want{{facilities.ConstraintSpan, 7.8095238, 0.65}, {facilities.ConstraintBlockage, 1.1027569, 0.01}, {facilities.ConstraintModelLength, 9.8, 2.9}}},
		{"24:1", 24, []want{{facilities.ConstraintSpan, 374.85714, 0.65}, {facilities.ConstraintBlockage, 2540.7519, 0.01}, {facilities.ConstraintModelLength, 470.4, 2.9}}},
		{"1:22", 1.0 / 22, []want{{facilities.ConstraintSpan, 0.70995671, 0.65}}},
		{"1:24", 1.0 / 24, []want{{facilities.ConstraintSpan, 0.65079365, 0.65}}},
		{"1:26", 1.0 / 26, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got := loads.Fit(&f, &a, tc.scale)
			require.Len(t, got, len(tc.want))
			for i, w := range tc.want {
				assert.Equal(t, w.name, got[i].Constraint)
				assert.InEpsilon(t, w.value, got[i].Value, 1e-7, w.name) // hand values to 8 digits
				assert.InEpsilon(t, w.limit, got[i].Limit, 1e-12, w.name)
				assert.NotEmpty(t, got[i].Message)
			}
		})
	}
}

// checkJet runs Check on the demo business jet in tsw-1 at M 0.78, p0 150 kPa,
// T0 310 K over α −4…12°.
func checkJet(t *testing.T, f *facilities.Facility, a similarity.Article, in loads.Installation, scale float64, beta *similarity.Sweep) loads.Result {
	t.Helper()
	mx, err := a.Aero.Matrix(similarity.Sweep{From: -4, To: 12, Step: 4}, beta)
	require.NoError(t, err)
	set := facilities.Setting{Mach: 0.78, StagnationPressure: 150e3, StagnationTemperature: 310}
	if f.Medium.IsLiquid() {
		set = facilities.Setting{Speed: 3, StagnationPressure: 101e3, StagnationTemperature: 293.15}
	}
	st, err := f.State(set)
	require.NoError(t, err)
	r, err := loads.Check(&loads.Case{Facility: f, Article: &a, Installation: in, Matrix: mx, Scale: scale, State: st, Every: true})
	require.NoError(t, err)
	return r
}

func TestVerdict(t *testing.T) {
	t.Parallel()
	tsw := demo(t, "tsw-1")
	a := orrinJ16()
	withMass := loads.Installation{BalanceID: "int-b1", ModelMass: 14}
	cases := []struct {
		name    string
		f       facilities.Facility
		in      loads.Installation
		scale   float64
		verdict string
	}{
		{"fits and within", tsw, withMass, 1.0 / 26, loads.VerdictWithin},
		{"span too wide at 1:22", tsw, withMass, 1.0 / 22, loads.VerdictDoesNotFit},
		{"weight left out", tsw, loads.Installation{BalanceID: "int-b1"}, 1.0 / 26, loads.VerdictNotVerified},
		// A copy of int-b1 with an axial rating of 400 N (allowed 400/1.5 =
		// 266.7 N): at 1:26 the axial load at α 12° is −345 N (regression
		// value), 129 % of the allowed load.
		{"over on a smaller axial rating", withAxial(tsw, 400), withMass, 1.0 / 26, loads.VerdictOver},
		{"no balance", withoutBalances(tsw), withMass, 1.0 / 26, loads.VerdictNotVerified},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			r := checkJet(t, &tc.f, a, tc.in, tc.scale, nil)
			assert.Equal(t, tc.verdict, r.Verdict)
			if tc.verdict == loads.VerdictOver {
				require.Len(t, r.Reports, 1)
				assert.NotEmpty(t, r.Reports[0].OverAllowed)
				assert.Equal(t, "axial", r.Reports[0].OverAllowed[0].Component)
			}
		})
	}
}

func withAxial(f facilities.Facility, axial float64) facilities.Facility {
	f.Balances = append([]facilities.Balance(nil), f.Balances...)
	b := f.Balances[0]
	b.Limits.Axial = &axial
	f.Balances[0] = b
	return f
}

func withoutBalances(f facilities.Facility) facilities.Facility {
	f.Balances = nil
	return f
}

// TestUnratedComponents is a water-tunnel balance rated only for normal, axial
// and pitching moment in a β sweep: the side force (C_Y,body = −C_D·sin β; the
// estimate gives no C_n, so the yawing moment stays 0) carries load and has no
// rating, so the verdict is not_verified and the report names it; the
// rows of every point list all six components, the unrated ones without a
// rating.
func TestUnratedComponents(t *testing.T) {
	t.Parallel()
	f := demo(t, "wtn-04")
	n, ax, m := 180.0, 36.0, 11.0
	f.Balances = []facilities.Balance{{ID: "hyd-3c", Limits: facilities.Limits{Normal: &n, Axial: &ax, PitchingMoment: &m}, SafetyFactor: 1.5}}
	// The demo survey drone's aerodynamics on a small model; the side force
	// comes from the drag rotated by β (C_Y,body = −C_D·sin β).
	a := similarity.Article{ReferenceLength: 0.41, ReferenceArea: 1.4, Span: 3.45, Length: 2.05, FrontalArea: 0.1, WettedArea: 3.9,
		Aero: similarity.Aero{LiftSlope: 4.95, ZeroLiftAlpha: -2.8, CLMax: 1.35, CDMin: 0.031, CLAtCDMin: 0.28, InducedDragFactor: 0.047, CmZero: 0.06, CmSlope: -0.65}}
	r := checkJet(t, &f, a, loads.Installation{ModelMass: 0.5}, 0.1, &similarity.Sweep{From: -4, To: 4, Step: 4})
	assert.Equal(t, loads.VerdictNotVerified, r.Verdict)
	require.Len(t, r.Reports, 1)
	rep := r.Reports[0]
	assert.Equal(t, []string{"side"}, rep.UnratedLoaded)
	assert.True(t, rep.WithinLimits, "the rated rows are within")
	for _, p := range rep.Points {
		require.Len(t, p.Rows, 6)
		for i, row := range p.Rows {
			assert.Equal(t, loads.ComponentName(i), row.Name)
			assert.Equal(t, i == loads.IndexNormal || i == loads.IndexAxial || i == loads.IndexPitchingMoment, row.Rated, row.Name)
		}
	}
}
