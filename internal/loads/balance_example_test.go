package loads_test

import (
	"fmt"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// A 0.3 m² model on the demo balance int-a of lsw-2, its moment reference centre
// 5 cm ahead of the balance centre, 12 kg, at two angles of attack. By hand at α 0:
// N = 3000·0.3·0.2 − 12·9.80665 = 180 − 117.68 = 62.32 N; A = 900·0.03 = 27 N;
// m = 900·0.25·0.04 + 180·0.05 = 9 + 9 = 18 N·m, 18/280 = 0.0643 of the rating. The
// output below is a regression value (the program's own output), checked by hand at α 0.
func ExampleSetup_Check() {
	f, _ := facilities.DemoFacility("lsw-2")
	lc := loads.Setup{ReferenceArea: 0.3, ReferenceLength: 0.25,
		Installation: loads.Installation{BalanceOffset: loads.Offset{X: 0.05}, ModelMass: 12},
		Points: []facilities.Point{
			{Alpha: 0, Coefficients: facilities.Coefficients{CL: 0.2, CD: 0.03, Cm: 0.04}},
			{Alpha: 12, Coefficients: facilities.Coefficients{CL: 1.2, CD: 0.09, Cm: -0.1}},
		}}
	r, err := lc.Check(&f.Balances[1], 3000)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range r.Points {
		fmt.Printf("α %g°: N %.4g N, A %.4g N, m %.4g N·m, %.3g of rating\n", p.Alpha, p.Normal, p.Axial, p.PitchingMoment, p.Utilization)
	}
	fmt.Printf("worst %s at α %g°; safe up to q %.4g Pa\n", r.Limiting.Component, r.Limiting.Alpha, r.MaxSafeDynamicPressure)
	// Output:
	// α 0°: N 62.32 N, A 27 N, m 18 N·m, 0.0643 of rating
	// α 12°: N 958.1 N, A -120.8 N, m 31.16 N·m, 0.266 of rating
	// worst normal at α 12°; safe up to q 7030 Pa
}
