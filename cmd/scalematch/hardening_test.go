package main

import (
	"context"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/sqlite"
)

// TestServeBindsFirst: serve with a port in use or an invalid address exited
// only after it had created and seeded the data directory; it now fails before
// touching the disk.
func TestServeBindsFirst(t *testing.T) {
	busy, err := net.Listen("tcp", "127.0.0.1:0")
	require.NoError(t, err)
	defer busy.Close()
	cases := []struct{ name, addr, metrics string }{
		{"port in use", busy.Addr().String(), ""},
		{"invalid address", "127.0.0.1:99999", ""},
		{"metrics port in use", "127.0.0.1:0", busy.Addr().String()},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), "data")
			err := serve(context.Background(), serveOptions{addr: tc.addr, metricsAddr: tc.metrics, data: dir}, io.Discard)
			require.Error(t, err)
			_, statErr := os.Stat(dir)
			assert.ErrorIs(t, statErr, os.ErrNotExist, "the data directory was created")
		})
	}
}

// TestServeMetricsAddr: with --metrics-addr, /metrics is served there and not
// on the API's address.
func TestServeMetricsAddr(t *testing.T) {
	ml, err := net.Listen("tcp", "127.0.0.1:0")
	require.NoError(t, err)
	maddr := ml.Addr().String()
	ml.Close()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	base, done := startServe(ctx, t, serveOptions{addr: "127.0.0.1:0", metricsAddr: maddr, data: t.TempDir()}, io.Discard)
	status := func(url string) int {
		resp, err := http.Get(url)
		require.NoError(t, err)
		b, _ := io.ReadAll(resp.Body)
		resp.Body.Close()
		if resp.StatusCode == 200 && strings.Contains(url, "/metrics") {
			assert.Contains(t, string(b), "scalematch_http_requests_total")
		}
		return resp.StatusCode
	}
	status(base + "/healthz")
	assert.Equal(t, http.StatusNotFound, status(base+"/metrics"))
	assert.Equal(t, http.StatusOK, status("http://"+maddr+"/metrics"))
	cancel()
	require.NoError(t, <-done)
}

// TestCheckCommand: scalematch check passes a sound catalog and names the damage
// of a broken one; serve refuses to start on it.
func TestCheckCommand(t *testing.T) {
	dir := t.TempDir()
	ctx := context.Background()
	db, err := sqlite.Open(ctx, sqlite.Path(dir))
	require.NoError(t, err)
	_, err = facilities.SeedDemo(ctx, db, true)
	require.NoError(t, err)
	for i := range 100 {
		_, err := db.SavePlan(ctx, facilities.PlanRecord{ID: fmt.Sprintf("p%04d", i), Body: []byte(`{"x":"` + strings.Repeat("q", 9000) + `"}`)})
		require.NoError(t, err)
	}
	require.NoError(t, db.Close())
	out, err := runCmd(t, "", "check", "--data", dir)
	require.NoError(t, err)
	assert.Contains(t, out, ": ok (integrity check")

	f, err := os.OpenFile(sqlite.Path(dir), os.O_RDWR, 0)
	require.NoError(t, err)
	st, _ := f.Stat()
	_, err = f.WriteAt([]byte(strings.Repeat("\xde\xad\xbe\xef", 2048)), st.Size()/4096/2*4096)
	require.NoError(t, err)
	require.NoError(t, f.Close())
	_, err = runCmd(t, "", "check", "--data", dir)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "damaged")
	err = serve(ctx, serveOptions{addr: "127.0.0.1:0", data: dir}, io.Discard)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "scalematch check")

	_, err = runCmd(t, "", "check", "--data", t.TempDir())
	assert.ErrorContains(t, err, "no catalog")
}

func TestParseWriteTokenScopes(t *testing.T) {
	tokens, scopes, err := parseWriteTokens("staff:tok-aaaa:tsw-*, admin:tok-bbbb")
	require.NoError(t, err)
	assert.Equal(t, map[string]facilities.Actor{"tok-aaaa": "staff", "tok-bbbb": "admin"}, tokens)
	assert.Equal(t, map[string]string{"tok-aaaa": "tsw-*"}, scopes)
	_, _, err = parseWriteTokens("staff:tok-aaaa:[")
	require.Error(t, err)
	assert.NotContains(t, err.Error(), "tok-aaaa")
}
