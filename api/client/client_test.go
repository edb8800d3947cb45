package client_test

import (
	"bytes"
	"context"
	"errors"
	"math"
	"net/http/httptest"
	"reflect"
	"scalematch/internal/loads"
	"scalematch/internal/testfixture"
	"scalematch/internal/testfixture/testsite"
	"slices"
	"strings"
	"testing"

	"scalematch/api"
	"scalematch/api/client"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// newClient starts the real service over a fresh SQLite catalog seeded with the
// demo facilities and returns a client of it.
func newClient(t *testing.T) *client.Client {
	t.Helper()
	s, err := api.New(api.Config{Catalog: testsite.DemoStore(t), Logger: testfixture.Quiet()})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	c, err := client.New(ts.URL+"/", client.WithHTTPClient(ts.Client()), client.WithUserAgent("scalematch-client-test"))
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// planRequest decodes a plan request as the service does, units and all.
func planRequest(t *testing.T, body string) *schema.PlanRequest {
	t.Helper()
	var req schema.PlanRequest
	if err := unitjson.Decode([]byte(body), &req); err != nil {
		t.Fatal(err)
	}
	return &req
}

// problem returns err as a *client.Problem, failing the test when it is not one.
func problem(t *testing.T, err error) *client.Problem {
	t.Helper()
	var p *client.Problem
	if !errors.As(err, &p) {
		t.Fatalf("error %v (%T) is not a *client.Problem", err, err)
	}
	return p
}

func TestPlanAndStoredPlan(t *testing.T) {
	c := newClient(t)
	ctx := context.Background()
	p, err := c.Plan(ctx, planRequest(t, testfixture.J16Plan))
	if err != nil {
		t.Fatal(err)
	}
	if p.ID == "" || p.FacilityID != "tsw-1" || p.FacilityVersion != 1 {
		t.Errorf("id %q, facility %s version %d; want an id, tsw-1 version 1", p.ID, p.FacilityID, p.FacilityVersion)
	}
	if p.Loads == nil || p.Loads.BalanceID != "int-b1" || len(p.Loads.Points) != 21 {
		t.Fatalf("loads: %+v; want int-b1 with 21 points", p.Loads)
	}
	// Mach is matched within the default tolerance of 0.005.
	if d := math.Abs(*p.Mismatch.MachDifference); d > 0.005+1e-9 {
		t.Errorf("|ΔM| = %.4g, above the 0.005 tolerance", d)
	}
	if !slices.ContainsFunc(p.Binding, func(b similarity.Binding) bool { return b.Constraint == facilities.ConstraintDynamic }) {
		t.Errorf("binding %+v lacks %s", p.Binding, facilities.ConstraintDynamic)
	}
	stored, err := c.StoredPlan(ctx, p.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(stored, p) {
		t.Errorf("the stored plan differs from the answer")
	}
}

func TestPlanBatch(t *testing.T) {
	c := newClient(t)
	good := planRequest(t, testfixture.J16Plan)
	bad := planRequest(t, strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"no-such"`, 1))
	res, err := c.PlanBatch(context.Background(), []schema.PlanRequest{*good, *bad, *good})
	if err != nil {
		t.Fatal(err)
	}
	if len(res) != 3 {
		t.Fatalf("%d results, want 3", len(res))
	}
	for i, want := range []int{200, 404, 200} {
		switch r := res[i]; {
		case want == 200 && (r.Plan == nil || r.Error != nil):
			t.Errorf("result %d: want a plan, got %+v", i, r.Error)
		case want != 200 && (r.Error == nil || r.Error.Status != want):
			t.Errorf("result %d: want a problem with status %d, got %+v", i, want, r.Error)
		}
	}
	if res[0].Plan != nil && res[2].Plan != nil && res[0].Plan.ID != res[2].Plan.ID {
		t.Errorf("the same request got ids %s and %s", res[0].Plan.ID, res[2].Plan.ID)
	}
}

func TestLoads(t *testing.T) {
	c := newClient(t)
	scale := 1.0 / 30
	mach, p0, t0 := 0.8, 150000.0, 310.0
	req := schema.LoadsRequest{
		Article:    planRequest(t, testfixture.J16Plan).Article,
		FacilityID: "tsw-1",
		Model:      schema.LoadsModel{Scale: &scale},
		Alpha:      similarity.Sweep{From: -4, To: 16, Step: 2},
		Test:       schema.TestSettings{Mach: &mach, StagnationPressure: &p0, StagnationTemperature: &t0},
	}
	cases := []struct {
		name    string
		balance string
		want    []string // balance ids of the reports
	}{
		{"named balance", "int-b2", []string{"int-b2"}},
		{"every balance", "", []string{"int-b1", "int-b2"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := req
			r.Installation.BalanceID = tc.balance
			out, err := c.Loads(context.Background(), &r)
			if err != nil {
				t.Fatal(err)
			}
			reports := out.Loads.All
			if tc.balance != "" {
				if out.Loads.One == nil || out.Loads.All != nil {
					t.Fatalf("want one report, got %+v", out.Loads)
				}
				reports = []loads.Report{*out.Loads.One}
			}
			var ids []string
			for _, rep := range reports {
				ids = append(ids, rep.BalanceID)
				if len(rep.Points) != 11 {
					t.Errorf("%s: %d points, want 11", rep.BalanceID, len(rep.Points))
				}
			}
			if !slices.Equal(ids, tc.want) {
				t.Errorf("reports for %v, want %v", ids, tc.want)
			}
			// The state is the one asked for, within rounding.
			if math.Abs(out.Test.Mach-mach) > 1e-12 || math.Abs(out.Test.StagnationPressure/p0-1) > 1e-12 {
				t.Errorf("test state M %.6g, p0 %.6g Pa; want %g, %g", out.Test.Mach, out.Test.StagnationPressure, mach, p0)
			}
		})
	}
}

func TestConditions(t *testing.T) {
	c := newClient(t)
	mach, p0, t0 := 0.8, 150000.0, 310.0
	out, err := c.Conditions(context.Background(), &schema.ConditionsRequest{FacilityID: "tsw-1",
		TestSettings: schema.TestSettings{Mach: &mach, StagnationPressure: &p0, StagnationTemperature: &t0}})
	if err != nil {
		t.Fatal(err)
	}
	// Isentropic relations for γ = 1.4 (NACA Report 1135): T/T0 = 1/(1 + 0.2·M²),
	// q/p0 = 0.7·M²·(1 + 0.2·M²)^-3.5.
	wantT := t0 / (1 + 0.2*mach*mach)
	wantQ := p0 * 0.7 * mach * mach * math.Pow(1+0.2*mach*mach, -3.5)
	if math.Abs(out.Static.Temperature/wantT-1) > 1e-6 || math.Abs(out.DynamicPressure/wantQ-1) > 1e-6 {
		t.Errorf("T %.6g K, q %.6g Pa; want %.6g K, %.6g Pa", out.Static.Temperature, out.DynamicPressure, wantT, wantQ)
	}
	if len(out.Violations) != 0 {
		t.Errorf("violations %+v, want none", out.Violations)
	}
}

func TestAtmosphere(t *testing.T) {
	c := newClient(t)
	alt := 11000.0
	s, err := c.Atmosphere(context.Background(), client.AtmosphereQuery{Altitude: &alt})
	if err != nil {
		t.Fatal(err)
	}
	// U.S. Standard Atmosphere 1976 at 11 000 m geometric (10 981 m geopotential):
	// 288.15 − 0.0065·10 981.0 = 216.774 K (from memory of the 1976 table's lapse rate).
	if math.Abs(s.Temperature-216.774) > 0.001 {
		t.Errorf("temperature %.4f K, want 216.774 K", s.Temperature)
	}
	pa := 11000.0
	if _, err := c.Atmosphere(context.Background(), client.AtmosphereQuery{Altitude: &alt, PressureAltitude: &pa}); problem(t, err).Status != 400 {
		t.Errorf("both altitudes: %v, want 400", err)
	}
}

func TestGroups(t *testing.T) {
	c := newClient(t)
	out, err := c.Groups(context.Background(), &schema.GroupsRequest{
		Variables: []schema.GroupVariable{{Name: "R", Unit: "N"}, {Name: "rho", Unit: "kg/m^3"},
			{Name: "V", Unit: "m/s"}, {Name: "L", Unit: "m"}, {Name: "mu", Dimensions: "M L^-1 T^-1"}},
		Repeating: []string{"rho", "V", "L"},
	})
	if err != nil {
		t.Fatal(err)
	}
	if out.Rank != 3 || len(out.Groups) != 2 {
		t.Fatalf("rank %d, %d groups; want 3 and 2", out.Rank, len(out.Groups))
	}
	// Force coefficient R/(ρV²L²) and inverse Reynolds number μ/(ρVL) (Buckingham 1914).
	if g := out.Groups[0].String(); g != "R rho^-1 V^-2 L^-2" {
		t.Errorf("first group %s, want R rho^-1 V^-2 L^-2", g)
	}
	if g := out.Groups[1].String(); g != "mu rho^-1 V^-1 L^-1" {
		t.Errorf("second group %s, want mu rho^-1 V^-1 L^-1", g)
	}
}

func TestFacilities(t *testing.T) {
	c := newClient(t)
	ctx := context.Background()
	list, err := c.Facilities(ctx)
	if err != nil {
		t.Fatal(err)
	}
	var ids []string
	for _, f := range list {
		ids = append(ids, f.ID)
	}
	var want []string
	for _, f := range facilities.Demo() {
		want = append(want, f.ID)
	}
	slices.Sort(want)
	if !slices.Equal(ids, want) {
		t.Errorf("facilities %v, want the demo's %v", ids, want)
	}
	f, err := c.Facility(ctx, "tsw-1")
	if err != nil {
		t.Fatal(err)
	}
	demo, _ := facilities.DemoFacility("tsw-1")
	demo.Version = 1
	if !reflect.DeepEqual(*f, demo) {
		t.Errorf("tsw-1 from the service differs from the demo record:\n%+v\n%+v", *f, demo)
	}
	if _, err := c.Facility(ctx, "no-such"); problem(t, err).Status != 404 {
		t.Errorf("unknown facility: %v, want 404", err)
	}
}

func TestEnvelope(t *testing.T) {
	c := newClient(t)
	cases := []struct {
		format string
		magic  []byte
	}{
		{"svg", []byte("<svg")},
		{"png", []byte("\x89PNG\r\n\x1a\n")}, // PNG signature (ISO/IEC 15948)
	}
	for _, tc := range cases {
		t.Run(tc.format, func(t *testing.T) {
			b, err := c.Envelope(context.Background(), "tsw-1", tc.format, 0.085, 0.8, 1.2e7)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Contains(b[:min(len(b), 256)], tc.magic) {
				t.Errorf("answer starts %q, want %q", b[:min(len(b), 32)], tc.magic)
			}
		})
	}
	if _, err := c.Envelope(context.Background(), "tsw-1", "gif", 0.085, 0, 0); err == nil {
		t.Error("gif: want an error")
	}
	if _, err := c.Envelope(context.Background(), "tsw-1", "svg", -1, 0, 0); problem(t, err).Status != 400 {
		t.Errorf("negative length: %v, want 400", err)
	}
}

func TestProblems(t *testing.T) {
	c := newClient(t)
	cases := []struct {
		name   string
		body   string
		status int
		fields []string
		limits []string
	}{
		{"400 names every bad field", strings.NewReplacer(`"12000 m"`, `99000`, `"span": 16.4`, `"span": -1`).Replace(testfixture.J16Plan),
			400, []string{"flight.altitude", "article.span"}, nil},
		{"422 names the limits that conflict", strings.Replace(testfixture.J16Plan, `{"scale_min": 0.01, "scale_max": 0.5}`, `{"scale": 0.2}`, 1),
			422, nil, []string{facilities.ConstraintSpan}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			// The values decode; it is the service that judges them.
			_, err := c.Plan(context.Background(), planRequest(t, tc.body))
			p := problem(t, err)
			if p.Status != tc.status || p.Type == "" || p.Title == "" {
				t.Fatalf("status %d, type %q, title %q; want %d", p.Status, p.Type, p.Title, tc.status)
			}
			var got []string
			for _, f := range p.Errors {
				got = append(got, f.Field)
			}
			for _, f := range tc.fields {
				if !slices.Contains(got, f) {
					t.Errorf("fields %v lack %s", got, f)
				}
			}
			for _, l := range tc.limits {
				if !slices.Contains(p.Limits, l) {
					t.Errorf("limits %v lack %s", p.Limits, l)
				}
			}
			if !strings.Contains(p.Error(), strings.TrimSpace(p.Title)) {
				t.Errorf("Error() %q lacks the title", p.Error())
			}
		})
	}
}

func TestNewRefusesBadURLs(t *testing.T) {
	for _, u := range []string{"", "localhost:8080", "ftp://host", "http://", "://x"} {
		if _, err := client.New(u); err == nil {
			t.Errorf("New(%q): want an error", u)
		}
	}
}
