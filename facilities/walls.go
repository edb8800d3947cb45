package facilities

import (
	"fmt"
	"math"
)

// Wall-correction thresholds (Barlow, Rae & Pope 1999, ch. 9–10, from memory).
const (
	// WallMachCaution is the Mach number above which the classical closed-wall
	// corrections are warned as unreliable.
	WallMachCaution = 0.8
	// BlockageCaution is the frontal-area ratio A_frontal/C above which the
	// classical blockage corrections are warned as unreliable (7.5 %).
	BlockageCaution = 0.075
	// DefaultLiftInterferenceClosed is Glauert's boundary factor δ for closed walls
	// of a circular section (from memory).
	DefaultLiftInterferenceClosed = 0.125
	// DefaultLiftInterferenceOpen is δ for an open jet (from memory).
	DefaultLiftInterferenceOpen = -0.125
)

// SolidBlockage returns the solid-blockage factor ε_sb of a model of frontal area
// frontalArea (m²) in a closed test section of cross-section area (m²) at Mach number
// mach, by the simple rule with the subsonic compressibility factor
//
//	ε_sb = ¼·(A_frontal/C)·(1 − M²)^−1.5
//
// (Barlow, Rae & Pope, Low-Speed Wind Tunnel Testing, 3rd ed., 1999, ch. 9–10; from
// memory). It is meaningful for 0 ≤ M < 1 only; it returns 0 when M ≥ 1 or area ≤ 0.
func SolidBlockage(frontalArea, area, mach float64) float64 {
	b := 1 - mach*mach
	if b <= 0 || area <= 0 {
		return 0
	}
	return 0.25 * frontalArea / area / (b * math.Sqrt(b))
}

// WakeBlockage returns the wake-blockage factor ε_wb of a model of reference area
// refArea (m²) with drag coefficient cd in a closed test section of cross-section
// area (m²) at Mach number mach, by Maskell's simple form with the subsonic
// compressibility factor
//
//	ε_wb = S/(4C)·C_D·(1 + 0.4·M²)/(1 − M²)
//
// (Barlow, Rae & Pope 1999, ch. 9–10; from memory). It returns 0 when M ≥ 1 or
// area ≤ 0. It is linear in cd.
func WakeBlockage(refArea, area, cd, mach float64) float64 {
	m2 := mach * mach
	b := 1 - m2
	if b <= 0 || area <= 0 {
		return 0
	}
	return refArea / (4 * area) * cd * (1 + 0.4*m2) / b
}

// BlockageFactors returns the blockage of a model of frontal area frontalArea and
// reference area refArea (m², model scale) in facility f at Mach number mach: the
// solid blockage ε_sb, the wake blockage per unit drag coefficient ε_wb/C_D, and
// whether a blockage correction applies at all (closed walls below M 1 only; an
// open jet, slotted and porous walls get none). Both factors are proportional to
// the areas. It allocates nothing.
func BlockageFactors(f *Facility, frontalArea, refArea, mach float64) (solid, wakePerCD float64, applied bool) {
	c := f.TestSection.CrossSection()
	if f.TestSection.Walls != WallsClosed || mach >= 1 || !(c > 0) {
		return 0, 0, false
	}
	return SolidBlockage(frontalArea, c, mach), WakeBlockage(refArea, c, 1, mach), true
}

// Walls is the wall-correction model of one model in one test section at one Mach
// number. Build it with NewWalls. The blockage ε = SolidBlockage + WakePerCD·C_D
// gives the corrected speed V_c = V·(1+ε) and dynamic pressure q_c = q·(1+ε)²;
// the lift interference is Δα = LiftFactor·C_L in radians. The zero value applies
// no correction.
type Walls struct {
	// Kind is the wall type, one of the Walls* names.
	Kind string
	// Mach is the free-stream Mach number the factors were computed at.
	Mach float64
	// AreaRatio is A_frontal/C, the model's frontal area over the test-section area.
	AreaRatio float64
	// SolidBlockage is ε_sb, compressibility included; 0 when not applied.
	SolidBlockage float64
	// WakePerCD is ε_wb/C_D, compressibility included; 0 when not applied.
	WakePerCD float64
	// LiftFactor is δ·S/C, the lift interference Δα per unit C_L in radians.
	LiftFactor float64
	// Delta is the boundary factor δ used.
	Delta float64
	// Applied reports whether a classical blockage correction applies.
	Applied bool
	// Warnings say when the corrections are missing or unreliable.
	Warnings []string
}

// NewWalls returns the wall corrections of a model of frontal area frontalArea and
// reference area refArea (m², model scale) in facility f at free-stream Mach number
// mach. Closed walls get solid and wake blockage and lift interference; an open jet
// gets lift interference only; slotted and porous walls get no classical correction,
// and a warning saying so. At M ≥ 1 in a closed section no blockage correction is
// applied. Water facilities have M ≈ 0 and use the incompressible forms.
func NewWalls(f *Facility, frontalArea, refArea, mach float64) Walls {
	c := f.TestSection.CrossSection()
	w := Walls{Kind: f.TestSection.Walls, Mach: mach}
	if c <= 0 {
		w.Warnings = append(w.Warnings, "the test-section area is not positive: no wall correction applied")
		return w
	}
	w.AreaRatio = frontalArea / c
	switch w.Kind {
	case WallsClosed:
		w.Delta = DefaultLiftInterferenceClosed
	case WallsOpen:
		w.Delta = DefaultLiftInterferenceOpen
	}
	if f.LiftInterferenceFactor != nil {
		w.Delta = *f.LiftInterferenceFactor
	}
	w.SolidBlockage, w.WakePerCD, w.Applied = BlockageFactors(f, frontalArea, refArea, mach)
	switch w.Kind {
	case WallsClosed:
		if mach >= 1 {
			w.Warnings = append(w.Warnings, fmt.Sprintf("closed-wall blockage corrections do not apply at M %.3g ≥ 1: none applied", mach))
		} else {
			if mach > WallMachCaution {
				w.Warnings = append(w.Warnings, fmt.Sprintf("closed-wall corrections above M %.2g are unreliable (M = %.3g): treat the corrected loads with caution", WallMachCaution, mach))
			}
		}
		w.LiftFactor = w.Delta * refArea / c
	case WallsOpen:
		w.LiftFactor = w.Delta * refArea / c
	default:
		w.Warnings = append(w.Warnings, fmt.Sprintf("%s walls: no classical blockage or lift-interference correction applied; the facility's own wall-interference method governs", w.Kind))
	}
	if w.AreaRatio > BlockageCaution {
		w.Warnings = append(w.Warnings, fmt.Sprintf("frontal blockage %.3g %% exceeds %.3g %%: classical wall corrections are unreliable", 100*w.AreaRatio, 100*BlockageCaution))
	}
	return w
}

// Blockage returns the total blockage ε = ε_sb + ε_wb at drag coefficient cd.
func (w Walls) Blockage(cd float64) float64 { return w.SolidBlockage + w.WakePerCD*cd }

// DynamicPressureFactor returns q_c/q = (1+ε)² at drag coefficient cd; 1 when no
// correction applies.
func (w Walls) DynamicPressureFactor(cd float64) float64 {
	e := 1 + w.Blockage(cd)
	return e * e
}

// LiftInterference returns the lift interference Δα = δ·(S/C)·C_L in radians at
// lift coefficient cl; the free-air angle of attack is the geometric one plus Δα.
func (w Walls) LiftInterference(cl float64) float64 { return w.LiftFactor * cl }

// Corrections is the wall-correction summary of a plan or load check. Blockage
// values are those of the point with the largest drag coefficient (the largest
// correction); the per-point dynamic pressure is in each load point.
type Corrections struct {
	// Walls is the wall type.
	Walls string `json:"walls"`
	// Applied reports whether a blockage correction was applied.
	Applied bool `json:"applied"`
	// FrontalBlockage is A_frontal/C, dimensionless.
	FrontalBlockage float64 `json:"frontal_blockage"`
	// SolidBlockage is ε_sb, dimensionless.
	SolidBlockage float64 `json:"solid_blockage"`
	// WakeBlockage is the largest ε_wb over the sweep, dimensionless.
	WakeBlockage float64 `json:"wake_blockage"`
	// Blockage is ε = ε_sb + ε_wb at that point.
	Blockage float64 `json:"blockage"`
	// SpeedFactor is V_c/V = 1+ε at that point.
	SpeedFactor float64 `json:"speed_factor"`
	// DynamicPressureFactor is q_c/q = (1+ε)² at that point.
	DynamicPressureFactor float64 `json:"dynamic_pressure_factor"`
	// LiftInterferenceFactor is the boundary factor δ used.
	LiftInterferenceFactor float64 `json:"lift_interference_factor"`
	// LiftInterference is the largest |Δα| over the sweep in degrees, signed.
	LiftInterference float64 `json:"lift_interference"`
	// LiftInterferenceAlpha is the geometric α in degrees where it occurs.
	LiftInterferenceAlpha float64 `json:"lift_interference_alpha"`
	// Warnings say when corrections are missing or unreliable.
	Warnings []string `json:"warnings,omitempty"`
}

// Summary returns the corrections over the test-matrix points pts.
func (w Walls) Summary(pts []Point) Corrections {
	c := Corrections{
		Walls: w.Kind, Applied: w.Applied, FrontalBlockage: w.AreaRatio,
		SolidBlockage: w.SolidBlockage, LiftInterferenceFactor: w.Delta,
		Warnings: append([]string(nil), w.Warnings...),
	}
	cdMax := math.Inf(-1)
	maxDA := -1.0
	for _, p := range pts {
		if p.CD > cdMax {
			cdMax = p.CD
		}
		if da := w.LiftInterference(p.CL); math.Abs(da) > maxDA {
			maxDA = math.Abs(da)
			c.LiftInterference = da * 180 / math.Pi
			c.LiftInterferenceAlpha = p.Alpha
		}
	}
	if len(pts) == 0 {
		cdMax = 0
	}
	c.WakeBlockage = w.WakePerCD * cdMax
	c.Blockage = w.Blockage(cdMax)
	c.SpeedFactor = 1 + c.Blockage
	c.DynamicPressureFactor = w.DynamicPressureFactor(cdMax)
	return c
}

// Apply sets each point's DynamicPressureFactor to (1+ε)² at its own drag
// coefficient.
func (w Walls) Apply(pts []Point) {
	for i := range pts {
		pts[i].DynamicPressureFactor = w.DynamicPressureFactor(pts[i].CD)
	}
}
