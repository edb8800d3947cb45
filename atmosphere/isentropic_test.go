package atmosphere_test

import (
	"fmt"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/atmosphere"
)

func TestNACA1135Table(t *testing.T) {
	t.Parallel()
	// NACA Report 1135 (Ames Research Staff 1953), Table I (subsonic) and Table II
	// (supersonic), γ = 1.4, five significant figures as tabulated, all from memory:
	// the tolerance is half a unit in the fifth digit.
	const g = atmosphere.Gamma
	cases := []struct {
		name      string
		got, want float64
		tol       float64 // absolute
	}{
		{"M=0.5 p/p0", 1 / atmosphere.PressureRatio(0.5, g), 0.84302, 5e-6},
		{"M=0.5 T/T0", 1 / atmosphere.TemperatureRatio(0.5, g), 0.95238, 5e-6},
		{"M=1 p/p0", 1 / atmosphere.PressureRatio(1, g), 0.52828, 5e-6},
		{"M=1 T/T0", 1 / atmosphere.TemperatureRatio(1, g), 0.83333, 5e-6},
		{"M=1 ρ/ρ0", 1 / atmosphere.DensityRatio(1, g), 0.63394, 5e-6},
		{"M=2 p/p0", 1 / atmosphere.PressureRatio(2, g), 0.12780, 5e-6},
		{"M=2 T/T0", 1 / atmosphere.TemperatureRatio(2, g), 0.55556, 5e-6},
		// Normal-shock total-pressure ratio p0'/p0 = pitot pressure over isentropic
		// stagnation pressure (NACA 1135 Table II; from memory).
		{"M=2 p0'/p0", atmosphere.PitotPressureRatio(2, g) / atmosphere.PressureRatio(2, g), 0.72087, 5e-6},
		{"M=3 p0'/p0", atmosphere.PitotPressureRatio(3, g) / atmosphere.PressureRatio(3, g), 0.32834, 5e-6},
		// Zero Mach number: every ratio is 1 (definition).
		{"M=0 p0/p", atmosphere.PressureRatio(0, g), 1, 0},
		{"M=0 pitot", atmosphere.PitotPressureRatio(0, g), 1, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			assert.InDelta(t, c.want, c.got, c.tol, "NACA Report 1135 Tables I and II (from memory)")
		})
	}
}

func TestIsentropicFixture(t *testing.T) {
	t.Parallel()
	// fluids.compressible.P_stagnation and T_stagnation (fixture isentropic.csv),
	// γ = 1.4, 1.3 and 5/3, Mach 0 to 5.
	rows := readFixture(t, "isentropic.csv")
	require.GreaterOrEqual(t, len(rows), 300, "fixture rows")
	const tol = 1e-12 // relative; same closed forms, rounding only
	for _, r := range rows {
		g, m := r[0], r[1]
		assert.InEpsilon(t, r[2], atmosphere.PressureRatio(m, g), tol, "γ %g M %g: p0/p, python3-fluids P_stagnation", g, m)
		assert.InEpsilon(t, r[3], atmosphere.TemperatureRatio(m, g), tol, "γ %g M %g: T0/T, python3-fluids T_stagnation", g, m)
		if m <= 1 {
			assert.InEpsilon(t, r[2], atmosphere.PitotPressureRatio(m, g), tol, "γ %g M %g: subsonic pitot ratio is p0/p (python3-fluids)", g, m)
		}
	}
}

func TestCriticalFixture(t *testing.T) {
	t.Parallel()
	// fluids.compressible.T_critical_flow and P_critical_flow (fixture
	// critical.csv): T*/T0 = 2/(γ+1), p*/p0 = (2/(γ+1))^(γ/(γ−1)), written there
	// independently of the stagnation relations.
	for _, r := range readFixture(t, "critical.csv") {
		g := r[0]
		t.Run(fmt.Sprintf("γ=%.4g", g), func(t *testing.T) {
			t.Parallel()
			assert.InEpsilon(t, r[1], 1/atmosphere.TemperatureRatio(1, g), 1e-14, "T*/T0, python3-fluids T_critical_flow")
			assert.InEpsilon(t, r[2], 1/atmosphere.PressureRatio(1, g), 1e-14, "p*/p0, python3-fluids P_critical_flow")
		})
	}
}

func TestPitotBranchesMeet(t *testing.T) {
	t.Parallel()
	// The isentropic and Rayleigh pitot formulas give the same value at Mach 1
	// (physics.md §2), and the ratio rises monotonically through it.
	for _, g := range []float64{1.4, 1.3, 5.0 / 3.0} {
		t.Run(fmt.Sprintf("γ=%.4g", g), func(t *testing.T) {
			t.Parallel()
			below := atmosphere.PitotPressureRatio(math.Nextafter(1, 0), g)
			at := atmosphere.PitotPressureRatio(1, g)
			above := atmosphere.PitotPressureRatio(math.Nextafter(1, 2), g)
			want := math.Pow((g+1)/2, g/(g-1)) // both branches at M = 1
			for _, v := range []float64{below, at, above} {
				assert.InEpsilon(t, want, v, 1e-14, "pitot ratio near Mach 1, both branches (physics.md §2)")
			}
			prev := 0.0
			for m := 0.0; m <= 5; m += 0.001 {
				v := atmosphere.PitotPressureRatio(m, g)
				require.GreaterOrEqual(t, v, prev, "pitot ratio falls at M = %g", m)
				prev = v
			}
		})
	}
}
