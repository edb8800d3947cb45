package main

import (
	"fmt"
	"io"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"scalematch/api/schema"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
)

func newLoadsCmd() *cobra.Command {
	var o computeOptions
	cmd := &cobra.Command{
		Use:   "loads FILE|-",
		Short: "Check balance loads at given test conditions (the JSON of POST /v1/loads)",
		Long: `Check the balance loads of a model of given scale at given test settings: read a
load request, the JSON body POST /v1/loads takes, from FILE or, for "-", from
standard input. Nothing is optimised.

facility_id resolves against the same catalog as every command: PostgreSQL when
SCALEMATCH_DATABASE_URL is set, else the service's SQLite catalog under --data when
that directory holds one, else the built-in demo facilities; a facility not found
names the catalog looked in.

By default a table: the model, the test state, the facility limits the settings
break, the wall corrections, and for the named balance (or every balance of the
facility when installation.balance_id is absent) the loads at every angle of
attack with their utilisation, one line per point with the limiting component or
gauge row named (--rows: every component and gauge row at every point, with its
load, rating, allowed load and share of it). The verdict and the test-section
limits the model breaks come first. --units us adds U.S. customary units beside the SI
ones. --json prints exactly the body POST /v1/loads returns.

Exit status: 0 when the verdict is within_allowed_loads, 3 not_verified,
4 over_allowed_load, 5 does_not_fit (the answer is printed in full first);
1 for an error. --load-fraction checks against a share of the allowed load
(installation.load_fraction); --resolution asks whether the balances resolve a
required resolution (required_resolution, e.g. cd_counts=1,cl=0.005).

Loads and limits are estimates only: the facility's approved limits, procedures
and licensed engineering judgement govern.`,
		Example: `  scalematch loads check.json
  scalematch loads --json - < check.json`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			body, err := o.start(cmd, args[0])
			if err != nil {
				return err
			}
			var req schema.LoadsRequest
			if err := unitjson.Decode(body, &req); err != nil {
				return explain(err)
			}
			if err := o.override(cmd, &req.Installation, &req.RequiredResolution); err != nil {
				return err
			}
			ctx := cmd.Context()
			p, closeCatalog, err := o.planner(ctx)
			if err != nil {
				return err
			}
			resp, err := p.Loads(ctx, &req)
			if cerr := closeCatalog(); err == nil && cerr != nil {
				return cerr
			}
			if err != nil {
				return explain(inCatalog(err, o.where))
			}
			if o.json {
				if err := writeAPIJSON(o.stdout, resp); err != nil {
					return err
				}
			} else if err := writeLoadCheck(o.stdout, resp, o.units == "us", o.rows); err != nil {
				return err
			}
			return gate(resp.Verdict)
		},
	}
	o.bind(cmd, true, "POST /v1/loads")
	return cmd
}

// writeLoadCheck prints the answer of a load check as a table.
func writeLoadCheck(w io.Writer, r *schema.LoadsResponse, us, rows bool) error {
	u := units{us}
	fmt.Fprintf(w, "Load check: facility %s\n", r.FacilityID)
	writeVerdict(w, r.Verdict, r.FitBroken)
	writeResolutionState(w, r.ResolutionState, r.LoadFraction)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	row := func(name, format string, args ...any) {
		fmt.Fprintf(tw, "  %s\t"+format+"\n", append([]any{name}, args...)...)
	}

	m := r.Model
	section(w, "Model")
	row("scale", "1:%.4g (%.5g)", 1/m.Scale, m.Scale)
	row("reference length", "%s", u.q(m.ReferenceLength, "m", 4))
	row("reference area", "%s", u.q(m.ReferenceArea, "m²", 4))
	row("span", "%s", u.q(m.Span, "m", 4))
	row("blockage", "%.3g %% of the test section", 100*m.Blockage)
	tw.Flush()

	section(w, "Test")
	writeTest(row, u, r.Test.State, r.Test.Reynolds)
	if c := r.Test.Cavitation; c != nil {
		row("cavitation number", "%.4g (vapour pressure %s)", *c, u.q(*r.Test.VapourPressure, "Pa", 4))
	}
	tw.Flush()

	if r.Flight != nil && r.Mismatch != nil && r.Flight.Marine != nil {
		section(w, "Against the full scale (in water)")
		row("full-scale cavitation number", "%.4g", r.Flight.Marine.Cavitation)
		row("full-scale Reynolds number", "%.4g", r.Flight.Reynolds)
		writeMismatch(row, *r.Mismatch)
		tw.Flush()
	} else if r.Flight != nil && r.Mismatch != nil {
		section(w, "Against the flight")
		row("flight Mach number", "%.4f", r.Flight.Mach)
		row("flight Reynolds number", "%.4g", r.Flight.Reynolds)
		writeMismatch(row, *r.Mismatch)
		tw.Flush()
	}

	section(w, "Facility limits broken")
	if len(r.Violations) == 0 {
		fmt.Fprintln(w, "  none")
	}
	for _, v := range r.Violations {
		fmt.Fprintf(w, "  - %s: %s\n", v.Constraint, v.Message)
	}

	writeCorrections(w, row, r.Corrections)
	tw.Flush()
	writeCorrectionPoints(w, r.Corrections)

	reports := r.Loads.All
	if r.Loads.One != nil {
		reports = []loads.Report{*r.Loads.One}
	}
	for _, rep := range reports {
		writeLoads(w, u, rep)
		if rows {
			writeRows(w, rep)
		}
	}
	writeNotes(w, r.Warnings, r.Cautions)
	return nil
}
