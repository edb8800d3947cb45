package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"scalematch/internal/app"
	"scalematch/internal/campaign"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
)

// campaignOptions are the flags of scalematch campaign.
type campaignOptions struct {
	computeOptions
	csv, ndjson bool
	// progress forces the progress bar on (tests); otherwise it is drawn only
	// when standard output is a terminal and the campaign is not Small.
	progress bool
}

func newCampaignCmd() *cobra.Command {
	var o campaignOptions
	cmd := &cobra.Command{
		Use:   "campaign FILE|-",
		Short: "Plan a test campaign: one model over many conditions in several facilities (the JSON of POST /v1/campaigns)",
		Long: `Plan a test campaign: read a campaign request, the JSON body POST /v1/campaigns
takes (the article; conditions, each with a label, and/or a grid of altitudes and
Mach numbers; candidate facilities with optional installations and fixed scales;
the model policy; the aim; level sharing), from FILE or, for "-", from standard
input, and print the campaign: per facility the model scale and why, the
conditions it serves and the hours; then each facility's run order with every
condition's settings, Reynolds ratio (and what a model made for it alone would
reach), Mach difference and balance utilisation; the conditions no facility
serves with the limits that exclude them; warnings and cautions. Figures are SI
(Pa shown as kPa, K, hours).

--json prints exactly the body POST /v1/campaigns returns, --csv its CSV (one
row per condition and α/β point), --ndjson its NDJSON (one line per condition,
then the summary). A large campaign draws a progress bar on standard error
while standard output is a terminal.

facility_id resolves against the same catalog as every command (PostgreSQL
when SCALEMATCH_DATABASE_URL is set, else the SQLite catalog under --data when
it holds one, else the demo facilities). Exit status: 0 when every served
condition is within_allowed_loads, else that of the worst verdict (3
not_verified, 4 over_allowed_load, 5 does_not_fit); 1 for an error.

Loads and limits are estimates only: the facility's approved limits, procedures
and licensed engineering judgement govern.`,
		Example: `  scalematch campaign examples/campaign-j16.json
  scalematch campaign --csv examples/campaign-j16.json > runs.csv
  scalematch campaign --ndjson - < campaign.json`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			body, err := o.start(cmd, args[0])
			if err != nil {
				return err
			}
			n := 0
			for _, b := range []bool{o.json, o.csv, o.ndjson} {
				if b {
					n++
				}
			}
			if n > 1 {
				return fmt.Errorf("give at most one of --json, --csv and --ndjson")
			}
			var req campaign.Request
			if err := unitjson.Decode(body, &req); err != nil {
				return explain(err)
			}
			ctx := cmd.Context()
			p, closeCatalog, err := o.planner(ctx)
			if err != nil {
				return err
			}
			err = o.run(ctx, p, req)
			if cerr := closeCatalog(); err == nil {
				err = cerr
			}
			return err
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.data, "data", "./scalematch-data", "directory of the service's SQLite catalog; facility ids resolve against it when it holds one, else against the demo catalog")
	f.BoolVar(&o.json, "json", false, "print exactly the JSON body that POST /v1/campaigns returns")
	f.BoolVar(&o.csv, "csv", false, "print the campaign as CSV: one row per condition and α/β point")
	f.BoolVar(&o.ndjson, "ndjson", false, "print the campaign as NDJSON: one line per condition, then the summary")
	o.units = "si"
	return cmd
}

// run plans the campaign and prints it in the format asked for.
func (o *campaignOptions) run(ctx context.Context, p *app.Planner, req campaign.Request) error {
	var progress func(done, total int)
	if o.progress || !campaign.Small(&req) && isTerminal(o.stdout) {
		bar := progressbar.NewOptions(1, progressbar.OptionSetWriter(o.stderr), progressbar.OptionSetDescription("planning"),
			progressbar.OptionShowCount(), progressbar.OptionThrottle(100*time.Millisecond),
			progressbar.OptionOnCompletion(func() { fmt.Fprintln(o.stderr) }))
		progress = func(done, total int) {
			if bar.GetMax() != total {
				bar.ChangeMax(total)
			}
			_ = bar.Set(done)
		}
		defer bar.Finish()
	}
	res, err := campaign.Run(ctx, p, req, progress)
	if err != nil {
		return explain(inCatalog(err, o.where))
	}
	switch {
	case o.json:
		b, err := json.Marshal(res)
		if err != nil {
			return err
		}
		if _, err := o.stdout.Write(append(b, '\n')); err != nil {
			return err
		}
	case o.csv:
		if err := res.WriteCSV(o.stdout); err != nil {
			return err
		}
	case o.ndjson:
		if err := res.WriteNDJSON(o.stdout); err != nil {
			return err
		}
	default:
		if err := writeCampaign(o.stdout, res); err != nil {
			return err
		}
	}
	return gate(worstVerdict(res))
}

// isTerminal reports whether w is a terminal.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// worstVerdict is the worst load verdict of the conditions served:
// does_not_fit, over_allowed_load, not_verified, within_allowed_loads; within
// when none is served.
func worstVerdict(res *campaign.Result) string {
	worst := loads.VerdictWithin
	for _, c := range res.Conditions {
		if c.Plan != nil && verdictExit(c.Plan.Verdict) > verdictExit(worst) {
			worst = c.Plan.Verdict
		}
	}
	return worst
}

// scaleText writes a scale as 1:N.
func scaleText(s float64) string {
	if s <= 0 {
		return "-"
	}
	return fmt.Sprintf("1:%.4g", 1/s)
}

// writeCampaign prints the campaign as tables.
func writeCampaign(w io.Writer, res *campaign.Result) error {
	sm := res.Summary
	scales := make([]string, len(sm.ModelScales))
	for i, s := range sm.ModelScales {
		scales[i] = scaleText(s)
	}
	fmt.Fprintf(w, "Campaign: %d of %d conditions served, %d with the Mach number matched; model %s (%s)\n",
		sm.ConditionsServed, sm.Conditions, sm.MachMatched, strings.Join(scales, ", "), res.Policy)
	fmt.Fprintf(w, "Reynolds ratio: lowest %.3f, mean %.3f (aim %s: %.4f); worst balance utilisation %.1f %%\n",
		sm.LowestReynoldsRatio, sm.MeanReynoldsRatio, res.Aim, sm.AimValue, 100*sm.WorstBalanceUtilization)
	fmt.Fprintf(w, "Tunnel time: %.2f h", sm.Hours)
	if sm.HoursSavedBySharing > 0 {
		fmt.Fprintf(w, " (%.2f h saved by level sharing)", sm.HoursSavedBySharing)
	}
	fmt.Fprintln(w)

	section(w, "Facilities")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  facility\tscale\tset by\tserved\tbalance\tlowest Re ratio\tmean Re ratio\thours\tin the request's order")
	for i, fp := range res.Facilities {
		id := fp.FacilityID
		if id == "" {
			id = fmt.Sprintf("facilities[%d]", i)
		}
		sched, caller := "-", "-"
		if fp.Schedule != nil {
			sched, caller = fmt.Sprintf("%.2f", fp.Schedule.Hours), fmt.Sprintf("%.2f", fp.HoursCallerOrder)
		}
		bal := strings.Join(fp.BalanceIDs, ", ")
		if bal == "" {
			bal = "-"
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%d\t%s\t%.3f\t%.3f\t%s\t%s\n", id, scaleText(fp.Scale), fp.ScaleReason.Kind, fp.ConditionsServed,
			bal, fp.LowestReynoldsRatio, fp.MeanReynoldsRatio, sched, caller)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for i, fp := range res.Facilities {
		if fp.ConditionsServed > 0 {
			fmt.Fprintf(w, "  %s: %s\n", facilityName(fp, i), fp.ScaleReason.Note)
		}
	}

	byLabel := make(map[string]*campaign.ConditionPlan, len(res.Conditions))
	for i := range res.Conditions {
		byLabel[res.Conditions[i].Label] = &res.Conditions[i]
	}
	for i, fp := range res.Facilities {
		if fp.ConditionsServed == 0 {
			continue
		}
		head := fmt.Sprintf("Run order in %s (model %s)", facilityName(fp, i), scaleText(fp.Scale))
		if s := fp.Schedule; s != nil {
			head += fmt.Sprintf(": %d points in %d runs, %d pressure and %d temperature changes, %.2f h", s.Points, s.Runs, s.PressureChanges, s.TemperatureChanges, s.Hours)
		}
		section(w, head)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  run\tcondition\tM flight\tM test\tp0 kPa\tT0 K\tq kPa\tRe ratio\town model\tΔM\tbalance %\tverdict")
		for k, label := range fp.RunOrder {
			c := byLabel[label]
			p := c.Plan
			dm := "-"
			if p.MachDifference != nil {
				dm = fmt.Sprintf("%+.4f", *p.MachDifference)
			}
			shared := ""
			if p.SharedLevel {
				shared = " (shared level)"
			}
			fmt.Fprintf(tw, "  %d\t%s\t%.3f\t%.3f\t%.1f\t%.1f\t%.2f\t%.3f%s\t%.3f at %s\t%s\t%.1f\t%s\n", k+1, label, c.FlightMach, p.Mach,
				p.StagnationPressure/1000, p.StagnationTemperature, p.DynamicPressure/1000, p.ReynoldsRatio, shared,
				c.OwnReynoldsRatio, scaleText(c.OwnScale), dm, 100*p.MaxUtilization, p.Verdict)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	if sm.ConditionsServed < sm.Conditions {
		section(w, "Not served")
		for _, c := range res.Conditions {
			if c.Served {
				continue
			}
			var why []string
			for _, e := range c.Excluded {
				why = append(why, fmt.Sprintf("%s: %s", e.FacilityID, strings.Join(e.Limits, ", ")))
			}
			fmt.Fprintf(w, "  %s: %s\n", c.Label, strings.Join(why, "; "))
		}
	}
	if len(res.Warnings) > 0 {
		section(w, "Warnings")
		for _, s := range res.Warnings {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	}
	section(w, "Cautions")
	for _, s := range res.Cautions {
		fmt.Fprintf(w, "  - %s\n", s)
	}
	return nil
}

// facilityName is a facility's id, or its place in the request when inline.
func facilityName(fp campaign.FacilityPlan, i int) string {
	if fp.FacilityID != "" {
		return fp.FacilityID
	}
	return fmt.Sprintf("facilities[%d]", i)
}
