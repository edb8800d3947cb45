package main

import (
	"bytes"
	"encoding/json"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/atmosphere"
)

func TestAtmosphereCommandTable(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want []string // lines or fragments the table must hold
	}{
		{"tropopause SI", []string{"atmosphere", "--altitude", "11000"}, []string{
			"U.S. Standard Atmosphere 1976, standard day\n",
			"geometric altitude     11000.0 m\n",
			"temperature            216.774 K (-56.38 °C)\n", // 288.15 − 0.0065·10981.0
			// Pressure, density and speed of sound: regression values (the
			// program's own output at 10 981 m'; physics.md §1 has the model).
			"pressure               22700 Pa\n",
			"density                0.364802 kg/m³\n",
			"speed of sound         295.154 m/s\n",
		}},
		{"FL350 hot day US", []string{"atmosphere", "--pressure-altitude", "10668", "--delta-isa", "10", "--units", "us"}, []string{
			"standard day +10 K",
			"35000 ft\n",                 // 10668 m / 0.3048 m/ft
			"23842.3 Pa",                 // the 1976 standard at FL350: 23 842 Pa (from memory); the last digit a regression value
			"497.957 psf (7.04063 inHg)", // 23842.3/47.8803 and /3386.389
			"411.854 °R",                 // (218.808 + 10) K · 1.8
			"994.869 ft/s",               // √(1.4·287.0529·228.808)/0.3048, worked by hand
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var out, errOut bytes.Buffer
			require.NoError(t, run(c.args, strings.NewReader(""), &out, &errOut), "run (stderr %q)", errOut.String())
			for _, w := range c.want {
				assert.Contains(t, out.String(), w, "output")
			}
		})
	}
}

func TestAtmosphereCommandJSON(t *testing.T) {
	var out bytes.Buffer
	require.NoError(t, run([]string{"atmosphere", "--altitude", "11000", "--delta-isa", "-15", "--json"}, strings.NewReader(""), &out, &bytes.Buffer{}))
	// Exactly the names of GET /v1/atmosphere, nothing more.
	var fields map[string]float64
	require.NoError(t, json.Unmarshal(out.Bytes(), &fields), "%s", out.String())
	names := []string{"altitude", "geopotential_altitude", "pressure_altitude", "delta_isa", "temperature",
		"pressure", "density", "speed_of_sound", "viscosity", "kinematic_viscosity"}
	assert.Len(t, fields, len(names), "fields: %s", out.String())
	want, err := atmosphere.At(11000, -15)
	require.NoError(t, err)
	wantJSON, err := json.Marshal(want)
	require.NoError(t, err)
	assert.Equal(t, string(wantJSON), strings.TrimSpace(out.String()), "JSON")
	for _, n := range names {
		assert.Contains(t, fields, n, "fields")
	}
	assert.InDelta(t, 216.77351270445553-15, fields["temperature"], 1e-9, "temperature, K: the standard 216.7735 K less 15 K")
}

// TestAtmosphereCommandErrors checks that the command reads its flags as GET
// /v1/atmosphere reads its query, naming the flag in each error.
func TestAtmosphereCommandErrors(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"no altitude", []string{"atmosphere"}, "--altitude: give altitude (geometric, m) or pressure_altitude (m)"},
		{"both altitudes", []string{"atmosphere", "--altitude", "1", "--pressure-altitude", "1"}, "--pressure-altitude: give only one of"},
		{"above 86 km", []string{"atmosphere", "--altitude", "90000"}, "--altitude: atmosphere: altitude 90000 m is outside -5000 m to 86000 m"},
		{"above 86 km in feet", []string{"atmosphere", "--altitude", "300000 ft"}, "--altitude: atmosphere: altitude 91440 m is outside -5000 m to 86000 m"},
		{"NaN altitude", []string{"atmosphere", "--altitude", "NaN"}, `--altitude: quantity "NaN" does not start with a number`},
		{"too cold", []string{"atmosphere", "--altitude", "0", "--delta-isa", "-150"}, "--delta-isa: atmosphere: delta_isa -150 K is outside -100 K to 100 K"},
		{"wrong dimension", []string{"atmosphere", "--altitude", "35 kg"}, `--altitude: unit "kg" is a mass`},
		{"bad units", []string{"atmosphere", "--altitude", "0", "--units", "imperial"}, `--units "imperial": want si or us`},
		{"not a number", []string{"atmosphere", "--altitude", "high"}, `--altitude: quantity "high" does not start with a number`},
		{"stray argument", []string{"atmosphere", "--altitude", "0", "extra"}, "unknown command"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var out bytes.Buffer
			err := run(c.args, strings.NewReader(""), &out, &bytes.Buffer{})
			require.Error(t, err, "output %s", out.String())
			assert.Contains(t, err.Error(), c.want)
			assert.Zero(t, out.Len(), "printed %q on error", out.String())
		})
	}
}

// TestAtmosphereCommandUnits checks that each flag takes a unit string as the API
// does: the same state as the SI number.
func TestAtmosphereCommandUnits(t *testing.T) {
	cases := []struct {
		name     string
		withUnit []string
		si       []string
	}{
		// 35 000 ft × 0.3048 m/ft (exact, NIST SP 811) = 10 668 m.
		{"feet", []string{"--altitude", "35000 ft"}, []string{"--altitude", "10668"}},
		{"pressure altitude in km", []string{"--pressure-altitude", "10.5 km"}, []string{"--pressure-altitude", "10500"}},
		// A temperature difference of 10 °C is 10 K.
		{"offset in degC", []string{"--altitude", "1000", "--delta-isa", "10 degC"}, []string{"--altitude", "1000", "--delta-isa", "10"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a, err := runCmd(t, "", append([]string{"atmosphere", "--json"}, c.withUnit...)...)
			require.NoError(t, err)
			b, err := runCmd(t, "", append([]string{"atmosphere", "--json"}, c.si...)...)
			require.NoError(t, err)
			assert.JSONEq(t, b, a)
		})
	}
}
