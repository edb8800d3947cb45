package similarity

import (
	"scalematch/atmosphere"
	"scalematch/facilities"
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

// CheckArticle returns the problems of the article's geometry, each named by its
// JSON path under "article", and of its aerodynamic estimate; nil when there are
// none.
func CheckArticle(a *Article) []facilities.FieldError {
	var fe []facilities.FieldError
	BoundArticleLength.Check(&fe, "article.reference_length", a.ReferenceLength)
	BoundArticleArea.Check(&fe, "article.reference_area", a.ReferenceArea)
	BoundArticleLength.Check(&fe, "article.span", a.Span)
	BoundArticleArea.Check(&fe, "article.frontal_area", a.FrontalArea)
	BoundWettedArea.Check(&fe, "article.wetted_area", a.WettedArea)
	BoundArticleOverallLength.Check(&fe, "article.length", a.Length)
	BoundFormFactor.Check(&fe, "article.form_factor", a.FormFactor)
	return fe
}
