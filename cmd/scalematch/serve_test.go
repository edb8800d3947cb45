package main

import (
	"bytes"
	"context"
	"io"
	"net"
	"net/http"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/spf13/pflag"

	"scalematch/facilities"
	"scalematch/facilities/sqlite"
)

func TestParseWriteTokens(t *testing.T) {
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
			got, _, err := parseWriteTokens(tc.in)
			if tc.errFrag != "" {
				if err == nil || !strings.Contains(err.Error(), tc.errFrag) {
					t.Fatalf("error %v, want one containing %q", err, tc.errFrag)
				}
				for tok := range strings.SplitSeq(tc.in, ",") {
					if _, secret, ok := strings.Cut(tok, ":"); ok && secret != "" && strings.Contains(err.Error(), secret) {
						t.Errorf("error %q reveals a token", err)
					}
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(tc.want) {
				t.Fatalf("got %v, want %v", got, tc.want)
			}
			for k, v := range tc.want {
				if got[k] != v {
					t.Errorf("token %q: name %q, want %q", k, got[k], v)
				}
			}
		})
	}
}

func TestFlagsFromEnv(t *testing.T) {
	env := map[string]string{"SCALEMATCH_ADDR": "127.0.0.1:9999", "SCALEMATCH_DATA": "/from/env", "SCALEMATCH_NO_DEMO": "true"}
	lookup := func(k string) (string, bool) { v, ok := env[k]; return v, ok }

	cmd := newServeCmd()
	if err := cmd.ParseFlags([]string{"--data", "/from/flag"}); err != nil {
		t.Fatal(err)
	}
	if err := flagsFromEnv(cmd.Flags(), lookup); err != nil {
		t.Fatal(err)
	}
	for flag, want := range map[string]string{"addr": "127.0.0.1:9999", "data": "/from/flag", "no-demo": "true"} {
		if got := cmd.Flags().Lookup(flag).Value.String(); got != want {
			t.Errorf("--%s = %q, want %q", flag, got, want)
		}
	}

	env["SCALEMATCH_NO_DEMO"] = "maybe"
	fs := pflag.NewFlagSet("x", pflag.ContinueOnError)
	fs.Bool("no-demo", false, "")
	err := flagsFromEnv(fs, lookup)
	if err == nil || !strings.Contains(err.Error(), "SCALEMATCH_NO_DEMO") {
		t.Errorf("error %v, want one naming SCALEMATCH_NO_DEMO", err)
	}
}

type syncWriter struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (w *syncWriter) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.b.Write(p)
}

func (w *syncWriter) String() string {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.b.String()
}

func TestServeLifecycle(t *testing.T) {
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
			dir := t.TempDir()
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			addrc := make(chan net.Addr, 1)
			logs := &syncWriter{}
			done := make(chan error, 1)
			go func() {
				done <- serve(ctx, serveOptions{addr: "127.0.0.1:0", data: dir, noDemo: tc.noDemo,
					ready: func(a net.Addr) { addrc <- a }}, logs)
			}()
			var base string
			select {
			case a := <-addrc:
				base = "http://" + a.String()
			case err := <-done:
				t.Fatalf("serve ended before listening: %v", err)
			case <-time.After(20 * time.Second):
				t.Fatal("serve did not start listening")
			}
			for _, path := range []string{"/healthz", "/readyz"} {
				resp, err := http.Get(base + path)
				if err != nil {
					t.Fatal(err)
				}
				io.Copy(io.Discard, resp.Body)
				resp.Body.Close()
				if resp.StatusCode != 200 {
					t.Errorf("GET %s: %d", path, resp.StatusCode)
				}
			}
			cancel()
			select {
			case err := <-done:
				if err != nil {
					t.Fatalf("serve: %v", err)
				}
			case <-time.After(40 * time.Second):
				t.Fatal("serve did not stop")
			}
			if !strings.Contains(logs.String(), `"msg":"store closed"`) {
				t.Errorf("the store was not closed; log:\n%s", logs.String())
			}
			db, err := sqlite.Open(context.Background(), sqlite.Path(dir))
			if err != nil {
				t.Fatal(err)
			}
			defer db.Close()
			fs, err := db.Facilities(context.Background())
			if err != nil {
				t.Fatal(err)
			}
			if len(fs) != tc.facilities {
				t.Errorf("store has %d facilities, want %d", len(fs), tc.facilities)
			}
		})
	}
}

func TestServeRefusesOtherDatabases(t *testing.T) {
	err := serve(context.Background(), serveOptions{addr: "127.0.0.1:0", databaseURL: "mysql://x"}, io.Discard)
	if err == nil || !strings.Contains(err.Error(), "postgres://") {
		t.Errorf("error %v, want one asking for a postgres:// URL", err)
	}
}
