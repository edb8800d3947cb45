package loads

import "scalematch/facilities"

// Documented ranges of the installation's and the required resolution's
// numbers (facilities.Bound: checked with the field's JSON path, published in
// the OpenAPI document).
var (
	// BoundModelMass bounds installation.model_mass, kg.
	BoundModelMass = facilities.Bound{Min: 0, Max: 1e5, Unit: "kg"}
	// BoundOffset bounds each installation offset, m.
	BoundOffset = facilities.Bound{Min: -100, Max: 100, Unit: "m"}
	// BoundLoadFraction bounds installation.load_fraction, the share of the
	// allowed load (rating ÷ safety factor) a plan or check may use.
	BoundLoadFraction = facilities.Bound{Min: 0, Max: 1, MinExclusive: true}
	// BoundResolutionCoefficient bounds a required 2σ resolution of a
	// coefficient other than C_D (dimensionless).
	BoundResolutionCoefficient = facilities.Bound{Min: 0, Max: 1, MinExclusive: true}
	// BoundResolutionCounts bounds the required 2σ resolution of C_D in drag
	// counts (1 count = 0.0001).
	BoundResolutionCounts = facilities.Bound{Min: 0, Max: 10000, MinExclusive: true}
	// BoundModelVolume bounds installation.model_volume, m³ (0: not given).
	BoundModelVolume = facilities.Bound{Min: 0, Max: 1e3, Unit: "m³"}
)

// Bounds returns the documented range of every number of the installation and
// the required resolution, keyed "schema.field" by the OpenAPI schema names
// ("loads.Installation.model_mass"), as facilities.Bounds does for the
// facility record.
func Bounds() map[string]facilities.Bound {
	return map[string]facilities.Bound{
		"loads.Installation.model_mass":    BoundModelMass,
		"loads.Installation.load_fraction": BoundLoadFraction,
		"loads.Resolution.cl":              BoundResolutionCoefficient,
		"loads.Resolution.cd_counts":       BoundResolutionCounts,
		"loads.Resolution.cm":              BoundResolutionCoefficient,
		"loads.Resolution.cy":              BoundResolutionCoefficient,
		"loads.Resolution.cl_roll":         BoundResolutionCoefficient,
		"loads.Resolution.cn":              BoundResolutionCoefficient,
		"loads.Installation.model_volume":  BoundModelVolume,
		"loads.Offset.x":                   BoundOffset,
		"loads.Offset.z":                   BoundOffset,
	}
}
