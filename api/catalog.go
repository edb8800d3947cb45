package api

import (
	"bytes"
	"context"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"path"
	"strconv"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/check"
)

// Catalog response headers.
const (
	// HeaderFacilityID names the catalog facility a stored plan was made against.
	HeaderFacilityID = "Scalematch-Facility-Id"
	// HeaderFacilityVersion names the facility version a stored plan used.
	HeaderFacilityVersion = "Scalematch-Facility-Version"
	// HeaderFacilityCurrentVersion is sent with a stored plan whose facility has
	// changed since: the facility's current version, or "deleted".
	HeaderFacilityCurrentVersion = "Scalematch-Facility-Current-Version"
)

// registerCatalog registers the facility catalog, its version history and the
// stored-plan routes under /v1.
func (s *Server) registerCatalog(v1 *gin.RouterGroup) {
	v1.GET("/facilities", s.listFacilities)
	v1.GET("/facilities/:id", s.getFacility)
	v1.GET("/facilities/:id/versions", s.getFacilityVersions)
	v1.POST("/facilities", s.createFacility)
	v1.PUT("/facilities/:id", s.updateFacility)
	v1.DELETE("/facilities/:id", s.deleteFacility)
	v1.GET("/plans", s.listPlans)
	v1.GET("/plans/:id", s.getPlan)
}

// listFacilities answers GET /v1/facilities.
//
//	@Summary		List the facility catalog
//	@Description	Every current facility, ordered by id, with its catalog version. All figures SI: test-section sizes m, areas m², speeds m/s, pressures Pa, temperatures K, Reynolds number per metre 1/m, balance forces N and moments N·m.
//	@Tags			catalog
//	@Produce		json
//	@Success		200	{object}	schema.FacilityList
//	@Failure		503	{object}	schema.Problem	"the store did not answer in time"
//	@Router			/v1/facilities [get]
func (s *Server) listFacilities(c *gin.Context) {
	fs, err := s.cfg.Catalog.Facilities(c.Request.Context())
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, schema.FacilityList{Facilities: fs})
}

// getFacility answers GET /v1/facilities/{id}.
//
//	@Summary		Read one facility
//	@Description	The current version of a facility, with the version as a strong ETag ("3"); send it back as If-Match to change or delete the facility. All figures SI: m, m², m/s, Pa, K, 1/m, N, N·m.
//	@Tags			catalog
//	@Produce		json
//	@Param			id	path		string	true	"facility id"	example(tsw-1)
//	@Success		200	{object}	facilities.Facility
//	@Header			200	{string}	ETag	"the facility's version, quoted"
//	@Failure		404	{object}	schema.Problem	"no such facility, or it was deleted"
//	@Router			/v1/facilities/{id} [get]
func (s *Server) getFacility(c *gin.Context) {
	f, err := s.cfg.Catalog.Facility(c.Request.Context(), c.Param("id"))
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header("ETag", etag(f.Version))
	s.answer(c, http.StatusOK, f)
}

// getFacilityVersions answers GET /v1/facilities/{id}/versions.
//
//	@Summary		A facility's history
//	@Description	Every change of a facility, oldest first, deleted facilities included: version, time (UTC), who (the write token's name), action (create, update, delete), the JSON paths that changed (e.g. balances[0].limits.normal, in N) and the record as of that version in SI units.
//	@Tags			catalog
//	@Produce		json
//	@Param			id	path		string	true	"facility id"	example(tsw-1)
//	@Success		200	{object}	schema.FacilityHistory
//	@Failure		404	{object}	schema.Problem	"the id was never in the catalog"
//	@Router			/v1/facilities/{id}/versions [get]
func (s *Server) getFacilityVersions(c *gin.Context) {
	id := c.Param("id")
	vs, err := s.cfg.Catalog.Versions(c.Request.Context(), id)
	if err != nil {
		s.fail(c, err)
		return
	}
	s.answer(c, http.StatusOK, schema.FacilityHistory{ID: id, Versions: vs})
}

// createFacility answers POST /v1/facilities.
//
//	@Summary		Add a facility
//	@Description	Stores a new facility as version 1 (a deleted id continues its version numbers). Numbers are SI (m, m², m/s, Pa, K, 1/m, N, N·m) or strings with units ("2.5 bar", "400 lbf"). Every invalid field is named at once. Needs a write token; the token's name is recorded as the author. Limits entered here are what plans check balances against: the facility's approved limits and procedures govern.
//	@Tags			catalog
//	@Accept			json
//	@Produce		json
//	@Security		WriteToken
//	@Param			facility	body		facilities.Facility	true	"the facility"
//	@Success		201			{object}	facilities.Facility
//	@Header			201			{string}	ETag		"the new version, quoted"
//	@Header			201			{string}	Location	"/v1/facilities/{id}"
//	@Failure		400			{object}	schema.Problem	"invalid fields, each named by its JSON path"
//	@Failure		401			{object}	schema.Problem	"no bearer token"
//	@Failure		403			{object}	schema.Problem	"the token is not allowed, its scope does not cover this facility id, or no write tokens are configured"
//	@Failure		409			{object}	schema.Problem	"the id exists"
//	@Router			/v1/facilities [post]
func (s *Server) createFacility(c *gin.Context) {
	by, ok := s.writer(c)
	if !ok {
		return
	}
	var f facilities.Facility
	if !s.decodeBody(c, &f) {
		return
	}
	if !s.inScope(c, f.ID) {
		return
	}
	f.Version = 0
	if err := f.Validate(); err != nil {
		s.fail(c, err)
		return
	}
	out, err := s.cfg.Catalog.CreateFacility(c.Request.Context(), f, by)
	s.plans.Forget(f.ID)
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header("ETag", etag(out.Version))
	c.Header("Location", "/v1/facilities/"+out.ID)
	s.answer(c, http.StatusCreated, out)
}

// updateFacility answers PUT /v1/facilities/{id}.
//
//	@Summary		Change a facility
//	@Description	Replaces a facility with the body when If-Match names its current version (the ETag of GET); the answer carries the new version. Without If-Match: 428; with a version that is no longer current (someone else changed it): 412, so two people cannot silently overwrite each other's balance limits. The body's id must equal the path's or be absent. Numbers are SI (m, m², m/s, Pa, K, 1/m, N, N·m) or strings with units. Needs a write token. The facility's approved limits and procedures govern over anything entered here.
//	@Tags			catalog
//	@Accept			json
//	@Produce		json
//	@Security		WriteToken
//	@Param			id			path		string				true	"facility id"	example(tsw-1)
//	@Param			If-Match	header		string				true	"the current version's ETag, e.g. \"3\""
//	@Param			facility	body		facilities.Facility	true	"the whole facility"
//	@Success		200			{object}	facilities.Facility
//	@Header			200			{string}	ETag	"the new version, quoted"
//	@Failure		400			{object}	schema.Problem	"invalid fields, each named by its JSON path"
//	@Failure		401			{object}	schema.Problem	"no bearer token"
//	@Failure		403			{object}	schema.Problem	"the token is not allowed, its scope does not cover this facility id, or no write tokens are configured"
//	@Failure		404			{object}	schema.Problem	"no such facility"
//	@Failure		412			{object}	schema.Problem	"If-Match is not the current version"
//	@Failure		428			{object}	schema.Problem	"If-Match is missing"
//	@Router			/v1/facilities/{id} [put]
func (s *Server) updateFacility(c *gin.Context) {
	by, ok := s.writer(c)
	if !ok {
		return
	}
	if !s.inScope(c, c.Param("id")) {
		return
	}
	ifMatch, err := ifMatchVersion(c.GetHeader("If-Match"))
	if err != nil {
		s.fail(c, err)
		return
	}
	var f facilities.Facility
	if !s.decodeBody(c, &f) {
		return
	}
	id := c.Param("id")
	var fields []check.FieldError
	switch {
	case f.ID == "":
		f.ID = id
	case f.ID != id:
		fields = append(fields, check.FieldError{Field: "id",
			Message: fmt.Sprintf("%q differs from the path's %q: leave it out or make it equal", f.ID, id)})
	}
	if f.Version != 0 && f.Version != ifMatch {
		fields = append(fields, check.FieldError{Field: "version",
			Message: fmt.Sprintf("%d differs from If-Match's %d: leave it out or make it equal", f.Version, ifMatch)})
	}
	f.Version = 0
	if err := f.Validate(); err != nil {
		var de *check.Error
		if !errors.As(err, &de) {
			s.fail(c, err)
			return
		}
		fields = append(fields, de.Fields...)
	}
	if err := check.Invalid("the facility is invalid", fields); err != nil {
		s.fail(c, err)
		return
	}
	out, err := s.cfg.Catalog.UpdateFacility(c.Request.Context(), f, ifMatch, by)
	s.plans.Forget(f.ID)
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header("ETag", etag(out.Version))
	s.answer(c, http.StatusOK, out)
}

// deleteFacility answers DELETE /v1/facilities/{id}.
//
//	@Summary		Delete a facility
//	@Description	Marks a facility deleted when If-Match names its current version. Its history and the plans made against it stay readable; the id may be created again later. Without If-Match: 428; with a stale version: 412. Needs a write token.
//	@Tags			catalog
//	@Security		WriteToken
//	@Param			id			path	string	true	"facility id"	example(tsw-1)
//	@Param			If-Match	header	string	true	"the current version's ETag, e.g. \"3\""
//	@Success		204
//	@Failure		400	{object}	schema.Problem	"malformed If-Match"
//	@Failure		401	{object}	schema.Problem	"no bearer token"
//	@Failure		403	{object}	schema.Problem	"the token is not allowed, its scope does not cover this facility id, or no write tokens are configured"
//	@Failure		404	{object}	schema.Problem	"no such facility"
//	@Failure		412	{object}	schema.Problem	"If-Match is not the current version"
//	@Failure		428	{object}	schema.Problem	"If-Match is missing"
//	@Router			/v1/facilities/{id} [delete]
func (s *Server) deleteFacility(c *gin.Context) {
	by, ok := s.writer(c)
	if !ok {
		return
	}
	if !s.inScope(c, c.Param("id")) {
		return
	}
	ifMatch, err := ifMatchVersion(c.GetHeader("If-Match"))
	if err != nil {
		s.fail(c, err)
		return
	}
	err = s.cfg.Catalog.DeleteFacility(c.Request.Context(), c.Param("id"), ifMatch, by)
	s.plans.Forget(c.Param("id"))
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Status(http.StatusNoContent)
}

// getPlan answers GET /v1/plans/{id}.
//
//	@Summary		Read a stored plan
//	@Description	The plan exactly as POST /v1/plans first answered it, byte for byte (SI units throughout: m, m², m/s, Pa, K, N, N·m; angles in degrees). Scalematch-Facility-Id and Scalematch-Facility-Version name the catalog facility version it used (absent for a facility given inline). When that facility has changed or been deleted since, the answer says so: a facility_changed object (planned_version, current_version, deleted, message) is added in front of the stored plan's fields, and the Scalematch-Facility-Current-Version header gives the current version or "deleted"; the rest of the body is the stored plan, byte for byte. Such a plan may no longer hold: plan again. With Accept: text/csv the answer is a table instead, one row per α/β point of the load report (a plan without one has a single row): plan id, label, facility, scale, the test settings (mach, speed_m_s, stagnation_pressure_pa, stagnation_temperature_k, dynamic_pressure_pa, reynolds), reynolds_ratio, mach_difference, alpha_deg, beta_deg, the point's corrected dynamic pressure, the six balance loads (_n, _n_m) and utilization, allowed_utilization, limiting, balance_id, verdict; each column name ends with its unit. Loads are estimates: the facility's approved limits, procedures and licensed engineering judgement govern.
//	@Tags			planning
//	@Produce		json
//	@Produce		text/csv
//	@Param			id	path		string	true	"plan id"
//	@Success		200	{object}	schema.PlanResponse
//	@Header			200	{string}	Scalematch-Facility-Id		"catalog facility id"
//	@Header			200	{integer}	Scalematch-Facility-Version	"catalog facility version"
//	@Header			200	{string}	Scalematch-Facility-Current-Version	"the facility's current version, or deleted; only when it changed since the plan"
//	@Failure		404	{object}	schema.Problem	"no plan with this id is stored"
//	@Failure		406	{object}	schema.Problem	"Accept names neither application/json nor text/csv"
//	@Router			/v1/plans/{id} [get]
func (s *Server) getPlan(c *gin.Context) {
	format, err := negotiate(c.GetHeader("Accept"), formatJSON, formatCSV)
	if err != nil {
		s.fail(c, err)
		return
	}
	c.Header("Vary", "Accept")
	p, err := s.cfg.Catalog.Plan(c.Request.Context(), c.Param("id"))
	if err != nil {
		s.fail(c, err)
		return
	}
	if p.FacilityID != "" {
		c.Header(HeaderFacilityID, p.FacilityID)
		c.Header(HeaderFacilityVersion, strconv.Itoa(p.FacilityVersion))
	}
	if !p.CreatedAt.IsZero() {
		c.Header("Last-Modified", p.CreatedAt.UTC().Format(http.TimeFormat))
	}
	body := p.Body
	if p.FacilityID == "" || p.FacilityVersion == 0 {
		// A plan record never changes; only the note on a changed catalog
		// facility does, so the rest are kept for good.
		c.Header("Cache-Control", cacheForever)
		c.Header("ETag", `"`+p.ID+`"`)
		if format == formatCSV {
			c.Header("ETag", `"`+p.ID+`.csv"`)
		}
	}
	if p.FacilityID != "" && p.FacilityVersion > 0 {
		ch, err := s.facilityChange(c.Request.Context(), p.FacilityID, p.FacilityVersion)
		if err != nil {
			s.fail(c, err)
			return
		}
		if ch != nil {
			if body, err = withFacilityChange(body, ch); err != nil {
				s.fail(c, err)
				return
			}
			cur := strconv.Itoa(ch.CurrentVersion)
			if ch.Deleted {
				cur = "deleted"
			}
			c.Header(HeaderFacilityCurrentVersion, cur)
		}
	}
	if format == formatCSV {
		s.planCSV(c, p.Body)
		return
	}
	s.answerBytes(c, http.StatusOK, "application/json; charset=utf-8", body)
}

// planCSV answers a stored plan as a table (app.WritePlanCSV).
func (s *Server) planCSV(c *gin.Context, body []byte) {
	plan, err := app.DecodePlan(body)
	if err != nil {
		s.fail(c, err)
		return
	}
	var b bytes.Buffer
	if err := app.WritePlanCSV(&b, plan); err != nil {
		s.fail(c, err)
		return
	}
	s.answerBytes(c, http.StatusOK, "text/csv; charset=utf-8; header=present", b.Bytes())
}

// facilityChange compares a stored plan's facility version with the catalog's
// current one: nil when it is still current.
func (s *Server) facilityChange(ctx context.Context, id string, planned int) (*schema.FacilityChange, error) {
	var cur int
	if vr, ok := s.cfg.Catalog.(facilities.VersionReader); ok {
		v, err := vr.CurrentVersion(ctx, id)
		if err != nil && !isNotFound(err) {
			return nil, err
		}
		cur = v
	} else {
		f, err := s.cfg.Catalog.Facility(ctx, id)
		if err != nil && !isNotFound(err) {
			return nil, err
		}
		cur = f.Version
	}
	if cur == planned {
		return nil, nil
	}
	ch := &schema.FacilityChange{FacilityID: id, PlannedVersion: planned, CurrentVersion: cur, Deleted: cur == 0}
	if ch.Deleted {
		ch.Message = fmt.Sprintf("facility %s has been deleted from the catalog since this plan was made against its version %d: the plan may no longer hold", id, planned)
	} else {
		ch.Message = fmt.Sprintf("facility %s has changed since this plan was made: planned against version %d, now at version %d; the plan's limits, loads and cautions may no longer hold: plan again", id, planned, cur)
	}
	return ch, nil
}

// withFacilityChange returns the stored plan body with "facility_changed" added
// as its first field; the rest of the body is unchanged, byte for byte.
func withFacilityChange(body []byte, ch *schema.FacilityChange) ([]byte, error) {
	fc, err := json.Marshal(ch)
	if err != nil {
		return nil, err
	}
	if len(body) < 2 || body[0] != '{' {
		return nil, fmt.Errorf("api: stored plan body is not a JSON object")
	}
	out := make([]byte, 0, len(body)+len(fc)+24)
	out = append(out, `{"facility_changed":`...)
	out = append(out, fc...)
	if body[1] != '}' {
		out = append(out, ',')
	}
	return append(out, body[1:]...), nil
}

// etag is the strong entity tag of a catalog version (RFC 9110 §8.8.3).
func etag(version int) string { return `"` + strconv.Itoa(version) + `"` }

// ifMatchVersion reads the catalog version from an If-Match header (RFC 9110
// §13.1.1). Missing: CodePreconditionRequired. "*" is refused the same way, since
// it would overwrite whatever is current. A weak tag or one that names no version
// can never match strongly: CodePreconditionFailed. Anything else not a single
// entity tag: CodeInvalid.
func ifMatchVersion(h string) (int, error) {
	h = strings.TrimSpace(h)
	switch {
	case h == "":
		return 0, &check.Error{Code: check.CodePreconditionRequired,
			Message: `a change needs If-Match with the facility's current ETag (GET /v1/facilities/{id}), e.g. If-Match: "3"`}
	case h == "*":
		return 0, &check.Error{Code: check.CodePreconditionRequired,
			Message: `If-Match: * would overwrite whatever is current; send the facility's ETag, e.g. If-Match: "3"`}
	}
	weak := strings.HasPrefix(h, "W/")
	tag := strings.TrimPrefix(h, "W/")
	if len(tag) < 2 || tag[0] != '"' || tag[len(tag)-1] != '"' || strings.ContainsAny(tag[1:len(tag)-1], `",`) {
		return 0, check.Invalid("bad If-Match header", []check.FieldError{{Field: "If-Match",
			Message: fmt.Sprintf("%q is not one entity tag: want the ETag of GET, e.g. \"3\"", h)}})
	}
	v, err := strconv.Atoi(tag[1 : len(tag)-1])
	if weak || err != nil || v < 1 {
		return 0, &check.Error{Code: check.CodePreconditionFailed,
			Message: fmt.Sprintf("If-Match %s matches no version of this facility: send the strong ETag of GET, e.g. \"3\"", h)}
	}
	return v, nil
}

// writeScopeKey keys, in the gin context, the facility-id pattern the request's
// write token is limited to ("" none).
const writeScopeKey = "scalematch.write_scope"

// inScope reports whether the request's write token may change facility id
// (Config.WriteScopes); when not, it answers 403 naming the token's scope.
func (s *Server) inScope(c *gin.Context, id string) bool {
	scope := c.GetString(writeScopeKey)
	if scope == "" {
		return true
	}
	if ok, err := path.Match(scope, id); err == nil && ok {
		return true
	}
	s.fail(c, &check.Error{Code: check.CodeForbidden,
		Message: fmt.Sprintf("this token may change only the facilities whose id matches %q, not %q", scope, truncate(id, maxEchoField))})
	return false
}

// writer checks the request's bearer token against the configured write tokens
// and returns the token's name for the audit trail. Every configured token is
// compared, in constant time on SHA-256 digests, so neither the match's position
// nor a token's length shows in the answer time. No token (or another scheme):
// 401 with WWW-Authenticate: Bearer; an unknown token, or none configured: 403.
// On failure it answers the request and returns false.
func (s *Server) writer(c *gin.Context) (facilities.Actor, bool) {
	if len(s.cfg.WriteTokens) == 0 {
		s.fail(c, &check.Error{Code: check.CodeForbidden,
			Message: "catalog changes are switched off: the service has no write tokens (SCALEMATCH_WRITE_TOKENS)"})
		return "", false
	}
	scheme, token, _ := strings.Cut(strings.TrimSpace(c.GetHeader("Authorization")), " ")
	token = strings.TrimSpace(token)
	if !strings.EqualFold(scheme, "Bearer") || token == "" {
		s.fail(c, &check.Error{Code: check.CodeUnauthorized,
			Message: "catalog changes need Authorization: Bearer <write token>"})
		return "", false
	}
	got := sha256.Sum256([]byte(token))
	var by facilities.Actor
	var scope string
	found := 0
	for t, name := range s.cfg.WriteTokens {
		want := sha256.Sum256([]byte(t))
		eq := subtle.ConstantTimeCompare(got[:], want[:])
		if eq == 1 {
			by, scope = name, s.cfg.WriteScopes[t]
		}
		found |= eq
	}
	c.Set(writeScopeKey, scope)
	if found == 0 {
		s.fail(c, &check.Error{Code: check.CodeForbidden, Message: "this token may not change the catalog"})
		return "", false
	}
	return by, true
}

// isNotFound reports whether err is a *check.Error with CodeNotFound.
func isNotFound(err error) bool {
	var fe *check.Error
	return errors.As(err, &fe) && fe.Code == check.CodeNotFound
}
