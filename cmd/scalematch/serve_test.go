package main

import (
	"context"
	"io"
	"net"
	"net/http"
	"strings"
	"testing"
	"time"

	"github.com/spf13/pflag"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/testfixture"
)

func TestParseWriteTokens(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name    string
		in      string
		want    map[string]facilities.Actor
		errFrag string
	}{
		{"none", "", map[string]facilities.Actor{}, ""},
		{"named", "ana:s3cret-aaaa, ben:s3cret-bbbb", map[string]facilities.Actor{"s3cret-aaaa": "ana", "s3cret-bbbb": "ben"}, ""},
		{"bare get numbered names", "tok-one,ana:tok-two,tok-three", map[string]facilities.Actor{"tok-one": "token-1", "tok-two": "ana", "tok-three": "token-2"}, ""},
		{"empty items skipped", ",, x-token ,", map[string]facilities.Actor{"x-token": "token-1"}, ""},
		{"empty token", "ana:", nil, "entry 1"},
		{"empty name", ":zq-secret-9", nil, "entry 1"},
		{"duplicate", "ana:zq-same-7,ben:zq-same-7", nil, "entry 2 (ben) repeats"},
		{"space inside", "ana:zq a-4", nil, "spaces"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got, _, err := parseWriteTokens(tc.in)
			if tc.errFrag != "" {
				require.ErrorContains(t, err, tc.errFrag)
				for tok := range strings.SplitSeq(tc.in, ",") {
					if _, secret, ok := strings.Cut(tok, ":"); ok && secret != "" {
						assert.NotContains(t, err.Error(), secret, "the error reveals a token")
					}
				}
				return
			}
			require.NoError(t, err)
			require.Len(t, got, len(tc.want), "tokens %v", got)
			for k, v := range tc.want {
				assert.Equal(t, v, got[k], "token %q", k)
			}
		})
	}
}

func TestFlagsFromEnv(t *testing.T) {
	t.Parallel()
	env := map[string]string{"SCALEMATCH_ADDR": "127.0.0.1:9999", "SCALEMATCH_DATA": "/from/env", "SCALEMATCH_NO_DEMO": "true"}
	lookup := func(k string) (string, bool) { v, ok := env[k]; return v, ok }

	cmd := newServeCmd()
	require.NoError(t, cmd.ParseFlags([]string{"--data", "/from/flag"}))
	require.NoError(t, flagsFromEnv(cmd.Flags(), lookup))
	for flag, want := range map[string]string{"addr": "127.0.0.1:9999", "data": "/from/flag", "no-demo": "true"} {
		assert.Equal(t, want, cmd.Flags().Lookup(flag).Value.String(), "--%s", flag)
	}

	env["SCALEMATCH_NO_DEMO"] = "maybe"
	fs := pflag.NewFlagSet("x", pflag.ContinueOnError)
	fs.Bool("no-demo", false, "")
	assert.ErrorContains(t, flagsFromEnv(fs, lookup), "SCALEMATCH_NO_DEMO")
}

func TestServeLifecycle(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name       string
		noDemo     bool
		facilities int
	}{
		{"demo seeded", false, len(facilities.Demo())},
		{"no demo", true, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			dir := t.TempDir()
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			logs := &testfixture.LogBuffer{}
			base, done := startServe(ctx, t, serveOptions{addr: "127.0.0.1:0", data: dir, noDemo: tc.noDemo}, logs)
			for _, path := range []string{"/healthz", "/readyz"} {
				resp, err := http.Get(base + path)
				require.NoError(t, err)
				io.Copy(io.Discard, resp.Body)
				resp.Body.Close()
				assert.Equal(t, http.StatusOK, resp.StatusCode, "GET %s", path)
			}
			cancel()
			select {
			case err := <-done:
				require.NoError(t, err, "serve")
			case <-time.After(40 * time.Second):
				require.FailNow(t, "serve did not stop")
			}
			assert.Contains(t, logs.String(), `"msg":"store closed"`, "the store was closed")
			db, err := sqlite.Open(context.Background(), sqlite.Path(dir))
			require.NoError(t, err)
			defer db.Close()
			fs, err := db.Facilities(context.Background())
			require.NoError(t, err)
			assert.Len(t, fs, tc.facilities, "facilities in the store")
		})
	}
}

func TestServeRefusesOtherDatabases(t *testing.T) {
	t.Parallel()
	err := serve(context.Background(), serveOptions{addr: "127.0.0.1:0", databaseURL: "mysql://x"}, io.Discard)
	assert.ErrorContains(t, err, "postgres://", "asks for a postgres:// URL")
}

// startServe runs serve with opts until ctx ends and returns the API's base URL
// once it listens, and the channel serve's result arrives on.
func startServe(ctx context.Context, t *testing.T, opts serveOptions, logs io.Writer) (string, <-chan error) {
	t.Helper()
	addrc := make(chan net.Addr, 1)
	done := make(chan error, 1)
	opts.ready = func(a net.Addr) { addrc <- a }
	go func() { done <- serve(ctx, opts, logs) }()
	select {
	case a := <-addrc:
		return "http://" + a.String(), done
	case err := <-done:
		require.FailNow(t, "serve ended before listening", "%v", err)
	case <-time.After(20 * time.Second):
		require.FailNow(t, "serve did not start listening")
	}
	return "", done
}
