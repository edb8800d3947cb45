package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"scalematch/atmosphere"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// rankinePerKelvin converts a temperature difference or an absolute temperature
// from K to °R (1.8, from the unit table's exact definition).
const rankinePerKelvin = 1 / similarity.Rankine

// newAtmosphereCmd is `scalematch atmosphere`: the standard atmosphere at one
// altitude, as a table or as the JSON of GET /v1/atmosphere.
func newAtmosphereCmd() *cobra.Command {
	var (
		altitude, pressureAltitude, deltaISA string
		asJSON                               bool
		units                                string
	)
	cmd := &cobra.Command{
		Use:   "atmosphere (--altitude Z | --pressure-altitude Z) [--delta-isa DT]",
		Short: "Print the U.S. Standard Atmosphere 1976 at an altitude",
		Long: `Print the U.S. Standard Atmosphere 1976 at a geometric altitude or a pressure
altitude (-5 km to 86 km), on a day whose temperature differs from the standard by
--delta-isa at the same pressure. Each value is an SI number (m, K) or a string
with a unit, exactly as GET /v1/atmosphere takes it: "35000 ft", "10 degC".

By default a table in SI units; --units us adds U.S. customary units beside them.
--json prints exactly what GET /v1/atmosphere returns.`,
		Example: `  scalematch atmosphere --altitude 11000
  scalematch atmosphere --altitude "35000 ft" --delta-isa "10 degC" --units us
  scalematch atmosphere --pressure-altitude 10668 --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if units != "si" && units != "us" {
				return fmt.Errorf("--units %q: want si or us", units)
			}
			flags := map[string]*string{"altitude": &altitude, "pressure_altitude": &pressureAltitude, "delta_isa": &deltaISA}
			flagName := func(key string) string { return strings.ReplaceAll(key, "_", "-") }
			s, err := app.AtmosphereQuery(
				func(key string) string {
					if p, ok := flags[key]; ok {
						return *p
					}
					return ""
				},
				func(key string) bool { return cmd.Flags().Changed(flagName(key)) })
			if err != nil {
				var de *check.Error
				if errors.As(err, &de) {
					for i := range de.Fields {
						de.Fields[i].Field = "--" + flagName(de.Fields[i].Field)
					}
				}
				return explain(err)
			}
			out := cmd.OutOrStdout()
			if asJSON {
				return json.NewEncoder(out).Encode(s)
			}
			return writeAtmosphere(out, s, units == "us")
		},
	}
	f := cmd.Flags()
	f.StringVar(&altitude, "altitude", "", `geometric altitude: m, or a length with a unit ("35000 ft")`)
	f.StringVar(&pressureAltitude, "pressure-altitude", "", "pressure altitude (ICAO: geopotential altitude of the standard pressure): m, or a length with a unit")
	f.StringVar(&deltaISA, "delta-isa", "0", `temperature offset from the standard day at the same pressure: K, or with a unit ("10 degC"); -100 K to 100 K`)
	f.BoolVar(&asJSON, "json", false, "print the JSON of GET /v1/atmosphere")
	f.StringVar(&units, "units", "si", "units of the table: si, or us to add U.S. customary units")
	return cmd
}

// writeAtmosphere prints the state as a table, one quantity a line with its SI unit
// and, when us is set, its value in U.S. customary units.
func writeAtmosphere(w io.Writer, s atmosphere.State, us bool) error {
	day := "standard day"
	if s.DeltaISA != 0 {
		day = fmt.Sprintf("standard day %+g K", s.DeltaISA)
	}
	if _, err := fmt.Fprintf(w, "U.S. Standard Atmosphere 1976, %s\n", day); err != nil {
		return err
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	row := func(name, si, customary string) {
		if us {
			fmt.Fprintf(tw, "  %s\t%s\t%s\n", name, si, customary)
		} else {
			fmt.Fprintf(tw, "  %s\t%s\n", name, si)
		}
	}
	ft := func(m float64) string { return fmt.Sprintf("%.0f ft", m/similarity.Foot) }
	tR := s.Temperature * rankinePerKelvin
	row("geometric altitude", fmt.Sprintf("%.1f m", s.Altitude), ft(s.Altitude))
	row("geopotential altitude", fmt.Sprintf("%.1f m'", s.GeopotentialAltitude), ft(s.GeopotentialAltitude)+"'")
	row("pressure altitude", fmt.Sprintf("%.1f m", s.PressureAltitude), ft(s.PressureAltitude))
	row("temperature offset", fmt.Sprintf("%+g K", s.DeltaISA), fmt.Sprintf("%+g °R", s.DeltaISA*rankinePerKelvin))
	row("temperature", fmt.Sprintf("%.3f K (%.2f °C)", s.Temperature, s.Temperature-273.15),
		fmt.Sprintf("%.3f °R (%.2f °F)", tR, tR-similarity.FahrenheitZero))
	row("pressure", fmt.Sprintf("%.6g Pa", s.Pressure),
		fmt.Sprintf("%.6g psf (%.6g inHg)", s.Pressure/similarity.PoundPerSquareFoot, s.Pressure/similarity.InchOfMercury))
	row("density", fmt.Sprintf("%.6g kg/m³", s.Density), fmt.Sprintf("%.6g slug/ft³", s.Density*similarity.Foot*similarity.Foot*similarity.Foot/similarity.Slug))
	row("speed of sound", fmt.Sprintf("%.6g m/s", s.SpeedOfSound), fmt.Sprintf("%.6g ft/s", s.SpeedOfSound/similarity.Foot))
	row("dynamic viscosity", fmt.Sprintf("%.6g Pa·s", s.Viscosity), fmt.Sprintf("%.6g lbf·s/ft²", s.Viscosity/similarity.PoundPerSquareFoot))
	row("kinematic viscosity", fmt.Sprintf("%.6g m²/s", s.KinematicViscosity), fmt.Sprintf("%.6g ft²/s", s.KinematicViscosity/(similarity.Foot*similarity.Foot)))
	return tw.Flush()
}
