package api

import (
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/internal/app"
)

// getAtmosphere answers GET /v1/atmosphere.
//
//	@Summary		Standard atmosphere
//	@Description	The U.S. Standard Atmosphere 1976 at a geometric altitude or a pressure altitude, on a day offset from standard by delta_isa (K) at the same pressure. Each query value is a number in SI units or a string with a unit ("35000 ft", "10 degC" for delta_isa). Response: altitude and geopotential_altitude and pressure_altitude in m, delta_isa and temperature in K, pressure in Pa, density in kg/m³, speed_of_sound in m/s, viscosity in Pa·s, kinematic_viscosity in m²/s.
//	@Tags			planning
//	@Produce		json
//	@Param			altitude			query		string	false	"geometric altitude, m (or a length with a unit, e.g. 35000 ft); give this or pressure_altitude"
//	@Param			pressure_altitude	query		string	false	"pressure altitude (ICAO), m (or a length with a unit); give this or altitude"
//	@Param			delta_isa			query		string	false	"temperature offset from the standard day, K (or e.g. 10 degC); default 0"
//	@Success		200					{object}	atmosphere.State
//	@Failure		400					{object}	schema.Problem	"a bad or missing altitude, or one outside -5 km to 86 km"
//	@Router			/v1/atmosphere [get]
func (s *Server) getAtmosphere(c *gin.Context) {
	st, err := app.AtmosphereQuery(c.Query, func(k string) bool { _, ok := c.GetQuery(k); return ok })
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, st)
}
