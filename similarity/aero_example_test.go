package similarity_test

import (
	"fmt"

	"scalematch/facilities"
	"scalematch/similarity"
)

// The Orrin J16 estimate of the demo world at 4° and past the stall at 16°.
func ExampleAero_Coefficients() {
	a := similarity.Aero{LiftSlope: 4.9, ZeroLiftAlpha: -1.6, CLMax: 1.25, CDMin: 0.022,
		CLAtCDMin: 0.14, InducedDragFactor: 0.057, CmZero: 0.03, CmSlope: -1.05}
	for _, alpha := range []float64{4, 16} {
		c, stalled, err := a.Coefficients(alpha, 0)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("α %g°: C_L %.4g, C_D %.4g, C_m %.4g, stalled %v\n", alpha, c.CL, c.CD, c.Cm, stalled)
	}
	// The output below is a regression value (the program's own output).

	// Output:
	// α 4°: C_L 0.4789, C_D 0.02855, C_m -0.0433, stalled false
	// α 16°: C_L 1.25, C_D 0.09223, C_m -0.2632, stalled true
}

// The Orrin J16 at a fifth of its flight Reynolds number, Mach matched at 0.78,
// with a form factor of 1.15 chosen for the example.
func ExampleReynoldsEffect() {
	art := &similarity.Article{ReferenceLength: 2.4, ReferenceArea: 36.5, WettedArea: 228, FormFactor: 1.15}
	r, err := similarity.ReynoldsEffect(art, 12e6, 0.78, 2.4e6, 0.78, facilities.MediumAir)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("C_f flight %.4g, test %.4g: %+.4g counts; transition at %.2g of the chord; trips %v\n",
		r.SkinFrictionFlight, r.SkinFrictionTest, r.DeltaCDCounts, r.NaturalTransitionFraction, r.TripsRecommended)
	// The output below is a regression value (the program's own output).

	// Output:
	// C_f flight 0.002763, test 0.002993: +16.56 counts; transition at 0.21 of the chord; trips true
}
