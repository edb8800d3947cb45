package api

import (
	"encoding/json"
	"fmt"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/internal/check"
)

// batchBody is the batch as first decoded: each request kept raw, so that a bad
// item fails alone with its own problem.
type batchBody struct {
	Requests []json.RawMessage `json:"requests"`
}

// batchItem is one result as written: the plan's exact bytes, or a problem.
type batchItem struct {
	Plan  json.RawMessage `json:"plan,omitempty"`
	Error *schema.Problem `json:"error,omitempty"`
}

// postPlanBatch answers POST /v1/plans/batch.
//
//	@Summary		Plan many tests at once
//	@Description	Up to 1000 plan requests, each exactly as POST /v1/plans takes it (SI numbers or strings with units), planned concurrently. The results are in the order of the requests; each is {"plan": …} with the plan exactly as POST /v1/plans would answer it, or {"error": problem} with the status that request would have got on its own. The batch itself fails (400) only when it is not {"requests": [...]} or has more than 1000 items.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Param			request	body		schema.BatchRequest	true	"requests: a list of plan requests"
//	@Success		200		{object}	schema.BatchResponse
//	@Failure		400		{object}	schema.Problem	"not a batch, or more than 1000 requests"
//	@Failure		413		{object}	schema.Problem	"body too large"
//	@Router			/v1/plans/batch [post]
func (s *Server) postPlanBatch(c *gin.Context) {
	var b batchBody
	if !s.decodeBody(c, &b) {
		return
	}
	switch {
	case b.Requests == nil:
		s.fail(c, check.Fields{{Field: "requests", Message: "required: a list of plan requests"}}.Err())
		return
	case len(b.Requests) > schema.MaxBatch:
		s.fail(c, check.Fields{{Field: "requests", Message: fmt.Sprintf("%d requests: at most %d per batch", len(b.Requests), schema.MaxBatch)}}.Err())
		return
	}
	results := s.planner().Batch().PlanBatch(c.Request.Context(), b.Requests, s.observePlanner)
	out := make([]batchItem, len(results))
	for i, r := range results {
		if r.Err != nil {
			pr := s.problem(c, r.Err)
			out[i].Error = &pr
			continue
		}
		out[i].Plan = r.Plan
	}
	body, err := batchJSON(out)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answerBytes(c, http.StatusOK, "application/json; charset=utf-8", body)
}

// batchJSON writes {"results": [...]} with each plan's bytes as they are: they are
// json.Marshal's compact output already (or the stored copy of it), so they are
// not scanned and compacted again as encoding/json does with a json.RawMessage.
func batchJSON(items []batchItem) ([]byte, error) {
	n := len(`{"results":[]}`)
	for _, it := range items {
		n += len(`{"plan":},`) + len(it.Plan)
	}
	b := make([]byte, 0, n)
	b = append(b, `{"results":[`...)
	for i, it := range items {
		if i > 0 {
			b = append(b, ',')
		}
		if it.Plan != nil {
			b = append(b, `{"plan":`...)
			b = append(b, it.Plan...)
			b = append(b, '}')
			continue
		}
		e, err := json.Marshal(batchItem{Error: it.Error})
		if err != nil {
			return nil, err
		}
		b = append(b, e...)
	}
	return append(b, `]}`...), nil
}
