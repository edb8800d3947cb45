package main

import (
	"bytes"
	"encoding/json"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestCheckLoopback(t *testing.T) {
	t.Parallel()
	tests := []struct {
		url string
		ok  bool
	}{
		{"http://127.0.0.1:8080", true},
		{"http://[::1]:8080", true},
		{"http://localhost:8080", true},
		{"http://192.0.2.10:8080", false}, // TEST-NET-1 (RFC 5737): never loopback
		{"ftp://127.0.0.1", false},
	}
	for _, tc := range tests {
		t.Run(tc.url, func(t *testing.T) {
			t.Parallel()
			if err := checkLoopback(tc.url); tc.ok {
				assert.NoError(t, err)
			} else {
				assert.Error(t, err)
			}
		})
	}
}

// TestRunInProcess is not parallel: the tool reports the process's CPU time per
// request.
func TestRunInProcess(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a short load test")
	}
	var out bytes.Buffer
	err := run([]string{"-serve", "-duration", "600ms", "-concurrency", "2", "-plan", "../testdata/load/plan-orrin-j16-tsw-1.json"}, &out)
	require.NoError(t, err)
	for _, name := range []string{"repeated", "distinct", "health"} {
		re := regexp.MustCompile(name + `.*?(\d+\.\d) /s .* (\d+) not 200 .* CPU (\d+) µs/request`)
		m := re.FindStringSubmatch(out.String())
		require.NotNil(t, m, "no %s line", name)
		assert.NotEqual(t, "0.0", m[1], "%s: rate /s", name)
		assert.Equal(t, "0", m[2], "%s: answers not 200", name)
		assert.NotEqual(t, "0", m[3], "%s: CPU µs/request", name)
	}
	assert.Regexp(t, `plans per health check: repeated \d+\.\d %, distinct \d+\.\d %\n`, out.String(), "ratio line")
	assert.Regexp(t, `CPU of a health check per CPU of a plan: repeated \d+\.\d %, distinct \d+\.\d %\n`, out.String(), "CPU ratio line")
	assert.Regexp(t, `distinct plans stored in [1-9]\d* group commits, \d+\.\d\d records each on average\n`, out.String(), "group commit line")
	assert.Equal(t, 7, strings.Count(out.String(), "\n"), "lines in:\n%s", out.String())
}

func TestVaried(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name, body string
		start      int64
		want       []string // the first requests' flight altitudes, as sent
		err        bool
	}{
		{"number", `{"flight":{"altitude":11000,"mach":0.8},"x":[1]}`, 0, []string{"11000.000001", "11000.000002"}, false},
		{"metres", `{"flight":{"mach":0.78,"altitude":"12000 m"}}`, 0, []string{"12000.000001", "12000.000002"}, false},
		{"started higher", `{"flight":{"altitude":"12000 m"}}`, startSteps - 2, []string{"12009.999999", "12010"}, false},
		{"feet", `{"flight":{"altitude":"39370 ft"}}`, 0, nil, true},
		{"pressure altitude", `{"flight":{"pressure_altitude":"11 km"}}`, 0, nil, true},
		{"no flight", `{"facility_id":"tsw-1"}`, 0, nil, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			v, err := newVaried([]byte(tc.body), tc.start)
			if tc.err {
				require.Error(t, err)
			} else {
				require.NoError(t, err)
			}
			for _, want := range tc.want {
				var req struct {
					Flight map[string]json.RawMessage `json:"flight"`
				}
				b := v.next()
				require.NoError(t, json.Unmarshal(b, &req), "%s", b)
				assert.Equal(t, want, string(req.Flight["altitude"]), "%s: altitude as sent", b)
				if strings.Contains(tc.body, "mach") {
					assert.NotNil(t, req.Flight["mach"], "%s: the rest as given", b)
				}
			}
		})
	}
}

func TestRunRefusesBadFlags(t *testing.T) {
	t.Parallel()
	tests := []struct {
		args []string
		want string
	}{
		{[]string{"-duration", "0s"}, "-duration"},
		{[]string{"-duration", "1h"}, "-duration"},
		{[]string{"-concurrency", "0"}, "-concurrency"},
		{[]string{"-only", "plans"}, "-only"},
		{[]string{"-url", "http://192.0.2.10:8080", "-duration", "1s"}, "not a loopback address"},
	}
	for _, tc := range tests {
		args := append(tc.args, "-plan", "../testdata/load/plan-orrin-j16-tsw-1.json")
		assert.ErrorContains(t, run(args, &bytes.Buffer{}), tc.want, "run(%v)", args)
	}
}
