package api

import (
	"context"
	"fmt"
	"net/http"
	"strconv"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/facilities"
	"scalematch/internal/charts"
)

// notAcceptableError is a request whose Accept header names no format the
// service draws; problem maps it to 406.
type notAcceptableError struct{ accept string }

func (e notAcceptableError) Error() string {
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
//	@Failure		404		{object}	Problem	"no plan with this id, no chart or format of this name, or a chart the plan cannot have"
//	@Failure		406		{object}	Problem	"the Accept header names no format drawn"
//	@Router			/v1/plans/{id}/charts/{chart} [get]
func (s *Server) getPlanChart(c *gin.Context) {
	name, f, err := chartFormat(c.Param("chart"), c.GetHeader("Accept"))
	if err != nil {
		s.fail(c, err)
		return
	}
	plan, fac, err := s.StoredPlan(c.Request.Context(), c.Param("id"))
	if err != nil {
		s.fail(c, err)
		return
	}
	ch, err := PlanChart(name, plan, fac)
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
			return "", "", &facilities.Error{Code: facilities.CodeNotFound,
				Message: fmt.Sprintf("no chart format %q: want svg, png or pdf", ext)}
		}
		return name, f, nil
	}
	f, ok := charts.Negotiate(accept)
	if !ok {
		return "", "", notAcceptableError{accept}
	}
	return name, f, nil
}

// StoredPlan returns a stored plan's answer and the facility version it used (nil
// for a facility given inline). The plan not being stored is CodeNotFound.
func (s *Server) StoredPlan(ctx context.Context, id string) (*PlanResponse, *facilities.Facility, error) {
	rec, err := s.cfg.Catalog.Plan(ctx, id)
	if err != nil {
		return nil, nil, err
	}
	plan, err := DecodePlan(rec.Body)
	if err != nil {
		return nil, nil, err
	}
	if rec.FacilityID == "" {
		return plan, nil, nil
	}
	f, err := facilityVersion(ctx, s.cfg.Catalog, rec.FacilityID, rec.FacilityVersion)
	if err != nil {
		return nil, nil, err
	}
	return plan, f, nil
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
