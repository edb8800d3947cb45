package loads_test

import (
	"fmt"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// The ceiling a balance puts on the free-stream dynamic pressure of a Pellin P3
// model, for two model scales in the demo tunnel lsw-2.
func ExampleLimit_MaxDynamicPressure() {
	art := &similarity.Article{ReferenceLength: 1.42, ReferenceArea: 13.4, Span: 9.6, FrontalArea: 1.7,
		Aero: similarity.Aero{LiftSlope: 5.1, ZeroLiftAlpha: -2.4, CLMax: 1.55, CDMin: 0.029,
			CLAtCDMin: 0.12, InducedDragFactor: 0.052, CmZero: 0.04, CmSlope: -0.75}}
	mx, err := art.Aero.Matrix(similarity.Sweep{From: -4, To: 16, Step: 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	f, _ := facilities.DemoFacility("lsw-2")
	ll, err := loads.NewLimit(art, &f, loads.Installation{BalanceID: "int-a", ModelMass: 15}, mx)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range []float64{0.1, 0.2} {
		fmt.Printf("scale %g: q ≤ %.4g Pa\n", s, ll.MaxDynamicPressure(s, facilities.State{Mach: 0.2}))
	}
	// The output below is a regression value (the program's own output).

	// Output:
	// scale 0.1: q ≤ 1.002e+04 Pa
	// scale 0.2: q ≤ 2478 Pa
}
