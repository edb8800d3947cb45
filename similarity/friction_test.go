package similarity_test

import (
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// TestSkinFrictionLaws checks each law against its formula worked by hand and,
// where named, a published value.
func TestSkinFrictionLaws(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		// Blasius (Schlichting, Boundary-Layer Theory): 1.328/√10⁶ = 0.001328.
		{"Blasius 1e6", similarity.LaminarSkinFriction(1e6), 0.001328, 1e-15},
		// Prandtl–Schlichting (Schlichting): 0.455/7^2.58 = 0.0030037131, from the formula;
		// Schlichting's curve reads about 0.0030 at 10⁷ (from memory).
		{"Prandtl-Schlichting 1e7", similarity.TurbulentSkinFriction(1e7), 0.0030037131, 1e-10},
		// 0.455/6^2.58 = 0.0044707581, from the formula.
		{"Prandtl-Schlichting 1e6", similarity.TurbulentSkinFriction(1e6), 0.0044707581, 1e-10},
		// Schlichting's figure of the flat-plate laws reads 0.0045 at 10⁶, 0.0030 at
		// 10⁷ and 0.0021 at 10⁸ for the Prandtl–Schlichting line (from memory; read
		// off a log plot, so ± 0.00005).
		{"Prandtl-Schlichting 1e6 textbook", similarity.TurbulentSkinFriction(1e6), 0.0045, 5e-5},
		{"Prandtl-Schlichting 1e7 textbook", similarity.TurbulentSkinFriction(1e7), 0.0030, 5e-5},
		{"Prandtl-Schlichting 1e8 textbook", similarity.TurbulentSkinFriction(1e8), 0.0021, 5e-5},
		// A = 5e5·(0.455/5.69897^2.58 − 1.328/707.107) = 5e5·(0.0051057172 − 0.0018780756) = 1613.82.
		{"transition constant 5e5", similarity.TransitionConstant(5e5), 1613.8208, 1e-3},
		// With transition at 5·10⁵: 0.0030037131 − 1613.8208/10⁷ = 0.0028423310.
		{"transitional 1e7", similarity.TransitionalSkinFriction(1e7), 0.0028423310, 1e-10},
		// Below Re_tr the plate is laminar: Blasius at 10⁵ = 1.328/316.227766 = 0.0041995047.
		{"transitional below Re_tr", similarity.TransitionalSkinFriction(1e5), 0.0041995047, 1e-10},
		// ITTC 1957 line: 0.075/(7 − 2)² = 0.075/25 = 0.0030 exactly, the published
		// check value of the line (ITTC 1957; ITTC Recommended Procedure 7.5-02-02-02).
		{"ITTC 1957 1e7", similarity.ITTC1957(1e7), 0.0030, 1e-15},
		// (1 + 0.144·0.64)^−0.65 = 1.09216^−0.65 = 0.94430856 (Raymer; common practice).
		{"compressibility M 0.8", similarity.CompressibilityFactor(0.8), 0.94430856, 1e-8},
		{"compressibility M 0", similarity.CompressibilityFactor(0), 1, 0},
		// Reference temperature at M 0.8 (White, Viscous Fluid Flow, §7-3; from memory):
		// T_aw/T_e = 1 + 0.8485·0.2·0.64 = 1.108608; T*/T_e = 0.5 + 0.039·0.64 +
		// 0.5·1.108608 = 1.079264; factor 1.079264^(−0.12) = 0.99088825.
		{"laminar compressibility M 0.8", similarity.LaminarCompressibilityFactor(0.8), 0.99088825, 1e-8},
		{"laminar compressibility M 0", similarity.LaminarCompressibilityFactor(0), 1, 0},
		{"transition fraction 3e6", similarity.TransitionFraction(3e6), 5e5 / 3e6, 1e-15},
		{"transition fraction laminar", similarity.TransitionFraction(1e5), 1, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			assert.InDelta(t, c.want, c.got, c.tol)
		})
	}
}

// TestTransitionConstantSchlichting compares A(Re_tr) with the table of the
// transitional law in Schlichting, Boundary-Layer Theory, ch. 21 (from memory):
// Re_tr 3·10⁵, 5·10⁵, 10⁶, 3·10⁶ give A = 1050, 1700, 3300, 8700. The formula,
// which keeps C_f continuous at Re_tr, gives 970, 1614, 3143, 8709: within 8 %.
func TestTransitionConstantSchlichting(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name      string
		reTr, a   float64
		tolPerCnt float64
	}{
		{"3e5", 3e5, 1050, 8},
		{"5e5", 5e5, 1700, 6},
		{"1e6", 1e6, 3300, 5},
		{"3e6", 3e6, 8700, 0.5},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			got := similarity.TransitionConstant(c.reTr)
			assert.InDelta(t, 0, 100*(got/c.a-1), c.tolPerCnt, "A = %.1f", got)
		})
	}
}

// TestTransitionalContinuity: the natural-transition law has no step at Re_tr, in
// a liquid (factors 1) and in a gas at M 0.8 (laminar and turbulent factors
// differ). The old water line jumped from Blasius 1.328/√(5e5) = 0.001878 to ITTC
// 0.075/(log10 5e5 − 2)² = 0.005482 there (2.92×).
func TestTransitionalContinuity(t *testing.T) {
	t.Parallel()
	kl, kt := similarity.LaminarCompressibilityFactor(0.8), similarity.CompressibilityFactor(0.8)
	cases := []struct {
		name   string
		kl, kt float64
	}{{"incompressible", 1, 1}, {"M 0.8", kl, kt}}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			below := similarity.CompressibleTransitionalSkinFriction(similarity.TransitionReynolds*(1-1e-9), c.kl, c.kt)
			above := similarity.CompressibleTransitionalSkinFriction(similarity.TransitionReynolds*(1+1e-9), c.kl, c.kt)
			assert.InDelta(t, 0, above/below-1, 1e-8)
			// and the law rises back towards the turbulent line above Re_tr:
			// 2·Re_tr is above Blasius there and below the fully turbulent value.
			mid := similarity.CompressibleTransitionalSkinFriction(2*similarity.TransitionReynolds, c.kl, c.kt)
			assert.Greater(t, mid, c.kl*similarity.LaminarSkinFriction(2*similarity.TransitionReynolds))
			assert.Less(t, mid, c.kt*similarity.TurbulentSkinFriction(2*similarity.TransitionReynolds))
		})
	}
}

// frictionArticle is an aircraft invented for these tests (not a demo aircraft):
// form factor 1.2, wetted area 145 m² on a 25 m² reference area, so
// FF·S_wet/S_ref = 6.96; with the Orrin J16's aerodynamic estimate.
func frictionArticle() *similarity.Article {
	return &similarity.Article{ReferenceLength: 1.8, ReferenceArea: 25, Span: 13, Length: 14,
		FrontalArea: 2.3, WettedArea: 145, FormFactor: 1.2, Aero: orrin()}
}

// TestReynoldsEffect: the test article at Re 12·10⁶ in flight and a quarter of that in
// the tunnel, both at M 0.8 (turbulent factor k_t = 0.94430856, laminar factor
// k_l = 0.99088825):
//
//	C_f,flight  = 0.455/(log10 1.2e7)^2.58·k_t                          = 0.0027553013
//	C_f,test    = k_t·0.455/(log10 3e6)^2.58 − (5e5/3e6)·(k_t·0.0051057172 − k_l·0.0018780756)
//	            = 0.0034654504 − 0.1666667·(0.0048213593 − 0.0018609655) = 0.0029720489
//	C_f,tripped = 0.455/(log10 3e6)^2.58·k_t                            = 0.0034654504
//	ΔC_D = (C_f,test − C_f,flight)·1.2·145/25 = 15.0856 counts; tripped 49.4264 counts
//	transition: model 5e5/3e6 = 16.7 % (> 10 %), full scale turbulent: trips
//
// In water (no compressibility) at Re 10⁷ full scale and 10⁶ on the model, the
// model with natural transition takes the transitional law in water too:
//
//	C_f,test = 0.0044707581 − 1613.8208/10⁶ = 0.0028569373
//	default line:  C_f,flight = 0.0030037131, ΔC_D = −0.0001467758·6.96 = −10.2156 counts;
//	               tripped 0.0044707581: ΔC_D = 0.0014670450·6.96 = 102.1063 counts
//	ITTC 1957 chosen: C_f,flight = 0.0030,   ΔC_D = −0.0001430627·6.96 = −9.9572 counts;
//	                  tripped 0.075/16 = 0.0046875: ΔC_D = 0.0016875·6.96 = 117.45 counts
func TestReynoldsEffect(t *testing.T) {
	t.Parallel()
	ittc := frictionArticle()
	ittc.FrictionLine = similarity.LineITTC1957
	natural := frictionArticle()
	natural.FullScaleBoundaryLayer = similarity.BoundaryLayerNatural
	cases := []struct {
		name                      string
		art                       *similarity.Article
		reF, mF, reT, mT          float64
		medium                    string
		line, layer               string
		cfF, cfT, counts, tripped float64
		tolCf, tolCounts          float64
		trips                     bool
	}{
		{"transonic quarter Reynolds", frictionArticle(), 12e6, 0.8, 3e6, 0.8, facilities.MediumAir,
			similarity.LinePrandtlSchlichting, similarity.BoundaryLayerTurbulent,
			0.0027553013, 0.0029720489, 15.0856, 49.4264, 1e-10, 1e-4, true},
		// Natural transition at full scale too (transitional law at 1.2e7, M 0.8):
		// k_t·PS(1.2e7) − (5e5/1.2e7)·(k_t·0.0051057172 − k_l·0.0018780756)
		// = 0.0027553013 − 0.0416667·0.0029603938 = 0.0026319509;
		// ΔC_D = (0.0029720489 − 0.0026319509)·6.96e4 = 23.6708 counts,
		// tripped (0.0034654504 − 0.0026319509)·6.96e4 = 58.0116 counts.
		{"natural transition at full scale", natural, 12e6, 0.8, 3e6, 0.8, facilities.MediumAir,
			similarity.LinePrandtlSchlichting, similarity.BoundaryLayerNatural,
			0.0026319509, 0.0029720489, 23.6708, 58.0116, 1e-10, 1e-3, true},
		{"water, default line", frictionArticle(), 1e7, 0, 1e6, 0, facilities.MediumWater,
			similarity.LinePrandtlSchlichting, similarity.BoundaryLayerTurbulent,
			0.0030037131, 0.0028569373, -10.2156, 102.1063, 1e-10, 1e-3, true},
		{"water, ITTC 1957 chosen", ittc, 1e7, 0, 1e6, 0, facilities.MediumWater,
			similarity.LineITTC1957, similarity.BoundaryLayerTurbulent,
			0.0030, 0.0028569373, -9.9572, 117.45, 1e-10, 1e-3, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			r, err := similarity.ReynoldsEffect(c.art, c.reF, c.mF, c.reT, c.mT, c.medium)
			require.NoError(t, err)
			assert.Equal(t, c.line, r.Line)
			assert.Equal(t, c.layer, r.FullScaleBoundaryLayer)
			assert.Equal(t, c.trips, r.TripsRecommended)
			assert.InDelta(t, c.cfF, r.SkinFrictionFlight, c.tolCf)
			assert.InDelta(t, c.cfT, r.SkinFrictionTest, c.tolCf)
			assert.InDelta(t, c.counts, r.DeltaCDCounts, c.tolCounts)
			assert.InDelta(t, c.tripped, r.DeltaCDCountsTripped, c.tolCounts)
			if c.trips {
				assert.Contains(t, strings.Join(r.Notes, " "), "trips")
			}
		})
	}
}

// TestReynoldsEffectWaterTransitional reproduces the water-tunnel case of the
// physics review: a wtn-04 plan with the model at Re 7·10⁵ (natural transition at
// 5e5/7e5 = 0.714 of the length) and, rebuilt from the figures reported, the full
// scale at Re 3.67·10⁶ on the ITTC line and FF·S_wet/S_ref = 2.65.
//
//	log10 7e5 = 5.8450980, log10 3.67e6 = 6.5646661
//	ITTC(7e5)   = 0.075/3.8450980² = 0.0050727847
//	ITTC(3.67e6) = 0.075/4.5646661² = 0.0035995088
//	old model (ITTC on the model above 5e5): (0.0050727847 − 0.0035995088)·2.65e4 = +39.04 counts
//	transitional law: 0.455/5.8450980^2.58 − A/7e5 = 0.0047828697 − 1613.8208/7e5
//	                = 0.0047828697 − 0.0023054583 = 0.0024774114
//	new, ITTC line chosen for the full scale: (0.0024774114 − 0.0035995088)·2.65e4 = −29.74 counts
//	new, default line: PS(3.67e6) = 0.0035448902: (0.0024774114 − 0.0035448902)·2.65e4 = −28.29 counts
//
// With Schlichting's tabulated A = 1700 in place of the continuous 1613.8 the
// transitional C_f is 0.0047828697 − 0.0024285714 = 0.0023542983 and ΔC_D −33.00
// counts, the review's figure.
func TestReynoldsEffectWaterTransitional(t *testing.T) {
	t.Parallel()
	art := &similarity.Article{ReferenceArea: 1, WettedArea: 2.65}
	ittc := *art
	ittc.FrictionLine = similarity.LineITTC1957
	cases := []struct {
		name   string
		art    *similarity.Article
		counts float64
	}{
		{"ITTC 1957 chosen for the full scale", &ittc, -29.7356},
		{"default line", art, -28.2882},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			r, err := similarity.ReynoldsEffect(c.art, 3.67e6, 0, 7e5, 0, facilities.MediumWater)
			require.NoError(t, err)
			assert.InDelta(t, 0.714286, r.NaturalTransitionFraction, 1e-6)
			assert.InDelta(t, 0.0024774114, r.SkinFrictionTest, 1e-10)
			assert.InDelta(t, c.counts, r.DeltaCDCounts, 1e-3)
		})
	}
	// The old answer, from the laws the old model used, for the record.
	old := (similarity.ITTC1957(7e5) - similarity.ITTC1957(3.67e6)) * 2.65e4
	assert.InDelta(t, 39.04, old, 0.01)
	schlichting := (similarity.TurbulentSkinFriction(7e5) - 1700/7e5 - similarity.ITTC1957(3.67e6)) * 2.65e4
	assert.InDelta(t, -33.00, schlichting, 0.01)
}

func TestReynoldsEffectErrors(t *testing.T) {
	t.Parallel()
	a := frictionArticle()
	a.WettedArea = 0
	_, err := similarity.ReynoldsEffect(a, 1e7, 0.5, 1e6, 0.5, facilities.MediumAir)
	assert.Contains(t, fieldsOf(t, err), "article.wetted_area")
	_, err = similarity.ReynoldsEffect(frictionArticle(), math.NaN(), 0.5, 1e6, -1, facilities.MediumAir)
	fs := fieldsOf(t, err)
	assert.Contains(t, fs, "flight.reynolds")
	assert.Contains(t, fs, "test.mach")
}

func TestReynoldsEffectSettingErrors(t *testing.T) {
	t.Parallel()
	a := frictionArticle()
	a.FrictionLine = "schoenherr"
	a.FullScaleBoundaryLayer = "laminar"
	_, err := similarity.ReynoldsEffect(a, 1e7, 0.5, 1e6, 0.5, facilities.MediumAir)
	fs := fieldsOf(t, err)
	assert.Contains(t, fs, "article.friction_line")
	assert.Contains(t, fs, "article.full_scale_boundary_layer")
}
