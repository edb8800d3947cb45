package app_test

import (
	"context"
	"fmt"
	"os"

	"scalematch/api/schema"
	"scalematch/internal/app"
	"scalematch/internal/unitjson"
)

// ExamplePlanner_Plan plans the Orrin J16 of the demo world at cruise (M 0.78 at
// 12 000 m) in the transonic demo tunnel tsw-1 on balance int-b1, as POST /v1/plans
// and `scalematch plan` do.
func ExamplePlanner_Plan() {
	body, err := os.ReadFile("testdata/j16-tsw-1-cruise.json")
	if err != nil {
		fmt.Println(err)
		return
	}
	var req schema.PlanRequest
	if err := unitjson.Decode(body, &req); err != nil {
		fmt.Println(err)
		return
	}
	var p app.Planner // the demo catalog
	plan, err := p.Plan(context.Background(), &req)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("scale 1:%.4g, test M %.4g at q %.4g Pa\n", 1/plan.Model.Scale, plan.Test.Mach, plan.Test.DynamicPressure)
	fmt.Printf("Re test/flight %.4g\n", plan.Mismatch.ReynoldsRatio)
	for _, b := range plan.Binding {
		fmt.Printf("binding %s: %+.3g %% Re per 1 %%\n", b.Constraint, b.ReynoldsGainPerPercent)
	}
	fmt.Printf("balance %s at %.4g of its rating (%s at α %g°), %.4g allowed\n", plan.Loads.BalanceID,
		plan.Loads.MaxUtilization, plan.Loads.Limiting.Component, plan.Loads.Limiting.Alpha, plan.Loads.AllowedUtilization)
	// The output below is a regression value (the program's own output).

	// Output:
	// scale 1:25.31, test M 0.775 at q 5.4e+04 Pa
	// Re test/flight 0.1967
	// binding balance: +0.499 % Re per 1 %
	// binding max_dynamic_pressure: +0.499 % Re per 1 %
	// binding stagnation_temperature_min: +1.31 % Re per 1 %
	// balance int-b1 at 0.6667 of its rating (axial at α 16°), 0.6667 allowed
}
