package main

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"scalematch/facilities"
	"scalematch/internal/loads"
)

// Exit statuses of scalematch. A load check (scalematch loads) and a plan
// (scalematch plan) that print their answer exit with the status of its verdict,
// so that a script can gate on it; any error exits 1.
const (
	// exitOK: the verdict is within_allowed_loads (or the command has none).
	exitOK = 0
	// exitError: the command failed (bad input, no feasible plan, I/O).
	exitError = 1
	// exitNotVerified: the verdict is not_verified.
	exitNotVerified = 3
	// exitOverAllowed: the verdict is over_allowed_load.
	exitOverAllowed = 4
	// exitDoesNotFit: the verdict is does_not_fit.
	exitDoesNotFit = 5
)

// verdictExit returns the exit status of a verdict.
func verdictExit(v string) int {
	switch v {
	case loads.VerdictWithin:
		return exitOK
	case loads.VerdictOver:
		return exitOverAllowed
	case loads.VerdictDoesNotFit:
		return exitDoesNotFit
	}
	return exitNotVerified
}

// verdictError is returned by a command whose answer was printed in full but
// whose verdict is not within_allowed_loads; main exits with its status.
type verdictError struct{ verdict string }

func (e verdictError) Error() string {
	return fmt.Sprintf("verdict %s (exit status %d)", e.verdict, verdictExit(e.verdict))
}

// ExitCode is the process exit status for the verdict.
func (e verdictError) ExitCode() int { return verdictExit(e.verdict) }

// gate returns a verdictError for a verdict other than within_allowed_loads.
func gate(verdict string) error {
	if verdictExit(verdict) == exitOK {
		return nil
	}
	return verdictError{verdict}
}

// verdictWords says a verdict to a reader.
func verdictWords(v string) string {
	switch v {
	case loads.VerdictWithin:
		return "within the allowed loads (rating ÷ safety factor) on every rated component and gauge row, by this estimate"
	case loads.VerdictOver:
		return "OVER the allowed load: do not run the points marked !"
	case loads.VerdictDoesNotFit:
		return "DOES NOT FIT the test section: do not install the model"
	}
	return "NOT VERIFIED: a loaded component has no rating, the weight was left out, or there is no balance"
}

// writeVerdict prints the verdict and the broken fit limits, first of all.
func writeVerdict(w io.Writer, verdict string, broken []facilities.Violation) {
	fmt.Fprintf(w, "Verdict: %s (%s)\n", verdict, verdictWords(verdict))
	section(w, "Fit in the test section")
	if len(broken) == 0 {
		fmt.Fprintln(w, "  fits: span, blockage and length within the section's limits")
	}
	for _, v := range broken {
		fmt.Fprintf(w, "  - %s: %s\n", v.Constraint, v.Message)
	}
}

// writeRows prints every component and gauge row of every point of a report:
// load, rating, allowed load and share of the allowed load, the limiting row
// marked *, a row over its allowed load marked !.
func writeRows(w io.Writer, r loads.Report) {
	fmt.Fprintf(w, "  every component and gauge row of balance %s (forces N, moments N·m; * limiting, ! over the allowed load)\n", r.BalanceID)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "  α °\tβ °\trow\tload\trating\tallowed\tof allowed %%\t\n")
	for _, p := range r.Points {
		for _, row := range p.Rows {
			rating, allowed, share := "none", "none", "unrated"
			if row.Covered && !row.Rated {
				share = "in gauge rows"
			}
			if row.Rated {
				rating, allowed = fmt.Sprintf("%.5g", row.Rating), fmt.Sprintf("%.5g", row.Allowed)
				mark := ""
				if row.Limiting {
					mark += " *"
				}
				if row.ShareOfAllowed > 1 {
					mark += " !"
				}
				share = fmt.Sprintf("%.1f%s", 100*row.ShareOfAllowed, mark)
			}
			fmt.Fprintf(tw, "  %.4g\t%.4g\t%s\t%.4g\t%s\t%s\t%s\t\n", p.Alpha, p.Beta, row.Name, row.Load, rating, allowed, share)
		}
	}
	tw.Flush()
	if len(r.UnratedLoaded) > 0 {
		fmt.Fprintf(w, "  loaded but unrated: %s\n", strings.Join(r.UnratedLoaded, ", "))
	}
}

// writeResolutionState prints the answer's resolution state (when a
// resolution was asked) and the share of the allowed load (when below 1).
func writeResolutionState(w io.Writer, state string, fraction float64) {
	if state != "" {
		words := map[string]string{
			loads.ResolutionResolved:        "a balance within its allowed loads resolves the required resolution at every point",
			loads.ResolutionTooCoarse:       "the balance is too coarse for the required resolution at this dynamic pressure",
			loads.ResolutionAccuracyUnknown: "the balance gives no accuracy for a coefficient asked",
			loads.ResolutionNoBalance:       "no balance of the facility can both keep within its allowed loads and resolve the test",
		}[state]
		fmt.Fprintf(w, "Resolution: %s (%s)\n", state, words)
	}
	if fraction > 0 && fraction < 1 {
		fmt.Fprintf(w, "Load margin: planned and checked to %.4g %% of the allowed load (rating ÷ safety factor)\n", 100*fraction)
	}
}

// writeUncertainty prints the range over the sweep of the coefficients' 2σ
// uncertainty from the balance's accuracy, or that the balance gives none.
func writeUncertainty(w io.Writer, r loads.Report) {
	if len(r.Uncertainty) == 0 {
		fmt.Fprintf(w, "  resolution: not known (balance %s gives no accuracy)\n", r.BalanceID)
		return
	}
	lo, hi := r.Uncertainty[0], r.Uncertainty[0]
	for _, u := range r.Uncertainty[1:] {
		lo.CL, hi.CL = min(lo.CL, u.CL), max(hi.CL, u.CL)
		lo.CDCounts, hi.CDCounts = min(lo.CDCounts, u.CDCounts), max(hi.CDCounts, u.CDCounts)
		lo.Cm, hi.Cm = min(lo.Cm, u.Cm), max(hi.Cm, u.Cm)
	}
	fmt.Fprintf(w, "  resolution (2σ from the balance accuracy, over the sweep): C_D %.3g–%.3g counts, C_L %.3g–%.3g, C_m %.3g–%.3g\n",
		lo.CDCounts, hi.CDCounts, lo.CL, hi.CL, lo.Cm, hi.Cm)
	if len(r.UncertaintyUnknown) > 0 {
		fmt.Fprintf(w, "  resolution not known for: %s\n", strings.Join(r.UncertaintyUnknown, ", "))
	}
	if rc := r.Resolution; rc != nil {
		switch rc.State {
		case loads.ResolutionAccuracyUnknown:
			fmt.Fprintf(w, "  required resolution: %s (%s)\n", rc.State, strings.Join(rc.Unknown, ", "))
		default:
			fmt.Fprintf(w, "  required resolution: %s; least dynamic pressure %.5g Pa (%s at α %.4g°), margin %.3g\n",
				rc.State, rc.MinDynamicPressure, rc.Limiting.Component, rc.Limiting.Alpha, rc.Margin)
		}
	}
}
