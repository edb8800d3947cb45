package facilities_test

import (
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

func closedSection(w, h float64, walls string) *facilities.Facility {
	return &facilities.Facility{ID: "t", TestSection: facilities.TestSection{Width: w, Height: h, Length: 3, Walls: walls}}
}

// TestWallsHandCase checks the closed-wall corrections of Barlow, Rae & Pope
// (1999), ch. 9–10 (from memory), against a case worked by hand:
//
//	C = 3.6 m × 1.5 m = 5.4 m² (a section invented for this case), A_frontal = 0.1 m², S = 0.5 m², M = 0.2, C_D = 0.05
//	A/C          = 0.1/5.4                      = 0.0046296296
//	(1−M²)^−1.5  = 0.96^−1.5                    = 1.0631466
//	ε_sb         = ¼·0.0046296296·1.0631466     = 0.0049219750
//	ε_wb         = 0.5/(4·5.4)·0.05·1.016/0.96  = 0.0012249228
//	ε            = 0.0061468978
//	q_c/q = 1 + (2 − 0.04)·ε                    = 1.0120479 (compressible form;
//	                                              the incompressible (1+ε)² is 1.0123316)
//	Δα at C_L = 1.2: 0.125·0.5/5.4·1.2          = 0.0138889 rad
func TestWallsHandCase(t *testing.T) {
	t.Parallel()
	f := closedSection(3.6, 1.5, facilities.WallsClosed)
	w := facilities.NewWalls(f, 0.1, 0.5, 0.2)
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"solid blockage", w.SolidBlockage, 0.0049219750, 1e-9},
		{"wake blockage", w.WakePerCD * 0.05, 0.0012249228, 1e-9},
		{"total blockage", w.Blockage(0.05), 0.0061468978, 1e-9},
		{"dynamic pressure factor", w.DynamicPressureFactor(0.05), 1.0120479, 1e-7},
		{"lift interference", w.LiftInterference(1.2), 0.0138889, 1e-7},
		{"incompressible solid blockage", facilities.SolidBlockage(0.1, 5.4, 0), 0.25 * 0.1 / 5.4, 1e-15},
	}
	for _, c := range cases {
		assert.InDelta(t, c.want, c.got, c.tol, "%s, worked by hand (Barlow, Rae & Pope 1999)", c.name)
	}
	assert.True(t, w.Applied, "closed walls at M 0.2: applied")
	assert.Empty(t, w.Warnings, "closed walls at M 0.2")
}

func TestWallsKinds(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name        string
		walls       string
		mach, area  float64
		applied     bool
		liftFactor  float64
		wantWarning string
	}{
		{"closed low speed", facilities.WallsClosed, 0.1, 0.1, true, 0.125 * 0.5 / 5.4, ""},
		{"closed past M 0.8", facilities.WallsClosed, 0.85, 0.1, true, 0.125 * 0.5 / 5.4, "unreliable"},
		{"closed supersonic", facilities.WallsClosed, 1.2, 0.1, false, 0.125 * 0.5 / 5.4, "do not apply"},
		{"closed high blockage", facilities.WallsClosed, 0.1, 0.5, true, 0.125 * 0.5 / 5.4, "frontal blockage"},
		{"open jet", facilities.WallsOpen, 0.1, 0.1, false, -0.125 * 0.5 / 5.4, ""},
		{"slotted", facilities.WallsSlotted, 0.7, 0.1, false, 0, "no classical"},
		{"porous", facilities.WallsPorous, 0.7, 0.1, false, 0, "no classical"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			w := facilities.NewWalls(closedSection(3.6, 1.5, c.walls), c.area, 0.5, c.mach)
			assert.Equal(t, c.applied, w.Applied, "applied")
			if !c.applied {
				assert.Equal(t, 1.0, w.DynamicPressureFactor(0.3), "q factor without a correction")
			}
			assert.InDelta(t, c.liftFactor, w.LiftFactor, 1e-15, "lift factor δ·S/C (Barlow, Rae & Pope 1999)")
			if c.wantWarning == "" {
				assert.Empty(t, w.Warnings)
			} else {
				assert.Contains(t, strings.Join(w.Warnings, " | "), c.wantWarning)
			}
		})
	}
}

func TestWallsFacilityDelta(t *testing.T) {
	t.Parallel()
	f := closedSection(2.0, 2.0, facilities.WallsClosed)
	d := 0.11
	f.LiftInterferenceFactor = &d
	w := facilities.NewWalls(f, 0.05, 0.4, 0.1)
	assert.InDelta(t, 0.11*0.4/4, w.LiftFactor, 1e-15, "lift factor from the facility's δ")
}

func TestWallsSummary(t *testing.T) {
	t.Parallel()
	w := facilities.NewWalls(closedSection(3.6, 1.5, facilities.WallsClosed), 0.1, 0.5, 0.2)
	pts := []facilities.Point{
		{Alpha: 0, Coefficients: facilities.Coefficients{CL: 0.2, CD: 0.03}},
		{Alpha: 10, Coefficients: facilities.Coefficients{CL: 1.2, CD: 0.08}},
		{Alpha: -4, Coefficients: facilities.Coefficients{CL: -0.3, CD: 0.05}},
	}
	c := w.Summary(pts, 5)
	assert.InDelta(t, w.WakePerCD*0.08, c.WakeBlockage, 1e-15, "wake blockage: the largest-C_D point's")
	assert.InDelta(t, 0.0138889*180/math.Pi, c.LiftInterference, 1e-5, "lift interference °, worked by hand in TestWallsHandCase")
	assert.Equal(t, 10.0, c.LiftInterferenceAlpha, "lift interference at the largest-C_L point, α °")
	w.Apply(pts)
	for _, p := range pts {
		assert.Equal(t, w.DynamicPressureFactor(p.CD), p.DynamicPressureFactor, "α %g: q factor", p.Alpha)
	}
}

// TestWallsCompressibleHandCase checks the compressible closed-wall forms of
// Barlow, Rae & Pope, Low-Speed Wind Tunnel Testing, 3rd ed. (1999), ch. 10 (from
// memory), at M 0.75, worked by hand:
//
//	C = 2.7 m × 2.0 m = 5.4 m², A_frontal = 0.06 m², S = 0.5 m², C_D = 0.075, C_L = 0.8
//	1 − M² = 0.4375;  (1 − M²)^−1.5 = 1/(0.4375·0.6614378) = 3.4556752
//	ε_sb = ¼·(0.06/5.4)·3.4556752                        = 0.0095990977
//	ε_wb = 0.5/(4·5.4)·0.075·(1 + 0.4·0.5625)/0.4375       = 0.0048611111
//	ε    = 0.0144602088
//	q_c/q = 1 + (2 − 0.5625)·ε       = 1.0207865502
//	(1+ε)² (the old incompressible form) = 1.0291295153: 0.817 % high
//	M_c  = 0.75·[1 + (1 + 0.2·0.5625)·ε] = 0.75·1.0160869823 = 0.7620652367
//	V_c/V = 1 + ε                     = 1.0144602088
//	Δα = 0.125·(0.5/5.4)·0.8 = 0.0092592593 rad = 0.5305165°; ΔC_D = 0.0092592593·0.8 = 0.0074074074
//	with τ2 = 0.1 and a = 5 /rad: Δα_sc = 0.1·0.0092592593 = 0.00092592593 rad = 0.05305165°;
//	ΔC_L = −5·0.00092592593 = −0.0046296296; ΔC_m = 0.25·5·0.00092592593 = 0.0011574074
//
// The corrected Mach number differs from the free stream by 0.0121, more than
// twice the planner's default Mach tolerance.
func TestWallsCompressibleHandCase(t *testing.T) {
	t.Parallel()
	f := closedSection(2.7, 2.0, facilities.WallsClosed)
	tau := 0.1
	f.StreamlineCurvatureFactor = &tau
	w := facilities.NewWalls(f, 0.06, 0.5, 0.75)
	c := w.Summary([]facilities.Point{{Alpha: 4, Coefficients: facilities.Coefficients{CL: 0.8, CD: 0.075}}}, 5)
	require.Len(t, c.Points, 1)
	p := c.Points[0]
	for _, v := range []*float64{p.Blockage, p.DynamicPressureFactor, p.SpeedFactor, p.CorrectedMach,
		p.DeltaAlphaUpwash, p.DeltaCDUpwash, p.DeltaAlphaCurvature, p.DeltaCLCurvature, p.DeltaCmCurvature} {
		require.NotNil(t, v)
	}
	cases := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"solid blockage", w.SolidBlockage, 0.0095990977, 1e-9},
		{"wake blockage", w.WakePerCD * 0.075, 0.0048611111, 1e-9},
		{"blockage", *p.Blockage, 0.0144602088, 1e-9},
		{"q_c/q", *p.DynamicPressureFactor, 1.0207865502, 1e-9},
		{"old form too high", 100 * ((1+*p.Blockage)*(1+*p.Blockage) / *p.DynamicPressureFactor - 1), 0.817, 0.001},
		{"corrected Mach", *p.CorrectedMach, 0.7620652367, 1e-9},
		{"speed factor", *p.SpeedFactor, 1.0144602088, 1e-9},
		{"Δα upwash °", *p.DeltaAlphaUpwash, 0.5305165, 1e-6},
		{"ΔC_D upwash", *p.DeltaCDUpwash, 0.0074074074, 1e-9},
		{"Δα curvature °", *p.DeltaAlphaCurvature, 0.05305165, 1e-7},
		{"ΔC_L curvature", *p.DeltaCLCurvature, -0.0046296296, 1e-9},
		{"ΔC_m curvature", *p.DeltaCmCurvature, 0.0011574074, 1e-9},
		{"summary corrected Mach", *c.CorrectedMachMax, 0.7620652367, 1e-9},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			assert.InDelta(t, tc.want, tc.got, tc.tol)
		})
	}
	assert.Empty(t, c.NotComputed)
	assert.Greater(t, *p.CorrectedMach-0.75, 2*0.005, "corrected Mach against the default tolerance")
}

// TestWallsNotComputed: corrections that are not computed are null with a reason,
// never zeros.
func TestWallsNotComputed(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name       string
		walls      string
		mach       float64
		tau        bool
		liftSlope  float64
		missing    []string
		blockage   bool
		upwash     bool
		curvature  bool
		curvatureL bool
		water      bool
	}{
		{"closed, no τ2", facilities.WallsClosed, 0.5, false, 5, []string{facilities.CorrectionStreamlineCurvature}, true, true, false, false, false},
		{"closed, τ2, table aero", facilities.WallsClosed, 0.5, true, 0, []string{facilities.CorrectionStreamlineCurvature}, true, true, true, false, false},
		{"closed supersonic", facilities.WallsClosed, 1.2, true, 5, []string{facilities.CorrectionBlockage}, false, true, true, true, false},
		{"open jet", facilities.WallsOpen, 0.2, true, 5, []string{facilities.CorrectionBlockage, facilities.CorrectionStreamlineCurvature}, false, true, false, false, false},
		{"slotted", facilities.WallsSlotted, 0.7, true, 5, []string{facilities.CorrectionBlockage, facilities.CorrectionUpwash, facilities.CorrectionStreamlineCurvature}, false, false, false, false, false},
		{"porous", facilities.WallsPorous, 0.7, false, 5, []string{facilities.CorrectionBlockage, facilities.CorrectionUpwash, facilities.CorrectionStreamlineCurvature}, false, false, false, false, false},
		{"water, closed", facilities.WallsClosed, 0, false, 5, []string{facilities.CorrectionMach, facilities.CorrectionStreamlineCurvature}, false, true, false, false, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			f := closedSection(2.7, 2.0, tc.walls)
			if tc.water {
				f.Medium.Kind = facilities.MediumWater
			}
			if tc.tau {
				tau := 0.1
				f.StreamlineCurvatureFactor = &tau
			}
			c := facilities.NewWalls(f, 0.06, 0.5, tc.mach).Summary([]facilities.Point{{Alpha: 4, Coefficients: facilities.Coefficients{CL: 0.8, CD: 0.05}}}, tc.liftSlope)
			var names []string
			for _, n := range c.NotComputed {
				names = append(names, n.Correction)
				assert.NotEmpty(t, n.Reason)
			}
			assert.Equal(t, tc.missing, names)
			p := c.Points[0]
			assert.Equal(t, tc.blockage, p.Blockage != nil && p.DynamicPressureFactor != nil && p.CorrectedMach != nil && p.SpeedFactor != nil)
			if tc.water {
				// q_c and V_c corrected, no corrected Mach number.
				assert.True(t, p.Blockage != nil && p.DynamicPressureFactor != nil && p.SpeedFactor != nil)
				assert.Nil(t, p.CorrectedMach)
				assert.Nil(t, c.CorrectedMachMax)
			}
			assert.Equal(t, tc.upwash, p.DeltaAlphaUpwash != nil && p.DeltaCDUpwash != nil)
			assert.Equal(t, tc.curvature, p.DeltaAlphaCurvature != nil)
			assert.Equal(t, tc.curvatureL, p.DeltaCLCurvature != nil && p.DeltaCmCurvature != nil)
		})
	}
}
