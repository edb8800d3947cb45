package api_test

import (
	"context"
	"io"
	"log/slog"
	"net"
	"net/http"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

// TestShutdownDrains: 2 of 838 requests in flight at SIGTERM were reset. A
// shutdown now reports unready first, serves on for DrainDelay, then stops
// accepting; every request in flight is answered.
func TestShutdownDrains(t *testing.T) {
	slow := saveCatalog{save: func(context.Context) error { time.Sleep(300 * time.Millisecond); return nil }}
	s, err := api.New(api.Config{Catalog: slow, Registry: prometheus.NewRegistry(),
		Logger: slog.New(slog.NewTextHandler(io.Discard, nil)), DrainDelay: 400 * time.Millisecond})
	require.NoError(t, err)
	base, cancel, served := testfixture.ServeLoopback(t, s.Serve)

	const inFlight = 12
	var wg sync.WaitGroup
	statuses := make([]int, inFlight)
	errs := make([]error, inFlight)
	for i := range inFlight {
		wg.Go(func() {
			body := strings.Replace(testfixture.J16Plan, `"to": 16`, `"to": `+string(rune('0'+i%10)), 1)
			resp, err := http.Post(base+"/v1/plans", "application/json", strings.NewReader(body))
			if err != nil {
				errs[i] = err
				return
			}
			io.Copy(io.Discard, resp.Body)
			resp.Body.Close()
			statuses[i] = resp.StatusCode
		})
	}
	time.Sleep(100 * time.Millisecond) // the requests are in the store's SavePlan
	cancel()
	time.Sleep(50 * time.Millisecond)
	resp, err := http.Get(base + "/readyz")
	require.NoError(t, err, "still serving while it drains")
	resp.Body.Close()
	assert.Equal(t, http.StatusServiceUnavailable, resp.StatusCode, "/readyz while draining")
	assert.True(t, resp.Close, "Connection: close while draining")
	wg.Wait()
	for i := range inFlight {
		assert.NoError(t, errs[i], "request %d", i)
		assert.Equal(t, http.StatusOK, statuses[i], "request %d", i)
	}
	require.NoError(t, <-served)
	_, err = net.DialTimeout("tcp", strings.TrimPrefix(base, "http://"), time.Second)
	assert.Error(t, err, "no longer accepting")
}

// TestWriteScopes: a write token limited to "tsw-*" changes tsw-9 but not lsw-9.
func TestWriteScopes(t *testing.T) {
	logs := &testfixture.LogBuffer{}
	ts, _ := catalogServerWith(t, api.Config{
		WriteTokens: map[string]facilities.Actor{"tok-t": "tunnel-staff", "tok-all": "admin"},
		WriteScopes: map[string]string{"tok-t": "tsw-*"},
		Logger:      slog.New(slog.NewJSONHandler(logs, nil)),
	})
	cases := []struct {
		token, id string
		status    int
	}{
		{"tok-t", "tsw-9", http.StatusCreated},
		{"tok-t", "lsw-9", http.StatusForbidden},
		{"tok-all", "lsw-9", http.StatusCreated},
	}
	for _, tc := range cases {
		t.Run(tc.token+" "+tc.id, func(t *testing.T) {
			r := catalogCall(t, ts, "POST", "/v1/facilities", map[string]string{"Authorization": "Bearer " + tc.token}, facilityJSON(t, tc.id, nil))
			assert.Equal(t, tc.status, r.status, "%s", r.body)
		})
	}
	r := catalogCall(t, ts, "DELETE", "/v1/facilities/lsw-9", map[string]string{"Authorization": "Bearer tok-t", "If-Match": `"1"`}, "")
	assert.Equal(t, http.StatusForbidden, r.status, "delete out of scope")
}
