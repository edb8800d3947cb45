package loads

import (
	"fmt"

	"scalematch/facilities"
)

// CautionFraction is the share of the allowed utilisation (1/safety factor) above
// which a load answer carries a caution naming the component and point (80 %).
const CautionFraction = 0.8

// The standing cautions of every answer that carries balance loads. They are exported
// so that callers and tests can recognise them; their wording is the contract.
const (
	// CautionWeightLeftOut goes with an answer whose loads leave the model's weight out.
	CautionWeightLeftOut = "The model's weight is left out of these balance loads (no model_mass given), which makes the load check unconservative: the balance carries the weight at every point, wind on and wind off. Give model_mass."
	// CautionStaticLoads goes with every answer that carries balance loads.
	CautionStaticLoads = "The balance loads are steady, static estimates from a linear lift curve and a parabolic drag polar: stall, buffet, tunnel start and stop transients and model vibration can load the balance well beyond them, and the safety factor is the only margin left for that and for the estimate's own error."
)

// Cautions returns the cautions that go with an answer for facility f and the
// given load reports, each worded to its danger:
//
//   - always facilities.CautionEstimate;
//   - with any load report, CautionStaticLoads;
//   - for each report whose worst point exceeds its allowed utilisation
//     (rating ÷ safety factor): that those points must not be run;
//   - for each report whose worst point is above CautionFraction of its allowed
//     utilisation but within it: how little margin is left;
//   - when any report leaves the model's weight out, CautionWeightLeftOut;
//   - for the facility (f may be nil), facilities.FacilityCautions: with any
//     load report in water, facilities.CautionWaterLoads among them.
func Cautions(f *facilities.Facility, reports ...Report) []string {
	out := []string{facilities.CautionEstimate}
	if len(reports) > 0 {
		out = append(out, CautionStaticLoads)
	}
	noWeight := false
	for _, r := range reports {
		switch {
		case r.MaxUtilization > r.AllowedUtilization*(1+1e-12):
			out = append(out, fmt.Sprintf("Balance %s: do not run the points above its allowed load. By this estimate %s reaches %.0f %% of its rating at α %.4g°, β %.4g°, beyond the %.0f %% allowed (rating ÷ safety factor %.3g); change the model scale, the dynamic pressure, the α range or the balance, and plan again.",
				r.BalanceID, r.Limiting.Component, 100*r.MaxUtilization, r.Limiting.Alpha, r.Limiting.Beta,
				100*r.AllowedUtilization, r.SafetyFactor))
		case r.MaxUtilization > CautionFraction*r.AllowedUtilization:
			out = append(out, fmt.Sprintf("Balance %s: %s reaches %.0f %% of its rating at α %.4g°, β %.4g° (%.0f %% of the %.0f %% allowed, rating ÷ safety factor %.3g): within the allowed load by this estimate only, with the safety factor as the only margin left for the estimate's error.",
				r.BalanceID, r.Limiting.Component, 100*r.MaxUtilization, r.Limiting.Alpha, r.Limiting.Beta,
				100*r.MaxUtilization/r.AllowedUtilization, 100*r.AllowedUtilization, r.SafetyFactor))
		}
		noWeight = noWeight || !r.WeightIncluded
	}
	if noWeight {
		out = append(out, CautionWeightLeftOut)
	}
	return append(out, facilities.FacilityCautions(f, len(reports) > 0)...)
}
