package loads

import (
	"fmt"
	"strings"

	"scalematch/facilities"
	"scalematch/internal/check"
)

// CheckAll returns the load check of every balance of facility f, in the
// facility's order; ErrNoBalance when it has none.
func CheckAll(lc *Setup, f *facilities.Facility, q float64) ([]Report, error) {
	if len(f.Balances) == 0 {
		return nil, ErrNoBalance
	}
	out := make([]Report, len(f.Balances))
	// The points' sines and loads do not depend on the balance: with
	// several balances they are taken once for all (each check took them
	// again).
	var pre []pointLoads
	if len(f.Balances) > 1 {
		pre = lc.pointsLoads()
	}
	for i := range f.Balances {
		r, err := lc.checkWith(&f.Balances[i], q, i, pre)
		if err != nil {
			return nil, err
		}
		out[i] = r
	}
	return out, nil
}

// Choice is the balance a load check settled on, with the reason in a
// sentence for the plan, and the checks of every balance considered.
type Choice struct {
	Report Report
	Reason string
	All    []Report
}

// Choose checks the installation's named balance, or, when none is named, picks
// among the facility's balances: with a required resolution
// (Setup.Resolution), of the balances that keep every point within
// the allowed loads, the one that resolves it with the most margin; otherwise
// (or when none resolves it) the one with the highest peak utilisation that
// still keeps every point at or under the allowed load: the most heavily used
// balance that is safe resolves the loads best. A named balance that does not exist
// is a check.CodeInvalid error on installation.balance_id; no balance that can carry the
// loads is a check.CodeUnprocessable error naming the "balance" limit; a facility without
// balances is ErrNoBalance.
func Choose(lc *Setup, f *facilities.Facility, q float64) (Choice, error) {
	if id := lc.Installation.BalanceID; id != "" {
		for i := range f.Balances {
			if f.Balances[i].ID != id {
				continue
			}
			r, err := lc.checkWith(&f.Balances[i], q, i, nil)
			if err != nil {
				return Choice{}, err
			}
			return Choice{Report: r, Reason: "balance " + id + " as requested", All: []Report{r}}, nil
		}
		ids := make([]string, len(f.Balances))
		for i, b := range f.Balances {
			ids[i] = b.ID
		}
		return Choice{}, &check.Error{Code: check.CodeInvalid, Message: "unknown balance",
			Fields: []check.FieldError{{Field: "installation.balance_id", Message: fmt.Sprintf("facility %s has no balance %q; it has: %s", f.ID, id, strings.Join(ids, ", "))}}}
	}
	all, err := CheckAll(lc, f, q)
	if err != nil {
		return Choice{}, err
	}
	best := -1
	for i, r := range all {
		if r.WithinLimits && (best < 0 || r.MaxUtilization > all[best].MaxUtilization) {
			best = i
		}
	}
	if fine := finestResolving(all); fine >= 0 {
		r := all[fine]
		reason := fmt.Sprintf("balance %s chosen: of the balances that keep every point within the allowed loads by this estimate, it resolves the required resolution with the most margin (%.3g: the least dynamic pressure it needs is %.4g Pa), at %.0f %% peak utilisation (%s at α %.4g°, allowed %.0f %%)",
			r.BalanceID, r.Resolution.Margin, r.Resolution.MinDynamicPressure, 100*r.MaxUtilization, r.Limiting.Component, r.Limiting.Alpha, 100*r.AllowedUtilization)
		return Choice{Report: r, Reason: reason, All: all}, nil
	}
	if best < 0 {
		parts := make([]string, len(all))
		for i, r := range all {
			parts[i] = fmt.Sprintf("%s reaches %.0f %% of its %s rating at α %.4g° (allowed %.0f %%)",
				r.BalanceID, 100*r.MaxUtilization, r.Limiting.Component, r.Limiting.Alpha, 100*r.AllowedUtilization)
		}
		return Choice{All: all}, &check.Error{Code: check.CodeUnprocessable,
			Message: "no balance of facility " + f.ID + " can carry the loads: " + strings.Join(parts, "; "),
			Limits:  []string{facilities.ConstraintBalance}}
	}
	r := all[best]
	reason := fmt.Sprintf("balance %s chosen: at %.0f %% peak utilisation (%s at α %.4g°, allowed %.0f %%) it is the most heavily used balance that keeps every point within the allowed loads by this estimate (the safety factor is the only margin left for the estimate's error), so it resolves the loads best",
		r.BalanceID, 100*r.MaxUtilization, r.Limiting.Component, r.Limiting.Alpha, 100*r.AllowedUtilization)
	if len(all) == 1 {
		reason = fmt.Sprintf("balance %s chosen: the facility's only balance, at %.0f %% peak utilisation (allowed %.0f %%)",
			r.BalanceID, 100*r.MaxUtilization, 100*r.AllowedUtilization)
	}
	return Choice{Report: r, Reason: reason, All: all}, nil
}

// finestResolving returns the index of the report within its allowed loads
// that resolves the required resolution with the most margin, or −1.
func finestResolving(all []Report) int {
	k := -1
	for i := range all {
		if all[i].WithinLimits && resolves(&all[i]) && (k < 0 || all[i].Resolution.Margin > all[k].Resolution.Margin) {
			k = i
		}
	}
	return k
}

// ResolutionState returns the answer's resolution state over the reports of a
// check ("" when no resolution was asked): resolved when a report within its
// allowed loads resolves it; else, with one report within its allowed loads,
// that report's state; else no_balance_resolves.
func ResolutionState(reports []Report) string {
	if len(reports) == 0 || reports[0].Resolution == nil {
		return ""
	}
	if finestResolving(reports) >= 0 {
		return ResolutionResolved
	}
	if len(reports) == 1 && reports[0].WithinLimits {
		return reports[0].Resolution.State
	}
	return ResolutionNoBalance
}

// resolves reports whether the report's balance resolves the required
// resolution.
func resolves(r *Report) bool {
	return r.Resolution != nil && r.Resolution.State == ResolutionResolved
}
