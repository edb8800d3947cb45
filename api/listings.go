package api

import (
	"fmt"
	"mime"
	"net/url"
	"strconv"
	"strings"
	"time"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/check"
)

// listParams are the query parameters of the listings (GET /v1/plans, GET
// /v1/campaigns).
var listParams = []string{"facility", "label", "since", "until", "cursor", "limit"}

// listQuery reads a listing's query: facility and label as given, since and
// until as RFC 3339 instants (since before until), cursor as a listing gave it,
// limit 1 to facilities.MaxListLimit. Every bad parameter is named.
func listQuery(c *gin.Context) (facilities.ListQuery, error) {
	q := facilities.ListQuery{Facility: c.Query("facility"), Label: c.Query("label"), Cursor: c.Query("cursor")}
	var fe check.Fields
	at := func(name string) time.Time {
		s, ok := c.GetQuery(name)
		if !ok {
			return time.Time{}
		}
		t, err := time.Parse(time.RFC3339Nano, s)
		if err != nil {
			fe.Add(name, "%q is not an RFC 3339 instant such as 2031-04-02T09:30:00Z", truncate(s, maxEchoField))
		}
		return t
	}
	q.Since, q.Until = at("since"), at("until")
	if !q.Since.IsZero() && !q.Until.IsZero() && !q.Since.Before(q.Until) {
		fe.Add("until", "must be after since")
	}
	if s, ok := c.GetQuery("limit"); ok {
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 || n > facilities.MaxListLimit {
			fe.Add("limit", "%q: want a whole number from 1 to %d", truncate(s, maxEchoField), facilities.MaxListLimit)
		}
		q.Limit = n
	}
	return q, fe.Err()
}

// nextLink is the URL of a listing's next page: the request's own query with
// the cursor replaced; "" when there is none.
func nextLink(c *gin.Context, cursor string) string {
	if cursor == "" {
		return ""
	}
	v := c.Request.URL.Query()
	v.Set("cursor", cursor)
	u := url.URL{Path: c.Request.URL.Path, RawQuery: v.Encode()}
	c.Header("Link", fmt.Sprintf("<%s>; rel=\"next\"", u.String()))
	return u.String()
}

// listPlans answers GET /v1/plans.
//
//	@Summary		List stored plans
//	@Description	The stored plans, newest first, without their bodies (GET /v1/plans/{id} has each): id, label, facility id and version, creation time (UTC). Filters: facility (a catalog id), label (the plan request's label, exact), since and until (RFC 3339 instants; since ≤ created_at < until). Pages hold limit plans (default 50, at most 500); next_cursor (and the Link header, rel="next") continues the listing; a cursor is opaque. A service without a store keeps no plans: 404.
//	@Tags			planning
//	@Produce		json
//	@Param			facility	query		string	false	"catalog facility id"	example(tsw-1)
//	@Param			label		query		string	false	"the plan request's label"
//	@Param			since		query		string	false	"created at or after this RFC 3339 instant"	example(2031-04-02T00:00:00Z)
//	@Param			until		query		string	false	"created before this RFC 3339 instant"
//	@Param			cursor		query		string	false	"next_cursor of the previous page"
//	@Param			limit		query		int		false	"plans per page, 1 to 500 (default 50)"
//	@Success		200			{object}	schema.PlanList
//	@Header			200			{string}	Link	"the next page, rel=\"next\"; absent on the last"
//	@Failure		400			{object}	schema.Problem	"a bad, unknown or repeated query parameter, named"
//	@Failure		404			{object}	schema.Problem	"the service runs without a store"
//	@Router			/v1/plans [get]
func (s *Server) listPlans(c *gin.Context) {
	pl, ok := s.cfg.Catalog.(facilities.PlanLister)
	if !ok {
		s.fail(c, noStore("plans"))
		return
	}
	q, err := listQuery(c)
	if err != nil {
		s.fail(c, err)
		return
	}
	recs, next, err := pl.Plans(c.Request.Context(), q)
	if err != nil {
		s.fail(c, err)
		return
	}
	out := schema.PlanList{Plans: make([]schema.PlanListItem, len(recs)), NextCursor: next, Next: nextLink(c, next)}
	for i, r := range recs {
		out.Plans[i] = schema.PlanListItem{ID: r.ID, Label: r.Label, FacilityID: r.FacilityID, FacilityVersion: r.FacilityVersion,
			CreatedAt: r.CreatedAt, Href: "/v1/plans/" + url.PathEscape(r.ID)}
	}
	s.answer(c, 200, out)
}

// noStore is the 404 of a listing on a service without a store.
func noStore(what string) error {
	return &check.Error{Code: check.CodeNotFound,
		Message: fmt.Sprintf("this service runs without a store (no --data directory or SCALEMATCH_DATABASE_URL) and keeps no %s", what)}
}

// dataFormat is a format a stored answer is written in.
type dataFormat string

const (
	formatJSON   dataFormat = "application/json"
	formatCSV    dataFormat = "text/csv"
	formatNDJSON dataFormat = "application/x-ndjson"
)

// negotiate picks the format an Accept header asks for among offered (the
// first is the default): the media range of highest quality, then the first
// given, that one of them matches; "*/*", a type's "text/*" or
// "application/*", and an empty header match the first offered of that type.
// A header that matches none is a 406 naming the formats offered.
func negotiate(accept string, offered ...dataFormat) (dataFormat, error) {
	accept = strings.TrimSpace(accept)
	if accept == "" {
		return offered[0], nil
	}
	best, bestQ := dataFormat(""), 0.0
	for _, part := range strings.Split(accept, ",") {
		mt, params, err := mime.ParseMediaType(strings.TrimSpace(part))
		if err != nil {
			continue
		}
		q := 1.0
		if s, ok := params["q"]; ok {
			if q, err = strconv.ParseFloat(s, 64); err != nil {
				continue
			}
		}
		if q <= bestQ {
			continue
		}
		for _, f := range offered {
			typ, _, _ := strings.Cut(string(f), "/")
			if mt == string(f) || mt == "*/*" || mt == typ+"/*" {
				best, bestQ = f, q
				break
			}
		}
	}
	if best == "" {
		names := make([]string, len(offered))
		for i, f := range offered {
			names[i] = string(f)
		}
		return "", notAcceptableError{accept: accept, formats: strings.Join(names, ", ")}
	}
	return best, nil
}
