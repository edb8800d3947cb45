package api

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"mime"
	"net/http"
	"net/url"
	"slices"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/api/schema"
	"scalematch/internal/check"
	"scalematch/internal/unitjson"
)

// Cache-Control values.
const (
	// cacheRevalidate: a client may keep the answer but asks again with
	// If-None-Match before using it (the default of GET).
	cacheRevalidate = "no-cache"
	// cacheNever: computed answers and problems are not kept.
	cacheNever = "no-store"
	// cacheForever: a stored plan made against an inline facility never changes.
	cacheForever = "public, max-age=31536000, immutable"
)

// queryParams lists the query parameters each route takes; any other, and any
// given twice, is refused with 400 naming it, as an unknown JSON field is.
var queryParams = map[string][]string{
	"/v1/atmosphere":                  {"altitude", "pressure_altitude", "delta_isa"},
	"/v1/plans":                       listParams,
	"/v1/campaigns":                   listParams,
	"/v1/facilities/:id/envelope.svg": {"reference_length", "flight_mach", "flight_speed", "flight_reynolds"},
	"/v1/facilities/:id/envelope.png": {"reference_length", "flight_mach", "flight_speed", "flight_reynolds"},
	"/v1/facilities/:id/envelope.pdf": {"reference_length", "flight_mach", "flight_speed", "flight_reynolds"},
}

// headers sets the headers every answer carries, X-Content-Type-Options: nosniff
// and a default Cache-Control (GET and HEAD revalidate, the rest are not kept),
// and refuses on the /v1 routes what none of them accepts: unknown or repeated
// query parameters (400) and a body that is not plain JSON (415).
func (s *Server) headers(c *gin.Context) {
	h := c.Writer.Header()
	h.Set("X-Content-Type-Options", "nosniff")
	if s.draining.Load() {
		h.Set("Connection", "close")
	}
	get := c.Request.Method == http.MethodGet || c.Request.Method == http.MethodHead
	if get {
		h.Set("Cache-Control", cacheRevalidate)
	} else {
		h.Set("Cache-Control", cacheNever)
	}
	// The JSON API's rules; the HTML pages (internal/pages) take forms and
	// queries of their own.
	api := strings.HasPrefix(c.Request.URL.Path, "/v1/")
	if !api {
		c.Next()
		return
	}
	if err := checkQuery(c.Request.URL.RawQuery, queryParams[c.FullPath()]); err != nil {
		s.fail(c, err)
		return
	}
	if !get && c.Request.Method != http.MethodDelete && c.FullPath() != "" {
		if err := checkJSONBody(c.Request); err != nil {
			s.fail(c, err)
			return
		}
	}
	c.Next()
}

// checkQuery refuses a query that does not parse, names a parameter not in
// allowed, or gives one more than once.
func checkQuery(raw string, allowed []string) error {
	if raw == "" {
		return nil
	}
	q, err := url.ParseQuery(raw)
	if err != nil {
		return unitjson.BodyError("the query string does not parse: " + err.Error())
	}
	var fe check.Fields
	keys := make([]string, 0, len(q))
	for k := range q {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		name := truncate(k, maxEchoField)
		switch {
		case !slices.Contains(allowed, k) && len(allowed) == 0:
			fe.Add(name, "unknown query parameter: this route takes none")
		case !slices.Contains(allowed, k):
			fe.Add(name, "unknown query parameter: want one of %s", strings.Join(allowed, ", "))
		case len(q[k]) > 1:
			fe.Add(name, "given %d times: give it once", len(q[k]))
		}
	}
	return fe.Err()
}

// checkJSONBody refuses a request body that is not plain JSON: a Content-Type
// other than application/json (or a +json type) with at most a UTF-8 charset, none
// at all, or any Content-Encoding but identity.
func checkJSONBody(r *http.Request) error {
	if ce := strings.TrimSpace(r.Header.Get("Content-Encoding")); ce != "" && !strings.EqualFold(ce, "identity") {
		return unsupported(fmt.Sprintf("Content-Encoding %q is not accepted: send the JSON body unencoded", truncate(ce, maxEchoField)))
	}
	ct := r.Header.Get("Content-Type")
	if ct == "application/json" || ct == "application/json; charset=utf-8" {
		// The two forms clients send, accepted without mime.ParseMediaType's
		// parameter map: every other form is parsed below.
		return nil
	}
	if ct == "" {
		return unsupported("the request has no Content-Type: send the body as application/json")
	}
	mt, params, err := mime.ParseMediaType(ct)
	if err != nil {
		return unsupported(fmt.Sprintf("Content-Type %q does not parse: send application/json", truncate(ct, maxEchoField)))
	}
	if mt != "application/json" && !(strings.HasPrefix(mt, "application/") && strings.HasSuffix(mt, "+json")) {
		return unsupported(fmt.Sprintf("Content-Type %s is not JSON: send the body as application/json", truncate(mt, maxEchoField)))
	}
	if cs, ok := params["charset"]; ok && !strings.EqualFold(cs, "utf-8") {
		return unsupported(fmt.Sprintf("charset %q: JSON is UTF-8", truncate(cs, maxEchoField)))
	}
	return nil
}

// unsupported is the 415 of a body that is not plain JSON.
func unsupported(msg string) error { return &clientFault{kindUnsupportedMedia, msg, "not_json"} }

// Lengths of what a problem echoes of the request, in bytes.
const (
	maxEchoField   = 200
	maxEchoMessage = 500
)

// truncate shortens s to at most n bytes on a rune boundary, marking the cut with
// "…".
func truncate(s string, n int) string {
	if len(s) <= n {
		return s
	}
	cut := n
	for cut > 0 && !utf8Start(s[cut]) {
		cut--
	}
	return s[:cut] + "…"
}

func utf8Start(b byte) bool { return b&0xC0 != 0x80 }

// truncateProblem shortens every field path and message of p, and its detail, so
// that an answer never echoes an unbounded part of the request.
func truncateProblem(p *schema.Problem) {
	p.Detail = truncate(p.Detail, maxEchoMessage)
	for i := range p.Errors {
		p.Errors[i] = check.FieldError{Field: truncate(p.Errors[i].Field, maxEchoField), Message: truncate(p.Errors[i].Message, maxEchoMessage)}
	}
}

// notModified answers 304 when the request's If-None-Match names etag (or is
// "*"), and reports whether it did.
func notModified(c *gin.Context, etag string) bool {
	inm := c.GetHeader("If-None-Match")
	if inm == "" || etag == "" {
		return false
	}
	for _, t := range strings.Split(inm, ",") {
		t = strings.TrimSpace(t)
		if t == "*" || strings.TrimPrefix(t, "W/") == strings.TrimPrefix(etag, "W/") {
			c.Header("ETag", etag)
			c.AbortWithStatus(http.StatusNotModified)
			return true
		}
	}
	return false
}

// bodyETag is the weak entity tag of an answer's bytes.
func bodyETag(body []byte) string {
	sum := sha256.Sum256(body)
	return `W/"` + hex.EncodeToString(sum[:12]) + `"`
}
