package api_test

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/check"
	"scalematch/internal/testfixture"
)

// catalogServer serves a seeded SQLite catalog with the given write tokens.
func catalogServer(t *testing.T, tokens map[string]facilities.Actor) (*httptest.Server, *sqlite.DB) {
	t.Helper()
	return catalogServerWith(t, api.Config{WriteTokens: tokens, Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
}

// catalogServerWith serves a seeded SQLite catalog with cfg (its Catalog set to
// the new store).
func catalogServerWith(t *testing.T, cfg api.Config) (*httptest.Server, *sqlite.DB) {
	t.Helper()
	ctx := context.Background()
	db, err := sqlite.Open(ctx, filepath.Join(t.TempDir(), sqlite.FileName))
	require.NoError(t, err)
	t.Cleanup(func() { db.Close() })
	_, err = facilities.SeedDemo(ctx, db, true)
	require.NoError(t, err)
	cfg.Catalog = db
	s, err := api.New(cfg)
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	return ts, db
}

type catalogReply struct {
	status int
	header http.Header
	body   []byte
}

func catalogCall(t *testing.T, ts *httptest.Server, method, path string, header map[string]string, body string) catalogReply {
	t.Helper()
	var b []byte
	if body != "" {
		b = []byte(body)
	}
	r := testfixture.Do(t, ts.Client(), method, ts.URL+path, header, b)
	return catalogReply{r.Status, r.Header, r.Body}
}

func facilityJSON(t *testing.T, id string, edit func(*facilities.Facility)) string {
	t.Helper()
	f, ok := facilities.DemoFacility("lsw-2")
	require.True(t, ok, "demo facility lsw-2 missing")
	f.ID, f.Version = id, 0 // a new record's body: the catalog gives the version
	if edit != nil {
		edit(&f)
	}
	b, err := json.Marshal(f)
	require.NoError(t, err)
	return string(b)
}

// TestCatalogWriteAccess sends every write route without a token, with a wrong
// token, with a right one, and to a service with no tokens configured.
func TestCatalogWriteAccess(t *testing.T) {
	const secret = "s3cret-token-of-facility-staff"
	tokens := map[string]facilities.Actor{secret: "facility-staff", "another-token": "other"}
	type route struct {
		name, method, path string
		ifMatch            string
		body               func(t *testing.T) string
		success            int
	}
	routes := []route{
		{"create", http.MethodPost, "/v1/facilities", "", func(t *testing.T) string { return facilityJSON(t, "new-1", nil) }, http.StatusCreated},
		{"update", http.MethodPut, "/v1/facilities/lsw-2", `"1"`, func(t *testing.T) string {
			return facilityJSON(t, "lsw-2", func(f *facilities.Facility) { f.Name = "renamed" })
		}, http.StatusOK},
		{"delete", http.MethodDelete, "/v1/facilities/wtn-04", `"1"`, func(*testing.T) string { return "" }, http.StatusNoContent},
	}
	auths := []struct {
		name   string
		tokens map[string]facilities.Actor
		header string
		want   int // 0: the route's success status
	}{
		{"no token", tokens, "", http.StatusUnauthorized},
		{"another scheme", tokens, "Basic " + secret, http.StatusUnauthorized},
		{"empty bearer", tokens, "Bearer ", http.StatusUnauthorized},
		{"wrong token", tokens, "Bearer not-the-token", http.StatusForbidden},
		{"token prefix", tokens, "Bearer " + secret[:10], http.StatusForbidden},
		{"right token", tokens, "Bearer " + secret, 0},
		{"scheme in lower case", tokens, "bearer " + secret, 0},
		{"none configured, no token", nil, "", http.StatusForbidden},
		{"none configured, some token", nil, "Bearer " + secret, http.StatusForbidden},
	}
	for _, rt := range routes {
		for _, a := range auths {
			t.Run(rt.name+"/"+a.name, func(t *testing.T) {
				ts, db := catalogServer(t, a.tokens)
				h := map[string]string{}
				if a.header != "" {
					h["Authorization"] = a.header
				}
				if rt.ifMatch != "" {
					h["If-Match"] = rt.ifMatch
				}
				r := catalogCall(t, ts, rt.method, rt.path, h, rt.body(t))
				want := a.want
				if want == 0 {
					want = rt.success
				}
				require.Equal(t, want, r.status, "status: %s", r.body)
				if want == http.StatusUnauthorized {
					assert.True(t, strings.HasPrefix(r.header.Get("WWW-Authenticate"), "Bearer"), "401 without WWW-Authenticate: Bearer (got %q)", r.header.Get("WWW-Authenticate"))
				}
				if want >= 400 {
					assert.Equal(t, schema.ContentTypeProblem, r.header.Get("Content-Type"), "Content-Type")
					assert.NotContains(t, string(r.body), secret, "the problem repeats the token")
				}
				// The audit names the token's name, never the token.
				id := strings.TrimPrefix(rt.path, "/v1/facilities/")
				if rt.name == "create" {
					id = "new-1"
				}
				vs, err := db.Versions(context.Background(), id)
				if a.want != 0 {
					if rt.name == "create" {
						assert.Equal(t, check.CodeNotFound, check.ErrorCode(err), "a refused create left history %v, %v", vs, err)
					} else if assert.NoError(t, err, "a refused %s: history", rt.name) {
						assert.Len(t, vs, 1, "a refused %s changed the history", rt.name)
					}
					return
				}
				require.NoError(t, err)
				require.NotEmpty(t, vs, "history")
				assert.Equal(t, facilities.Actor("facility-staff"), vs[len(vs)-1].By, "change recorded as by the token's name")
			})
		}
	}
}

// TestCatalogETags checks the version-as-ETag handshake: 428 without If-Match, 412
// with a stale one, success with the current one.
func TestCatalogETags(t *testing.T) {
	auth := map[string]string{"Authorization": "Bearer tok"}
	with := func(kv ...string) map[string]string {
		h := map[string]string{"Authorization": "Bearer tok"}
		for i := 0; i+1 < len(kv); i += 2 {
			h[kv[i]] = kv[i+1]
		}
		return h
	}
	ts, _ := catalogServer(t, map[string]facilities.Actor{"tok": "staff"})

	r := catalogCall(t, ts, http.MethodGet, "/v1/facilities/lsw-2", nil, "")
	require.Equal(t, http.StatusOK, r.status, "GET: status")
	require.Equal(t, `"1"`, r.header.Get("ETag"), "GET: ETag")
	edit := facilityJSON(t, "lsw-2", func(f *facilities.Facility) { f.Balances[0].Limits.Normal = catalogPtr(8000) })

	tests := []struct {
		name     string
		method   string
		header   map[string]string
		body     string
		want     int
		wantETag string
	}{
		{"put without If-Match", http.MethodPut, auth, edit, http.StatusPreconditionRequired, ""},
		{"put with If-Match *", http.MethodPut, with("If-Match", "*"), edit, http.StatusPreconditionRequired, ""},
		{"put with a version ahead", http.MethodPut, with("If-Match", `"5"`), edit, http.StatusPreconditionFailed, ""},
		{"put with a weak tag", http.MethodPut, with("If-Match", `W/"1"`), edit, http.StatusPreconditionFailed, ""},
		{"put with a malformed tag", http.MethodPut, with("If-Match", `1`), edit, http.StatusBadRequest, ""},
		{"put with the current version", http.MethodPut, with("If-Match", `"1"`), edit, http.StatusOK, `"2"`},
		{"put again with the old version", http.MethodPut, with("If-Match", `"1"`), edit, http.StatusPreconditionFailed, ""},
		{"delete without If-Match", http.MethodDelete, auth, "", http.StatusPreconditionRequired, ""},
		{"delete with a stale version", http.MethodDelete, with("If-Match", `"1"`), "", http.StatusPreconditionFailed, ""},
		{"delete with the current version", http.MethodDelete, with("If-Match", `"2"`), "", http.StatusNoContent, ""},
		{"put after delete", http.MethodPut, with("If-Match", `"3"`), edit, http.StatusNotFound, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := catalogCall(t, ts, tt.method, "/v1/facilities/lsw-2", tt.header, tt.body)
			require.Equal(t, tt.want, r.status, "status: %s", r.body)
			if tt.wantETag != "" {
				assert.Equal(t, tt.wantETag, r.header.Get("ETag"), "ETag")
			}
		})
	}

	r = catalogCall(t, ts, http.MethodGet, "/v1/facilities/lsw-2/versions", nil, "")
	var h schema.FacilityHistory
	require.Equal(t, http.StatusOK, r.status, "versions: %s", r.body)
	require.NoError(t, json.Unmarshal(r.body, &h), "versions")
	// Seed, update of balances[0].limits.normal by staff, delete.
	require.Len(t, h.Versions, 3, "history %+v", h.Versions)
	assert.EqualValues(t, "staff", h.Versions[1].By, "update: by")
	assert.Equal(t, []string{"balances[0].limits.normal"}, h.Versions[1].Fields, "update: fields")
	assert.EqualValues(t, "delete", h.Versions[2].Action, "last version: action")
}

func catalogPtr(v float64) *float64 { return &v }

func TestCatalogCreateAndValidate(t *testing.T) {
	ts, _ := catalogServer(t, map[string]facilities.Actor{"tok": "staff"})
	auth := map[string]string{"Authorization": "Bearer tok"}

	r := catalogCall(t, ts, http.MethodPost, "/v1/facilities", auth, facilityJSON(t, "lsw-3", func(f *facilities.Facility) { f.Version = 9 }))
	require.Equal(t, http.StatusCreated, r.status, "create: %s", r.body)
	require.Equal(t, "/v1/facilities/lsw-3", r.header.Get("Location"), "create: Location")
	require.Equal(t, `"1"`, r.header.Get("ETag"), "create: ETag")
	// Units in strings are accepted and stored in SI.
	withUnits := strings.Replace(facilityJSON(t, "lsw-4", nil), `"max_dynamic_pressure":4100`, `"max_dynamic_pressure":"41 hPa"`, 1)
	r = catalogCall(t, ts, http.MethodPost, "/v1/facilities", auth, withUnits)
	require.Equal(t, http.StatusCreated, r.status, "create with a unit string: %s", r.body)
	var f facilities.Facility
	if assert.NoError(t, json.Unmarshal(r.body, &f)) && assert.NotNil(t, f.MaxDynamicPressure, "max dynamic pressure") {
		assert.Equal(t, 4100.0, *f.MaxDynamicPressure, "41 hPa stored, Pa")
	}

	tests := []struct {
		name       string
		method     string
		path       string
		header     map[string]string
		body       string
		want       int
		wantFields []string
	}{
		{"create an existing id", http.MethodPost, "/v1/facilities", auth, facilityJSON(t, "lsw-2", nil), http.StatusConflict, nil},
		{"create with an unknown field", http.MethodPost, "/v1/facilities", auth,
			strings.Replace(facilityJSON(t, "x-1", nil), `"name"`, `"nmae"`, 1), http.StatusBadRequest, nil},
		{"create invalid: every field named", http.MethodPost, "/v1/facilities", auth, facilityJSON(t, "Bad Id", func(f *facilities.Facility) {
			f.TestSection.Width = -1
			f.Balances[0].SafetyFactor = 0.5
		}), http.StatusBadRequest, []string{"id", "test_section.width", "balances[0].safety_factor"}},
		{"update with another id", http.MethodPut, "/v1/facilities/lsw-2", map[string]string{"Authorization": "Bearer tok", "If-Match": `"1"`},
			facilityJSON(t, "tsw-1", func(f *facilities.Facility) { f.TestSection.Height = 0 }), http.StatusBadRequest, []string{"id", "test_section.height"}},
		{"update without an id", http.MethodPut, "/v1/facilities/lsw-2", map[string]string{"Authorization": "Bearer tok", "If-Match": `"1"`},
			strings.Replace(facilityJSON(t, "lsw-2", nil), `"id":"lsw-2",`, ``, 1), http.StatusOK, nil},
		{"read unknown", http.MethodGet, "/v1/facilities/nope", nil, "", http.StatusNotFound, nil},
		{"versions unknown", http.MethodGet, "/v1/facilities/nope/versions", nil, "", http.StatusNotFound, nil},
		{"plan unknown", http.MethodGet, "/v1/plans/nope", nil, "", http.StatusNotFound, nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := catalogCall(t, ts, tt.method, tt.path, tt.header, tt.body)
			require.Equal(t, tt.want, r.status, "status: %s", r.body)
			if tt.wantFields == nil {
				return
			}
			var p schema.Problem
			require.NoError(t, json.Unmarshal(r.body, &p))
			var named []string
			for _, e := range p.Errors {
				named = append(named, e.Field)
			}
			for _, want := range tt.wantFields {
				assert.Contains(t, named, want, "fields the problem names")
			}
		})
	}

	r = catalogCall(t, ts, http.MethodGet, "/v1/facilities", nil, "")
	var list schema.FacilityList
	require.Equal(t, http.StatusOK, r.status, "list: %s", r.body)
	require.NoError(t, json.Unmarshal(r.body, &list), "list")
	assert.Len(t, list.Facilities, len(facilities.Demo())+2, "listed facilities: the demo ones and two created")
}

// plannedBody plans testfixture.J16Plan against the facility facilityID on ts and returns
// the plan with its id replaced by id: a real plan body to store by hand.
func plannedBody(t *testing.T, ts *httptest.Server, facilityID, id string) []byte {
	t.Helper()
	req := strings.Replace(testfixture.J16Plan, `"facility_id": "tsw-1"`, `"facility_id": "`+facilityID+`"`, 1)
	r := catalogCall(t, ts, http.MethodPost, "/v1/plans", nil, req)
	require.Equal(t, http.StatusOK, r.status, "%s", r.body)
	var head struct {
		ID string `json:"id"`
	}
	require.NoError(t, json.Unmarshal(r.body, &head))
	return bytes.Replace(r.body, []byte(`"id":"`+head.ID+`"`), []byte(`"id":"`+id+`"`), 1)
}

func TestStoredPlan(t *testing.T) {
	ts, db := catalogServer(t, nil)
	body := plannedBody(t, ts, "tsw-1", "p-7")
	created := time.Date(2031, 5, 6, 7, 8, 9, 0, time.UTC)
	_, err := db.SavePlan(context.Background(), facilities.PlanRecord{ID: "p-7", FacilityID: "tsw-1", FacilityVersion: 1, CreatedAt: created, Body: body})
	require.NoError(t, err)
	r := catalogCall(t, ts, http.MethodGet, "/v1/plans/p-7", nil, "")
	require.Equal(t, http.StatusOK, r.status, "status: %s", r.body)
	require.Equal(t, string(body), string(r.body), "stored plan, byte for byte")
	for k, want := range map[string]string{
		api.HeaderFacilityID:      "tsw-1",
		api.HeaderFacilityVersion: "1",
		"Last-Modified":           "Tue, 06 May 2031 07:08:09 GMT",
		"Content-Type":            "application/json; charset=utf-8",
	} {
		assert.Equal(t, want, r.header.Get(k), k)
	}
}

// TestStoredPlanFacilityChanged checks that a stored plan read back after its
// facility changed or was deleted says so in the body and a header, and that the
// rest of the body is the stored plan byte for byte.
func TestStoredPlanFacilityChanged(t *testing.T) {
	ts, db := catalogServer(t, nil)
	ctx := context.Background()
	tmpl, err := db.Facility(ctx, "tsw-1")
	require.NoError(t, err)
	mk := func(id string) facilities.Facility {
		f := tmpl
		f.ID, f.Name, f.Version = id, "changed-plan case "+id, 0
		created, err := db.CreateFacility(ctx, f, "test")
		require.NoError(t, err)
		return created
	}
	changed, deleted, same := mk("wch-1"), mk("wch-2"), mk("wch-3")
	stored := map[string][]byte{}
	for _, f := range []facilities.Facility{changed, deleted, same} {
		stored[f.ID] = plannedBody(t, ts, f.ID, "p-"+f.ID)
		_, err := db.SavePlan(ctx, facilities.PlanRecord{ID: "p-" + f.ID, FacilityID: f.ID, FacilityVersion: f.Version,
			Body: stored[f.ID]})
		require.NoError(t, err)
	}
	changed.Name += ", revised"
	_, err = db.UpdateFacility(ctx, changed, changed.Version, "test")
	require.NoError(t, err)
	require.NoError(t, db.DeleteFacility(ctx, deleted.ID, deleted.Version, "test"))

	cases := []struct {
		name       string
		id         string
		wantHeader string
		wantChange *schema.FacilityChange
		wantText   string
	}{
		{"unchanged", "wch-3", "", nil, ""},
		{"changed", "wch-1", "2", &schema.FacilityChange{FacilityID: "wch-1", PlannedVersion: 1, CurrentVersion: 2},
			"facility wch-1 has changed since this plan was made: planned against version 1, now at version 2"},
		{"deleted", "wch-2", "deleted", &schema.FacilityChange{FacilityID: "wch-2", PlannedVersion: 1, Deleted: true},
			"facility wch-2 has been deleted from the catalog since this plan was made against its version 1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := catalogCall(t, ts, http.MethodGet, "/v1/plans/p-"+c.id, nil, "")
			require.Equal(t, http.StatusOK, r.status, "%s", r.body)
			body := stored[c.id]
			assert.Equal(t, c.wantHeader, r.header.Get(api.HeaderFacilityCurrentVersion))
			if c.wantChange == nil {
				assert.Equal(t, string(body), string(r.body), "byte for byte")
				return
			}
			var got struct {
				FacilityChanged *schema.FacilityChange `json:"facility_changed"`
			}
			require.NoError(t, json.Unmarshal(r.body, &got))
			require.NotNil(t, got.FacilityChanged)
			assert.Contains(t, got.FacilityChanged.Message, c.wantText)
			got.FacilityChanged.Message = ""
			assert.Equal(t, *c.wantChange, *got.FacilityChanged)
			// The stored plan follows the added field byte for byte.
			assert.True(t, bytes.HasSuffix(r.body, body[1:]), "%s", r.body)
			assert.True(t, bytes.HasPrefix(r.body, []byte(`{"facility_changed":{`)), "%s", r.body)
		})
	}
}
