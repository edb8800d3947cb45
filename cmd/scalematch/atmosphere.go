package main

import (
	"encoding/json"
	"fmt"
	"io"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"scalematch/atmosphere"
)

// U.S. customary units in SI, from their exact definitions (NIST Special
// Publication 811, appendix B): the international foot and pound, the standard
// acceleration of gravity for the pound-force, the conventional inch of mercury.
const (
	footM        = 0.3048                        // m
	poundKg      = 0.45359237                    // kg
	poundForceN  = poundKg * atmosphere.G0       // N, 4.4482216152605
	slugKg       = poundForceN / footM           // kg, 14.593902937206
	psfPa        = poundForceN / (footM * footM) // Pa, 47.880258980336
	inchHgPa     = 3386.389                      // Pa, conventional inch of mercury
	rankinePerK  = 1.8                           // °R per K
	fahrenheit0R = 459.67                        // °R at 0 °F
)

// newAtmosphereCmd is `scalematch atmosphere`: the standard atmosphere at one
// altitude, as a table or as the JSON of GET /v1/atmosphere.
func newAtmosphereCmd() *cobra.Command {
	var (
		altitude, pressureAltitude, deltaISA float64
		asJSON                               bool
		units                                string
	)
	cmd := &cobra.Command{
		Use:   "atmosphere (--altitude M | --pressure-altitude M) [--delta-isa K]",
		Short: "Print the U.S. Standard Atmosphere 1976 at an altitude",
		Long: `Print the U.S. Standard Atmosphere 1976 at a geometric altitude or a pressure
altitude (both in metres, -5 km to 86 km), on a day whose temperature differs from
the standard by --delta-isa kelvin at the same pressure.

By default a table in SI units; --units us adds U.S. customary units beside them.
--json prints exactly what GET /v1/atmosphere returns.`,
		Example: `  scalematch atmosphere --altitude 11000
  scalematch atmosphere --pressure-altitude 10668 --delta-isa 10 --units us
  scalematch atmosphere --altitude 11000 --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if units != "si" && units != "us" {
				return fmt.Errorf("--units %q: want si or us", units)
			}
			hasAlt, hasPA := cmd.Flags().Changed("altitude"), cmd.Flags().Changed("pressure-altitude")
			switch {
			case hasAlt && hasPA:
				return fmt.Errorf("give only one of --altitude and --pressure-altitude")
			case !hasAlt && !hasPA:
				return fmt.Errorf("give --altitude (geometric, m) or --pressure-altitude (m)")
			}
			var (
				s   atmosphere.State
				err error
			)
			if hasPA {
				s, err = atmosphere.AtPressureAltitude(pressureAltitude, deltaISA)
			} else {
				s, err = atmosphere.At(altitude, deltaISA)
			}
			if err != nil {
				return err
			}
			out := cmd.OutOrStdout()
			if asJSON {
				return json.NewEncoder(out).Encode(s)
			}
			return writeAtmosphere(out, s, units == "us")
		},
	}
	f := cmd.Flags()
	f.Float64Var(&altitude, "altitude", 0, "geometric altitude, m")
	f.Float64Var(&pressureAltitude, "pressure-altitude", 0, "pressure altitude (ICAO: geopotential altitude of the standard pressure), m")
	f.Float64Var(&deltaISA, "delta-isa", 0, "temperature offset from the standard day at the same pressure, K (-100 to 100)")
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
	ft := func(m float64) string { return fmt.Sprintf("%.0f ft", m/footM) }
	tR := s.Temperature * rankinePerK
	row("geometric altitude", fmt.Sprintf("%.1f m", s.Altitude), ft(s.Altitude))
	row("geopotential altitude", fmt.Sprintf("%.1f m'", s.GeopotentialAltitude), ft(s.GeopotentialAltitude)+"'")
	row("pressure altitude", fmt.Sprintf("%.1f m", s.PressureAltitude), ft(s.PressureAltitude))
	row("temperature offset", fmt.Sprintf("%+g K", s.DeltaISA), fmt.Sprintf("%+g °R", s.DeltaISA*rankinePerK))
	row("temperature", fmt.Sprintf("%.3f K (%.2f °C)", s.Temperature, s.Temperature-273.15),
		fmt.Sprintf("%.3f °R (%.2f °F)", tR, tR-fahrenheit0R))
	row("pressure", fmt.Sprintf("%.6g Pa", s.Pressure),
		fmt.Sprintf("%.6g psf (%.6g inHg)", s.Pressure/psfPa, s.Pressure/inchHgPa))
	row("density", fmt.Sprintf("%.6g kg/m³", s.Density), fmt.Sprintf("%.6g slug/ft³", s.Density*footM*footM*footM/slugKg))
	row("speed of sound", fmt.Sprintf("%.6g m/s", s.SpeedOfSound), fmt.Sprintf("%.6g ft/s", s.SpeedOfSound/footM))
	row("dynamic viscosity", fmt.Sprintf("%.6g Pa·s", s.Viscosity), fmt.Sprintf("%.6g lbf·s/ft²", s.Viscosity/psfPa))
	row("kinematic viscosity", fmt.Sprintf("%.6g m²/s", s.KinematicViscosity), fmt.Sprintf("%.6g ft²/s", s.KinematicViscosity/(footM*footM)))
	return tw.Flush()
}
