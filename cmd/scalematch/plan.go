package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// computeOptions are the flags shared by plan, loads and groups.
type computeOptions struct {
	data     string
	database string // SCALEMATCH_DATABASE_URL: PostgreSQL, as for every command
	where    string // the catalog planner opened, for not-found messages
	json     bool
	units    string
	stdin    io.Reader
	stdout   io.Writer
	// chartDir, for plan, is the directory its charts are written to ("": none);
	// stderr receives the names of the files written.
	chartDir string
	stderr   io.Writer
	// rows prints every component and gauge row of every point.
	rows bool
	// loadFraction and resolution, when given, set installation.load_fraction
	// and required_resolution over the request's.
	loadFraction float64
	resolution   string
}

// bind adds the shared flags to cmd; withData adds --data and --units (groups needs
// no catalog, and its groups are dimensionless, so it has neither).
func (o *computeOptions) bind(cmd *cobra.Command, withData bool, jsonOf string) {
	f := cmd.Flags()
	if withData {
		f.StringVar(&o.data, "data", "./scalematch-data", "directory of the service's SQLite catalog; facility ids resolve against it when it holds one, else against the demo catalog")
	}
	f.BoolVar(&o.json, "json", false, "print exactly the JSON body that "+jsonOf+" returns")
	o.units = "si"
	if withData { // every command with a catalog prints dimensional figures; groups does not
		f.StringVar(&o.units, "units", "si", "units of the table: si, or us to add U.S. customary units beside them")
		f.BoolVar(&o.rows, "rows", false, "print every component and gauge row of the balance at every point (load, rating, allowed load, share of it), not one line per point")
		f.Float64Var(&o.loadFraction, "load-fraction", 0, "plan and check to this share of the allowed load (rating ÷ safety factor), above 0 and at most 1; sets installation.load_fraction")
		f.StringVar(&o.resolution, "resolution", "", "required 2σ resolution, e.g. cd_counts=1,cl=0.005 (cl, cd_counts, cm, cy, cl_roll, cn); sets required_resolution")
	}
}

// override applies --load-fraction and --resolution to a request's installation
// and required resolution.
func (o *computeOptions) override(cmd *cobra.Command, in *loads.Installation, res **loads.Resolution) error {
	if cmd.Flags().Changed("load-fraction") {
		v := o.loadFraction
		in.LoadFraction = &v
	}
	if o.resolution == "" {
		return nil
	}
	r, err := parseResolution(o.resolution)
	if err != nil {
		return err
	}
	*res = r
	return nil
}

// parseResolution reads a --resolution value: name=value pairs separated by
// commas, the names of required_resolution.
func parseResolution(s string) (*loads.Resolution, error) {
	r := &loads.Resolution{}
	for _, kv := range strings.Split(s, ",") {
		k, v, ok := strings.Cut(strings.TrimSpace(kv), "=")
		if !ok {
			return nil, fmt.Errorf("--resolution %q: want name=value pairs such as cd_counts=1,cl=0.005", s)
		}
		x, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if err != nil {
			return nil, fmt.Errorf("--resolution %s: %q is not a number", k, v)
		}
		dst := map[string]**float64{"cl": &r.CL, "cd_counts": &r.CDCounts, "cm": &r.Cm, "cy": &r.CY, "cl_roll": &r.Cl, "cn": &r.Cn}[strings.TrimSpace(k)]
		if dst == nil {
			return nil, fmt.Errorf("--resolution: unknown coefficient %q: want cl, cd_counts, cm, cy, cl_roll or cn", k)
		}
		*dst = &x
	}
	return r, nil
}

// start checks the flags, reads SCALEMATCH_<FLAG> for flags not given, and reads
// the request body from the file named by arg, or standard input for "-".
func (o *computeOptions) start(cmd *cobra.Command, arg string) ([]byte, error) {
	if err := flagsFromEnv(cmd.Flags(), os.LookupEnv); err != nil {
		return nil, err
	}
	if o.units != "si" && o.units != "us" {
		return nil, fmt.Errorf("--units %q: want si or us", o.units)
	}
	o.stdin, o.stdout, o.stderr = cmd.InOrStdin(), cmd.OutOrStdout(), cmd.ErrOrStderr()
	o.database = os.Getenv(envDatabaseURL)
	var r io.Reader
	if arg == "-" {
		r = o.stdin
	} else {
		f, err := os.Open(arg)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r = f
	}
	// The service reads at most api.BodyLimit bytes; so does the command line, so
	// that both accept the same requests.
	b, err := io.ReadAll(io.LimitReader(r, api.BodyLimit+1))
	if err != nil {
		return nil, err
	}
	if len(b) > api.BodyLimit {
		return nil, fmt.Errorf("%s: the request is larger than %d bytes, the service's limit", arg, api.BodyLimit)
	}
	return b, nil
}

// planner returns the composition the service uses, over the catalog every command
// reads (openCatalog: PostgreSQL when SCALEMATCH_DATABASE_URL is set, else the
// SQLite catalog under o.data when that directory holds one, else the demo
// catalog), and a function that closes the catalog. The command line never writes to the catalog: a plan
// already stored under its id is answered with the stored bytes, as the service
// would, and a new plan is not stored.
func (o *computeOptions) planner(ctx context.Context) (*app.Planner, func() error, error) {
	none := func() error { return nil }
	cat, where, closeFn, err := openCatalog(ctx, o.data, o.database)
	if err != nil {
		return nil, none, err
	}
	o.where = where
	if cat == nil {
		return &app.Planner{}, none, nil
	}
	return &app.Planner{Catalog: readOnlyPlans{cat}}, closeFn, nil
}

// readOnlyPlans is a catalog whose SavePlan stores nothing: it returns the record
// already stored under the id when there is one, else the record as given.
type readOnlyPlans struct{ facilities.Catalog }

// SavePlan returns the stored record with p's id, or p when none is stored.
func (c readOnlyPlans) SavePlan(ctx context.Context, p facilities.PlanRecord) (facilities.PlanRecord, error) {
	rec, err := c.Catalog.Plan(ctx, p.ID)
	if check.ErrorCode(err) == check.CodeNotFound {
		return p, nil
	}
	return rec, err
}

// problemError is a domain error written for a person: its message, then each bad
// field by JSON path and each conflicting limit on a line of its own.
type problemError struct{ e *check.Error }

var problemTitles = map[check.Code]string{
	check.CodeInvalid:       "invalid input",
	check.CodeNotFound:      "not found",
	check.CodeUnprocessable: "no feasible plan",
}

func (p problemError) Error() string {
	var b strings.Builder
	title := problemTitles[p.e.Code]
	if title == "" {
		title = string(p.e.Code)
	}
	b.WriteString(title)
	if p.e.Message != "" {
		b.WriteString(": ")
		b.WriteString(p.e.Message)
	}
	for _, f := range p.e.Fields {
		field := f.Field
		if field == "" {
			field = "(body)"
		}
		fmt.Fprintf(&b, "\n  %s: %s", field, f.Message)
	}
	if len(p.e.Limits) > 0 {
		fmt.Fprintf(&b, "\n  conflicting limits: %s", strings.Join(p.e.Limits, ", "))
	}
	return b.String()
}

func (p problemError) Unwrap() error { return p.e }

// explain returns err, a domain error in its chain written out field by field.
func explain(err error) error {
	var de *check.Error
	if errors.As(err, &de) {
		return problemError{de}
	}
	return err
}

func newPlanCmd() *cobra.Command {
	var o computeOptions
	cmd := &cobra.Command{
		Use:   "plan FILE|-",
		Short: "Plan a scale-model test from a plan request (the JSON of POST /v1/plans)",
		Long: `Plan a scale-model test: read a plan request, the JSON body POST /v1/plans takes
(numbers in SI or strings with units such as "35000 ft", scales such as "1:16"),
from FILE or, for "-", from standard input, and print the plan.

facility_id resolves against the same catalog as every command: PostgreSQL when
SCALEMATCH_DATABASE_URL is set, else the service's SQLite catalog under --data when
that directory holds one, else the built-in demo facilities; a facility not found
names the catalog looked in. Nothing is
written to the catalog.

By default a table: flight, model, test condition, mismatch, the binding limits
with the Reynolds gain of one more per cent of each, wall corrections, the balance
loads at every angle of attack with their utilisation, the Reynolds effects on
drag, the schedule, warnings and cautions. --units us adds U.S. customary units
beside the SI ones. --json prints exactly the body POST /v1/plans returns.
--chart DIR also writes the plan's charts, the ones GET
/v1/plans/{id}/charts/{name} serves, as DIR/NAME.svg, .png and .pdf.

Exit status: 0 when the plan's load verdict is within_allowed_loads, 3
not_verified, 4 over_allowed_load, 5 does_not_fit (the plan is printed in full
first); 1 for an error. --rows prints every component and gauge row of the
balance at every point. --load-fraction plans to a share of the allowed load
(installation.load_fraction); --resolution asks for a required resolution
(required_resolution, e.g. cd_counts=1,cl=0.005): the plan keeps the dynamic
pressure high enough for a balance to resolve it and says whether one does.

Loads and limits are estimates only: the facility's approved limits, procedures
and licensed engineering judgement govern.`,
		Example: `  scalematch plan request.json
  scalematch plan --units us - < request.json
  scalematch plan --json --data ./scalematch-data request.json
  scalematch plan --chart ./charts request.json`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			body, err := o.start(cmd, args[0])
			if err != nil {
				return err
			}
			var req schema.PlanRequest
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
			err = o.plan(ctx, p, &req)
			if cerr := closeCatalog(); err == nil {
				err = cerr
			}
			return err
		},
	}
	o.bind(cmd, true, "POST /v1/plans")
	cmd.Flags().StringVar(&o.chartDir, "chart", "", "also write the plan's charts (envelope, loads, reynolds-trade) into this directory as SVG, PNG and PDF")
	return cmd
}

// plan plans req with p and prints the table or the service's JSON.
func (o *computeOptions) plan(ctx context.Context, p *app.Planner, req *schema.PlanRequest) error {
	if o.json {
		b, err := p.PlanJSON(ctx, req)
		if err != nil {
			return explain(inCatalog(err, o.where))
		}
		if _, err = o.stdout.Write(b); err != nil {
			return err
		}
		resp, err := app.DecodePlan(b)
		if err != nil {
			return err
		}
		if o.chartDir != "" {
			if err := o.writeCharts(ctx, p, resp, req.Facility); err != nil {
				return err
			}
		}
		return gate(resp.Verdict)
	}
	resp, err := p.Plan(ctx, req)
	if err != nil {
		return explain(inCatalog(err, o.where))
	}
	catalog := o.where
	if req.Facility != nil {
		catalog = ""
	}
	if err := writePlan(o.stdout, resp, o.units == "us", catalog, o.rows); err != nil {
		return err
	}
	if err := o.writeCharts(ctx, p, resp, req.Facility); err != nil {
		return err
	}
	return gate(resp.Verdict)
}

// units formats quantities in SI and, when us is set, in U.S. customary units
// beside them (NIST SP 811 conversion factors, as the atmosphere command uses):
// absolute pressures (unit "Pa abs": stagnation and static) in psia, dynamic
// pressure in psf, speeds in ft/s (flight airspeeds, unit "m/s kt", in knots too),
// forces in lbf, moments in ft·lbf.
type units struct{ us bool }

// q formats v in SI unit unit, with its U.S. customary equivalent when u.us and
// the unit has one; digits is the number of significant digits.
func (u units) q(v float64, unit string, digits int) string {
	shown := strings.TrimSuffix(strings.TrimSuffix(unit, " abs"), " kt")
	s := fmt.Sprintf("%.*g %s", digits, v, shown)
	if math.IsInf(v, 1) {
		return "unlimited"
	}
	if !u.us {
		return s
	}
	var c float64
	var cu string
	switch unit {
	case "m":
		c, cu = v/similarity.Foot, "ft"
	case "m²":
		c, cu = v/(similarity.Foot*similarity.Foot), "ft²"
	case "m/s":
		c, cu = v/similarity.Foot, "ft/s"
	case "m/s kt":
		return fmt.Sprintf("%s (%.*g ft/s, %.*g kt)", s, digits, v/similarity.Foot, digits, v/similarity.Knot)
	case "Pa":
		c, cu = v/similarity.PoundPerSquareFoot, "psf"
	case "Pa abs":
		c, cu = v/similarity.PoundPerSquareInch, "psia"
	case "N":
		c, cu = v/similarity.PoundForce, "lbf"
	case "N·m":
		c, cu = v/(similarity.PoundForce*similarity.Foot), "ft·lbf"
	case "K":
		c, cu = v*rankinePerKelvin, "°R"
	case "kg/m³":
		c, cu = v*similarity.Foot*similarity.Foot*similarity.Foot/similarity.Slug, "slug/ft³"
	case "1/m":
		c, cu = v*similarity.Foot, "1/ft"
	case "kg":
		c, cu = v/similarity.Pound, "lb"
	default:
		return s
	}
	return fmt.Sprintf("%s (%.*g %s)", s, digits, c, cu)
}

// bindingUnits gives the SI unit of each binding constraint's value.
var bindingUnits = map[string]string{
	facilities.ConstraintSpeedMin:     "m/s",
	facilities.ConstraintSpeedMax:     "m/s",
	facilities.ConstraintPressureMin:  "Pa abs",
	facilities.ConstraintPressureMax:  "Pa abs",
	facilities.ConstraintTempMin:      "K",
	facilities.ConstraintTempMax:      "K",
	facilities.ConstraintDynamic:      "Pa",
	facilities.ConstraintReynoldsUnit: "1/m",
	facilities.ConstraintCondensation: "K",
	facilities.ConstraintBalance:      "Pa",
}

// section starts a block of the table: a blank line and its heading.
func section(w io.Writer, title string) { fmt.Fprintf(w, "\n%s\n", title) }

// writePlan prints a plan as a table; catalog names the catalog the facility came
// from (openCatalog's name), "" when the request gave its facility inline; rows
// adds every balance component and gauge row at every point.
func writePlan(w io.Writer, r *schema.PlanResponse, us bool, catalog string, rows bool) error {
	u := units{us}
	where := "given inline"
	if catalog != "" {
		where = fmt.Sprintf("%s, version %d", catalog, r.FacilityVersion)
	}
	fmt.Fprintf(w, "Plan %s: facility %s (%s)\n", r.ID, r.FacilityID, where)
	writeVerdict(w, r.Verdict, r.FitBroken)
	writeResolutionState(w, r.ResolutionState, r.LoadFraction)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	row := func(name, format string, args ...any) {
		fmt.Fprintf(tw, "  %s\t"+format+"\n", append([]any{name}, args...)...)
	}
	flush := func() { tw.Flush() }

	fl := r.Flight
	if mr := fl.Marine; mr != nil {
		section(w, "Full scale (in water)")
		water := "fresh water"
		if mr.Water == similarity.WaterSea {
			water = fmt.Sprintf("sea water, salinity %.4g g/kg", mr.Salinity)
		}
		row("water", "%s at %s", water, u.q(mr.Temperature, "K", 5))
		row("speed", "%s", u.q(mr.Speed, "m/s kt", 4))
		row("Reynolds number", "%.4g on %s", fl.Reynolds, u.q(fl.ReferenceLength, "m", 4))
		row("depth of reference point", "%s (%s)", u.q(mr.Depth, "m", 4), mr.FreeSurface)
		row("pressure there", "%s (atmosphere %s)", u.q(mr.Pressure, "Pa", 5), u.q(mr.AtmosphericPressure, "Pa", 5))
		row("vapour pressure", "%s", u.q(mr.VapourPressure, "Pa", 4))
		row("cavitation number", "%.4g", mr.Cavitation)
		row("Froude number", "%.4g on length", fl.Froude)
		if mr.FroudeDepth != nil {
			row("Froude number on depth", "%.4g", *mr.FroudeDepth)
		}
		row("dynamic pressure", "%s", u.q(fl.DynamicPressure, "Pa", 5))
		row("density", "%s", u.q(fl.Static.Density, "kg/m³", 6))
		row("viscosity", "%s", u.q(fl.Static.Viscosity, "Pa·s", 4))
		flush()
	} else {
		section(w, "Flight")
		row("Mach number", "%.4f", fl.Mach)
		row("Reynolds number", "%.4g on %s", fl.Reynolds, u.q(fl.ReferenceLength, "m", 4))
		row("true airspeed", "%s", u.q(fl.TrueAirspeed, "m/s kt", 4))
		row("calibrated airspeed", "%s", u.q(fl.CalibratedAirspeed, "m/s kt", 4))
		row("equivalent airspeed", "%s", u.q(fl.EquivalentAirspeed, "m/s kt", 4))
		row("dynamic pressure", "%s", u.q(fl.DynamicPressure, "Pa", 5))
		writeStatic(row, u, fl.Static)
		flush()
	}

	m := r.Model
	section(w, "Model")
	row("scale", "1:%.4g (%.5g)", 1/m.Scale, m.Scale)
	row("reference length", "%s", u.q(m.ReferenceLength, "m", 4))
	row("reference area", "%s", u.q(m.ReferenceArea, "m²", 4))
	row("span", "%s", u.q(m.Span, "m", 4))
	row("frontal area", "%s", u.q(m.FrontalArea, "m²", 4))
	row("blockage", "%.3g %% of the test section", 100*m.Blockage)
	flush()

	section(w, "Test")
	writeTest(row, u, r.Test.State, r.Test.Reynolds)
	if c := r.Test.Cavitation; c != nil {
		row("cavitation number", "%.4g (vapour pressure %s)", *c, u.q(*r.Test.VapourPressure, "Pa", 4))
	}
	flush()

	section(w, "Mismatch")
	writeMismatch(row, r.Mismatch)
	flush()

	section(w, "Binding limits (Reynolds gain for 1 % more of each)")
	if len(r.Binding) == 0 {
		fmt.Fprintln(w, "  none: the flight's numbers are reached within every limit")
	}
	for _, b := range r.Binding {
		unit := bindingUnits[b.Constraint]
		val, lim := fmt.Sprintf("%.5g", b.Value), fmt.Sprintf("%.5g", b.Limit)
		if unit != "" {
			val, lim = u.q(b.Value, unit, 5), u.q(b.Limit, unit, 5)
		}
		row(b.Constraint, "%s at limit %s\t%+.3g %%", val, lim, b.ReynoldsGainPerPercent)
	}
	flush()

	writeCorrections(w, row, r.Corrections)
	flush()
	writeCorrectionPoints(w, r.Corrections)

	if r.Loads != nil {
		writeLoads(w, u, *r.Loads)
		if rows {
			writeRows(w, *r.Loads)
		}
	}

	if re := r.ReynoldsEffects; re != nil {
		section(w, "Reynolds effects (skin friction, "+re.Line+")")
		row("skin friction, full scale", "%.4g (%s)", re.SkinFrictionFlight, strings.ReplaceAll(re.FullScaleBoundaryLayer, "_", " "))
		row("skin friction, test", "%.4g natural transition, %.4g tripped", re.SkinFrictionTest, re.SkinFrictionTestTripped)
		row("compressibility, test", "%.4f laminar, %.4f turbulent", re.LaminarCompressibilityTest, re.TurbulentCompressibilityTest)
		row("drag difference", "%+.1f counts natural, %+.1f counts tripped", re.DeltaCDCounts, re.DeltaCDCountsTripped)
		row("laminar run", "%.2g of length on the model, %.2g in flight", re.NaturalTransitionFraction, re.FlightTransitionFraction)
		trips := "no"
		if re.TripsRecommended {
			trips = "yes"
		}
		row("trips recommended", "%s", trips)
		if tr := re.Trip; tr != nil {
			row("trip (Braslow & Knox)", "%.3g mm high at %.3g mm from the leading edge (%.0f %% chord); boundary layer %.3g mm there", tr.Height, tr.Position, 100*tr.PositionFraction, tr.BoundaryLayerThickness)
			for _, n := range tr.Notes[1:] {
				row("", "%s", n)
			}
		}
		flush()
	}

	if s := r.Schedule; s != nil {
		section(w, "Schedule")
		row("points", "%d in %d run(s)", s.Points, s.Runs)
		row("condition changes", "%d pressure, %d temperature", s.PressureChanges, s.TemperatureChanges)
		row("time", "%.3g h", s.Hours)
		flush()
	}
	writeNotes(w, r.Warnings, r.Cautions)
	return tw.Flush()
}

// matchedWord says whether a group is matched, as the answer decided it.
func matchedWord(ok bool) string {
	if ok {
		return "matched"
	}
	return "not matched"
}

// writeMismatch adds the mismatch rows, each group with the answer's own verdict
// (reynolds_matched, mach_matched, froude_matched), so that nothing is decided
// again from rounded figures.
func writeMismatch(row func(string, string, ...any), m similarity.Mismatch) {
	row("Re test / Re flight", "%.4g (%s within %.1f %%)", m.ReynoldsRatio, matchedWord(m.ReynoldsMatched), 100*similarity.RatioMatchBand)
	if d := m.MachDifference; d != nil && m.MachMatched != nil {
		row("M test - M flight", "%+.4f (%s within ±%.4g)", *d, matchedWord(*m.MachMatched), m.MachTolerance)
	} else {
		row("M test - M flight", "%s", "not a target in water")
	}
	if m.FroudeRatio != 0 && m.FroudeMatched != nil {
		row("Fr test / Fr flight", "%.4g (%s within %.1f %%)", m.FroudeRatio, matchedWord(*m.FroudeMatched), 100*similarity.RatioMatchBand)
	}
	if d := m.CavitationDifference; d != nil && m.CavitationMatched != nil {
		row("σ test - σ full scale", "%+.4g (%s within ±%g)", *d, matchedWord(*m.CavitationMatched), m.CavitationTolerance)
	}
}

// writeStatic adds the static state's rows.
func writeStatic(row func(string, string, ...any), u units, s facilities.Static) {
	row("static temperature", "%s", u.q(s.Temperature, "K", 5))
	row("static pressure", "%s", u.q(s.Pressure, "Pa abs", 5))
	row("density", "%s", u.q(s.Density, "kg/m³", 4))
}

// writeTest adds the rows of a test-section state and the model's Reynolds number.
func writeTest(row func(string, string, ...any), u units, st facilities.State, reynolds float64) {
	if st.Static.SpeedOfSound > 0 {
		row("Mach number", "%.4f", st.Mach)
	} else {
		row("Mach number", "%s", "not used (incompressible medium)")
	}
	row("speed", "%s", u.q(st.Speed, "m/s", 4))
	row("stagnation pressure", "%s", u.q(st.StagnationPressure, "Pa abs", 5))
	row("stagnation temperature", "%s", u.q(st.StagnationTemperature, "K", 5))
	row("dynamic pressure", "%s", u.q(st.DynamicPressure, "Pa", 5))
	row("Reynolds number", "%.4g on the model", reynolds)
	row("unit Reynolds number", "%s", u.q(st.ReynoldsPerMeter, "1/m", 4))
	writeStatic(row, u, st.Static)
}

// writeCorrections adds the wall corrections' section.
func writeCorrections(w io.Writer, row func(string, string, ...any), c facilities.Corrections) {
	section(w, "Wall corrections ("+c.Walls+" walls)")
	if !c.Applied {
		fmt.Fprintln(w, "  no blockage correction applied")
	}
	if c.Applied {
		row("blockage", "solid %.3g, wake %.3g, total %.3g (largest C_D)", c.SolidBlockage, c.WakeBlockage, c.Blockage)
		row("q_c/q", "%.4f (compressible form 1 + (2 − M²)·ε)", c.DynamicPressureFactor)
		if c.CorrectedMachMin != nil {
			row("corrected Mach", "%.4f to %.4f over the sweep (free stream %.4f)", *c.CorrectedMachMin, *c.CorrectedMachMax, c.Mach)
		}
	}
	if len(c.Points) > 0 && c.Points[0].DeltaAlphaUpwash != nil {
		row("lift interference", "%+.3g° at α %.3g° (δ %.3g)", c.LiftInterference+0, c.LiftInterferenceAlpha, c.LiftInterferenceFactor)
	}
	if c.StreamlineCurvatureFactor != nil {
		row("streamline curvature τ2", "%.3g", *c.StreamlineCurvatureFactor)
	}
}

// writeCorrectionPoints prints what wall corrections leave out and, when any is
// computed, the corrections of every test point.
func writeCorrectionPoints(w io.Writer, c facilities.Corrections) {
	for _, n := range c.NotComputed {
		fmt.Fprintf(w, "  not computed: %s: %s\n", strings.ReplaceAll(n.Correction, "_", " "), n.Reason)
	}
	if len(c.Points) == 0 || len(c.NotComputed) == 3 {
		return
	}
	// The curvature columns only when the curvature is computed.
	curv := c.Points[0].DeltaAlphaCurvature != nil
	head := []string{"α °", "β °", "ε", "q_c/q", "M_c", "Δα upwash °", "ΔC_D upwash"}
	if curv {
		head = append(head, "Δα curv. °", "ΔC_L curv.", "ΔC_m curv.")
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "  %s\t\n", strings.Join(head, "\t"))
	cell := func(v *float64, format string) string {
		if v == nil {
			return "not computed"
		}
		return fmt.Sprintf(format, *v+0)
	}
	for _, p := range c.Points {
		cells := []string{fmt.Sprintf("%.4g", p.Alpha), fmt.Sprintf("%.4g", p.Beta),
			cell(p.Blockage, "%.4f"), cell(p.DynamicPressureFactor, "%.4f"), cell(p.CorrectedMach, "%.4f"),
			cell(p.DeltaAlphaUpwash, "%+.3f"), cell(p.DeltaCDUpwash, "%+.5f")}
		if curv {
			cells = append(cells, cell(p.DeltaAlphaCurvature, "%+.3f"), cell(p.DeltaCLCurvature, "%+.4f"), cell(p.DeltaCmCurvature, "%+.4f"))
		}
		fmt.Fprintf(tw, "  %s\t\n", strings.Join(cells, "\t"))
	}
	tw.Flush()
	fmt.Fprintln(w, "  corrections add to the measured values to give free air (Barlow, Rae & Pope 1999, ch. 10)")
}

// writeLoads prints one balance's load check: a line per test point.
func writeLoads(w io.Writer, u units, r loads.Report) {
	section(w, fmt.Sprintf("Loads on balance %s at q %s (safety factor %.3g: at most %.1f %% of any rating)",
		r.BalanceID, u.q(r.DynamicPressure, "Pa", 5), r.SafetyFactor, 100*r.AllowedUtilization))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	side := false
	for _, p := range r.Points {
		side = side || p.Beta != 0 || p.Side != 0 || p.RollingMoment != 0 || p.YawingMoment != 0
	}
	// The SI columns always; with --units us the U.S. customary ones beside them.
	type system struct {
		force, moment string
		fconv, mconv  float64
	}
	systems := []system{{"N", "N·m", 1, 1}}
	if u.us {
		systems = append(systems, system{"lbf", "ft·lbf", 1 / similarity.PoundForce, 1 / (similarity.PoundForce * similarity.Foot)})
	}
	head := []string{"α °", "β °"}
	for _, sy := range systems {
		head = append(head, "normal "+sy.force, "axial "+sy.force, "pitching "+sy.moment)
		if side {
			head = append(head, "side "+sy.force, "rolling "+sy.moment, "yawing "+sy.moment)
		}
	}
	head = append(head, "use %", "limiting")
	fmt.Fprintf(tw, "  %s\t\n", strings.Join(head, "\t"))
	for _, p := range r.Points {
		cells := []string{fmt.Sprintf("%.4g", p.Alpha), fmt.Sprintf("%.4g", p.Beta)}
		for _, sy := range systems {
			cells = append(cells, fmt.Sprintf("%.1f", p.Normal*sy.fconv), fmt.Sprintf("%.1f", p.Axial*sy.fconv), fmt.Sprintf("%.2f", p.PitchingMoment*sy.mconv))
			if side {
				cells = append(cells, fmt.Sprintf("%.1f", p.Side*sy.fconv), fmt.Sprintf("%.2f", p.RollingMoment*sy.mconv), fmt.Sprintf("%.2f", p.YawingMoment*sy.mconv))
			}
		}
		mark := ""
		if p.Utilization > r.AllowedUtilization {
			mark = " !"
		}
		cells = append(cells, fmt.Sprintf("%.1f%s", 100*p.Utilization, mark), p.Limiting)
		fmt.Fprintf(tw, "  %s\t\n", strings.Join(cells, "\t"))
	}
	tw.Flush()
	verdict := "within the allowed loads by this estimate (the safety factor is the only margin left for its error)"
	switch {
	case !r.WithinLimits:
		verdict = "ABOVE the allowed load (rating ÷ safety factor): do not run the points marked !"
	case len(r.UnratedLoaded) > 0:
		verdict = "NOT VERIFIED: no rating for " + strings.Join(r.UnratedLoaded, ", ") + ", which carry load"
	}
	fmt.Fprintf(w, "  worst %.1f %% (%s at α %.4g°), %s; weight %s\n", 100*r.MaxUtilization, r.Limiting.Component, r.Limiting.Alpha,
		verdict, map[bool]string{true: "included", false: "left out (unconservative)"}[r.WeightIncluded])
	fmt.Fprintf(w, "  allowed load reached at dynamic pressure %s by this estimate (%s at α %.4g°)\n", u.q(float64(r.MaxSafeDynamicPressure), "Pa", 5),
		r.MaxSafeLimiting.Component, r.MaxSafeLimiting.Alpha)
	writeUncertainty(w, r)
}

// writeNotes prints the warnings and cautions as lists.
func writeNotes(w io.Writer, warnings, cautions []string) {
	for _, l := range []struct {
		title string
		items []string
	}{{"Warnings", warnings}, {"Cautions", cautions}} {
		if len(l.items) == 0 {
			continue
		}
		section(w, l.title)
		for _, s := range l.items {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	}
}

// writeAPIJSON writes v as json.Marshal does, which is how the service's handlers
// write their answers (no indentation, no trailing newline).
func writeAPIJSON(w io.Writer, v any) error {
	b, err := json.Marshal(v)
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}
