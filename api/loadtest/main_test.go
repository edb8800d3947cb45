package main

import (
	"bytes"
	"encoding/json"
	"regexp"
	"strings"
	"testing"
)

func TestCheckLoopback(t *testing.T) {
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
			if err := checkLoopback(tc.url); (err == nil) != tc.ok {
				t.Errorf("checkLoopback(%q) = %v, want ok %v", tc.url, err, tc.ok)
			}
		})
	}
}

func TestRunInProcess(t *testing.T) {
	if testing.Short() {
		t.Skip("runs a short load test")
	}
	var out bytes.Buffer
	err := run([]string{"-serve", "-duration", "600ms", "-concurrency", "2", "-plan", "../testdata/load/plan-orrin-j16-tsw-1.json"}, &out)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"repeated", "distinct", "health"} {
		re := regexp.MustCompile(name + `.*?(\d+\.\d) /s .* (\d+) not 200 .* CPU (\d+) µs/request`)
		m := re.FindStringSubmatch(out.String())
		if m == nil {
			t.Fatalf("no %s line in:\n%s", name, out.String())
		}
		if m[1] == "0.0" || m[2] != "0" || m[3] == "0" {
			t.Errorf("%s: rate %s /s, %s failures, CPU %s µs/request; want a rate, none and some CPU", name, m[1], m[2], m[3])
		}
	}
	if !regexp.MustCompile(`plans per health check: repeated \d+\.\d %, distinct \d+\.\d %\n`).MatchString(out.String()) {
		t.Errorf("no ratio line in:\n%s", out.String())
	}
	if !regexp.MustCompile(`distinct plans stored in [1-9]\d* group commits, \d+\.\d\d records each on average\n`).MatchString(out.String()) {
		t.Errorf("no group commit line in:\n%s", out.String())
	}
	if strings.Count(out.String(), "\n") != 6 {
		t.Errorf("want 6 lines:\n%s", out.String())
	}
}

func TestVaried(t *testing.T) {
	tests := []struct {
		name, body string
		want       []string // the first requests' flight altitudes, as sent
		err        bool
	}{
		{"number", `{"flight":{"altitude":11000,"mach":0.8},"x":[1]}`, []string{"11000.0001", "11000.0002"}, false},
		{"metres", `{"flight":{"mach":0.78,"altitude":"12000 m"}}`, []string{"12000.0001", "12000.0002"}, false},
		{"feet", `{"flight":{"altitude":"39370 ft"}}`, nil, true},
		{"pressure altitude", `{"flight":{"pressure_altitude":"11 km"}}`, nil, true},
		{"no flight", `{"facility_id":"tsw-1"}`, nil, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			v, err := newVaried([]byte(tc.body))
			if (err != nil) != tc.err {
				t.Fatalf("newVaried: %v, want error %v", err, tc.err)
			}
			for _, want := range tc.want {
				var req struct {
					Flight map[string]json.RawMessage `json:"flight"`
				}
				b := v.next()
				if err := json.Unmarshal(b, &req); err != nil {
					t.Fatalf("%s: %v", b, err)
				}
				if got := string(req.Flight["altitude"]); got != want || req.Flight["mach"] == nil && strings.Contains(tc.body, "mach") {
					t.Errorf("%s: altitude %s, want %s and the rest as given", b, got, want)
				}
			}
		})
	}
}

func TestRunRefusesBadFlags(t *testing.T) {
	tests := []struct {
		args []string
		want string
	}{
		{[]string{"-duration", "0s"}, "-duration"},
		{[]string{"-duration", "1h"}, "-duration"},
		{[]string{"-concurrency", "0"}, "-concurrency"},
		{[]string{"-url", "http://192.0.2.10:8080", "-duration", "1s"}, "not a loopback address"},
	}
	for _, tc := range tests {
		args := append(tc.args, "-plan", "../testdata/load/plan-orrin-j16-tsw-1.json")
		if err := run(args, &bytes.Buffer{}); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("run(%v) = %v, want an error about %s", args, err, tc.want)
		}
	}
}
