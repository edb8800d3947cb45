package similarity_test

import (
	"fmt"

	"scalematch/facilities"
	"scalematch/similarity"
)

// The Orrin J20 estimate of the demo world at 4° and past the stall at 16°.
func ExampleAero_Coefficients() {
	a := similarity.Aero{LiftSlope: 5.0, ZeroLiftAlpha: -1.5, CLMax: 1.3, CDMin: 0.021,
		CLAtCDMin: 0.15, InducedDragFactor: 0.055, CmZero: 0.02, CmSlope: -1.1}
	for _, alpha := range []float64{4, 16} {
		c, stalled, err := a.Coefficients(alpha, 0)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("α %g°: C_L %.4g, C_D %.4g, C_m %.4g, stalled %v\n", alpha, c.CL, c.CD, c.Cm, stalled)
	}
	// Output:
	// α 4°: C_L 0.48, C_D 0.02699, C_m -0.05679, stalled false
	// α 16°: C_L 1.3, C_D 0.09374, C_m -0.2872, stalled true
}

// The Orrin J20 at a quarter of its flight Reynolds number, Mach matched at 0.8.
func ExampleReynoldsEffect() {
	art := &similarity.Article{ReferenceLength: 2.6, ReferenceArea: 50, WettedArea: 290, FormFactor: 1.2}
	r, err := similarity.ReynoldsEffect(art, 12e6, 0.8, 3e6, 0.8, facilities.MediumAir)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("C_f flight %.4g, test %.4g: %+.4g counts; transition at %.2g of the chord; trips %v\n",
		r.SkinFrictionFlight, r.SkinFrictionTest, r.DeltaCDCounts, r.NaturalTransitionFraction, r.TripsRecommended)
	// Output:
	// C_f flight 0.002755, test 0.002972: +15.09 counts; transition at 0.17 of the chord; trips true
}

// The ceiling a balance puts on the free-stream dynamic pressure of a Pellin P2
// model, for two model scales in the demo tunnel lsw-2.
func ExampleBalanceLimit_MaxDynamicPressure() {
	art := &similarity.Article{ReferenceLength: 1.45, ReferenceArea: 12.5, Span: 8.8, FrontalArea: 1.9,
		Aero: similarity.Aero{LiftSlope: 5.2, ZeroLiftAlpha: -2.5, CLMax: 1.6, CDMin: 0.028,
			CLAtCDMin: 0.10, InducedDragFactor: 0.050, CmZero: 0.04, CmSlope: -0.8}}
	mx, err := art.Aero.Matrix(similarity.Sweep{From: -4, To: 16, Step: 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	f, _ := facilities.DemoFacility("lsw-2")
	ll, err := similarity.NewLoadLimit(art, &f, facilities.Installation{BalanceID: "int-a", ModelMass: 15}, mx)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range []float64{0.1, 0.2} {
		fmt.Printf("scale %g: q ≤ %.4g Pa\n", s, ll.MaxDynamicPressure(s, facilities.State{Mach: 0.2}))
	}
	// Output:
	// scale 0.1: q ≤ 1.148e+04 Pa
	// scale 0.2: q ≤ 2839 Pa
}
