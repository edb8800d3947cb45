package api

import (
	"bytes"
	"context"
	"crypto/rand"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"net/url"
	"time"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/campaign"
	"scalematch/internal/check"
	"scalematch/internal/jobs"
	"scalematch/internal/unitjson"
)

// kindCampaign is the job kind of a campaign planned in the background.
const kindCampaign = "campaign"

// HeaderJobState names a stored campaign's state (queued, running, done,
// failed, cancelled) on every answer about it.
const HeaderJobState = "Scalematch-Job-State"

// JobsConfig configures the worker that runs large campaigns in the background.
// Zero values take the defaults of jobs.Config (30 s lease, one job at a time).
type JobsConfig struct {
	// Lease is how long a replica's claim on a job holds without renewal: a job
	// whose replica died is taken over after at most this long.
	Lease time.Duration
	// Slots is how many jobs this replica runs at once.
	Slots int
	// Poll is how often an idle replica looks for jobs enqueued by others.
	Poll time.Duration
	// Off runs no worker here: this replica enqueues jobs and answers about
	// them, other replicas run them.
	Off bool
}

// setUpJobs makes the job worker when the catalog keeps jobs.
func (s *Server) setUpJobs() {
	js, ok := s.cfg.Catalog.(jobs.Store)
	if !ok {
		return
	}
	s.jobs = js
	if s.cfg.Jobs.Off {
		return
	}
	s.worker = jobs.NewWorker(jobs.Config{Store: js, Runners: map[string]jobs.Runner{kindCampaign: s.runCampaign},
		Lease: s.cfg.Jobs.Lease, Slots: s.cfg.Jobs.Slots, Poll: s.cfg.Jobs.Poll, Problem: s.jobProblem, Logger: s.log})
}

// RunJobs runs the background worker until ctx ends, then releases the jobs it
// holds and returns. Serve runs it; a caller serving Handler itself runs it
// alongside. Without a store (or with JobsConfig.Off) it only waits for ctx.
func (s *Server) RunJobs(ctx context.Context) {
	if s.worker == nil {
		<-ctx.Done()
		return
	}
	s.worker.Run(ctx)
}

// runCampaign is the campaign runner: the stored request body decoded as POST
// /v1/campaigns decodes it, planned from the start, the result as JSON.
func (s *Server) runCampaign(ctx context.Context, job jobs.Job, progress func(done, total int)) ([]byte, error) {
	var req campaign.Request
	if err := unitjson.Decode(job.Request, &req); err != nil {
		return nil, err
	}
	res, err := campaign.Run(ctx, s.planner().Batch(), req, progress)
	if err != nil {
		return nil, err
	}
	b, err := json.Marshal(res)
	var uve *json.UnsupportedValueError
	if errors.As(err, &uve) {
		err = app.CheckFinite(res, nil)
	}
	return b, err
}

// jobProblem is the problem a failed job keeps, as POST /v1/campaigns would
// have answered it, and whether the failure is final: a store that did not
// answer, or a full disk, is passing, and the job is run again.
func (s *Server) jobProblem(job jobs.Job, err error) ([]byte, bool) {
	if cl, ok := s.cfg.Catalog.(facilities.ErrorClassifier); ok {
		err = cl.ClassifyError(err)
	}
	if errors.Is(err, facilities.ErrUnavailable) || errors.Is(err, facilities.ErrStorageFull) || errors.Is(err, context.DeadlineExceeded) {
		return nil, false
	}
	instance := "/v1/campaigns/" + job.ID
	p := kindInternal.problemAt(instance, "internal error")
	var de *check.Error
	switch {
	case errors.As(err, &de) && codeKinds[de.Code].status != 0:
		detail := de.Message
		if detail == "" {
			detail = check.InvalidCount(len(de.Fields))
		}
		p = codeKinds[de.Code].problemAt(instance, detail)
		p.Errors, p.Limits = de.Fields, de.Limits
	case errors.Is(err, atmosphere.ErrRange):
		p = kindInvalid.problemAt(instance, err.Error())
	default:
		s.log.Error("job failed: internal error", "job", job.ID, "error", err.Error())
	}
	truncateProblem(&p)
	b, _ := json.Marshal(p)
	return b, true
}

func (k problemKind) problemAt(instance, detail string) schema.Problem {
	return schema.Problem{Type: "/problems/" + k.slug, Title: k.title, Status: k.status, Detail: detail, Instance: instance}
}

// newJobID returns a job id: 20 random hex digits (80 bits), which no caller
// can guess.
func newJobID() string {
	var b [10]byte
	rand.Read(b[:])
	return hex.EncodeToString(b[:])
}

// campaignJob is what the store keeps of a campaign beside its request: the
// listing's keys and summary.
func campaignJob(id string, req *campaign.Request, body []byte) jobs.Job {
	j := jobs.Job{ID: id, Kind: kindCampaign, Request: body}
	seen := map[string]bool{}
	for _, f := range req.Facilities {
		fid := f.FacilityID
		if fid == "" && f.Facility != nil {
			fid = f.Facility.ID
		}
		if fid != "" && !seen["f"+fid] {
			seen["f"+fid] = true
			j.Facilities = append(j.Facilities, fid)
		}
	}
	for _, c := range req.Conditions {
		if c.Label != "" && !seen["l"+c.Label] {
			seen["l"+c.Label] = true
			j.Labels = append(j.Labels, c.Label)
		}
	}
	j.Summary, _ = json.Marshal(schema.CampaignSummary{Conditions: req.ConditionCount(), Facilities: nonNilStrings(j.Facilities)})
	return j
}

func nonNilStrings(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

// enqueueCampaign stores a campaign too large to answer at once and answers
// 202 with its Location; it reports false, having answered nothing, when the
// campaign is to be planned at once (small, or no store keeps jobs).
func (s *Server) enqueueCampaign(c *gin.Context, req *campaign.Request, body []byte) bool {
	if s.jobs == nil || campaign.Small(req) {
		return false
	}
	// Bad input is refused now, not found by the worker after a 202.
	if err := campaign.Validate(c.Request.Context(), s.planner().Batch(), *req); err != nil {
		s.fail(c, err)
		return true
	}
	j, err := s.jobs.Enqueue(c.Request.Context(), campaignJob(newJobID(), req, body))
	if err != nil {
		s.fail(c, err)
		return true
	}
	if s.worker != nil {
		s.worker.Wake()
	}
	c.Header("Location", "/v1/campaigns/"+j.ID)
	c.Header(HeaderJobState, string(j.State))
	c.Header("Retry-After", "1")
	s.answer(c, http.StatusAccepted, campaignStatus(j))
	return true
}

// recordCampaign stores a campaign answered at once as a finished job, so that
// it is listed and read back like the others, and sets its Location; without a
// store it does nothing. A failed store answers the request with its problem
// (false): the campaign is not answered as if it were kept.
func (s *Server) recordCampaign(c *gin.Context, req *campaign.Request, body []byte, res *campaign.Result) bool {
	if s.jobs == nil {
		return true
	}
	j := campaignJob(newJobID(), req, body)
	var err error
	if j.Result, err = json.Marshal(res); err == nil {
		j, err = s.jobs.Record(c.Request.Context(), j)
	}
	if err != nil {
		s.fail(c, err)
		return false
	}
	c.Header("Location", "/v1/campaigns/"+j.ID)
	c.Header(HeaderJobState, string(j.State))
	return true
}

// campaignStatus is the answer about a stored campaign that is not done.
func campaignStatus(j jobs.Job) schema.CampaignStatus {
	st := schema.CampaignStatus{ID: j.ID, State: string(j.State), Done: j.Done, Total: j.Total,
		Attempt: j.Attempt, CreatedAt: j.CreatedAt, UpdatedAt: j.UpdatedAt, Href: "/v1/campaigns/" + url.PathEscape(j.ID)}
	var sum schema.CampaignSummary
	if json.Unmarshal(j.Summary, &sum) == nil {
		st.Facilities, st.Conditions = nonNilStrings(sum.Facilities), sum.Conditions
	}
	return st
}

// getCampaign answers GET /v1/campaigns/{id}.
//
//	@Summary		A stored campaign: its progress, then its result
//	@Description	A campaign too large to answer at once (POST /v1/campaigns answered 202) is planned in the background; a small one is stored done when a store is configured. While it is queued or running the answer is 202 with its state and progress (done of total steps in the current attempt, each condition counting twice; an attempt restarts from the start when the replica running it died) as JSON whatever Accept says, and Retry-After: 1. When done: 200 with the result in the format Accept asks for, JSON (as POST /v1/campaigns answers it), text/csv (one row per condition and α/β point) or application/x-ndjson (a line per condition, then the summary). A campaign that failed answers the problem POST /v1/campaigns would have answered (400, 404, 422 …); a cancelled one 409. The Scalematch-Job-State header names the state on every answer. docs/records.md describes the job lifecycle.
//	@Tags			planning
//	@Produce		json
//	@Produce		text/csv
//	@Produce		application/x-ndjson
//	@Param			id	path		string	true	"campaign id (the Location of POST /v1/campaigns)"
//	@Success		200	{object}	campaign.Result
//	@Success		202	{object}	schema.CampaignStatus	"queued or running: state and progress"
//	@Header			200	{string}	Scalematch-Job-State	"queued, running, done, failed or cancelled"
//	@Failure		404	{object}	schema.Problem	"no campaign with this id is stored, or the service runs without a store"
//	@Failure		406	{object}	schema.Problem	"Accept names none of the result's formats"
//	@Failure		409	{object}	schema.Problem	"the campaign was cancelled: it has no result"
//	@Failure		422	{object}	schema.Problem	"the campaign failed: its problem as POST /v1/campaigns would have answered it"
//	@Router			/v1/campaigns/{id} [get]
func (s *Server) getCampaign(c *gin.Context) {
	format, err := negotiate(c.GetHeader("Accept"), formatJSON, formatCSV, formatNDJSON)
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header("Vary", "Accept")
	j, err := s.campaign(c.Request.Context(), c.Param("id"))
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header(HeaderJobState, string(j.State))
	switch j.State {
	case jobs.Queued, jobs.Running:
		c.Header("Retry-After", "1")
		s.answer(c, http.StatusAccepted, campaignStatus(j))
		return
	case jobs.Cancelled:
		s.fail(c, &check.Error{Code: check.CodeConflict,
			Message: fmt.Sprintf("campaign %s was cancelled at step %d of %d: it has no result", j.ID, j.Done, j.Total)})
		return
	case jobs.Failed:
		var p schema.Problem
		if err := json.Unmarshal(j.Problem, &p); err != nil || p.Status < 400 {
			s.fail(c, fmt.Errorf("campaign %s: stored problem %q does not read back: %v", j.ID, j.Problem, err))
			return
		}
		p.RequestID = RequestID(c.Request.Context())
		s.writeProblem(c, p)
		return
	}
	// Done: the result never changes.
	c.Header("ETag", `"`+j.ID+"."+string(format[len(format)-3:])+`"`)
	if format == formatJSON {
		s.answerBytes(c, http.StatusOK, "application/json; charset=utf-8", j.Result)
		return
	}
	var res campaign.Result
	if err := json.Unmarshal(j.Result, &res); err != nil {
		s.fail(c, fmt.Errorf("campaign %s: stored result does not read back: %w", j.ID, err))
		return
	}
	var b bytes.Buffer
	write, ct := res.WriteCSV, "text/csv; charset=utf-8; header=present"
	if format == formatNDJSON {
		write, ct = res.WriteNDJSON, string(formatNDJSON)
	}
	if err := write(&b); err != nil {
		s.fail(c, err)
		return
	}
	s.answerBytes(c, http.StatusOK, ct, b.Bytes())
}

// campaign reads a stored campaign job; not found when the id names no
// campaign or the service keeps none.
func (s *Server) campaign(ctx context.Context, id string) (jobs.Job, error) {
	if s.jobs == nil {
		return jobs.Job{}, noStore("campaigns")
	}
	j, err := s.jobs.Job(ctx, id)
	if err == nil && j.Kind != kindCampaign {
		err = &check.Error{Code: check.CodeNotFound, Message: fmt.Sprintf("no campaign %q", id)}
	}
	return j, err
}

// deleteCampaign answers DELETE /v1/campaigns/{id}.
//
//	@Summary		Cancel a campaign
//	@Description	Cancels a queued or running campaign: the replica running it stops within a lease renewal (a few seconds) and nothing of it is kept; the answer is its state (cancelled) and the progress it had. A campaign already done, failed or cancelled cannot be cancelled: 409, and it stays as it is. No token is needed: the id, 80 random bits, is the key.
//	@Tags			planning
//	@Produce		json
//	@Param			id	path		string	true	"campaign id"
//	@Success		200	{object}	schema.CampaignStatus
//	@Failure		404	{object}	schema.Problem	"no campaign with this id is stored"
//	@Failure		409	{object}	schema.Problem	"the campaign is done, failed or cancelled already"
//	@Router			/v1/campaigns/{id} [delete]
func (s *Server) deleteCampaign(c *gin.Context) {
	if _, err := s.campaign(c.Request.Context(), c.Param("id")); err != nil {
		s.fail(c, err)
		return
	}
	j, err := s.jobs.Cancel(c.Request.Context(), c.Param("id"))
	if err != nil {
		if j.ID != "" {
			c.Header(HeaderJobState, string(j.State))
		}
		s.fail(c, err)
		return
	}
	c.Header(HeaderJobState, string(j.State))
	s.answer(c, http.StatusOK, campaignStatus(j))
}

// listCampaigns answers GET /v1/campaigns.
//
//	@Summary		List stored campaigns
//	@Description	The stored campaigns, newest first, without their requests and results: id, state, conditions, progress (done of total steps), attempt, facility ids, creation and last change (UTC), href. Filters: facility (a catalog id among the campaign's facilities), label (a condition's label, exact), since and until (RFC 3339 instants; since ≤ created_at < until). Pages hold limit campaigns (default 50, at most 500); next_cursor (and the Link header, rel="next") continues the listing. A service without a store keeps no campaigns: 404.
//	@Tags			planning
//	@Produce		json
//	@Param			facility	query		string	false	"catalog facility id"	example(tsw-1)
//	@Param			label		query		string	false	"a condition's label"
//	@Param			since		query		string	false	"created at or after this RFC 3339 instant"	example(2031-04-02T00:00:00Z)
//	@Param			until		query		string	false	"created before this RFC 3339 instant"
//	@Param			cursor		query		string	false	"next_cursor of the previous page"
//	@Param			limit		query		int		false	"campaigns per page, 1 to 500 (default 50)"
//	@Success		200			{object}	schema.CampaignList
//	@Header			200			{string}	Link	"the next page, rel=\"next\"; absent on the last"
//	@Failure		400			{object}	schema.Problem	"a bad, unknown or repeated query parameter, named"
//	@Failure		404			{object}	schema.Problem	"the service runs without a store"
//	@Router			/v1/campaigns [get]
func (s *Server) listCampaigns(c *gin.Context) {
	if s.jobs == nil {
		s.fail(c, noStore("campaigns"))
		return
	}
	q, err := listQuery(c)
	if err != nil {
		s.fail(c, err)
		return
	}
	js, next, err := s.jobs.Jobs(c.Request.Context(), jobs.Query{Kind: kindCampaign, ListQuery: q})
	if err != nil {
		s.fail(c, err)
		return
	}
	out := schema.CampaignList{Campaigns: make([]schema.CampaignStatus, len(js)), NextCursor: next, Next: nextLink(c, next)}
	for i, j := range js {
		out.Campaigns[i] = campaignStatus(j)
	}
	s.answer(c, http.StatusOK, out)
}
