package api

import (
	"bytes"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/internal/campaign"
)

// postCampaign answers POST /v1/campaigns.
//
//	@Summary		Plan a test campaign
//	@Description	Plans one full-scale article over a matrix of flight conditions (an explicit list, each with the caller's label, altitude or pressure altitude in m, delta_isa in K, Mach number or airspeed in m/s, its own α/β sweep in degrees; and/or a grid of altitudes × Mach numbers) in one or more candidate facilities (catalog ids or inline records, each with an optional installation and fixed scale). The model policy is one model for every facility (default), a model per facility, or a choice among existing models (scales). Each condition is planned as POST /v1/plans plans it (the Mach number within its tolerance first, then the Reynolds number) and goes to the facility that serves it best; the scale is the one that serves the most conditions, then matches the most Mach numbers, then maximises the lowest (default) or mean Reynolds closeness min(r, 1/r) over the conditions served, then takes the fewest tunnel hours. The answer gives per facility the scale and why, the balances, the run order and the schedule (hours); per condition its plan summary (settings in Pa, K, m/s; Reynolds ratio; Mach difference; binding limits; balance utilisation per α/β point), the Reynolds ratio a model made for it alone would reach (the price of one model), or the limits that exclude it; and a summary. Level sharing (a Reynolds cost in per cent) lets conditions share stagnation pressure and temperature levels to cut condition changes. Accept text/csv gives one row per condition and α/β point; application/x-ndjson one line per condition, then the summary line. docs/campaigns.md explains the objective, the assignment and the run order. With a store, a campaign too large to answer at once (conditions × facilities above 600, level sharing counted double) is stored as a job and answered 202 with Location: /v1/campaigns/{id}, whose GET gives its progress and then the result (docs/records.md, the job lifecycle); a small one is stored too and answered 201 with its Location. Without a store every campaign is planned at once (201).
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Produce		text/csv
//	@Produce		application/x-ndjson
//	@Param			request	body		campaign.Request	true	"article, alpha (degrees), conditions and/or grid, facilities, model policy, objective, level sharing"
//	@Success		201		{object}	campaign.Result
//	@Success		202		{object}	schema.CampaignStatus	"stored as a job: Location names it"
//	@Header			201,202	{string}	Location	"/v1/campaigns/{id}, when a store keeps campaigns"
//	@Failure		400		{object}	schema.Problem	"bad input: every bad field named by its JSON path (a facility_id that names no facility too)"
//	@Failure		406		{object}	schema.Problem	"the Accept header names no format the answer is written in"
//	@Failure		413		{object}	schema.Problem	"body too large"
//	@Router			/v1/campaigns [post]
func (s *Server) postCampaign(c *gin.Context) {
	format, err := negotiate(c.GetHeader("Accept"), formatJSON, formatCSV, formatNDJSON)
	if err != nil {
		s.fail(c, err)
		return
	}
	var req campaign.Request
	body, ok := s.decodeBodyBytes(c, &req)
	if !ok {
		return
	}
	// A large campaign (campaign.Small false) is stored and planned in the
	// background when a store keeps jobs (202, api/jobs.go); without one it is
	// planned at once, as a small one is.
	if s.enqueueCampaign(c, &req, body) {
		return
	}
	res, err := campaign.Run(c.Request.Context(), s.planner().Batch(), req, nil)
	if err != nil {
		s.fail(c, err)
		return
	}
	if !s.recordCampaign(c, &req, body, res) {
		return
	}
	s.writeCampaign(c, http.StatusCreated, format, res)
}

// writeCampaign answers with the campaign in the format asked for.
func (s *Server) writeCampaign(c *gin.Context, status int, format dataFormat, res *campaign.Result) {
	c.Header("Vary", "Accept")
	var buf bytes.Buffer
	var err error
	var contentType string
	switch format {
	case formatCSV:
		err, contentType = res.WriteCSV(&buf), "text/csv; charset=utf-8; header=present"
	case formatNDJSON:
		err, contentType = res.WriteNDJSON(&buf), string(formatNDJSON)
	default:
		s.answer(c, status, res)
		return
	}
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answerBytes(c, status, contentType, buf.Bytes())
}
