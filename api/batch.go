package api

import (
	"encoding/json"
	"fmt"
	"net/http"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/internal/app"
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
//	@Description	Up to 1000 plan requests, each exactly as POST /v1/plans takes it (SI numbers or strings with units), planned concurrently. The results are in the order of the requests; each is {"plan": …} with the plan exactly as POST /v1/plans would answer it, or {"error": problem} with the status that request would have got on its own. The batch itself fails (400) only when it is not {"requests": [...]} or has more than 1000 items. The answer is sent as the results become ready, in order (chunked): {"results": [...]} by default, or one result per line (NDJSON) when the request's Accept names application/x-ndjson.
//	@Tags			planning
//	@Accept			json
//	@Produce		json
//	@Produce		application/x-ndjson
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
	// The results are written as they come, in order: a batch holds at most
	// app.BatchWindow answers instead of all of them (a 1000-plan answer is
	// about 50 MB). Nothing after the first result can fail the batch as a
	// whole: each item carries its own problem.
	ndjson := acceptsNDJSON(c.GetHeader("Accept"))
	contentType, open, sep, end := "application/json; charset=utf-8", `{"results":[`, ",", "]}"
	if ndjson {
		contentType, open, sep, end = "application/x-ndjson", "", "", ""
	}
	c.Header("Content-Type", contentType)
	c.Status(http.StatusOK)
	w := c.Writer
	var buf []byte
	write := func(i int, r app.BatchPlan) error {
		buf = buf[:0]
		if i == 0 {
			buf = append(buf, open...)
		} else {
			buf = append(buf, sep...)
		}
		var err error
		if buf, err = s.appendBatchItem(c, buf, r); err != nil {
			return err
		}
		if ndjson {
			buf = append(buf, '\n')
		}
		if _, err := w.Write(buf); err != nil {
			return err
		}
		w.Flush()
		return nil
	}
	err := s.planner().Batch().StreamBatch(c.Request.Context(), b.Requests, s.observePlanner, write)
	if err != nil {
		// The client is gone: nothing more can be said to it.
		c.Abort()
		return
	}
	if len(b.Requests) == 0 {
		_, _ = w.WriteString(open)
	}
	_, _ = w.WriteString(end)
	if ndjson && len(b.Requests) == 0 {
		// An empty NDJSON answer has no line; the status says the batch was taken.
		w.WriteHeaderNow()
	}
}

// appendBatchItem appends one result as written: {"plan":…} with the plan's
// exact bytes (json.Marshal's compact output already, or the stored copy of
// it, so not scanned and compacted again as encoding/json does with a
// json.RawMessage), or {"error":problem}.
func (s *Server) appendBatchItem(c *gin.Context, b []byte, r app.BatchPlan) ([]byte, error) {
	if r.Err == nil {
		b = append(b, `{"plan":`...)
		b = append(b, r.Plan...)
		return append(b, '}'), nil
	}
	pr := s.problem(c, r.Err)
	e, err := json.Marshal(batchItem{Error: &pr})
	if err != nil {
		return b, err
	}
	return append(b, e...), nil
}

// acceptsNDJSON reports whether an Accept header names application/x-ndjson.
func acceptsNDJSON(accept string) bool {
	for part := range strings.SplitSeq(accept, ",") {
		mt, _, _ := strings.Cut(part, ";")
		if strings.EqualFold(strings.TrimSpace(mt), "application/x-ndjson") {
			return true
		}
	}
	return false
}
