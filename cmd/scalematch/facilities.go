package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/check"
)

// facilitiesOptions are the facilities command's settings.
type facilitiesOptions struct {
	data     string
	jsonOut  bool
	database string // SCALEMATCH_DATABASE_URL
}

func newFacilitiesCmd() *cobra.Command {
	var o facilitiesOptions
	cmd := &cobra.Command{
		Use:   "facilities [list | show ID]",
		Short: "List the facility catalog or show one facility",
		Long: `List the facility catalog (the default) or show one facility with its balances.

The catalog is the store under --data when one exists there (or PostgreSQL when
SCALEMATCH_DATABASE_URL is set), else the built-in demo catalog. Tables are in SI
units (m, m/s, Pa, K, N, N·m); --json prints exactly what GET /v1/facilities or
GET /v1/facilities/{id} would return.`,
		Args: cobra.MaximumNArgs(2),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := flagsFromEnv(cmd.Flags(), os.LookupEnv); err != nil {
				return err
			}
			o.database = os.Getenv(envDatabaseURL)
			return runFacilities(cmd.Context(), o, args, cmd.OutOrStdout())
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.data, "data", "./scalematch-data", "directory of the SQLite catalog")
	f.BoolVar(&o.jsonOut, "json", false, "print JSON as the API returns it")
	return cmd
}

// demoCatalog answers the facilities command from the built-in demo facilities.
type demoCatalog struct{}

func (demoCatalog) Facilities(context.Context) ([]facilities.Facility, error) {
	return facilities.Demo(), nil
}

func (demoCatalog) Facility(_ context.Context, id string) (facilities.Facility, error) {
	if f, ok := facilities.DemoFacility(id); ok {
		return f, nil
	}
	return facilities.Facility{}, facilities.FacilityNotFound(id)
}

// facilityReader is the part of a catalog the facilities command reads.
type facilityReader interface {
	Facilities(ctx context.Context) ([]facilities.Facility, error)
	Facility(ctx context.Context, id string) (facilities.Facility, error)
}

// demoCatalogName is how the commands name the built-in demo catalog.
const demoCatalogName = "demo catalog"

// openCatalog opens the catalog every command reads, the same way: PostgreSQL when
// database (SCALEMATCH_DATABASE_URL) is set, else the SQLite store under data when
// one exists there, else the built-in demo catalog (a nil Catalog). where names it
// ("postgres", "sqlite PATH", "demo catalog"); close is nil for the demo catalog.
func openCatalog(ctx context.Context, data, database string) (cat facilities.Catalog, where string, close func() error, err error) {
	if database != "" {
		db, where, err := openStore(ctx, database, data)
		if err != nil {
			return nil, "", nil, fmt.Errorf("opening the catalog %s: %w", where, err)
		}
		return db, where, db.Close, nil
	}
	if data == "" {
		return nil, demoCatalogName, nil, nil
	}
	path := sqlite.Path(data)
	if _, err := os.Stat(path); errors.Is(err, fs.ErrNotExist) {
		return nil, demoCatalogName, nil, nil
	} else if err != nil {
		return nil, "", nil, err
	}
	db, err := sqlite.Open(ctx, path)
	if err != nil {
		return nil, "", nil, fmt.Errorf("opening the catalog %s: %w", path, err)
	}
	return db, "sqlite " + path, db.Close, nil
}

// inCatalog returns err with a not-found error's message naming the catalog the
// command looked in.
func inCatalog(err error, where string) error {
	var de *check.Error
	if errors.As(err, &de) && de.Code == check.CodeNotFound && where != "" {
		c := *de
		c.Message = fmt.Sprintf("%s (looked in the %s)", c.Message, where)
		if where != demoCatalogName {
			c.Message = fmt.Sprintf("%s (looked in the catalog: %s)", de.Message, where)
		}
		return &c
	}
	return err
}

// openReader opens the store the command reads and says which it is; close is nil
// for the demo catalog.
func openReader(ctx context.Context, o facilitiesOptions) (facilityReader, string, func() error, error) {
	cat, where, closeFn, err := openCatalog(ctx, o.data, o.database)
	if err != nil || cat == nil {
		return demoCatalog{}, where, nil, err
	}
	return cat, where, closeFn, nil
}

func runFacilities(ctx context.Context, o facilitiesOptions, args []string, w io.Writer) (err error) {
	action := "list"
	if len(args) > 0 {
		action = args[0]
	}
	switch {
	case action == "list" && len(args) <= 1:
	case action == "show" && len(args) == 2:
	default:
		return fmt.Errorf("facilities: want \"list\" or \"show ID\", got %q", strings.Join(args, " "))
	}
	if ctx == nil {
		ctx = context.Background()
	}
	cat, where, closeFn, err := openReader(ctx, o)
	if err != nil {
		return err
	}
	if closeFn != nil {
		defer func() { err = errors.Join(err, closeFn()) }()
	}
	if action == "list" {
		fs, err := cat.Facilities(ctx)
		if err != nil {
			return err
		}
		if o.jsonOut {
			return writeJSON(w, schema.FacilityList{Facilities: fs})
		}
		return listTable(w, fs, where)
	}
	f, err := cat.Facility(ctx, args[1])
	if err != nil {
		return explain(inCatalog(err, where))
	}
	if o.jsonOut {
		return writeJSON(w, f)
	}
	return showTable(w, f, where)
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// rangeText writes a range as "min–max" with the given scale and precision, or
// one value when fixed; "-" when absent.
func rangeText(r *facilities.Range, scale float64, prec int) string {
	if r == nil {
		return "-"
	}
	lo := strconv.FormatFloat(r.Min*scale, 'f', prec, 64)
	if r.Fixed() {
		return lo
	}
	return lo + "–" + strconv.FormatFloat(r.Max*scale, 'f', prec, 64)
}

func optText(v *float64, scale float64, prec int) string {
	if v == nil {
		return "-"
	}
	return strconv.FormatFloat(*v*scale, 'f', prec, 64)
}

func listTable(w io.Writer, fs []facilities.Facility, where string) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	// The style of every table of the tool: a heading line, then indented rows with
	// lower-case column names that carry their units.
	fmt.Fprintf(w, "Facilities of the %s: %d facilities\n", where, len(fs))
	fmt.Fprintln(tw, "  id\tversion\tmedium\tsection w × h m\twalls\tMach\tspeed m/s\tp0 kPa\tT0 K\tq max kPa\tbalances")
	for _, f := range fs {
		var ids []string
		for _, b := range f.Balances {
			ids = append(ids, b.ID)
		}
		fmt.Fprintf(tw, "  %s\t%d\t%s\t%.2f × %.2f\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n",
			f.ID, f.Version, f.Medium.Kind, f.TestSection.Width, f.TestSection.Height, f.TestSection.Walls,
			rangeText(f.Mach, 1, 2), rangeText(f.Speed, 1, 1), rangeText(stagnationRange(&f), 1e-3, 1),
			rangeText(&f.StagnationTemperature, 1, 0), optText(f.MaxDynamicPressure, 1e-3, 1), strings.Join(ids, ", "))
	}
	return tw.Flush()
}

func showTable(w io.Writer, f facilities.Facility, where string) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(w, "Facility %s (%s)\n", f.ID, where)
	rows := [][2]string{
		{"id", f.ID},
		{"version", strconv.Itoa(f.Version)},
		{"name", f.Name},
		{"medium", f.Medium.Kind},
		{"test section (m)", fmt.Sprintf("%.3g wide × %.3g high × %.3g long, %s walls, %.4g m²",
			f.TestSection.Width, f.TestSection.Height, f.TestSection.Length, f.TestSection.Walls, f.TestSection.CrossSection())},
		{"Mach", rangeText(f.Mach, 1, 3)},
		{"speed (m/s)", rangeText(f.Speed, 1, 2)},
		{"stagnation pressure (Pa)", rangeText(stagnationRange(&f), 1, 0)},
		{"test-section static pressure (Pa)", rangeText(f.StaticPressure, 1, 0)},
		{"stagnation temperature (K)", rangeText(&f.StagnationTemperature, 1, 2)},
		{"max dynamic pressure (Pa)", optText(f.MaxDynamicPressure, 1, 0)},
		{"max Reynolds number per metre (1/m)", optText(f.MaxReynoldsPerMeter, 1, 0)},
		{"max span fraction", optText(f.MaxSpanFraction, 1, 3)},
		{"max blockage", optText(f.MaxBlockage, 1, 3)},
	}
	for _, r := range rows {
		fmt.Fprintf(tw, "  %s\t%s\n", r[0], r[1])
	}
	tw.Flush()
	section(w, "Balances")
	fmt.Fprintln(tw, "  balance\tnormal N\taxial N\tside N\trolling N·m\tpitching N·m\tyawing N·m\tsafety factor\tcombined rows")
	for _, b := range f.Balances {
		l := b.Limits
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t%s\t%s\t%.2f\t%d\n", b.ID,
			optText(l.Normal, 1, 0), optText(l.Axial, 1, 0), optText(l.Side, 1, 0),
			optText(l.RollingMoment, 1, 0), optText(l.PitchingMoment, 1, 0), optText(l.YawingMoment, 1, 0),
			b.SafetyFactor, len(b.Combined))
	}
	tw.Flush()
	fmt.Fprintln(w, "\nRatings as recorded in the catalog; the facility's approved limits and procedures govern.")
	return tw.Flush()
}

// stagnationRange is the facility's stagnation pressure range, nil (shown as "-")
// for a water facility that sets its static pressure instead.
func stagnationRange(f *facilities.Facility) *facilities.Range {
	if f.StaticPressure != nil {
		return nil
	}
	return &f.StagnationPressure
}
