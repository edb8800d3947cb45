package similarity

import (
	"errors"

	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/check"
)

// Documented ranges of a request's article, flight, model, sweep and objective (SI
// units; facilities.Bound). Each keeps every figure the planner computes from it
// finite.
var (
	// BoundArticleLength bounds the article's reference length and span, m.
	BoundArticleLength = facilities.Bound{Min: 1e-3, Max: 1000, Unit: "m"}
	// BoundArticleOverallLength bounds the article's overall length, m (0: unknown).
	BoundArticleOverallLength = facilities.Bound{Min: 0, Max: 1000, Unit: "m"}
	// BoundArticleArea bounds the article's reference and frontal areas, m².
	BoundArticleArea = facilities.Bound{Min: 1e-6, Max: 1e5, Unit: "m²"}
	// BoundWettedArea bounds the article's wetted area, m².
	BoundWettedArea = facilities.Bound{Min: 1e-6, Max: 1e6, Unit: "m²"}
	// BoundFormFactor bounds the article's form factor (0: taken as 1).
	BoundFormFactor = facilities.Bound{Min: 0, Max: 10}
	// BoundTableAngle bounds a coefficient table's α and a sweep's ends, degrees.
	BoundTableAngle = facilities.Bound{Min: -180, Max: 180, Unit: "°"}
	// BoundTableBeta bounds a coefficient table's β, degrees.
	BoundTableBeta = facilities.Bound{Min: -90, Max: 90, Unit: "°"}
	// BoundTableCoefficient bounds a coefficient table's C_L, C_m, C_Y, C_l, C_n.
	BoundTableCoefficient = facilities.Bound{Min: -100, Max: 100}
	// BoundTableDrag bounds a coefficient table's C_D.
	BoundTableDrag = facilities.Bound{Min: 0, Max: 100}
	// BoundSweepStep bounds a sweep's step, degrees.
	BoundSweepStep = facilities.Bound{Min: 0, MinExclusive: true, Max: 360, Unit: "°"}
	// BoundFlightMach bounds the flight Mach number.
	BoundFlightMach = facilities.Bound{Min: 0.01, Max: atmosphere.MaxMach}
	// BoundFlightSpeed bounds a flight airspeed, m/s (Resolve also checks the
	// Mach number it implies).
	BoundFlightSpeed = facilities.Bound{Min: 1, Max: 2000, Unit: "m/s"}
	// BoundAltitude bounds the geometric altitude, m (U.S. Standard Atmosphere 1976).
	BoundAltitude = facilities.Bound{Min: atmosphere.MinAltitude, Max: atmosphere.MaxAltitude, Unit: "m"}
	// BoundPressureAltitude bounds the pressure altitude, m.
	BoundPressureAltitude = facilities.Bound{Min: atmosphere.Geopotential(atmosphere.MinAltitude), Max: atmosphere.Geopotential(atmosphere.MaxAltitude), Unit: "m"}
	// BoundDeltaISA bounds the day's temperature offset, K.
	BoundDeltaISA = facilities.Bound{Min: atmosphere.MinDeltaISA, Max: atmosphere.MaxDeltaISA, Unit: "K"}
	// BoundScale bounds a model scale (model length over full-scale length).
	BoundScale = facilities.Bound{Min: 1e-4, Max: maxScale}
	// BoundMachTolerance bounds the objective's Mach tolerance.
	BoundMachTolerance = facilities.Bound{Min: 0, Max: 1}
	// BoundWeight bounds an objective weight.
	BoundWeight = facilities.Bound{Min: 0, Max: 1e6}
)

// Bounds returns the documented range of every number of the article, flight,
// model, sweeps and objective, keyed "schema.field" by OpenAPI schema name, as
// facilities.Bounds does.
func Bounds() map[string]facilities.Bound {
	aero := func(lo, hi float64, openLo bool) facilities.Bound {
		return facilities.Bound{Min: lo, Max: hi, MinExclusive: openLo}
	}
	return map[string]facilities.Bound{
		"similarity.Article.reference_length":       BoundArticleLength,
		"similarity.Article.span":                   BoundArticleLength,
		"similarity.Article.length":                 BoundArticleOverallLength,
		"similarity.Article.reference_area":         BoundArticleArea,
		"similarity.Article.frontal_area":           BoundArticleArea,
		"similarity.Article.wetted_area":            BoundWettedArea,
		"similarity.Article.form_factor":            BoundFormFactor,
		"similarity.Aero.lift_slope":                aero(0, maxLiftSlope, true),
		"similarity.Aero.zero_lift_alpha":           aero(-maxAlphaZero, maxAlphaZero, false),
		"similarity.Aero.cl_max":                    aero(0, maxCLMax, true),
		"similarity.Aero.cd_min":                    aero(0, maxCD, true),
		"similarity.Aero.cl_at_cd_min":              aero(-maxCLMax, maxCLMax, false),
		"similarity.Aero.induced_drag_factor":       aero(0, 1, false),
		"similarity.Aero.cm_zero":                   aero(-2, 2, false),
		"similarity.Aero.cm_slope":                  aero(-20, 20, false),
		"similarity.AeroPoint.alpha":                BoundTableAngle,
		"similarity.AeroPoint.beta":                 BoundTableBeta,
		"similarity.AeroPoint.cl":                   BoundTableCoefficient,
		"similarity.AeroPoint.cd":                   BoundTableDrag,
		"similarity.AeroPoint.cm":                   BoundTableCoefficient,
		"similarity.AeroPoint.cy":                   BoundTableCoefficient,
		"similarity.AeroPoint.cl_roll":              BoundTableCoefficient,
		"similarity.AeroPoint.cn":                   BoundTableCoefficient,
		"similarity.Sweep.from":                     BoundTableAngle,
		"similarity.Sweep.to":                       BoundTableAngle,
		"similarity.Sweep.step":                     BoundSweepStep,
		"similarity.Flight.altitude":                BoundAltitude,
		"similarity.Flight.pressure_altitude":       BoundPressureAltitude,
		"similarity.Flight.delta_isa":               BoundDeltaISA,
		"similarity.Flight.mach":                    BoundFlightMach,
		"similarity.Flight.true_airspeed":           BoundFlightSpeed,
		"similarity.Flight.calibrated_airspeed":     BoundFlightSpeed,
		"similarity.Flight.equivalent_airspeed":     BoundFlightSpeed,
		"similarity.Model.scale":                    BoundScale,
		"similarity.Model.scale_min":                BoundScale,
		"similarity.Model.scale_max":                BoundScale,
		"similarity.Model.scales":                   BoundScale,
		"similarity.Objective.mach_tolerance":       BoundMachTolerance,
		"similarity.Objective.cavitation_tolerance": BoundCavitationTolerance,
		"similarity.Marine.salinity":                BoundSalinity,
		"similarity.Marine.temperature":             BoundWaterTemperature,
		"similarity.Marine.depth":                   BoundDepth,
		"similarity.Marine.atmospheric_pressure":    BoundAtmosphericPressure,
		"similarity.Marine.speed":                   BoundMarineSpeed,
		"similarity.Objective.weights":              BoundWeight,
	}
}

// FieldErrors returns every problem of the article, each named by its JSON path
// under "article": its geometry against the documented ranges (BoundArticleLength,
// BoundArticleArea, BoundWettedArea, BoundArticleOverallLength, BoundFormFactor),
// its skin-friction settings (FrictionFieldErrors) and its aerodynamic estimate
// (Aero.Validate); nil when there are none.
func (a *Article) FieldErrors() []check.FieldError {
	fe := a.geometryErrors(articleGeometry...)
	fe = append(fe, a.FrictionFieldErrors()...)
	var de *check.Error
	if errors.As(a.Aero.Validate(), &de) {
		fe = append(fe, de.Fields...)
	}
	return fe
}

// articleGeometry lists the article's geometry fields by JSON name.
var articleGeometry = []string{"reference_length", "reference_area", "span", "frontal_area", "wetted_area", "length", "form_factor"}

// GeometryErrors returns the problems of the named geometry fields (JSON names:
// reference_length, reference_area, span, frontal_area, wetted_area, length,
// form_factor) against their documented ranges, for a caller outside this
// package that checks the fields it uses (internal/loads' load limit).
func (a *Article) GeometryErrors(fields ...string) []check.FieldError {
	return a.geometryErrors(fields...)
}

// geometryErrors returns the problems of the named geometry fields against their
// documented ranges, in one wording wherever they are checked: the request layer
// checks them all (FieldErrors), and the planner, the load limit and the
// skin-friction estimate, which library callers may give partial articles, each
// check the ones they use.
func (a *Article) geometryErrors(fields ...string) []check.FieldError {
	var fe []check.FieldError
	for _, f := range fields {
		var b facilities.Bound
		var v float64
		switch f {
		case "reference_length":
			b, v = BoundArticleLength, a.ReferenceLength
		case "reference_area":
			b, v = BoundArticleArea, a.ReferenceArea
		case "span":
			b, v = BoundArticleLength, a.Span
		case "frontal_area":
			b, v = BoundArticleArea, a.FrontalArea
		case "wetted_area":
			b, v = BoundWettedArea, a.WettedArea
		case "length":
			b, v = BoundArticleOverallLength, a.Length
		case "form_factor":
			b, v = BoundFormFactor, a.FormFactor
		default:
			panic("similarity: no article geometry field " + f)
		}
		if msg := b.Problem(v); msg != "" {
			// The field's name is built only for an error: a valid article
			// allocates nothing here.
			fe = append(fe, check.FieldError{Field: "article." + f, Message: msg})
		}
	}
	return fe
}

// Validate returns a CodeInvalid error naming every problem of the article
// (FieldErrors), or nil. The request layer, the planner, the load limit and the
// skin-friction estimate all validate an article with it.
func (a *Article) Validate() error {
	return check.Invalid("invalid article", a.FieldErrors())
}
