package main

import (
	"encoding/json"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// longCampaign is examples/campaign-j16.json over a 90 × 90 grid: 8105
// conditions in three facilities, a few seconds of planning (a 50 × 50 grid
// could finish, on a busy machine, before the test saw it running).
func longCampaign(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile("../../examples/campaign-j16.json")
	require.NoError(t, err)
	var req map[string]any
	require.NoError(t, json.Unmarshal(b, &req))
	const n = 90
	alts, machs := make([]float64, n), make([]float64, n)
	for i := range alts {
		alts[i] = 500 + 12000*float64(i)/(n-1)
		machs[i] = 0.4 + 0.42*float64(i)/(n-1)
	}
	req["grid"] = map[string]any{"altitudes": alts, "machs": machs}
	out, err := json.Marshal(req)
	require.NoError(t, err)
	return string(out)
}

type jobStatus struct {
	State   string `json:"state"`
	Done    int    `json:"done"`
	Total   int    `json:"total"`
	Attempt int    `json:"attempt"`
}

// poll reads a campaign until cond holds of its status (or it is no longer
// 202), failing after limit; it returns the last answer.
func poll(t *testing.T, srv *crashServer, loc string, limit time.Duration, cond func(jobStatus) bool) (int, []byte, jobStatus) {
	t.Helper()
	deadline := time.Now().Add(limit)
	for {
		status, _, body, err := srv.do(http.MethodGet, loc, "", "")
		require.NoError(t, err)
		var st jobStatus
		if status == http.StatusAccepted {
			require.NoError(t, json.Unmarshal(body, &st))
		}
		if status != http.StatusAccepted || cond(st) {
			return status, body, st
		}
		require.True(t, time.Now().Before(deadline), "campaign %s still %+v\n%s", loc, st, srv.log.String())
		time.Sleep(20 * time.Millisecond)
	}
}

func postCampaign(t *testing.T, srv *crashServer, body string) string {
	t.Helper()
	status, h, b, err := srv.do(http.MethodPost, "/v1/campaigns", "", body)
	require.NoError(t, err)
	require.Equal(t, http.StatusAccepted, status, "%s", b)
	return h.Get("Location")
}

// TestCrashResumesCampaign kills the server with SIGKILL while it plans a long
// campaign, restarts it on the same data directory, and checks that the
// campaign is taken up again (attempt 2, once the dead process's lease has
// passed) and finishes with the result of an uninterrupted run, byte for byte.
func TestCrashResumesCampaign(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary and kills it: skipped under -short")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "scalematch")
	out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput()
	require.NoError(t, err, "%s", out)
	data := filepath.Join(dir, "data")
	t.Setenv("SCALEMATCH_JOB_LEASE", "2s")
	body := longCampaign(t)

	srv := startServer(t, bin, data)
	loc := postCampaign(t, srv, body)
	_, _, before := poll(t, srv, loc, time.Minute, func(st jobStatus) bool { return st.State == "running" && st.Done > 0 })
	require.NoError(t, srv.cmd.Process.Signal(syscall.SIGKILL))
	srv.cmd.Wait()
	t.Logf("killed at step %d of %d", before.Done, before.Total)

	srv = startServer(t, bin, data)
	defer func() { srv.cmd.Process.Kill(); srv.cmd.Wait() }()
	status, resumed, _ := poll(t, srv, loc, 3*time.Minute, func(jobStatus) bool { return false })
	require.Equal(t, http.StatusOK, status, "%s", resumed)

	// The same campaign again, uninterrupted, on the restarted server.
	again := postCampaign(t, srv, body)
	status, whole, _ := poll(t, srv, again, 3*time.Minute, func(jobStatus) bool { return false })
	require.Equal(t, http.StatusOK, status, "%s", whole)
	assert.Equal(t, string(whole), string(resumed), "the resumed run's result is the uninterrupted run's")

	status, _, list, err := srv.do(http.MethodGet, "/v1/campaigns", "", "")
	require.NoError(t, err)
	require.Equal(t, http.StatusOK, status)
	var l struct {
		Campaigns []struct {
			Href    string `json:"href"`
			State   string `json:"state"`
			Attempt int    `json:"attempt"`
		} `json:"campaigns"`
	}
	require.NoError(t, json.Unmarshal(list, &l))
	attempts := map[string]int{}
	for _, c := range l.Campaigns {
		assert.Equal(t, "done", c.State)
		attempts[c.Href] = c.Attempt
	}
	assert.Equal(t, 2, attempts[loc], "the killed run, then the resumed one")
	assert.Equal(t, 1, attempts[again])
	assert.True(t, strings.Contains(srv.log.String(), "job claimed"), "the restarted server logs its claims")
}
