package facilities

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// nitrogenStateBefore is nitrogenState as it was before it wrote its state in
// place (nitrogenStateIn), returning the State by value (regression
// reference: the code of commit ea065cc, copied).
func (f *Facility) nitrogenStateBefore(s Setting, g *Stagnation) (State, error) {
	m := f.Medium
	t0, p0 := s.StagnationTemperature, s.StagnationPressure
	gamma, r := m.Gamma(), m.GasConstant()
	if s.Speed > 0 {
		if den := gamma*r*t0 - 0.5*(gamma-1)*s.Speed*s.Speed; !(den > 0) || s.Speed/math.Sqrt(den) > 1.05*MaxSettingMach {
			return State{}, speedError(s.Speed, gamma, r, t0)
		}
	}
	var fs nitrogenStatic
	var err error
	if g != nil {
		fs, err = nitrogenFreeStreamFrom(g, s.Mach, s.Speed)
	} else {
		fs, err = nitrogenFreeStream(t0, p0, s.Mach, s.Speed)
	}
	if err != nil {
		return State{}, err
	}
	if fs.mach > MaxSettingMach {
		return State{}, speedError(s.Speed, gamma, r, t0)
	}
	t, p, rho := fs.T, fs.p, fs.rho
	if margin := nitrogenMargin(m, t, p); margin < 0 {
		return State{}, Invalid(settingMessage, []FieldError{{Field: "stagnation_temperature", Message: fmt.Sprintf(
			"%g K gives a free stream of %.4g K at %.4g Pa, below nitrogen's saturation temperature %.4g K there: raise the stagnation temperature or lower the Mach number or pressure",
			t0, t, p, t/(1+margin))}})
	}
	mu := NitrogenViscosity(t, rho)
	v := fs.speed
	return gasState(fs.mach, v, p0, t0, Static{Temperature: t, Pressure: p, Density: rho, Viscosity: mu,
		SpeedOfSound: fs.a, Compressibility: p / (rho * r * t)}), nil
}

// stateBefore is StateFrom for nitrogen as it was (regression reference:
// the checks of the setting and nitrogenStateBefore, the code of commit
// ea065cc).
func (f *Facility) stateBefore(g *Stagnation, s Setting) (State, error) {
	if g != nil && (g.P0 != s.StagnationPressure || g.T0 != s.StagnationTemperature) {
		g = nil
	}
	if errs := settingErrors(s, nil); len(errs) > 0 {
		return State{}, Invalid(settingMessage, errs)
	}
	return f.nitrogenStateBefore(s, g)
}

// TestStateFromInMatchesBefore: State, StateFrom and StateFromIn (written in
// place over a state already there) give the nitrogen state of the code
// before, to the bit, and the same error, over 4000 random settings of the
// demo cryogenic tunnel's kind: Mach numbers and speeds, stagnation states
// from 80 to 320 K and 50 to 500 kPa (some below saturation in the free
// stream), from the stagnation state at the setting's own (p0, T0), at
// another one (ignored), or none, and a few bad settings; an air facility's
// StateFromIn is its StateFrom.
func TestStateFromInMatchesBefore(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(61, 67))
	f := Facility{ID: "n2", Medium: Medium{Kind: MediumNitrogen}}
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	failed := 0
	for i := range 4000 {
		s := Setting{StagnationPressure: u(5e4, 5e5), StagnationTemperature: u(80, 320)}
		if i%4 == 3 {
			s.Speed = u(20, 400)
		} else {
			s.Mach = u(0.05, 1.2)
		}
		switch i % 97 {
		case 5:
			s.StagnationPressure = -1
		case 11:
			s.StagnationTemperature = math.NaN()
		case 17:
			s.Mach, s.Speed = 0.5, 100
		case 23:
			s.Mach = MaxSettingMach * 1.5
		}
		var g *Stagnation
		switch i % 3 {
		case 1:
			if s.StagnationPressure > 0 && s.StagnationTemperature > 0 {
				g = new(Stagnation)
				NitrogenStagnationIn(g, s.StagnationPressure, s.StagnationTemperature)
			}
		case 2:
			g = new(Stagnation)
			NitrogenStagnationIn(g, 2e5, 200)
		}
		name := fmt.Sprintf("setting %d: %+v", i, s)
		want, wantErr := f.stateBefore(g, s)
		st := State{Mach: 9, Speed: 9, Static: Static{Viscosity: 9}, ReynoldsPerMeter: 9} // overwritten
		err := f.StateFromIn(&st, g, s)
		from, fromErr := f.StateFrom(g, s)
		plain, plainErr := f.State(s)
		if wantErr != nil {
			failed++
			require.Error(t, err, name)
			assert.Equal(t, wantErr.Error(), err.Error(), name)
			assert.Equal(t, wantErr.Error(), fromErr.Error(), name)
			assert.Equal(t, State{}, st, name)
			assert.Equal(t, State{}, from, name)
			continue
		}
		require.NoError(t, err, name)
		require.NoError(t, fromErr, name)
		assert.Equal(t, want, st, name)
		assert.Equal(t, want, from, name)
		if g == nil || (g.P0 == s.StagnationPressure && g.T0 == s.StagnationTemperature) {
			// From its own stagnation state or none: State's, to the bit.
			require.NoError(t, plainErr, name)
			assert.Equal(t, want, plain, name)
		}
	}
	t.Logf("%d settings refused", failed)
	require.Greater(t, failed, 100)
	require.Less(t, failed, 3000)

	air := Facility{ID: "a", Medium: Medium{Kind: MediumAir}}
	for i := range 200 {
		s := Setting{Mach: u(0.05, 1.2), StagnationPressure: u(5e4, 5e5), StagnationTemperature: u(200, 320)}
		want, wantErr := air.StateFrom(nil, s)
		var st State
		require.NoError(t, wantErr)
		require.NoError(t, air.StateFromIn(&st, nil, s), "setting %d", i)
		assert.Equal(t, want, st, "setting %d", i)
	}
}

// TestSettingOKMatchesErrors: settingOK holds exactly where settingErrors
// finds nothing, over every combination of the stagnation pressure and
// temperature, Mach number and speed from NaN, ±Inf, ±MaxFloat64, the
// smallest numbers, 0, 1 and each side of MaxSettingMach.
func TestSettingOKMatchesErrors(t *testing.T) {
	t.Parallel()
	vs := []float64{math.NaN(), math.Inf(-1), -math.MaxFloat64, -1, -math.SmallestNonzeroFloat64, 0,
		math.SmallestNonzeroFloat64, 0.5, 1, MaxSettingMach, math.Nextafter(MaxSettingMach, math.Inf(1)), 1e5,
		math.MaxFloat64, math.Inf(1)}
	ok := 0
	for _, p := range vs {
		for _, t0 := range vs {
			for _, m := range vs {
				for _, v := range vs {
					s := Setting{Mach: m, Speed: v, StagnationPressure: p, StagnationTemperature: t0}
					want := len(settingErrors(s, nil)) == 0
					require.Equal(t, want, settingOK(s), "%+v", s)
					if want {
						ok++
					}
				}
			}
		}
	}
	require.Greater(t, ok, 100)
}
