package api

import (
	"fmt"
	"math"
	"net/http"
	"path"
	"strconv"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/internal/app"
	"scalematch/internal/charts"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// notAcceptableError is a request whose Accept header names no format the
// service draws; problem maps it to 406.
type notAcceptableError struct{ accept, formats string }

func (e notAcceptableError) Error() string {
	if e.formats != "" {
		return fmt.Sprintf("Accept %q names no format of this answer: want %s", e.accept, e.formats)
	}
	return fmt.Sprintf("Accept %q names no format of this chart: image/svg+xml, image/png or application/pdf (or add .svg, .png or .pdf to the path)", e.accept)
}

// getPlanChart answers GET /v1/plans/{id}/charts/{chart}.
//
//	@Summary		A chart of a stored plan
//	@Description	One chart of a stored plan, drawn from its answer and the facility version it used: envelope (Reynolds number reachable against Mach number or speed for the model's reference length, each edge named by its limit, with the flight point, the planned test point and the trade curve), loads (utilisation of every balance component and gauge row against α, in per cent of its rating, with the allowed line at 100 %/safety factor and the points above it marked) or reynolds-trade (Re_test/Re_flight against M_test − M_flight for the chosen model). The format is the extension (.svg, .png, .pdf) or, without one, the Accept header (image/svg+xml, image/png, application/pdf; SVG when any). PNG is 768 × 528 pixels, PDF 8 × 5.5 in. Every chart carries a footer: estimates only; the facility's approved limits, procedures and licensed engineering judgement govern.
//	@Tags			charts
//	@Produce		image/svg+xml
//	@Produce		image/png
//	@Produce		application/pdf
//	@Param			id		path		string	true	"plan id"
//	@Param			chart	path		string	true	"chart name and optional format: envelope, loads or reynolds-trade, followed by .svg, .png or .pdf"
//	@Success		200		{string}	string	"the chart"
//	@Header			200		{string}	Scalematch-Caution	"what the chart leaves out; an estimate only"
//	@Failure		404		{object}	schema.Problem	"no plan with this id, no chart or format of this name, or a chart the plan cannot have"
//	@Failure		406		{object}	schema.Problem	"the Accept header names no format drawn"
//	@Router			/v1/plans/{id}/charts/{chart} [get]
func (s *Server) getPlanChart(c *gin.Context) {
	name, f, err := chartFormat(c.Param("chart"), c.GetHeader("Accept"))
	if err != nil {
		s.fail(c, err)
		return
	}
	plan, fac, err := app.StoredPlan(c.Request.Context(), s.cfg.Catalog, c.Param("id"))
	if err != nil {
		s.fail(c, err)
		return
	}
	ch, err := app.PlanChart(name, plan, fac)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.writeChart(c, ch, f)
}

// chartFormat splits "envelope.svg" into the chart's name and format; without an
// extension the format is what accept asks for.
func chartFormat(file, accept string) (string, charts.Format, error) {
	name, ext, hasExt := strings.Cut(file, ".")
	if hasExt {
		f, ok := charts.ParseFormat(ext)
		if !ok {
			return "", "", &check.Error{Code: check.CodeNotFound,
				Message: fmt.Sprintf("no chart format %q: want svg, png or pdf", ext)}
		}
		return name, f, nil
	}
	f, ok := charts.Negotiate(accept)
	if !ok {
		return "", "", notAcceptableError{accept: accept}
	}
	return name, f, nil
}

// writeChart answers 200 with ch drawn in format f, its footer (the caution) also
// in the Scalematch-Caution header.
func (s *Server) writeChart(c *gin.Context, ch *charts.Chart, f charts.Format) {
	b, err := ch.Render(f)
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header("Content-Length", strconv.Itoa(len(b)))
	c.Header("Vary", "Accept")
	c.Header(HeaderCaution, ch.Footer)
	s.answerBytes(c, http.StatusOK, f.ContentType(), b)
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
	var fe check.Fields
	num := func(key, unit string, positive bool) (float64, bool) {
		s, ok := c.GetQuery(key)
		if !ok {
			return 0, false
		}
		v, isNum := app.BareNumber(s)
		if !isNum {
			var err error
			v, err = similarity.ToSI(s, unit)
			if err != nil {
				fe.Add(key, "%s", err.Error())
				return 0, false
			}
		}
		if positive && !(v > 0 && !math.IsInf(v, 0)) {
			fe.Add(key, "%g: must be positive and finite", v)
			return 0, false
		}
		return v, true
	}
	var ok bool
	if q.refLength, ok = num("reference_length", "m", true); !ok && len(fe) == 0 {
		fe.Add("reference_length", "required: the model's reference length in m (above 0)")
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
		fe.Add("flight_reynolds", "give %s and flight_reynolds together", xKey)
	}
	return q, fe.Err()
}

// HeaderCaution names the response header carrying a chart's caution (its
// footer): what the estimate leaves out.
const HeaderCaution = "Scalematch-Caution"

// envelopeChartOf turns an envelope into a chart, with the flight point marked.
func envelopeChartOf(e app.Envelope, q envelopeQuery) (*charts.Chart, error) {
	var m charts.EnvelopeMarks
	if q.mark {
		m.Flight = &charts.Point{X: q.flightX, Reynolds: q.flightReynolds}
	}
	return charts.EnvelopeChart(e, m)
}

// envelope resolves the facility and the query and returns the chart.
func (s *Server) envelope(c *gin.Context) (*charts.Chart, error) {
	f, err := s.planner().Lookup(c.Request.Context(), c.Param("id"))
	if err != nil {
		return nil, err
	}
	q, err := parseEnvelopeQuery(c, f.Medium.IsLiquid())
	if err != nil {
		return nil, err
	}
	e, err := app.EnvelopeOf(f, q.refLength)
	if err != nil {
		return nil, err
	}
	return envelopeChartOf(e, q)
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
//	@Failure		400					{object}	schema.Problem
//	@Failure		404					{object}	schema.Problem
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
