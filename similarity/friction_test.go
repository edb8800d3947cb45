package similarity_test

import (
	"math"
	"strings"
	"testing"

	"scalematch/facilities"
	"scalematch/similarity"
)

// TestSkinFrictionLaws checks each law against its formula worked by hand.
func TestSkinFrictionLaws(t *testing.T) {
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
		// With transition at 5·10⁵ (Schlichting): 0.0030037131 − 1700/10⁷ = 0.0028337131.
		{"transitional 1e7", similarity.TransitionalSkinFriction(1e7), 0.0028337131, 1e-10},
		// Below Re_tr the plate is laminar: Blasius at 10⁵ = 1.328/316.227766 = 0.0041995047.
		{"transitional below Re_tr", similarity.TransitionalSkinFriction(1e5), 0.0041995047, 1e-10},
		// ITTC 1957 line: 0.075/(7 − 2)² = 0.075/25 = 0.0030 exactly.
		{"ITTC 1957 1e7", similarity.ITTC1957(1e7), 0.0030, 1e-15},
		// (1 + 0.144·0.64)^−0.65 = 1.09216^−0.65 = 0.94430856 (Raymer; common practice).
		{"compressibility M 0.8", similarity.CompressibilityFactor(0.8), 0.94430856, 1e-8},
		{"compressibility M 0", similarity.CompressibilityFactor(0), 1, 0},
		{"transition fraction 3e6", similarity.TransitionFraction(3e6), 5e5 / 3e6, 1e-15},
		{"transition fraction laminar", similarity.TransitionFraction(1e5), 1, 0},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s = %.10g, want %.10g ± %g", c.name, c.got, c.want, c.tol)
		}
	}
}

// orrinArticle is the Orrin J20 of the demo world with a form factor of 1.2.
func orrinArticle() *similarity.Article {
	return &similarity.Article{ReferenceLength: 2.6, ReferenceArea: 50, Span: 19, Length: 20,
		FrontalArea: 5.5, WettedArea: 290, FormFactor: 1.2, Aero: orrin()}
}

// TestReynoldsEffect: the Orrin J20 at Re 12·10⁶ in flight and a quarter of that in
// the tunnel, both at M 0.8 (compressibility factor 0.94430856):
//
//	C_f,flight  = 0.455/(log10 1.2e7)^2.58·k             = 0.0027553013
//	C_f,test    = (0.455/(log10 3e6)^2.58 − 1700/3e6)·k  = 0.0029303423
//	C_f,tripped = 0.455/(log10 3e6)^2.58·k               = 0.0034654504
//	ΔC_D = (C_f,test − C_f,flight)·1.2·290/50 = 12.18 counts; tripped 49.43 counts
//	transition: model 5e5/3e6 = 16.7 % (> 10 %), flight 4.2 % (< 5 %): trips
func TestReynoldsEffect(t *testing.T) {
	cases := []struct {
		name                  string
		reF, mF, reT, mT      float64
		medium                string
		line                  string
		cfF, cfT, counts, tol float64
		trips                 bool
	}{
		{"transonic quarter Reynolds", 12e6, 0.8, 3e6, 0.8, facilities.MediumAir, similarity.LinePrandtlSchlichting,
			0.0027553013, 0.0029303423, 12.182849, 1e-6, true},
		{"Reynolds nearly matched", 12e6, 0.8, 11e6, 0.8, facilities.MediumAir, similarity.LinePrandtlSchlichting,
			0.0027553013, 0, 0, 0, false},
		// Water: ITTC 1957 for both; 10⁶ gives 0.075/16 = 0.0046875 and 10⁷ gives 0.003:
		// ΔC_D = 0.0016875·1.2·290/50 = 117.45 counts. Full-scale transition at
		// 5e5/1e7 = 5 % is not ahead of the 5 % threshold: no trips.
		{"water", 1e7, 0, 1e6, 0, facilities.MediumWater, similarity.LineITTC1957,
			0.003, 0.0046875, 117.45, 1e-9, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := similarity.ReynoldsEffect(orrinArticle(), c.reF, c.mF, c.reT, c.mT, c.medium)
			if err != nil {
				t.Fatal(err)
			}
			if r.Line != c.line || r.TripsRecommended != c.trips {
				t.Errorf("line %s trips %v, want %s %v", r.Line, r.TripsRecommended, c.line, c.trips)
			}
			if math.Abs(r.SkinFrictionFlight-c.cfF) > 1e-10 {
				t.Errorf("C_f flight = %.10g, want %.10g", r.SkinFrictionFlight, c.cfF)
			}
			if c.tol > 0 && (math.Abs(r.SkinFrictionTest-c.cfT) > 1e-10 || math.Abs(r.DeltaCDCounts-c.counts) > c.tol) {
				t.Errorf("C_f test = %.10g, ΔC_D = %.8g counts; want %.10g, %.8g", r.SkinFrictionTest, r.DeltaCDCounts, c.cfT, c.counts)
			}
			if c.trips && !strings.Contains(strings.Join(r.Notes, " "), "trips") {
				t.Errorf("notes %q do not explain the trips", r.Notes)
			}
		})
	}
}

func TestReynoldsEffectErrors(t *testing.T) {
	a := orrinArticle()
	a.WettedArea = 0
	_, err := similarity.ReynoldsEffect(a, 1e7, 0.5, 1e6, 0.5, facilities.MediumAir)
	if fs := fieldsOf(t, err); !contains(fs, "article.wetted_area") {
		t.Errorf("fields %q, want article.wetted_area", fs)
	}
	_, err = similarity.ReynoldsEffect(orrinArticle(), math.NaN(), 0.5, 1e6, -1, facilities.MediumAir)
	if fs := fieldsOf(t, err); !contains(fs, "flight.reynolds") || !contains(fs, "test.mach") {
		t.Errorf("fields %q, want flight.reynolds and test.mach", fs)
	}
}
