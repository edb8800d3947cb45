package api_test

import (
	"encoding/json"
	"io"
	"net/http"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

// TestContentTypes: bodies that are not plain JSON were parsed as JSON; they are
// 415.
func TestContentTypes(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name     string
		ctype    string
		encoding string
		status   int
	}{
		{"JSON", "application/json", "", http.StatusOK},
		{"JSON with UTF-8", "application/json; charset=utf-8", "", http.StatusOK},
		{"a +json type", "application/vnd.scalematch+json", "", http.StatusOK},
		{"text", "text/plain", "", http.StatusUnsupportedMediaType},
		{"form", "application/x-www-form-urlencoded", "", http.StatusUnsupportedMediaType},
		{"XML", "application/xml", "", http.StatusUnsupportedMediaType},
		{"no Content-Type", "", "", http.StatusUnsupportedMediaType},
		{"Latin-1", "application/json; charset=iso-8859-1", "", http.StatusUnsupportedMediaType},
		{"gzip on a plain body", "application/json", "gzip", http.StatusUnsupportedMediaType},
	}
	body := `{"facility_id": "tsw-1", "mach": 0.8, "stagnation_pressure": 150000, "stagnation_temperature": 310}`
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			req, err := http.NewRequest(http.MethodPost, ts.URL+"/v1/conditions", strings.NewReader(body))
			require.NoError(t, err)
			req.Header.Del("Content-Type")
			if tc.ctype != "" {
				req.Header.Set("Content-Type", tc.ctype)
			}
			if tc.encoding != "" {
				req.Header.Set("Content-Encoding", tc.encoding)
			}
			resp, err := ts.Client().Do(req)
			require.NoError(t, err)
			resp.Body.Close()
			assert.Equal(t, tc.status, resp.StatusCode)
			if tc.status != http.StatusOK {
				assert.Equal(t, "application/problem+json", resp.Header.Get("Content-Type"))
			}
		})
	}
}

// TestHeaders: nosniff on every answer, and cache headers that fit each resource.
func TestHeaders(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name, method, path, body string
		status                   int
		cache                    string
		etag                     bool
	}{
		{"health", "GET", "/healthz", "", 200, "no-cache", true},
		{"a catalog read carries its version as ETag", "GET", "/v1/facilities/tsw-1", "", 200, "no-cache", true},
		{"the catalog list", "GET", "/v1/facilities", "", 200, "no-cache", true},
		{"a computed answer is not kept", "POST", "/v1/conditions", `{"facility_id": "tsw-1", "mach": 0.8, "stagnation_pressure": 150000, "stagnation_temperature": 310}`, 200, "no-store", false},
		{"a problem is not kept", "GET", "/v1/facilities/zz-9", "", 404, "no-store", false},
		{"no route", "GET", "/nowhere", "", 404, "no-store", false},
		{"the OpenAPI document", "GET", "/openapi.json", "", 200, "no-cache", true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			req, err := http.NewRequest(tc.method, ts.URL+tc.path, strings.NewReader(tc.body))
			require.NoError(t, err)
			req.Header.Set("Content-Type", "application/json")
			resp, err := ts.Client().Do(req)
			require.NoError(t, err)
			resp.Body.Close()
			require.Equal(t, tc.status, resp.StatusCode)
			assert.Equal(t, "nosniff", resp.Header.Get("X-Content-Type-Options"))
			assert.Equal(t, tc.cache, resp.Header.Get("Cache-Control"))
			assert.Equal(t, tc.etag, resp.Header.Get("ETag") != "", "ETag %q", resp.Header.Get("ETag"))
			if !tc.etag {
				return
			}
			req, _ = http.NewRequest(tc.method, ts.URL+tc.path, nil)
			req.Header.Set("If-None-Match", resp.Header.Get("ETag"))
			again, err := ts.Client().Do(req)
			require.NoError(t, err)
			again.Body.Close()
			assert.Equal(t, http.StatusNotModified, again.StatusCode, "If-None-Match with the ETag")
		})
	}
}

// TestStoredPlanImmutable: a stored plan of an inline facility never changes: it is
// kept for good under its id.
func TestStoredPlanImmutable(t *testing.T) {
	ts, _ := catalogServer(t, nil)
	f, ok := facilities.DemoFacility("tsw-1")
	require.True(t, ok)
	fb, err := json.Marshal(f)
	require.NoError(t, err)
	inline := strings.Replace(testfixture.J16Plan, `"facility_id": "tsw-1"`, `"facility": `+string(fb), 1)
	code, b := post(t, ts, "/v1/plans", inline)
	require.Equal(t, 200, code, "%s", b)
	id := string(b[strings.Index(string(b), `"id":"`)+6:])
	id = id[:strings.IndexByte(id, '"')]
	resp, err := http.Get(ts.URL + "/v1/plans/" + id)
	require.NoError(t, err)
	resp.Body.Close()
	require.Equal(t, http.StatusOK, resp.StatusCode)
	assert.Equal(t, "public, max-age=31536000, immutable", resp.Header.Get("Cache-Control"))
	assert.Equal(t, `"`+id+`"`, resp.Header.Get("ETag"))
}

// TestQueryAndMethods: repeated or unknown query parameters were silently
// accepted, and GET /v1/plans/batch was a 404.
func TestQueryAndMethods(t *testing.T) {
	ts := newServer(t)
	cases := []struct {
		name, path string
		status     int
		field      string
	}{
		{"known parameters", "/v1/atmosphere?altitude=1000", 200, ""},
		{"a repeated parameter", "/v1/atmosphere?altitude=1000&altitude=2000", 400, "altitude"},
		{"an unknown parameter", "/v1/atmosphere?altitude=1000&altitud=2", 400, "altitud"},
		{"a parameter on a route that takes none", "/v1/facilities?limit=3", 400, "limit"},
		{"GET on the batch", "/v1/plans/batch", 405, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			resp, err := http.Get(ts.URL + tc.path)
			require.NoError(t, err)
			var b strings.Builder
			_, _ = readAll(&b, resp)
			assert.Equal(t, tc.status, resp.StatusCode, b.String())
			if tc.field != "" {
				assert.Contains(t, b.String(), `"field":"`+tc.field+`"`)
			}
			if tc.status == 405 {
				assert.Equal(t, "POST", resp.Header.Get("Allow"))
			}
		})
	}
}

func readAll(b *strings.Builder, resp *http.Response) (int64, error) {
	defer resp.Body.Close()
	return io.Copy(b, resp.Body)
}
