package app

import (
	"maps"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// Documented ranges of the test settings of /v1/conditions and /v1/loads.
var (
	// BoundSettingMach bounds a test setting's Mach number; 0 is the tunnel at
	// rest (q = 0 Pa).
	BoundSettingMach = facilities.Bound{Min: 0, Max: facilities.MaxSettingMach}
	// BoundSettingSpeed bounds a test setting's speed, m/s; 0 is the tunnel at rest.
	BoundSettingSpeed = facilities.Bound{Min: 0, Max: facilities.MaxSpeed, Unit: "m/s"}
)

// Bounds returns the documented range of every number a request may carry, keyed
// "schema.field" by OpenAPI schema name ("schema.TestSettings.mach",
// "facilities.TestSection.width"): the facilities', the loads', the similarity
// package's and the API's own. docs/openapi3 writes them into the OpenAPI document as minimum
// and maximum.
func Bounds() map[string]facilities.Bound {
	m := facilities.Bounds()
	maps.Copy(m, loads.Bounds())
	maps.Copy(m, similarity.Bounds())
	for _, schema := range []string{"schema.TestSettings", "schema.ConditionsRequest"} {
		m[schema+".mach"] = BoundSettingMach
		m[schema+".speed"] = BoundSettingSpeed
		m[schema+".stagnation_pressure"] = facilities.BoundStagnationPressure
		m[schema+".stagnation_temperature"] = facilities.BoundStagnationTemperature
	}
	m["schema.LoadsModel.scale"] = similarity.BoundScale
	m["schema.PlanRequest.condensation_peak_mach"] = facilities.BoundCondensationPeakMach
	return m
}
