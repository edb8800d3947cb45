package api

import (
	"context"
	"fmt"
	"math"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/facilities"
	"scalematch/similarity"
)

// Envelope sampling: abscissae across the facility's range, stagnation
// temperatures across its range, and bisection steps on the stagnation pressure.
const (
	envelopeColumns      = 81
	envelopeTemperatures = 12
	envelopeBisections   = 40
)

// Envelope is the Reynolds-number envelope of a facility for a model of a given
// reference length: at each abscissa (free-stream Mach number, or speed in m/s in
// water) the lowest and highest Reynolds number any setting within every facility
// limit reaches (NaN where none does).
type Envelope struct {
	// FacilityID names the facility.
	FacilityID string
	// ReferenceLength is the model's reference length in m.
	ReferenceLength float64
	// Speed reports whether X are speeds in m/s (water) rather than Mach numbers.
	Speed bool
	// X are the abscissae, ascending.
	X []float64
	// Low and High are the Reynolds-number bounds at each X; NaN: unreachable.
	Low, High []float64
}

// EnvelopeOf samples the Reynolds-number envelope of facility f for a model of
// reference length refLength in m. For each abscissa and each stagnation
// temperature of a grid over the facility's range, the lowest stagnation pressure
// gives the lowest Reynolds number and the highest pressure that breaks no limit
// (found by bisection: dynamic pressure, Reynolds number per metre and the
// condensation margin all worsen as the pressure rises) gives the highest.
func EnvelopeOf(f *facilities.Facility, refLength float64) Envelope {
	e := Envelope{FacilityID: f.ID, ReferenceLength: refLength, Speed: f.Medium.IsLiquid()}
	lo, hi := envelopeAbscissa(f)
	e.X = make([]float64, envelopeColumns)
	e.Low = make([]float64, envelopeColumns)
	e.High = make([]float64, envelopeColumns)
	temps := gridOf(f.StagnationTemperature, envelopeTemperatures)
	for i := range e.X {
		x := lo + (hi-lo)*float64(i)/float64(envelopeColumns-1)
		e.X[i] = x
		e.Low[i], e.High[i] = math.NaN(), math.NaN()
		for _, t0 := range temps {
			rl, rh, ok := envelopeAt(f, x, t0, e.Speed)
			if !ok {
				continue
			}
			if math.IsNaN(e.Low[i]) || rl < e.Low[i] {
				e.Low[i] = rl
			}
			if math.IsNaN(e.High[i]) || rh > e.High[i] {
				e.High[i] = rh
			}
		}
		e.Low[i] *= refLength
		e.High[i] *= refLength
	}
	return e
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

// envelopeAbscissa returns the range of the envelope's abscissa: the facility's
// speed range in water; in a gas its Mach range, or, when it states only speeds,
// the Mach numbers those speeds give across its stagnation temperatures.
func envelopeAbscissa(f *facilities.Facility) (lo, hi float64) {
	if f.Medium.IsLiquid() {
		if f.Speed != nil {
			return f.Speed.Min, f.Speed.Max
		}
		return 0, 1
	}
	if f.Mach != nil {
		return f.Mach.Min, f.Mach.Max
	}
	if f.Speed == nil {
		return 0, 1
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, t0 := range []float64{f.StagnationTemperature.Min, f.StagnationTemperature.Max} {
		for _, v := range []float64{f.Speed.Min, f.Speed.Max} {
			st, err := f.State(facilities.Setting{Speed: v, StagnationPressure: f.StagnationPressure.Max, StagnationTemperature: t0})
			if err == nil {
				lo, hi = math.Min(lo, st.Mach), math.Max(hi, st.Mach)
			}
		}
	}
	if lo > hi {
		return 0, 1
	}
	return lo, hi
}

// envelopeAt returns the lowest and highest Reynolds number per metre reachable at
// abscissa x and stagnation temperature t0, and whether any pressure is allowed.
func envelopeAt(f *facilities.Facility, x, t0 float64, speed bool) (low, high float64, ok bool) {
	state := func(p0 float64) (facilities.State, bool) {
		s := facilities.Setting{StagnationPressure: p0, StagnationTemperature: t0}
		if speed {
			s.Speed = x
		} else {
			s.Mach = x
		}
		st, err := f.State(s)
		if err != nil || !(x > 0) {
			return st, false
		}
		return st, len(f.Violations(st)) == 0
	}
	pr := f.StagnationPressure
	st, ok := state(pr.Min)
	if !ok {
		return 0, 0, false
	}
	low = st.ReynoldsPerMeter
	if top, ok := state(pr.Max); ok {
		return low, top.ReynoldsPerMeter, true
	}
	a, b := pr.Min, pr.Max
	high = low
	for range envelopeBisections {
		m := 0.5 * (a + b)
		if st, ok := state(m); ok {
			a, high = m, st.ReynoldsPerMeter
		} else {
			b = m
		}
	}
	return low, high, true
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

// envelopeNote is the caution line under every envelope chart: what the chart
// leaves out and that it is an estimate (ASCII and at most 90 characters, for the
// PNG's small font).
const envelopeNote = "ESTIMATE: model size and balance load limits left out. Facility limits and procedures govern"

// EnvelopeCaution is the full caution of an envelope chart, sent as the
// Scalematch-Caution header of envelope.svg and envelope.png and as the SVG's
// description.
const EnvelopeCaution = "Estimate only: the envelope is the Reynolds number within the facility's flow limits (Mach or speed, stagnation pressure and temperature, dynamic pressure, unit Reynolds number, condensation) for the given model reference length; it leaves out the model-size limits (span, blockage) and the balance load limits, which can lower it. The facility's approved limits, procedures and licensed engineering judgement govern."

// HeaderCaution names the response header carrying a chart's caution.
const HeaderCaution = "Scalematch-Caution"

// envelopeChartOf turns an envelope into a chart, with the flight point marked.
func envelopeChartOf(e Envelope, q envelopeQuery) *envelopeChart {
	c := &envelopeChart{
		Title: fmt.Sprintf("%s: Reynolds number within the flow limits, model reference length %.4g m", e.FacilityID, e.ReferenceLength),
		Note:  envelopeNote, Caution: EnvelopeCaution,
		XLabel: "Mach number",
		YLabel: fmt.Sprintf("Reynolds number on %.4g m", e.ReferenceLength),
		X:      e.X, Low: e.Low, High: e.High,
	}
	if e.Speed {
		c.XLabel = "speed, m/s"
	}
	if q.mark {
		c.Mark = &chartMark{X: q.flightX, Y: q.flightReynolds, Label: fmt.Sprintf("flight Re %.3g", q.flightReynolds)}
	}
	return c
}

// envelope resolves the facility and the query and returns the chart.
func (s *Server) envelope(c *gin.Context) (*envelopeChart, error) {
	f, err := s.planner().lookup(c.Request.Context(), c.Param("id"))
	if err != nil {
		return nil, err
	}
	q, err := parseEnvelopeQuery(c, f.Medium.IsLiquid())
	if err != nil {
		return nil, err
	}
	return envelopeChartOf(EnvelopeOf(f, q.refLength), q), nil
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

// getEnvelopeSVG answers GET /v1/facilities/{id}/envelope.svg.
//
//	@Summary		Reynolds-number envelope (SVG)
//	@Description	The Reynolds number (log scale, on the model's reference length) against the Mach number (speed in m/s for water) that the facility reaches within its flow limits (Mach or speed, stagnation pressure and temperature, dynamic pressure, unit Reynolds number, condensation), for a model of reference_length m, with an optional flight point marked. An estimate: it leaves out the model-size limits (span, blockage) and the balance load limits, which can lower it; the chart's last line and the Scalematch-Caution header say so. Query values are SI numbers or strings with units.
//	@Tags			planning
//	@Produce		image/svg+xml
//	@Param			id					path		string	true	"facility id"
//	@Param			reference_length	query		string	true	"model reference length, m (above 0)"
//	@Param			flight_mach			query		string	false	"flight Mach number to mark (with flight_reynolds)"
//	@Param			flight_speed		query		string	false	"flight speed to mark in a water facility, m/s (with flight_reynolds)"
//	@Param			flight_reynolds		query		string	false	"flight Reynolds number to mark"
//	@Success		200					{string}	string	"an SVG document"
//	@Header			200					{string}	Scalematch-Caution	"what the chart leaves out; an estimate only"
//	@Failure		400					{object}	Problem
//	@Failure		404					{object}	Problem
//	@Router			/v1/facilities/{id}/envelope.svg [get]
func (s *Server) getEnvelopeSVG(c *gin.Context) {
	ch, err := s.envelope(c)
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header(HeaderCaution, EnvelopeCaution)
	c.Data(http.StatusOK, "image/svg+xml", ch.svg())
}

// getEnvelopePNG answers GET /v1/facilities/{id}/envelope.png.
//
//	@Summary		Reynolds-number envelope (PNG)
//	@Description	The chart of envelope.svg as a PNG image (760 × 480 pixels).
//	@Tags			planning
//	@Produce		image/png
//	@Param			id					path		string	true	"facility id"
//	@Param			reference_length	query		string	true	"model reference length, m (above 0)"
//	@Param			flight_mach			query		string	false	"flight Mach number to mark (with flight_reynolds)"
//	@Param			flight_speed		query		string	false	"flight speed to mark in a water facility, m/s (with flight_reynolds)"
//	@Param			flight_reynolds		query		string	false	"flight Reynolds number to mark"
//	@Success		200					{string}	string	"a PNG image"
//	@Header			200					{string}	Scalematch-Caution	"what the chart leaves out; an estimate only"
//	@Failure		400					{object}	Problem
//	@Failure		404					{object}	Problem
//	@Router			/v1/facilities/{id}/envelope.png [get]
func (s *Server) getEnvelopePNG(c *gin.Context) {
	ch, err := s.envelope(c)
	if err != nil {
		s.fail(c, err)
		return
	}
	b, err := ch.png()
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header(HeaderCaution, EnvelopeCaution)
	c.Data(http.StatusOK, "image/png", b)
}
