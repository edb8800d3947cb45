package client_test

import (
	"context"
	"math"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/client"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/internal/testfixture"
	"scalematch/internal/testfixture/testsite"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// newClient starts the real service over a fresh SQLite catalog seeded with the
// demo facilities and returns a client of it.
func newClient(t *testing.T) *client.Client {
	t.Helper()
	s, err := api.New(api.Config{Catalog: testsite.DemoStore(t), Logger: testfixture.Quiet()})
	require.NoError(t, err)
	ts := httptest.NewServer(s.Handler())
	t.Cleanup(ts.Close)
	c, err := client.New(ts.URL+"/", client.WithHTTPClient(ts.Client()), client.WithUserAgent("scalematch-client-test"))
	require.NoError(t, err)
	return c
}

// planRequest decodes a plan request as the service does, units and all.
func planRequest(t *testing.T, body string) *schema.PlanRequest {
	t.Helper()
	var req schema.PlanRequest
	require.NoError(t, unitjson.Decode([]byte(body), &req))
	return &req
}

// problem returns err as a *client.Problem, failing the test when it is not one.
func problem(t *testing.T, err error) *client.Problem {
	t.Helper()
	var p *client.Problem
	require.ErrorAs(t, err, &p)
	return p
}

func TestPlanAndStoredPlan(t *testing.T) {
	t.Parallel()
	c := newClient(t)
	ctx := context.Background()
	p, err := c.Plan(ctx, planRequest(t, testfixture.J16Plan))
	require.NoError(t, err)
	assert.NotEmpty(t, p.ID)
	assert.Equal(t, "tsw-1", p.FacilityID)
	assert.EqualValues(t, 1, p.FacilityVersion)
	require.NotNil(t, p.Loads)
	require.Equal(t, "int-b1", p.Loads.BalanceID)
	require.Len(t, p.Loads.Points, 21)
	// Mach is matched within the default tolerance of 0.005.
	require.NotNil(t, p.Mismatch.MachDifference)
	assert.InDelta(t, 0, *p.Mismatch.MachDifference, 0.005+1e-9, "|ΔM| within the default 0.005 tolerance")
	assert.True(t, slices.ContainsFunc(p.Binding, func(b similarity.Binding) bool { return b.Constraint == facilities.ConstraintDynamic }),
		"binding %+v lacks %s", p.Binding, facilities.ConstraintDynamic)
	stored, err := c.StoredPlan(ctx, p.ID)
	require.NoError(t, err)
	assert.Equal(t, p, stored, "the stored plan against the answer")
}

func TestPlanBatch(t *testing.T) {
	t.Parallel()
	c := newClient(t)
	good := planRequest(t, testfixture.J16Plan)
	bad := planRequest(t, strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"no-such"`, 1))
	res, err := c.PlanBatch(context.Background(), []schema.PlanRequest{*good, *bad, *good})
	require.NoError(t, err)
	require.Len(t, res, 3)
	for i, want := range []int{200, 404, 200} {
		r := res[i]
		if want == 200 {
			assert.NotNil(t, r.Plan, "result %d: want a plan", i)
			assert.Nil(t, r.Error, "result %d: want a plan", i)
		} else if assert.NotNil(t, r.Error, "result %d: want a problem", i) {
			assert.Equal(t, want, r.Error.Status, "result %d", i)
		}
	}
	if res[0].Plan != nil && res[2].Plan != nil {
		assert.Equal(t, res[0].Plan.ID, res[2].Plan.ID, "the same request's ids")
	}
}

func TestLoads(t *testing.T) {
	t.Parallel()
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
			t.Parallel()
			r := req
			r.Installation.BalanceID = tc.balance
			out, err := c.Loads(context.Background(), &r)
			require.NoError(t, err)
			reports := out.Loads.All
			if tc.balance != "" {
				require.NotNil(t, out.Loads.One, "want one report")
				require.Nil(t, out.Loads.All, "want one report")
				reports = []loads.Report{*out.Loads.One}
			}
			var ids []string
			for _, rep := range reports {
				ids = append(ids, rep.BalanceID)
				assert.Len(t, rep.Points, 11, rep.BalanceID)
			}
			assert.Equal(t, tc.want, ids, "balance ids of the reports")
			// The state is the one asked for, within rounding.
			assert.InDelta(t, mach, out.Test.Mach, 1e-12, "test Mach")
			assert.InDelta(t, 0, out.Test.StagnationPressure/p0-1, 1e-12, "test p0 against %g Pa", p0)
		})
	}
}

func TestConditions(t *testing.T) {
	t.Parallel()
	c := newClient(t)
	mach, p0, t0 := 0.8, 150000.0, 310.0
	out, err := c.Conditions(context.Background(), &schema.ConditionsRequest{FacilityID: "tsw-1",
		TestSettings: schema.TestSettings{Mach: &mach, StagnationPressure: &p0, StagnationTemperature: &t0}})
	require.NoError(t, err)
	// Isentropic relations for γ = 1.4 (NACA Report 1135): T/T0 = 1/(1 + 0.2·M²),
	// q/p0 = 0.7·M²·(1 + 0.2·M²)^-3.5.
	wantT := t0 / (1 + 0.2*mach*mach)
	wantQ := p0 * 0.7 * mach * mach * math.Pow(1+0.2*mach*mach, -3.5)
	assert.InDelta(t, 0, out.Static.Temperature/wantT-1, 1e-6, "static T against NACA Report 1135, %.6g K", wantT)
	assert.InDelta(t, 0, out.DynamicPressure/wantQ-1, 1e-6, "q against NACA Report 1135, %.6g Pa", wantQ)
	assert.Empty(t, out.Violations)
}

func TestAtmosphere(t *testing.T) {
	t.Parallel()
	c := newClient(t)
	alt := 11000.0
	s, err := c.Atmosphere(context.Background(), client.AtmosphereQuery{Altitude: &alt})
	require.NoError(t, err)
	// U.S. Standard Atmosphere 1976 at 11 000 m geometric (10 981 m geopotential):
	// 288.15 − 0.0065·10 981.0 = 216.774 K (from memory of the 1976 table's lapse rate).
	assert.InDelta(t, 216.774, s.Temperature, 0.001, "temperature K, U.S. Standard Atmosphere 1976 (from memory)")
	pa := 11000.0
	_, err = c.Atmosphere(context.Background(), client.AtmosphereQuery{Altitude: &alt, PressureAltitude: &pa})
	assert.Equal(t, 400, problem(t, err).Status, "both altitudes")
}

func TestGroups(t *testing.T) {
	t.Parallel()
	c := newClient(t)
	out, err := c.Groups(context.Background(), &schema.GroupsRequest{
		Variables: []schema.GroupVariable{{Name: "R", Unit: "N"}, {Name: "rho", Unit: "kg/m^3"},
			{Name: "V", Unit: "m/s"}, {Name: "L", Unit: "m"}, {Name: "mu", Dimensions: "M L^-1 T^-1"}},
		Repeating: []string{"rho", "V", "L"},
	})
	require.NoError(t, err)
	require.Equal(t, 3, out.Rank)
	require.Len(t, out.Groups, 2)
	// Force coefficient R/(ρV²L²) and inverse Reynolds number μ/(ρVL) (Buckingham 1914).
	assert.Equal(t, "R rho^-1 V^-2 L^-2", out.Groups[0].String())
	assert.Equal(t, "mu rho^-1 V^-1 L^-1", out.Groups[1].String())
}

func TestFacilities(t *testing.T) {
	t.Parallel()
	c := newClient(t)
	ctx := context.Background()
	list, err := c.Facilities(ctx)
	require.NoError(t, err)
	var ids []string
	for _, f := range list {
		ids = append(ids, f.ID)
	}
	var want []string
	for _, f := range facilities.Demo() {
		want = append(want, f.ID)
	}
	slices.Sort(want)
	assert.Equal(t, want, ids, "the demo's facilities, in id order")
	f, err := c.Facility(ctx, "tsw-1")
	require.NoError(t, err)
	demo, ok := facilities.DemoFacility("tsw-1")
	require.True(t, ok)
	demo.Version = 1
	assert.Equal(t, demo, *f, "tsw-1 from the service against the demo record")
	_, err = c.Facility(ctx, "no-such")
	assert.Equal(t, 404, problem(t, err).Status, "unknown facility")
}

func TestEnvelope(t *testing.T) {
	t.Parallel()
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
			t.Parallel()
			b, err := c.Envelope(context.Background(), "tsw-1", tc.format, 0.085, 0.8, 1.2e7)
			require.NoError(t, err)
			assert.Contains(t, string(b[:min(len(b), 256)]), string(tc.magic), "the answer's first 256 bytes")
		})
	}
	_, err := c.Envelope(context.Background(), "tsw-1", "gif", 0.085, 0, 0)
	assert.Error(t, err, "gif")
	_, err = c.Envelope(context.Background(), "tsw-1", "svg", -1, 0, 0)
	assert.Equal(t, 400, problem(t, err).Status, "negative length")
}

func TestProblems(t *testing.T) {
	t.Parallel()
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
			t.Parallel()
			// The values decode; it is the service that judges them.
			_, err := c.Plan(context.Background(), planRequest(t, tc.body))
			p := problem(t, err)
			require.Equal(t, tc.status, p.Status)
			require.NotEmpty(t, p.Type)
			require.NotEmpty(t, p.Title)
			var got []string
			for _, f := range p.Errors {
				got = append(got, f.Field)
			}
			assert.Subset(t, got, tc.fields, "the problem's fields")
			assert.Subset(t, p.Limits, tc.limits, "the problem's limits")
			assert.Contains(t, p.Error(), strings.TrimSpace(p.Title), "Error() carries the title")
		})
	}
}

func TestNewRefusesBadURLs(t *testing.T) {
	t.Parallel()
	for _, u := range []string{"", "localhost:8080", "ftp://host", "http://", "://x"} {
		_, err := client.New(u)
		assert.Error(t, err, "New(%q)", u)
	}
}
