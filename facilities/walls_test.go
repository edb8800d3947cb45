package facilities_test

import (
	"math"
	"strings"
	"testing"

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
//	ε            = 0.0061468978;  (1+ε)²        = 1.0123316
//	Δα at C_L = 1.2: 0.125·0.5/5.4·1.2          = 0.0138889 rad
func TestWallsHandCase(t *testing.T) {
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
		{"dynamic pressure factor", w.DynamicPressureFactor(0.05), 1.0123316, 1e-7},
		{"lift interference", w.LiftInterference(1.2), 0.0138889, 1e-7},
		{"incompressible solid blockage", facilities.SolidBlockage(0.1, 5.4, 0), 0.25 * 0.1 / 5.4, 1e-15},
	}
	for _, c := range cases {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s = %.10g, want %.10g ± %g", c.name, c.got, c.want, c.tol)
		}
	}
	if !w.Applied || len(w.Warnings) != 0 {
		t.Errorf("closed walls at M 0.2: applied %v, warnings %q; want applied, none", w.Applied, w.Warnings)
	}
}

func TestWallsKinds(t *testing.T) {
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
			w := facilities.NewWalls(closedSection(3.6, 1.5, c.walls), c.area, 0.5, c.mach)
			if w.Applied != c.applied {
				t.Errorf("applied = %v, want %v", w.Applied, c.applied)
			}
			if !c.applied && w.DynamicPressureFactor(0.3) != 1 {
				t.Errorf("q factor = %g without a correction, want 1", w.DynamicPressureFactor(0.3))
			}
			if math.Abs(w.LiftFactor-c.liftFactor) > 1e-15 {
				t.Errorf("lift factor = %g, want %g", w.LiftFactor, c.liftFactor)
			}
			joined := strings.Join(w.Warnings, " | ")
			if c.wantWarning == "" && joined != "" {
				t.Errorf("warnings %q, want none", joined)
			}
			if c.wantWarning != "" && !strings.Contains(joined, c.wantWarning) {
				t.Errorf("warnings %q, want one containing %q", joined, c.wantWarning)
			}
		})
	}
}

func TestWallsFacilityDelta(t *testing.T) {
	f := closedSection(2.0, 2.0, facilities.WallsClosed)
	d := 0.11
	f.LiftInterferenceFactor = &d
	w := facilities.NewWalls(f, 0.05, 0.4, 0.1)
	if want := 0.11 * 0.4 / 4; math.Abs(w.LiftFactor-want) > 1e-15 {
		t.Errorf("lift factor = %g, want %g from the facility's δ", w.LiftFactor, want)
	}
}

func TestWallsSummary(t *testing.T) {
	w := facilities.NewWalls(closedSection(3.6, 1.5, facilities.WallsClosed), 0.1, 0.5, 0.2)
	pts := []facilities.Point{
		{Alpha: 0, Coefficients: facilities.Coefficients{CL: 0.2, CD: 0.03}},
		{Alpha: 10, Coefficients: facilities.Coefficients{CL: 1.2, CD: 0.08}},
		{Alpha: -4, Coefficients: facilities.Coefficients{CL: -0.3, CD: 0.05}},
	}
	c := w.Summary(pts)
	if want := w.WakePerCD * 0.08; math.Abs(c.WakeBlockage-want) > 1e-15 {
		t.Errorf("wake blockage = %g, want the largest-C_D point's %g", c.WakeBlockage, want)
	}
	if want := 0.0138889 * 180 / math.Pi; math.Abs(c.LiftInterference-want) > 1e-5 || c.LiftInterferenceAlpha != 10 {
		t.Errorf("lift interference = %g° at α %g, want %g° at 10", c.LiftInterference, c.LiftInterferenceAlpha, want)
	}
	w.Apply(pts)
	for _, p := range pts {
		if want := w.DynamicPressureFactor(p.CD); p.DynamicPressureFactor != want {
			t.Errorf("α %g: q factor %g, want %g", p.Alpha, p.DynamicPressureFactor, want)
		}
	}
}
