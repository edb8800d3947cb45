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
// gives, in the compressible forms of Barlow, Rae & Pope (1999, ch. 10; from
// memory), the corrected speed V_c = V·(1+ε), dynamic pressure
// q_c = q·[1 + (2 − M²)·ε] and Mach number M_c = M·[1 + (1 + 0.2·M²)·ε]; the lift
// interference (upwash) is Δα = LiftFactor·C_L in radians, with its drag
// increment ΔC_D = LiftFactor·C_L², and, when the facility gives the streamline-
// curvature factor τ2, Δα_sc = τ2·LiftFactor·C_L with its lift and
// pitching-moment corrections. The zero value applies no correction.
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
	// Curvature is the streamline-curvature factor τ2 of the wing; 0 with
	// CurvatureKnown false when the facility gives none.
	Curvature      float64
	CurvatureKnown bool
	// Applied reports whether a classical blockage correction applies.
	Applied bool
	// Liquid: a water facility, whose Mach number is not a similarity target and
	// gets no corrected Mach number.
	Liquid bool
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
	w := Walls{Kind: f.TestSection.Walls, Mach: mach, Liquid: f.Medium.IsLiquid()}
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
	if f.StreamlineCurvatureFactor != nil && w.Kind == WallsClosed {
		w.Curvature, w.CurvatureKnown = *f.StreamlineCurvatureFactor, true
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

// DynamicPressureFactor returns q_c/q = 1 + (2 − M²)·ε at drag coefficient cd, the
// compressible form of Barlow, Rae & Pope (1999, ch. 10; from memory); 1 when no
// correction applies. At M 0 it is 1 + 2ε, the incompressible (1+ε)² to first
// order.
func (w Walls) DynamicPressureFactor(cd float64) float64 {
	return DynamicPressureRatio(w.Mach, w.Blockage(cd))
}

// DynamicPressureRatio returns q_c/q = 1 + (2 − M²)·ε for blockage eps at Mach
// number mach (Barlow, Rae & Pope 1999, ch. 10; from memory). The planner's load
// ceiling and the load check both use it, so that they agree to the bit.
func DynamicPressureRatio(mach, eps float64) float64 { return 1 + (2-mach*mach)*eps }

// MachFactor returns M_c/M = 1 + (1 + 0.2·M²)·ε at drag coefficient cd (Barlow, Rae
// & Pope 1999, ch. 10, for γ = 1.4; from memory); 1 when no correction applies.
func (w Walls) MachFactor(cd float64) float64 { return MachRatio(w.Mach, w.Blockage(cd)) }

// MachRatio returns M_c/M = 1 + (1 + 0.2·M²)·ε for blockage eps at Mach number mach.
func MachRatio(mach, eps float64) float64 { return 1 + (1+0.2*mach*mach)*eps }

// LiftInterference returns the lift interference Δα = δ·(S/C)·C_L in radians at
// lift coefficient cl; the free-air angle of attack is the geometric one plus Δα.
func (w Walls) LiftInterference(cl float64) float64 { return w.LiftFactor * cl }

// Correction names for the list of corrections not computed.
const (
	CorrectionBlockage            = "blockage"
	CorrectionUpwash              = "upwash"
	CorrectionStreamlineCurvature = "streamline_curvature"
	// CorrectionMach is the corrected Mach number alone (left out in water).
	CorrectionMach = "corrected_mach"
)

// NotComputed names a wall correction the answer leaves out and why.
type NotComputed struct {
	// Correction is "blockage" (ε, q_c, M_c, V_c), "upwash" (Δα, ΔC_D),
	// "streamline_curvature" (Δα_sc, ΔC_L, ΔC_m) or "corrected_mach" (M_c alone,
	// in water).
	Correction string `json:"correction" enums:"blockage,upwash,streamline_curvature,corrected_mach"`
	// Reason says why, in words.
	Reason string `json:"reason"`
}

// PointCorrection is the wall correction of one test-matrix point (Barlow, Rae &
// Pope 1999, ch. 10; from memory). Every correction is what is added to the value
// measured in the test section to get the free-air value. A null field is a
// correction not computed; Corrections.NotComputed says why.
type PointCorrection struct {
	// Alpha and Beta are the geometric angles in degrees.
	Alpha float64 `json:"alpha"`
	Beta  float64 `json:"beta"`
	// Blockage is ε = ε_sb + ε_wb at this point's C_D, dimensionless.
	Blockage *float64 `json:"blockage"`
	// DynamicPressureFactor is q_c/q = 1 + (2 − M²)·ε, dimensionless.
	DynamicPressureFactor *float64 `json:"dynamic_pressure_factor"`
	// SpeedFactor is V_c/V = 1 + ε, dimensionless.
	SpeedFactor *float64 `json:"speed_factor"`
	// CorrectedMach is M_c = M·[1 + (1 + 0.2·M²)·ε], dimensionless.
	CorrectedMach *float64 `json:"corrected_mach"`
	// DeltaAlphaUpwash is Δα = δ·(S/C)·C_L in degrees.
	DeltaAlphaUpwash *float64 `json:"delta_alpha_upwash"`
	// DeltaCDUpwash is the upwash drag increment ΔC_D = δ·(S/C)·C_L², dimensionless.
	DeltaCDUpwash *float64 `json:"delta_cd_upwash"`
	// DeltaAlphaCurvature is Δα_sc = τ2·δ·(S/C)·C_L in degrees.
	DeltaAlphaCurvature *float64 `json:"delta_alpha_curvature"`
	// DeltaCLCurvature is ΔC_L = −a·Δα_sc (a the lift slope per radian).
	DeltaCLCurvature *float64 `json:"delta_cl_curvature"`
	// DeltaCmCurvature is ΔC_m = +0.25·a·Δα_sc: the quarter-chord pitching-moment
	// correction, applied to C_m about the moment reference centre taken at the
	// reference chord's quarter point.
	DeltaCmCurvature *float64 `json:"delta_cm_curvature"`
}

// Corrections is the wall-correction summary of a plan or load check. Blockage
// values are those of the point with the largest drag coefficient (the largest
// correction); every point's corrections are in Points.
type Corrections struct {
	// Walls is the wall type.
	Walls string `json:"walls"`
	// Applied reports whether a blockage correction was applied.
	Applied bool `json:"applied"`
	// Mach is the free-stream (uncorrected) Mach number, dimensionless.
	Mach float64 `json:"mach"`
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
	// DynamicPressureFactor is q_c/q = 1 + (2 − M²)·ε at that point.
	DynamicPressureFactor float64 `json:"dynamic_pressure_factor"`
	// CorrectedMachMin and CorrectedMachMax are the range of the corrected Mach
	// number M_c over the sweep (equal to Mach when no blockage correction
	// applies); null in water.
	CorrectedMachMin *float64 `json:"corrected_mach_min"`
	CorrectedMachMax *float64 `json:"corrected_mach_max"`
	// LiftInterferenceFactor is the boundary factor δ used.
	LiftInterferenceFactor float64 `json:"lift_interference_factor"`
	// StreamlineCurvatureFactor is the facility's τ2; null when it gives none.
	StreamlineCurvatureFactor *float64 `json:"streamline_curvature_factor"`
	// LiftInterference is the largest |Δα| over the sweep in degrees, signed.
	LiftInterference float64 `json:"lift_interference"`
	// LiftInterferenceAlpha is the geometric α in degrees where it occurs.
	LiftInterferenceAlpha float64 `json:"lift_interference_alpha"`
	// Points are the corrections of every test-matrix point, in its order.
	Points []PointCorrection `json:"points"`
	// NotComputed lists the corrections left out (null in Points) and why; empty,
	// never null, when all are computed.
	NotComputed []NotComputed `json:"not_computed"`
	// Warnings say when corrections are missing or unreliable.
	Warnings []string `json:"warnings,omitempty"`
}

// Summary returns the corrections over the test-matrix points pts of a model of
// lift slope liftSlope per radian (0: unknown, as for a coefficient table, which
// leaves the curvature's lift and moment corrections out).
func (w Walls) Summary(pts []Point, liftSlope float64) Corrections {
	c := Corrections{
		Walls: w.Kind, Applied: w.Applied, Mach: w.Mach, FrontalBlockage: w.AreaRatio,
		SolidBlockage: w.SolidBlockage, LiftInterferenceFactor: w.Delta,
		Warnings:    append([]string(nil), w.Warnings...),
		NotComputed: []NotComputed{},
		Points:      make([]PointCorrection, len(pts)),
	}
	upwash := w.Kind == WallsClosed || w.Kind == WallsOpen
	curvatureLift := w.CurvatureKnown && liftSlope != 0
	if w.CurvatureKnown {
		tau := w.Curvature
		c.StreamlineCurvatureFactor = &tau
	}
	switch {
	case w.Applied:
	case w.Kind == WallsOpen:
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionBlockage, "open jet: the classical blockage correction is taken as negligible (Barlow, Rae & Pope 1999, ch. 10); q, V and M are the free stream's"})
	case w.Kind == WallsClosed:
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionBlockage, fmt.Sprintf("closed-wall blockage is not defined at M %.3g (≥ 1) or without a test-section area", w.Mach)})
	default:
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionBlockage, w.Kind + " walls: no classical blockage correction; the facility's own wall-interference method governs"})
	}
	if w.Liquid && w.Applied {
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionMach, "water: the Mach number is not a similarity target; q_c and V_c are corrected"})
	}
	if !upwash {
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionUpwash, w.Kind + " walls: no classical lift-interference correction; the facility's own wall-interference method governs"})
	}
	switch {
	case w.Kind != WallsClosed:
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionStreamlineCurvature, w.Kind + " walls: the streamline-curvature correction is computed for closed walls only"})
	case !w.CurvatureKnown:
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionStreamlineCurvature, "the facility gives no streamline-curvature factor τ2 (streamline_curvature_factor, from Barlow, Rae & Pope 1999, ch. 10, for 0.25·c/B of the model)"})
	case liftSlope == 0:
		c.NotComputed = append(c.NotComputed, NotComputed{CorrectionStreamlineCurvature, "Δα_sc is computed; its lift and pitching-moment corrections need a lift slope, which a coefficient table does not give"})
	}
	cdMax := math.Inf(-1)
	maxDA := -1.0
	mLo, mHi := w.Mach, w.Mach
	// The points' figures live in one array, at most pointFigures a point,
	// instead of one allocation each: put never outgrows its capacity.
	const pointFigures = 9
	slab := make([]float64, 0, pointFigures*len(pts))
	put := func(v float64) *float64 {
		slab = append(slab, v)
		return &slab[len(slab)-1]
	}
	for i, p := range pts {
		pc := PointCorrection{Alpha: p.Alpha, Beta: p.Beta}
		if p.CD > cdMax {
			cdMax = p.CD
		}
		if w.Applied {
			e := w.Blockage(p.CD)
			qf, sf, mc := w.DynamicPressureFactor(p.CD), 1+e, w.Mach*w.MachFactor(p.CD)
			pc.Blockage, pc.DynamicPressureFactor, pc.SpeedFactor = put(e), put(qf), put(sf)
			if !w.Liquid {
				pc.CorrectedMach = put(mc)
			}
			if i == 0 {
				mLo, mHi = mc, mc
			}
			mLo, mHi = math.Min(mLo, mc), math.Max(mHi, mc)
		}
		if upwash {
			da := w.LiftInterference(p.CL)
			if math.Abs(da) > maxDA {
				maxDA = math.Abs(da)
				c.LiftInterference = da * 180 / math.Pi
				c.LiftInterferenceAlpha = p.Alpha
			}
			deg, dcd := da*180/math.Pi, w.LiftFactor*p.CL*p.CL
			pc.DeltaAlphaUpwash, pc.DeltaCDUpwash = put(deg), put(dcd)
		}
		if w.CurvatureKnown {
			dsc := w.Curvature * w.LiftInterference(p.CL)
			deg := dsc * 180 / math.Pi
			pc.DeltaAlphaCurvature = put(deg)
			if curvatureLift {
				dcl, dcm := -liftSlope*dsc, 0.25*liftSlope*dsc
				pc.DeltaCLCurvature, pc.DeltaCmCurvature = put(dcl), put(dcm)
			}
		}
		c.Points[i] = pc
	}
	if len(pts) == 0 {
		cdMax = 0
	}
	if !w.Liquid {
		c.CorrectedMachMin, c.CorrectedMachMax = &mLo, &mHi
	}
	c.WakeBlockage = w.WakePerCD * cdMax
	c.Blockage = w.Blockage(cdMax)
	c.SpeedFactor = 1 + c.Blockage
	c.DynamicPressureFactor = w.DynamicPressureFactor(cdMax)
	return c
}

// Apply sets each point's DynamicPressureFactor to 1 + (2 − M²)·ε at its own drag
// coefficient.
func (w Walls) Apply(pts []Point) {
	for i := range pts {
		pts[i].DynamicPressureFactor = w.DynamicPressureFactor(pts[i].CD)
	}
}
