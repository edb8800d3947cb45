package api

import (
	"bytes"
	"context"
	"crypto/rand"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/facilities/postgres"
	"scalematch/facilities/sqlite"
	"scalematch/internal/campaign"
	"scalematch/internal/jobs"
	"scalematch/internal/testfixture"
	"scalematch/internal/unitjson"
)

// largeCampaign is examples/campaign-j16.json with an na × nm grid: with its
// five listed conditions and three facilities, more than campaign.SmallPairs
// condition-facility pairs when na·nm > 195.
func largeCampaign(t testing.TB, na, nm int) []byte {
	t.Helper()
	b, err := os.ReadFile("../examples/campaign-j16.json")
	require.NoError(t, err)
	var req map[string]any
	require.NoError(t, json.Unmarshal(b, &req))
	alts, machs := make([]float64, na), make([]float64, nm)
	for i := range alts {
		alts[i] = 1000 + 11000*float64(i)/float64(max(na-1, 1))
	}
	for i := range machs {
		machs[i] = 0.45 + 0.35*float64(i)/float64(max(nm-1, 1))
	}
	req["grid"] = map[string]any{"altitudes": alts, "machs": machs}
	out, err := json.Marshal(req)
	require.NoError(t, err)
	return out
}

// directResult plans body as the campaign runner does, on its own, and
// returns the result's JSON: what every stored run of it must equal.
func directResult(t testing.TB, cat facilities.Catalog, body []byte) []byte {
	t.Helper()
	var req campaign.Request
	require.NoError(t, unitjson.Decode(body, &req))
	s := &Server{cfg: Config{Catalog: cat}}
	if _, demo := cat.(facilities.DemoCatalog); !demo {
		s.plans = nil
	}
	res, err := s.runCampaign(context.Background(), jobs.Job{Request: body}, func(int, int) {})
	require.NoError(t, err)
	return res
}

type reply struct {
	status int
	header http.Header
	body   []byte
}

func call(t testing.TB, base, method, path, accept string, body []byte) reply {
	t.Helper()
	var header map[string]string
	if accept != "" {
		header = map[string]string{"Accept": accept}
	}
	r := testfixture.Do(t, nil, method, base+path, header, body)
	return reply{r.Status, r.Header, r.Body}
}

// jobServer serves a seeded store with a running job worker.
func jobServer(t *testing.T, cat facilities.Catalog, cfg JobsConfig) (*Server, string) {
	t.Helper()
	if cfg.Lease == 0 {
		cfg.Lease = 3 * time.Second
	}
	cfg.Poll = 20 * time.Millisecond
	s, err := New(Config{Catalog: cat, Logger: slog.New(slog.NewTextHandler(io.Discard, nil)), Jobs: cfg})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan struct{})
	go func() { s.RunJobs(ctx); close(done) }()
	t.Cleanup(func() { cancel(); <-done; ts.Close() })
	return s, ts.URL
}

func sqliteStore(t *testing.T) *sqlite.DB {
	t.Helper()
	db, err := sqlite.Open(context.Background(), filepath.Join(t.TempDir(), sqlite.FileName))
	require.NoError(t, err)
	t.Cleanup(func() { db.Close() })
	_, err = facilities.SeedDemo(context.Background(), db, true)
	require.NoError(t, err)
	return db
}

// waitDone polls GET path until it is no longer 202, checking that the
// progress never goes back within an attempt, and returns the last answer.
func waitDone(t testing.TB, base, path, accept string) reply {
	t.Helper()
	deadline := time.Now().Add(2 * time.Minute)
	last := schema.CampaignStatus{}
	for {
		r := call(t, base, http.MethodGet, path, accept, nil)
		if r.status != http.StatusAccepted {
			return r
		}
		var st schema.CampaignStatus
		require.NoError(t, json.Unmarshal(r.body, &st), "%s", r.body)
		require.Contains(t, []string{"queued", "running"}, st.State)
		require.Equal(t, st.State, r.header.Get(HeaderJobState))
		if st.Attempt == last.Attempt {
			require.GreaterOrEqual(t, st.Done, last.Done, "progress within an attempt never goes back")
		}
		require.LessOrEqual(t, st.Done, st.Total)
		last = st
		require.True(t, time.Now().Before(deadline), "campaign %s still %s (%d of %d)", path, st.State, st.Done, st.Total)
		time.Sleep(20 * time.Millisecond)
	}
}

func TestCampaignJobLifecycle(t *testing.T) {
	db := sqliteStore(t)
	srv, base := jobServer(t, db, JobsConfig{})
	body := largeCampaign(t, 15, 15)
	want := directResult(t, db, body)

	r := call(t, base, http.MethodPost, "/v1/campaigns", "", body)
	require.Equal(t, http.StatusAccepted, r.status, "%s", r.body)
	loc := r.header.Get("Location")
	require.True(t, strings.HasPrefix(loc, "/v1/campaigns/"), loc)
	var st schema.CampaignStatus
	require.NoError(t, json.Unmarshal(r.body, &st))
	assert.Equal(t, "queued", st.State)
	assert.Equal(t, 230, st.Conditions)
	assert.Equal(t, []string{"tsw-1", "cn2-05", "plp-3"}, st.Facilities)
	assert.Equal(t, loc, st.Href)

	done := waitDone(t, base, loc, "")
	require.Equal(t, http.StatusOK, done.status, "%s", done.body)
	assert.Equal(t, "done", done.header.Get(HeaderJobState))
	assert.Equal(t, string(want), string(done.body), "the stored result is the direct run's, byte for byte")

	var res campaign.Result
	require.NoError(t, json.Unmarshal(done.body, &res))
	var wantCSV, wantNDJSON bytes.Buffer
	require.NoError(t, res.WriteCSV(&wantCSV))
	require.NoError(t, res.WriteNDJSON(&wantNDJSON))
	csv := call(t, base, http.MethodGet, loc, "text/csv", nil)
	require.Equal(t, http.StatusOK, csv.status)
	assert.True(t, strings.HasPrefix(csv.header.Get("Content-Type"), "text/csv"))
	assert.Equal(t, wantCSV.String(), string(csv.body))
	nd := call(t, base, http.MethodGet, loc, "application/x-ndjson", nil)
	require.Equal(t, http.StatusOK, nd.status)
	assert.Equal(t, "application/x-ndjson", nd.header.Get("Content-Type"))
	assert.Equal(t, wantNDJSON.String(), string(nd.body))
	assert.Equal(t, http.StatusNotAcceptable, call(t, base, http.MethodGet, loc, "image/png", nil).status)

	del := call(t, base, http.MethodDelete, loc, "", nil)
	assert.Equal(t, http.StatusConflict, del.status, "a done campaign is not cancelled: %s", del.body)
	assert.Equal(t, "done", del.header.Get(HeaderJobState))

	// A small campaign is answered at once and stored done.
	small, err := os.ReadFile("../examples/campaign-j16.json")
	require.NoError(t, err)
	r = call(t, base, http.MethodPost, "/v1/campaigns", "", small)
	require.Equal(t, http.StatusCreated, r.status, "%s", r.body)
	smallLoc := r.header.Get("Location")
	require.NotEmpty(t, smallLoc)
	again := call(t, base, http.MethodGet, smallLoc, "", nil)
	require.Equal(t, http.StatusOK, again.status)
	assert.Equal(t, string(r.body), string(again.body), "read back as answered")

	// The listing: newest first, by facility and by a condition's label.
	list := func(query string) []string {
		t.Helper()
		r := call(t, base, http.MethodGet, "/v1/campaigns"+query, "", nil)
		require.Equal(t, http.StatusOK, r.status, "%s", r.body)
		var l schema.CampaignList
		require.NoError(t, json.Unmarshal(r.body, &l))
		var hrefs []string
		for _, c := range l.Campaigns {
			assert.Equal(t, "done", c.State)
			hrefs = append(hrefs, c.Href)
		}
		return hrefs
	}
	assert.Equal(t, []string{smallLoc, loc}, list(""))
	assert.Equal(t, []string{smallLoc}, list("?limit=1"))
	assert.Equal(t, []string{smallLoc, loc}, list("?facility=cn2-05&label=approach"))
	assert.Empty(t, list("?facility=lsw-2"))
	assert.Equal(t, http.StatusBadRequest, call(t, base, http.MethodGet, "/v1/campaigns?state=done", "", nil).status)

	// A campaign that fails keeps the problem its POST would have answered. POST
	// refuses bad input before it stores a job (TestCampaignLargeBadInputRefusedAtOnce),
	// so the failing job is stored directly, as one would be whose facility was
	// removed from the catalog after it was accepted.
	var bad map[string]any
	require.NoError(t, json.Unmarshal(body, &bad))
	bad["facilities"].([]any)[0].(map[string]any)["facility_id"] = "no-such-tunnel"
	badBody, _ := json.Marshal(bad)
	var badReq campaign.Request
	require.NoError(t, unitjson.Decode(badBody, &badReq))
	j, err := srv.jobs.Enqueue(context.Background(), campaignJob(newJobID(), &badReq, badBody))
	require.NoError(t, err)
	srv.worker.Wake()
	r = waitDone(t, base, "/v1/campaigns/"+j.ID, "text/csv")
	assert.Equal(t, "failed", r.header.Get(HeaderJobState))
	assert.Equal(t, schema.ContentTypeProblem, r.header.Get("Content-Type"))
	assert.Contains(t, []int{http.StatusBadRequest, http.StatusNotFound}, r.status, "%s", r.body)
	assert.Contains(t, string(r.body), "no-such-tunnel")

	assert.Equal(t, http.StatusNotFound, call(t, base, http.MethodGet, "/v1/campaigns/nope", "", nil).status)
}

func TestCampaignCancel(t *testing.T) {
	db := sqliteStore(t)
	// No worker: the campaign stays queued until cancelled.
	_, base := jobServer(t, db, JobsConfig{Off: true})
	r := call(t, base, http.MethodPost, "/v1/campaigns", "", largeCampaign(t, 15, 15))
	require.Equal(t, http.StatusAccepted, r.status, "%s", r.body)
	loc := r.header.Get("Location")
	del := call(t, base, http.MethodDelete, loc, "", nil)
	require.Equal(t, http.StatusOK, del.status, "%s", del.body)
	var st schema.CampaignStatus
	require.NoError(t, json.Unmarshal(del.body, &st))
	assert.Equal(t, "cancelled", st.State)
	got := call(t, base, http.MethodGet, loc, "", nil)
	assert.Equal(t, http.StatusConflict, got.status)
	assert.Equal(t, "cancelled", got.header.Get(HeaderJobState))
	assert.Equal(t, http.StatusConflict, call(t, base, http.MethodDelete, loc, "", nil).status, "cancelled already")
	assert.Equal(t, http.StatusNotFound, call(t, base, http.MethodDelete, "/v1/campaigns/nope", "", nil).status)
}

// TestCampaignRunningCancel: a running campaign is stopped by DELETE.
func TestCampaignRunningCancel(t *testing.T) {
	db := sqliteStore(t)
	_, base := jobServer(t, db, JobsConfig{Lease: 600 * time.Millisecond})
	r := call(t, base, http.MethodPost, "/v1/campaigns", "", largeCampaign(t, 40, 40))
	require.Equal(t, http.StatusAccepted, r.status, "%s", r.body)
	loc := r.header.Get("Location")
	deadline := time.Now().Add(time.Minute)
	for {
		st := call(t, base, http.MethodGet, loc, "", nil)
		if st.header.Get(HeaderJobState) == "running" || st.status != http.StatusAccepted {
			break
		}
		require.True(t, time.Now().Before(deadline))
		time.Sleep(10 * time.Millisecond)
	}
	del := call(t, base, http.MethodDelete, loc, "", nil)
	if del.status == http.StatusConflict {
		t.Skip("the campaign finished before it could be cancelled")
	}
	require.Equal(t, http.StatusOK, del.status, "%s", del.body)
	// The worker notices at its next heartbeat and takes the next job.
	r = call(t, base, http.MethodPost, "/v1/campaigns", "", largeCampaign(t, 15, 14))
	require.Equal(t, http.StatusAccepted, r.status)
	assert.Equal(t, http.StatusOK, waitDone(t, base, r.header.Get("Location"), "").status)
	assert.Equal(t, http.StatusConflict, call(t, base, http.MethodGet, loc, "", nil).status)
}

func TestCampaignWithoutStore(t *testing.T) {
	s, err := New(Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	r := call(t, ts.URL, http.MethodPost, "/v1/campaigns", "", largeCampaign(t, 15, 15))
	assert.Equal(t, http.StatusCreated, r.status, "without a store a large campaign is planned at once")
	assert.Empty(t, r.header.Get("Location"))
	for _, path := range []string{"/v1/campaigns", "/v1/campaigns/abc"} {
		r := call(t, ts.URL, http.MethodGet, path, "", nil)
		assert.Equal(t, http.StatusNotFound, r.status)
		assert.Contains(t, string(r.body), "without a store")
	}
}

// pgSchema creates a schema of its own on the test server and returns a URL
// selecting it; skipped when no server answers.
func pgSchema(t *testing.T) string {
	t.Helper()
	raw := os.Getenv("SCALEMATCH_TEST_DATABASE_URL")
	if raw == "" {
		raw = "postgres://postgres@127.0.0.1:5432/test?sslmode=disable"
	}
	u, err := url.Parse(raw)
	require.NoError(t, err)
	conn, err := net.DialTimeout("tcp", u.Host, 3*time.Second)
	if err != nil {
		t.Skipf("no PostgreSQL server at %s: %v", u.Host, err)
	}
	conn.Close()
	ctx := context.Background()
	admin, err := pgx.Connect(ctx, raw)
	require.NoError(t, err)
	var b [6]byte
	rand.Read(b[:])
	schemaName := "scalematch_test_" + hex.EncodeToString(b[:])
	_, err = admin.Exec(ctx, "CREATE SCHEMA "+schemaName)
	require.NoError(t, err)
	t.Cleanup(func() {
		admin.Exec(context.Background(), "DROP SCHEMA "+schemaName+" CASCADE")
		admin.Close(context.Background())
	})
	q := u.Query()
	q.Set("search_path", schemaName)
	u.RawQuery = q.Encode()
	return u.String()
}

// TestCampaignReplicasPostgres: two replicas, each with its own pool on one
// PostgreSQL schema and its own worker, share the queue of several large
// campaigns: each is run by one replica in one attempt, its progress counts
// each step once up to the total (a condition planned twice would count past
// it), and each result equals the direct run's byte for byte.
func TestCampaignReplicasPostgres(t *testing.T) {
	dsn := pgSchema(t)
	ctx := context.Background()
	type step struct {
		job     string
		attempt int
	}
	var mu sync.Mutex
	seen := map[step]map[int]int{} // job attempt → progress value → calls
	owners := map[string]string{}
	var replicas []*Server
	var bases []string
	for i := range 2 {
		db, err := postgres.Open(ctx, dsn)
		require.NoError(t, err)
		t.Cleanup(func() { db.Close() })
		if i == 0 {
			_, err = facilities.SeedDemo(ctx, db, true)
			require.NoError(t, err)
		}
		s, base := jobServer(t, db, JobsConfig{Off: true})
		replicas, bases = append(replicas, s), append(bases, base)
		// The replica's own worker, its campaign runner watched.
		w := jobs.NewWorker(jobs.Config{Store: db, Owner: fmt.Sprintf("replica-%d", i), Poll: 20 * time.Millisecond,
			Lease: 5 * time.Second, Problem: s.jobProblem, Logger: slog.New(slog.NewTextHandler(io.Discard, nil)),
			Runners: map[string]jobs.Runner{kindCampaign: func(ctx context.Context, j jobs.Job, progress func(int, int)) ([]byte, error) {
				return s.runCampaign(ctx, j, func(done, total int) {
					mu.Lock()
					k := step{j.ID, j.Attempt}
					if seen[k] == nil {
						seen[k] = map[int]int{}
					}
					seen[k][done]++
					owners[j.ID] = j.Owner
					mu.Unlock()
					progress(done, total)
				})
			}}})
		wctx, cancel := context.WithCancel(ctx)
		done := make(chan struct{})
		go func() { w.Run(wctx); close(done) }()
		t.Cleanup(func() { cancel(); <-done })
	}
	bodies := [][]byte{largeCampaign(t, 15, 14), largeCampaign(t, 14, 15), largeCampaign(t, 16, 13), largeCampaign(t, 13, 16)}
	var locs []string
	for i, b := range bodies {
		r := call(t, bases[i%2], http.MethodPost, "/v1/campaigns", "", b)
		require.Equal(t, http.StatusAccepted, r.status, "%s", r.body)
		locs = append(locs, r.header.Get("Location"))
	}
	cat := replicas[0].cfg.Catalog
	for i, loc := range locs {
		r := waitDone(t, bases[(i+1)%2], loc, "")
		require.Equal(t, http.StatusOK, r.status, "%s", r.body)
		assert.Equal(t, string(directResult(t, cat, bodies[i])), string(r.body), "campaign %d", i)
	}
	mu.Lock()
	defer mu.Unlock()
	ranBy := map[string]bool{}
	for _, loc := range locs {
		id := strings.TrimPrefix(loc, "/v1/campaigns/")
		j, err := replicas[0].jobs.Job(ctx, id)
		require.NoError(t, err)
		assert.Equal(t, 1, j.Attempt, "campaign %s run once", id)
		steps := seen[step{id, 1}]
		// Run reports 0 at its start, then each new highest count of steps
		// done (its workers finish in any order, so a count may be passed
		// over): no count twice, none past the total, the last the total. A
		// condition planned twice in the attempt would count past it.
		for v, n := range steps {
			assert.Equal(t, 1, n, "campaign %s step %d", id, v)
			assert.LessOrEqual(t, v, j.Total, "campaign %s", id)
		}
		assert.Equal(t, 1, steps[j.Total], "campaign %s reached its total", id)
		assert.Equal(t, j.Total, j.Done)
		ranBy[owners[id]] = true
	}
	t.Logf("replicas that ran campaigns: %v", ranBy)
}

// TestCampaignLargeBadInputRefusedAtOnce: a campaign too large to answer at once
// is validated before it is stored, so a facility id that names nothing is a 400
// naming the field, not a 202 whose job fails later; nothing is stored.
func TestCampaignLargeBadInputRefusedAtOnce(t *testing.T) {
	db := sqliteStore(t)
	_, base := jobServer(t, db, JobsConfig{Off: true})
	var req map[string]any
	require.NoError(t, json.Unmarshal(largeCampaign(t, 15, 15), &req))
	fs := req["facilities"].([]any)
	fs[0].(map[string]any)["facility_id"] = "no-such-tunnel"
	body, err := json.Marshal(req)
	require.NoError(t, err)
	r := call(t, base, http.MethodPost, "/v1/campaigns", "", body)
	require.Equal(t, http.StatusBadRequest, r.status, "%s", r.body)
	assert.Contains(t, string(r.body), "facilities[0].facility_id")
	assert.Empty(t, r.header.Get("Location"))
	list := call(t, base, http.MethodGet, "/v1/campaigns", "", nil)
	require.Equal(t, http.StatusOK, list.status, "%s", list.body)
	assert.NotContains(t, string(list.body), `"id"`, "nothing stored: %s", list.body)
}
