package api

import (
	"context"
	"fmt"
	"math"
	"path"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/facilities"
	"scalematch/internal/charts"
	"scalematch/similarity"
)

// Envelope sampling: abscissae across the facility's range and stagnation
// temperatures across its range for the lowest Reynolds number.
const (
	envelopeColumns      = 81
	envelopeTemperatures = 12
)

// Envelope is the Reynolds-number envelope of a facility for a model of a given
// reference length, with the limit that shapes each edge: what the envelope
// charts draw (charts.Envelope).
type Envelope = charts.Envelope

// EnvelopeOf returns the Reynolds-number envelope of facility f for a model of
// reference length refLength in m. The upper edge is the planner's own
// (similarity.Envelope: the highest Reynolds number within every facility limit
// at each Mach number or speed, and the limit that caps it); the lower edge is
// the lowest stagnation pressure at the stagnation temperature, of a grid over
// the facility's range, that gives the lowest Reynolds number (lowLimit names
// the limit that sets it). Errors are those
// of similarity.Envelope (*facilities.Error).
func EnvelopeOf(f *facilities.Facility, refLength float64) (Envelope, error) {
	top, err := similarity.Envelope(f, refLength, envelopeColumns)
	if err != nil {
		return Envelope{}, err
	}
	e := Envelope{FacilityID: f.ID, ReferenceLength: refLength, Speed: f.Medium.IsLiquid()}
	e.FirstLimit, e.LastLimit = facilities.ConstraintMachMin, facilities.ConstraintMachMax
	if e.Speed || f.Mach == nil {
		e.FirstLimit, e.LastLimit = facilities.ConstraintSpeedMin, facilities.ConstraintSpeedMax
	}
	n := len(top)
	e.X, e.Low, e.High = make([]float64, n), make([]float64, n), make([]float64, n)
	e.LowLimit, e.HighLimit = make([]string, n), make([]string, n)
	temps := gridOf(f.StagnationTemperature, envelopeTemperatures)
	for i, tp := range top {
		x := tp.Mach
		if e.Speed {
			x = tp.Speed
		}
		e.X[i] = x
		e.Low[i], e.High[i] = math.NaN(), math.NaN()
		e.LowLimit[i], e.HighLimit[i] = tp.Limit, tp.Limit
		if !(tp.Reynolds > 0) {
			continue
		}
		e.High[i] = tp.Reynolds
		for _, t0 := range temps {
			if re, ok := lowestAt(f, x, t0, e.Speed); ok && (math.IsNaN(e.Low[i]) || re < e.Low[i]) {
				e.Low[i] = re
				e.LowLimit[i] = lowLimit(f, t0)
			}
		}
		e.Low[i] *= refLength
	}
	return e, nil
}

// gridOf returns n values spread evenly over r, or r.Min alone when r is fixed.
func gridOf(r facilities.Range, n int) []float64 {
	if r.Fixed() {
		return []float64{r.Min}
	}
	g := make([]float64, n)
	for i := range g {
		g[i] = r.Min + (r.Max-r.Min)*float64(i)/float64(n-1)
	}
	return g
}

// lowLimit names the limit that sets the lower edge of the envelope where the
// lowest Reynolds number is reached at stagnation temperature t0 and the lowest
// stagnation pressure: in a gas the pressure (the Reynolds number is nearly
// proportional to it); in a liquid, whose Reynolds number hardly depends on the
// pressure, the temperature bound t0 sits on, when the range is not fixed.
func lowLimit(f *facilities.Facility, t0 float64) string {
	r := f.StagnationTemperature
	switch {
	case !f.Medium.IsLiquid() || r.Fixed():
		return facilities.ConstraintPressureMin
	case t0 == r.Min:
		return facilities.ConstraintTempMin
	case t0 == r.Max:
		return facilities.ConstraintTempMax
	}
	return facilities.ConstraintPressureMin
}

// lowestAt returns the Reynolds number per metre at abscissa x (Mach number, or
// speed in m/s when speed is set), stagnation temperature t0 and the facility's
// lowest stagnation pressure, and whether that setting breaks no limit.
func lowestAt(f *facilities.Facility, x, t0 float64, speed bool) (float64, bool) {
	s := facilities.Setting{StagnationPressure: f.StagnationPressure.Min, StagnationTemperature: t0}
	if speed {
		s.Speed = x
	} else {
		s.Mach = x
	}
	st, err := f.State(s)
	if err != nil || !(x > 0) || len(f.Violations(st)) > 0 {
		return 0, false
	}
	return st.ReynoldsPerMeter, true
}

// envelopeQuery is the parsed query of the envelope endpoints.
type envelopeQuery struct {
	refLength      float64
	flightX        float64
	flightReynolds float64
	mark           bool
}

// parseEnvelopeQuery reads reference_length (required, m or a length with a unit)
// and the optional flight point: flight_mach (or flight_speed in m/s for water)
// with flight_reynolds.
func parseEnvelopeQuery(c *gin.Context, water bool) (envelopeQuery, error) {
	var q envelopeQuery
	var fe fieldErrors
	num := func(key, unit string, positive bool) (float64, bool) {
		s, ok := c.GetQuery(key)
		if !ok {
			return 0, false
		}
		v, isNum := bareNumber(s)
		if !isNum {
			var err error
			v, err = similarity.ToSI(s, unit)
			if err != nil {
				fe.add(key, "%s", err.Error())
				return 0, false
			}
		}
		if positive && !(v > 0 && isFinite(v)) {
			fe.add(key, "%g: must be positive and finite", v)
			return 0, false
		}
		return v, true
	}
	var ok bool
	if q.refLength, ok = num("reference_length", "m", true); !ok && len(fe) == 0 {
		fe.add("reference_length", "required: the model's reference length in m (above 0)")
	}
	xKey, xUnit := "flight_mach", ""
	if water {
		xKey, xUnit = "flight_speed", "m/s"
	}
	x, hasX := num(xKey, xUnit, true)
	re, hasRe := num("flight_reynolds", "", true)
	switch {
	case hasX && hasRe:
		q.flightX, q.flightReynolds, q.mark = x, re, true
	case hasX != hasRe && len(fe) == 0:
		fe.add("flight_reynolds", "give %s and flight_reynolds together", xKey)
	}
	return q, fe.err()
}

// EnvelopeCaution is the full caution of an envelope chart, drawn as its footer
// and sent as the Scalematch-Caution header of the envelope endpoints.
const EnvelopeCaution = charts.EnvelopeCaution

// HeaderCaution names the response header carrying a chart's caution (its
// footer): what the estimate leaves out.
const HeaderCaution = "Scalematch-Caution"

// envelopeChartOf turns an envelope into a chart, with the flight point marked.
func envelopeChartOf(e Envelope, q envelopeQuery) (*charts.Chart, error) {
	var m charts.EnvelopeMarks
	if q.mark {
		m.Flight = &charts.Point{X: q.flightX, Reynolds: q.flightReynolds}
	}
	return charts.EnvelopeChart(e, m)
}

// envelope resolves the facility and the query and returns the chart.
func (s *Server) envelope(c *gin.Context) (*charts.Chart, error) {
	f, err := s.planner().lookup(c.Request.Context(), c.Param("id"))
	if err != nil {
		return nil, err
	}
	q, err := parseEnvelopeQuery(c, f.Medium.IsLiquid())
	if err != nil {
		return nil, err
	}
	e, err := EnvelopeOf(f, q.refLength)
	if err != nil {
		return nil, err
	}
	return envelopeChartOf(e, q)
}

// lookup returns the facility id names in the catalog, or in the demo catalog when
// none is configured.
func (p *Planner) lookup(ctx context.Context, id string) (*facilities.Facility, error) {
	var fe fieldErrors
	f, err := p.facility(ctx, nil, id, &fe)
	if err != nil {
		return nil, err
	}
	if err := fe.err(); err != nil {
		return nil, err
	}
	return f, nil
}

// getEnvelope answers GET /v1/facilities/{id}/envelope.svg, .png and .pdf.
//
//	@Summary		Reynolds-number envelope chart
//	@Description	The Reynolds number (log scale, on the model's reference length) against the Mach number (speed in m/s for water) that the facility reaches within its flow limits (Mach or speed, stagnation pressure and temperature, dynamic pressure, unit Reynolds number, condensation), for a model of reference_length m: the reachable region shaded, each edge named by the limit that shapes it, an optional flight point marked. An estimate: it leaves out the model-size limits (span, blockage) and the balance load limits, which can lower it; the chart's footer and the Scalematch-Caution header say so. One drawing as SVG, PNG (768 × 528 pixels) or PDF (8 × 5.5 in). Query values are SI numbers or strings with units.
//	@Tags			charts
//	@Produce		image/svg+xml
//	@Produce		image/png
//	@Produce		application/pdf
//	@Param			id					path		string	true	"facility id"
//	@Param			reference_length	query		string	true	"model reference length, m (above 0)"
//	@Param			flight_mach			query		string	false	"flight Mach number to mark (with flight_reynolds)"
//	@Param			flight_speed		query		string	false	"flight speed to mark in a water facility, m/s (with flight_reynolds)"
//	@Param			flight_reynolds		query		string	false	"flight Reynolds number to mark"
//	@Success		200					{string}	string	"the chart"
//	@Header			200					{string}	Scalematch-Caution	"what the chart leaves out; an estimate only"
//	@Failure		400					{object}	Problem
//	@Failure		404					{object}	Problem
//	@Router			/v1/facilities/{id}/envelope.svg [get]
//	@Router			/v1/facilities/{id}/envelope.png [get]
//	@Router			/v1/facilities/{id}/envelope.pdf [get]
func (s *Server) getEnvelope(c *gin.Context) {
	f, ok := charts.ParseFormat(strings.TrimPrefix(path.Ext(c.FullPath()), "."))
	if !ok {
		s.fail(c, fmt.Errorf("envelope route %s has no chart format", c.FullPath()))
		return
	}
	ch, err := s.envelope(c)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.writeChart(c, ch, f)
}
