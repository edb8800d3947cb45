package similarity_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/testfixture"
	"scalematch/similarity"
)

// orrin is the Orrin J16 estimate of the demo world (docs/demo-world.md).
func orrin() similarity.Aero {
	return similarity.Aero{LiftSlope: 4.9, ZeroLiftAlpha: -1.6, CLMax: 1.25, CDMin: 0.022,
		CLAtCDMin: 0.14, InducedDragFactor: 0.057, CmZero: 0.03, CmSlope: -1.05}
}

// TestParametric works the physics.md §6 model by hand for the Orrin J16:
//
//	α = 4°:   C_L = 4.9·(5.6°·π/180) = 0.47891835;  C_D = 0.022 + 0.057·(0.47891835 − 0.14)²
//	          = 0.028547342;  C_m = 0.03 − 1.05·(4°·π/180) = −0.043303829
//	α = 16°:  4.9·17.6°·π/180 = 1.505 > 1.25, held: C_L = 1.25, C_D = 0.022 + 0.057·1.11²
//	          = 0.0922297;  C_m = 0.03 − 1.05·(16°·π/180) = −0.26321531
//	α = −20°: 4.9·(−18.4°)·π/180 = −1.574, held at −1.25
func TestParametric(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name    string
		alpha   float64
		want    similarity.Coefficients
		stalled bool
		tol     float64
	}{
		{"linear range", 4, similarity.Coefficients{CL: 0.47891835, CD: 0.028547342, Cm: -0.043303829}, false, 1e-8},
		{"zero lift", -1.6, similarity.Coefficients{CL: 0, CD: 0.022 + 0.057*0.14*0.14, Cm: 0.03 + 1.05*1.6*math.Pi/180}, false, 1e-12},
		{"past the stall", 16, similarity.Coefficients{CL: 1.25, CD: 0.0922297, Cm: -0.26321531}, true, 1e-8},
		{"negative stall", -20, similarity.Coefficients{CL: -1.25, CD: 0.022 + 0.057*1.39*1.39, Cm: 0.03 + 1.05*20*math.Pi/180}, true, 1e-12},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			got, stalled, err := orrin().Coefficients(c.alpha, 0)
			require.NoError(t, err)
			assert.Equal(t, c.stalled, stalled, "stalled")
			assert.InDelta(t, c.want.CL, got.CL, c.tol, "C_L")
			assert.InDelta(t, c.want.CD, got.CD, c.tol, "C_D")
			assert.InDelta(t, c.want.Cm, got.Cm, c.tol, "C_m")
		})
	}
}

func table() similarity.Aero {
	return similarity.Aero{Table: []similarity.AeroPoint{
		{Alpha: 10, Beta: 0, CL: 1.0, CD: 0.06, Cm: -0.1},
		{Alpha: 0, Beta: 0, CL: 0.2, CD: 0.02, Cm: 0.0},
		{Alpha: 0, Beta: 5, CL: 0.18, CD: 0.025, Cm: 0.01, CY: -0.1, Cl: -0.01, Cn: 0.02},
		{Alpha: 10, Beta: 5, CL: 0.9, CD: 0.07, Cm: -0.08, CY: -0.12, Cl: -0.03, Cn: 0.03},
	}}
}

func TestTable(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name        string
		alpha, beta float64
		want        similarity.Coefficients
	}{
		{"row", 10, 0, similarity.Coefficients{CL: 1.0, CD: 0.06, Cm: -0.1}},
		// Halfway in α at β = 0: means of the two rows.
		{"alpha midpoint", 5, 0, similarity.Coefficients{CL: 0.6, CD: 0.04, Cm: -0.05}},
		// α 2.5 (a quarter of the α interval), β 2.5 (half the β interval):
		// C_L at β 0: 0.2 + 0.25·0.8 = 0.4; at β 5: 0.18 + 0.25·0.72 = 0.36; mean 0.38.
		// C_m at β 0: 0.25·(−0.1) = −0.025; at β 5: 0.01 + 0.25·(−0.09) = −0.0125.
		{"bilinear", 2.5, 2.5, similarity.Coefficients{CL: 0.38, CD: 0.5*(0.03) + 0.5*(0.036250), Cm: 0.5*(-0.025) + 0.5*(-0.0125),
			CY: 0.5 * (-0.105), Cl: 0.5 * (-0.015), Cn: 0.5 * 0.0225}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			got, stalled, err := table().Coefficients(c.alpha, c.beta)
			require.NoError(t, err)
			assert.False(t, stalled, "a table is never stalled")
			g := [6]float64{got.CL, got.CD, got.Cm, got.CY, got.Cl, got.Cn}
			w := [6]float64{c.want.CL, c.want.CD, c.want.Cm, c.want.CY, c.want.Cl, c.want.Cn}
			for i, name := range [6]string{"C_L", "C_D", "C_m", "C_Y", "C_l", "C_n"} {
				assert.InDelta(t, w[i], g[i], 1e-12, "%s (interpolated by hand above)", name)
			}
		})
	}
	for _, c := range []struct {
		name        string
		alpha, beta float64
	}{{"alpha above", 12, 0}, {"alpha below", -1, 0}, {"beta above", 5, 6}} {
		_, _, err := table().Coefficients(c.alpha, c.beta)
		assert.ErrorIs(t, err, similarity.ErrOutsideTable, c.name)
	}
}

func fieldsOf(t *testing.T, err error) []string {
	t.Helper()
	return testfixture.InvalidFields(t, err)
}

func TestAeroValidate(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		mod  func(*similarity.Aero)
		want string
	}{
		{"zero cl_max", func(a *similarity.Aero) { a.CLMax = 0 }, "article.aero.cl_max"},
		{"slope per degree mistaken", func(a *similarity.Aero) { a.LiftSlope = 95 }, "article.aero.lift_slope"},
		{"NaN drag", func(a *similarity.Aero) { a.CDMin = math.NaN() }, "article.aero.cd_min"},
		{"negative K", func(a *similarity.Aero) { a.InducedDragFactor = -0.1 }, "article.aero.induced_drag_factor"},
		{"table single row", func(a *similarity.Aero) { a.Table = []similarity.AeroPoint{{Alpha: 1, CL: 0.1, CD: 0.02}} }, "article.aero.table[0].alpha"},
		{"table negative drag", func(a *similarity.Aero) {
			a.Table = []similarity.AeroPoint{{Alpha: 0, CD: 0.02}, {Alpha: 4, CD: -0.01}}
		}, "article.aero.table[1].cd"},
		{"table duplicate alpha", func(a *similarity.Aero) {
			a.Table = []similarity.AeroPoint{{Alpha: 0, CD: 0.02}, {Alpha: 0, CD: 0.03}}
		}, "article.aero.table[0].alpha"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			a := orrin()
			c.mod(&a)
			assert.Contains(t, fieldsOf(t, a.Validate()), c.want)
		})
	}
	assert.NoError(t, orrin().Validate(), "valid estimate")
	assert.GreaterOrEqual(t, len(fieldsOf(t, (similarity.Aero{}).Validate())), 3,
		"zero estimate: fields, want lift_slope, cl_max, cd_min at least")
}

func TestSweep(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name        string
		s           similarity.Sweep
		n           int
		first, last float64
		field       string
	}{
		{"plan default", similarity.Sweep{From: -4, To: 16, Step: 1}, 21, -4, 16, ""},
		{"tenths reach the end", similarity.Sweep{From: 0, To: 1, Step: 0.1}, 11, 0, 1, ""},
		{"end not on a step", similarity.Sweep{From: 0, To: 10, Step: 3}, 4, 0, 9, ""},
		{"single angle", similarity.Sweep{From: 2, To: 2, Step: 1}, 1, 2, 2, ""},
		{"largest allowed", similarity.Sweep{From: -100, To: 100, Step: 0.1}, 2001, -100, 100, ""},
		{"too many", similarity.Sweep{From: -100, To: 100.1, Step: 0.1}, 0, 0, 0, "alpha.step"},
		{"zero step", similarity.Sweep{From: 0, To: 10}, 0, 0, 0, "alpha.step"},
		{"reversed", similarity.Sweep{From: 10, To: 0, Step: 1}, 0, 0, 0, "alpha.to"},
		{"beyond 180", similarity.Sweep{From: -200, To: 0, Step: 1}, 0, 0, 0, "alpha.from"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			got, err := c.s.Angles("alpha")
			if c.field != "" {
				assert.Contains(t, fieldsOf(t, err), c.field)
				return
			}
			require.NoError(t, err)
			require.Len(t, got, c.n, "angles")
			assert.InDelta(t, c.first, got[0], 1e-12, "first angle, °")
			assert.InDelta(t, c.last, got[len(got)-1], 1e-12, "last angle, °")
		})
	}
}

func TestMatrix(t *testing.T) {
	t.Parallel()
	mx, err := orrin().Matrix(similarity.Sweep{From: -4, To: 16, Step: 2}, &similarity.Sweep{From: -4, To: 4, Step: 4})
	require.NoError(t, err)
	require.Equal(t, 11, mx.AlphaPoints, "α points")
	require.Equal(t, 3, mx.BetaValues, "β values")
	require.Len(t, mx.Points, 33, "points, 11 × 3")
	// Point 11 is the second run's first point: α −4°, β 0°.
	assert.Equal(t, -4.0, mx.Points[11].Alpha, "point 11: α, °")
	assert.Equal(t, 0.0, mx.Points[11].Beta, "point 11: β, °")
	// C_L = 1.3 at α ≥ 1.3/(5·π/180) − 1.5 = 13.4°: α 14 and 16 in each of 3 runs.
	assert.Equal(t, 6, mx.Stalled, "stalled points")
	if assert.Len(t, mx.Warnings, 1, "warnings") {
		assert.Contains(t, mx.Warnings[0], "α 14° to 16°", "stall warning")
	}
	_, err = table().Matrix(similarity.Sweep{From: 0, To: 12, Step: 2}, nil)
	assert.Contains(t, fieldsOf(t, err), "alpha", "sweep beyond the table")
	_, err = table().Matrix(similarity.Sweep{From: 0, To: 10, Step: 2}, &similarity.Sweep{From: 0, To: 10, Step: 5})
	assert.Contains(t, fieldsOf(t, err), "beta", "β beyond the table")
	_, err = orrin().Matrix(similarity.Sweep{From: -10, To: 10, Step: 0.1}, &similarity.Sweep{From: 0, To: 20, Step: 1})
	assert.Contains(t, fieldsOf(t, err), "beta", "201 × 21 points")
}
