package loads_test

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/internal/testfixture"
)

// sixComponent is a six-component balance invented for these tests (not a demo
// balance), with a gauge row.
func sixComponent() facilities.Balance {
	return facilities.Balance{
		ID: "six",
		Limits: facilities.Limits{Normal: fptr(10000), Axial: fptr(1600), Side: fptr(4400),
			RollingMoment: fptr(950), PitchingMoment: fptr(1250), YawingMoment: fptr(950)},
		Combined: []facilities.CombinedLimit{{Name: "forward gauge",
			Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": 4.0}, Limit: 5800}},
		SafetyFactor: 1.5,
	}
}

func onePoint(alpha float64, c facilities.Coefficients) []facilities.Point {
	return []facilities.Point{{Alpha: alpha, Coefficients: c}}
}

// TestLoadsSigns checks the sign conventions of docs/axes.md on cases worked by hand
// (S = 1 m², c = 1 m; g0 = 9.80665 m/s²), to 1e-9 N or N·m unless noted.
func TestLoadsSigns(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		in   loads.Installation
		pts  []facilities.Point
		q    float64 // Pa
		want loads.PointResult
		tol  float64 // 0: 1e-9
	}{
		// Pure lift at α = 0 with the moment reference centre 0.1 m ahead of the
		// balance: N = 1000 N; m = N·Δx = +100 N·m, nose-up.
		{"normal force ahead is nose-up", loads.Installation{BalanceOffset: loads.Offset{X: 0.1}},
			onePoint(0, facilities.Coefficients{CL: 1}), 1000, loads.PointResult{Normal: 1000, PitchingMoment: 100}, 0},
		// Pure drag at α = 0 with the reference centre 0.2 m above the balance:
		// A = 50 N aft; m = A·Δz = +10 N·m (drag above the centre pitches nose-up).
		{"axial force above is nose-up", loads.Installation{BalanceOffset: loads.Offset{Z: 0.2}},
			onePoint(0, facilities.Coefficients{CD: 0.05}), 1000, loads.PointResult{Axial: 50, PitchingMoment: 10}, 0},
		// Lift at α = 90°: the lift points along −x body, so A = −L = −1000 N, N = 0.
		{"lift at 90 degrees is forward axial", loads.Installation{},
			onePoint(90, facilities.Coefficients{CL: 1}), 1000, loads.PointResult{Alpha: 90, Axial: -1000}, 0},
		// Weight alone at α = 0: W = 10 kg·9.80665 = 98.0665 N down, N = −98.0665 N;
		// CG 0.2 m ahead: m = −98.0665·0.2 = −19.6133 N·m, nose-down.
		{"weight at alpha 0", loads.Installation{ModelMass: 10, CGOffset: loads.Offset{X: 0.2, Z: 0.1}},
			onePoint(0, facilities.Coefficients{CL: 1, CD: 1}), 0, loads.PointResult{Normal: -98.0665, PitchingMoment: -19.6133}, 0},
		// Weight alone at α = 90° (nose up, vertical): A = +98.0665 N (aft along the
		// body); CG 0.1 m above the balance: m = A·z = +9.80665 N·m.
		{"weight at alpha 90", loads.Installation{ModelMass: 10, CGOffset: loads.Offset{X: 0.2, Z: 0.1}},
			onePoint(90, facilities.Coefficients{}), 0, loads.PointResult{Alpha: 90, Axial: 98.0665, PitchingMoment: 9.80665}, 0},
		// Side force ahead of and above the balance: Y = 200 N to starboard,
		// n = Y·Δx = +60 N·m (nose to starboard), l = Y·Δz = +20 N·m (starboard down).
		{"side force transfer", loads.Installation{BalanceOffset: loads.Offset{X: 0.3, Z: 0.1}},
			onePoint(0, facilities.Coefficients{CY: 0.2}), 1000, loads.PointResult{Side: 200, YawingMoment: 60, RollingMoment: 20}, 0},
		// Drag at β = 10°: A = D·cos β = 984.808 N, Y = −D·sin β = −173.648 N.
		{"drag in sideslip", loads.Installation{},
			[]facilities.Point{{Beta: 10, Coefficients: facilities.Coefficients{CD: 1}}}, 1000,
			loads.PointResult{Beta: 10, Axial: 984.807753, Side: -173.648178}, 1e-6},
		// Wall correction: q_c = 1.1·q, so N = 1.1·1000 N and the point's q is 1100 Pa.
		{"corrected dynamic pressure", loads.Installation{},
			[]facilities.Point{{Coefficients: facilities.Coefficients{CL: 1}, DynamicPressureFactor: 1.1}}, 1000,
			loads.PointResult{Normal: 1100, DynamicPressure: 1100}, 0},
	}
	b := sixComponent()
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			lc := loads.Setup{ReferenceArea: 1, ReferenceLength: 1, Installation: c.in, Points: c.pts}
			r, err := lc.Check(&b, c.q)
			require.NoError(t, err)
			got := r.Points[0]
			tol := c.tol
			if tol == 0 {
				tol = 1e-9
			}
			assert.InDeltaSlice(t, components(c.want), components(got), tol,
				"normal, axial, side, rolling, pitching, yawing (N, N·m), worked by hand")
			if c.want.DynamicPressure != 0 {
				assert.Equal(t, c.want.DynamicPressure, got.DynamicPressure, "the point's q, Pa")
			}
		})
	}
}

// components returns the six loads of p in the order of loads.Vector.
func components(p loads.PointResult) []float64 {
	return []float64{p.Normal, p.Axial, p.Side, p.RollingMoment, p.PitchingMoment, p.YawingMoment}
}

// TestGaugeRowBinds: N = 6000 N (60 % of 10000) and m = 800 N·m (64 % of 1250), but
// the forward gauge 0.5·N + 4·m = 3000 + 3200 = 6200 N against 5800 N is 107 %.
func TestGaugeRowBinds(t *testing.T) {
	t.Parallel()
	b := sixComponent()
	lc := loads.Setup{ReferenceArea: 1, ReferenceLength: 1,
		Points: onePoint(0, facilities.Coefficients{CL: 6, Cm: 0.8})}
	r, err := lc.Check(&b, 1000)
	require.NoError(t, err)
	assert.Equal(t, "forward gauge", r.Limiting.Component, "limiting row")
	assert.InDelta(t, 6200.0/5800, r.MaxUtilization, 1e-12, "utilisation, worked by hand")
	assert.False(t, r.WithinLimits, "within limits at 107 % of a gauge rating")
	// The gauge reaches 5800/1.5 = 3866.7 N at q = 3866.7/6.2 Pa.
	assert.InDelta(t, 5800/1.5/6.2, float64(r.MaxSafeDynamicPressure), 1e-9, "max safe q Pa, worked by hand")
	assert.Equal(t, "forward gauge", r.MaxSafeLimiting.Component, "the row that sets the max safe q")
}

// randomCase builds a seeded random load case over a 21-point α sweep.
func randomCase(rng *rand.Rand, scale float64, weight bool) loads.Setup {
	lc := loads.Setup{ReferenceArea: 85 * scale * scale, ReferenceLength: 3.9 * scale,
		Installation: loads.Installation{
			BalanceOffset: loads.Offset{X: scale * (rng.Float64() - 0.5), Z: scale * (rng.Float64() - 0.5) * 0.2},
		}}
	if weight {
		lc.Installation.ModelMass = 5 + 40*rng.Float64()
		lc.Installation.CGOffset = loads.Offset{X: 0.1 * (rng.Float64() - 0.5), Z: 0.02 * (rng.Float64() - 0.5)}
	}
	for i := range 21 {
		a := -4 + float64(i)
		cl := 5.6 * (a + 1.5) * math.Pi / 180
		lc.Points = append(lc.Points, facilities.Point{Alpha: a, Beta: 4 * (rng.Float64() - 0.5), Coefficients: facilities.Coefficients{
			CL: cl, CD: 0.024 + 0.042*(cl-0.15)*(cl-0.15), Cm: 0.03 - 0.9*a*math.Pi/180,
			CY: 0.05 * (rng.Float64() - 0.5), Cl: 0.01 * (rng.Float64() - 0.5), Cn: 0.01 * (rng.Float64() - 0.5)}})
	}
	return lc
}

// TestLoadsScale: with weight and wall corrections off, forces scale exactly with
// q·s² and moments with q·s³ (offsets scaled with the model).
func TestLoadsScale(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	b := sixComponent()
	for trial := range 50 {
		s := 0.02 + 0.2*rng.Float64()
		k := 0.1 + 10*rng.Float64()
		q := 1000 + 50000*rng.Float64()
		seed := rng.Uint64()
		a := randomCase(rand.New(rand.NewPCG(seed, 3)), s, false)
		c := randomCase(rand.New(rand.NewPCG(seed, 3)), k*s, false)
		ra, err := a.Check(&b, q)
		require.NoError(t, err)
		rb, err := c.Check(&b, 2*q)
		require.NoError(t, err)
		for i := range ra.Points {
			pa, pb := ra.Points[i], rb.Points[i]
			for _, f := range []struct {
				name   string
				a, b   float64
				factor float64
			}{
				{"normal", pa.Normal, pb.Normal, 2 * k * k},
				{"axial", pa.Axial, pb.Axial, 2 * k * k},
				{"side", pa.Side, pb.Side, 2 * k * k},
				{"rolling", pa.RollingMoment, pb.RollingMoment, 2 * k * k * k},
				{"pitching", pa.PitchingMoment, pb.PitchingMoment, 2 * k * k * k},
				{"yawing", pa.YawingMoment, pb.YawingMoment, 2 * k * k * k},
			} {
				require.InDelta(t, f.b, f.a*f.factor, 1e-12*math.Abs(f.b)+1e-9, "trial %d α %g: %s × %.15g, exact scaling", trial, pa.Alpha, f.name, f.factor)
			}
		}
	}
}

// TestMaxSafeDynamicPressure: at the reported q the worst point sits exactly at
// 1/safety factor, with weight included.
func TestMaxSafeDynamicPressure(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(7, 11))
	b := sixComponent()
	for trial := range 100 {
		lc := randomCase(rng, 0.03+0.1*rng.Float64(), trial%2 == 0)
		r, err := lc.Check(&b, 1000)
		require.NoError(t, err)
		require.Positive(t, float64(r.MaxSafeDynamicPressure), "trial %d: max safe q Pa", trial)
		require.False(t, math.IsInf(float64(r.MaxSafeDynamicPressure), 0), "trial %d: a finite max safe q", trial)
		at, err := lc.Check(&b, float64(r.MaxSafeDynamicPressure))
		require.NoError(t, err)
		assert.InDelta(t, 1/1.5, at.MaxUtilization, 1e-9, "trial %d: utilisation at max safe q %g Pa: 1/safety factor", trial, r.MaxSafeDynamicPressure)
		assert.Equal(t, r.MaxSafeLimiting, at.Limiting, "trial %d: limiting at max safe q", trial)
	}
}

// overweight is a 12 kg model (W = 12 kg·9.80665 = 117.7 N) at α 0 on a balance
// rated for 100 N of normal force over a safety factor of 2: the weight alone is
// above the 50 N allowed.
func overweight() (facilities.Balance, loads.Setup) {
	return facilities.Balance{ID: "small", Limits: facilities.Limits{Normal: fptr(100)}, SafetyFactor: 2},
		loads.Setup{ReferenceArea: 0.1, ReferenceLength: 0.2,
			Installation: loads.Installation{ModelMass: 12}, Points: onePoint(0, facilities.Coefficients{CL: 0.5})}
}

func TestWeightAloneBreaks(t *testing.T) {
	t.Parallel()
	b, lc := overweight()
	r, err := lc.Check(&b, 10)
	require.NoError(t, err)
	assert.Zero(t, r.MaxSafeDynamicPressure, "max safe q Pa")
	assert.False(t, r.WithinLimits)
}

func TestUnlimitedJSON(t *testing.T) {
	t.Parallel()
	b := facilities.Balance{ID: "free"}
	lc := loads.Setup{ReferenceArea: 1, ReferenceLength: 1, Points: onePoint(0, facilities.Coefficients{CL: 1})}
	r, err := lc.Check(&b, 1000)
	require.NoError(t, err)
	require.True(t, math.IsInf(float64(r.MaxSafeDynamicPressure), 1), "max safe q %g with no ratings: +Inf", r.MaxSafeDynamicPressure)
	out, err := json.Marshal(r)
	require.NoError(t, err)
	assert.Contains(t, string(out), `"max_safe_dynamic_pressure":null`)
	assert.Equal(t, 1, strings.Count(string(out), "max_safe_dynamic_pressure\""), "max_safe_dynamic_pressure once in %s", out)
	assert.Contains(t, string(out), "model_mass not given", "the warning that the weight is left out")
}

func TestLoadErrors(t *testing.T) {
	t.Parallel()
	good := func() loads.Setup {
		return loads.Setup{ReferenceArea: 1, ReferenceLength: 1, Points: onePoint(0, facilities.Coefficients{CL: 1})}
	}
	cases := []struct {
		name  string
		mod   func(*loads.Setup, *facilities.Balance)
		q     float64
		field string
	}{
		{"negative mass", func(l *loads.Setup, _ *facilities.Balance) { l.Installation.ModelMass = -1 }, 1, "installation.model_mass"},
		{"NaN offset", func(l *loads.Setup, _ *facilities.Balance) { l.Installation.CGOffset.X = math.NaN() }, 1, "installation.cg_offset.x"},
		{"zero area", func(l *loads.Setup, _ *facilities.Balance) { l.ReferenceArea = 0 }, 1, "article.reference_area"},
		{"negative q", func(*loads.Setup, *facilities.Balance) {}, -5, "test.dynamic_pressure"},
		{"no points", func(l *loads.Setup, _ *facilities.Balance) { l.Points = nil }, 1, "alpha"},
		{"unknown gauge component", func(_ *loads.Setup, b *facilities.Balance) {
			b.Combined[0].Coefficients["lift"] = 1
		}, 1, "balance.combined[0].coefficients.lift"},
		{"safety factor below 1", func(_ *loads.Setup, b *facilities.Balance) { b.SafetyFactor = 0.5 }, 1, "balance.safety_factor"},
		{"zero rating", func(_ *loads.Setup, b *facilities.Balance) { b.Limits.Axial = fptr(0) }, 1, "balance.limits.axial"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			lc, b := good(), sixComponent()
			c.mod(&lc, &b)
			_, err := lc.Check(&b, c.q)
			assert.Contains(t, testfixture.InvalidFields(t, err), c.field)
		})
	}
}

func benchCase(n int) loads.Setup {
	lc := randomCase(rand.New(rand.NewPCG(3, 5)), 0.05, true)
	lc.Points = lc.Points[:min(n, len(lc.Points))]
	return lc
}

func BenchmarkSetupCheck21(b *testing.B) {
	lc := benchCase(21)
	bal := sixComponent()
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := lc.Check(&bal, 20000); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkRatingsMaxDynamicPressure21(b *testing.B) {
	lc := benchCase(21)
	bal := sixComponent()
	rs, err := loads.NewRatings(&bal)
	require.NoError(b, err)
	perQ := make([]loads.Vector, 21)
	weight := make([]loads.Vector, 21)
	for i := range perQ {
		perQ[i], weight[i] = lc.Affine(i)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		q := math.Inf(1)
		for i := range perQ {
			qi, _ := rs.MaxDynamicPressure(&perQ[i], &weight[i])
			q = min(q, qi)
		}
		if q <= 0 {
			b.Fatal(q)
		}
	}
}

func TestSafeDynamicPressure(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name             string
		u, w, allowed, q float64
	}{
		// |q·2 + 10| ≤ 100: q = (100 − 10)/2 = 45.
		{"growing, weight same sign", 2, 10, 100, 45},
		// |q·2 − 10| ≤ 100: q = (100 + 10)/2 = 55.
		{"growing, weight opposite", 2, -10, 100, 55},
		// |−2·q − 10| ≤ 100: q = (100 − 10)/2 = 45.
		{"falling, weight same sign", -2, -10, 100, 45},
		{"weight at the limit", 2, 100, 100, 0},
		{"weight beyond", 2, -101, 100, 0},
		{"no aerodynamic load", 0, 10, 100, math.Inf(1)},
	}
	for _, c := range cases {
		assert.Equal(t, c.q, loads.SafeDynamicPressure(c.u, c.w, c.allowed), "%s: q Pa, worked by hand", c.name)
	}
}

// TestWeightCancelledByLiftIsNotSafe: the wind-on load can cancel an overweight
// model's wind-off load, but the balance carries the weight alone before the tunnel
// starts and on the way up to the test's q (physics.md §8), so the check must fail.
// Worked by hand: W = 12 kg·9.80665 = 117.68 N, normal rating 100 N over a safety
// factor of 2 allows 50 N; at α = 0, N = q·S·C_L − W = 0 at q = 117.68/(0.1·0.5)
// = 2353.6 Pa.
func TestWeightCancelledByLiftIsNotSafe(t *testing.T) {
	t.Parallel()
	b, lc := overweight()
	q := 12 * 9.80665 / (0.1 * 0.5)
	r, err := lc.Check(&b, q)
	require.NoError(t, err)
	require.InDelta(t, 0, r.MaxUtilization, 1e-9, "wind-on utilisation at the cancelling q")
	assert.False(t, r.WithinLimits, "the weight alone is over the rating")
	assert.Zero(t, r.MaxSafeDynamicPressure, "max safe q Pa: the weight alone is over the rating")
	assert.Contains(t, strings.Join(r.Warnings, "\n"), "weight alone", "a warning about the weight alone")
}

// TestInstallationValidateBounds: the installation's own Validate refuses what the
// request validation refuses (its documented ranges), so a load check called
// without the request layer cannot take a 1 km offset or a 1e9 kg model.
func TestInstallationValidateBounds(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name  string
		in    loads.Installation
		field string
	}{
		{"offset beyond 100 m", loads.Installation{CGOffset: loads.Offset{X: 1e3}}, "installation.cg_offset.x"},
		{"balance offset not finite", loads.Installation{BalanceOffset: loads.Offset{Z: math.Inf(-1)}}, "installation.balance_offset.z"},
		{"model mass beyond 1e5 kg", loads.Installation{ModelMass: 1e9}, "installation.model_mass"},
		{"negative volume", loads.Installation{ModelVolume: -1}, "installation.model_volume"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			err := tc.in.Validate()
			var de *facilities.Error
			require.ErrorAs(t, err, &de)
			require.Len(t, de.Fields, 1)
			assert.Equal(t, tc.field, de.Fields[0].Field)
		})
	}
	assert.NoError(t, loads.Installation{ModelMass: 20, CGOffset: loads.Offset{X: 0.1, Z: -0.02}}.Validate())
}

// TestCheckMatchesPublicParts: Setup.Check, which takes each point's sine and
// cosine of α once for its loads, weight and uncertainty, gives each point's
// loads as q·perQ + weight from Affine and each uncertainty as
// CoefficientUncertainty, to the bit, over seeded random cases with and
// without weight (some points at q factor 0, which means 1).
func TestCheckMatchesPublicParts(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(31, 7))
	b := sixComponent()
	b.Accuracy = &facilities.Accuracy{FractionOfRating: 0.001, Components: &facilities.Limits{Side: fptr(3)}}
	for trial := range 40 {
		lc := randomCase(rng, 0.02+0.1*rng.Float64(), trial%2 == 0)
		for i := range lc.Points {
			if rng.IntN(3) > 0 {
				lc.Points[i].DynamicPressureFactor = 1 + 0.02*rng.Float64()
			}
		}
		q := 2e4 * rng.Float64()
		r, err := lc.Check(&b, q)
		require.NoError(t, err)
		d, known := loads.AccuracyOf(&b)
		require.Len(t, r.Uncertainty, len(lc.Points))
		for i, p := range lc.Points {
			perQ, w := lc.Affine(i)
			got := [6]float64{r.Points[i].Normal, r.Points[i].Axial, r.Points[i].Side,
				r.Points[i].RollingMoment, r.Points[i].PitchingMoment, r.Points[i].YawingMoment}
			for k := range got {
				assert.Equal(t, math.Float64bits(q*perQ[k]+w[k]), math.Float64bits(got[k]), "trial %d point %d component %d", trial, i, k)
			}
			u, unk := loads.CoefficientUncertainty(d, known, p.Alpha, r.Points[i].DynamicPressure, lc.ReferenceArea, lc.ReferenceLength)
			u.Alpha, u.Beta = p.Alpha, p.Beta
			assert.Equal(t, u, r.Uncertainty[i], "trial %d point %d", trial, i)
			assert.Equal(t, unk, r.UncertaintyUnknown)
		}
	}
}
