package app_test

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"slices"
	"strings"
	"sync/atomic"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// j16Plan is the Orrin J16 of the demo world (docs/demo-world.md) in tsw-1 at
// cruise, on balance int-b1.
var j16Plan = func() string {
	b, err := os.ReadFile("testdata/j16-tsw-1-cruise.json")
	if err != nil {
		panic(err)
	}
	return string(b)
}()

// decodePlan decodes a plan request as POST /v1/plans does.
func decodePlan(t testing.TB, body string) *schema.PlanRequest {
	t.Helper()
	var req schema.PlanRequest
	require.NoError(t, unitjson.Decode([]byte(body), &req))
	return &req
}

// TestBalanceBindingAgreesWithLoads checks that the plan lists "balance" among its
// binding limits exactly when the reported balance check sits at its allowed
// utilisation (1/safety factor), and that the planner's load limit at the chosen
// scale is the report's max_safe_dynamic_pressure (where the allowed load is reached by the estimate): the planner and the load
// report use one load-limit implementation (loads.Limit).
func TestBalanceBindingAgreesWithLoads(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name    string
		edit    func(string) string
		binding bool // "balance" expected among the binding limits
		tol     float64
	}{
		// int-b1's axial rating (1100 N over 1.5) meets q_max = 54 kPa at a scale
		// below the span limit: the plan sits on both.
		{"J16 tsw-1 int-b1", func(s string) string { return s }, true, 1e-6},
		// int-b2 carries the span-limited model at q_max with room to spare.
		{"J16 tsw-1 int-b2", func(s string) string { return strings.Replace(s, `"int-b1"`, `"int-b2"`, 1) }, false, 1e-6},
		{"J16 tsw-1 balance chosen", func(s string) string { return strings.Replace(s, `"balance_id": "int-b1", `, ``, 1) }, false, 1e-6},
		{"J16 tsw-1 no weight", func(s string) string { return strings.Replace(s, `, "model_mass": 20`, ``, 1) }, true, 1e-6},
		// In cn2-05 the span limit and q_max bind before int-k's ratings do.
		{"J16 cn2-05 int-k", func(s string) string {
			return strings.NewReplacer(`"tsw-1"`, `"cn2-05"`, `"int-b1"`, `"int-k"`).Replace(s)
		}, false, 1e-6},
	}
	var p app.Planner
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			req := decodePlan(t, tc.edit(j16Plan))
			resp, err := p.Plan(context.Background(), req)
			require.NoError(t, err)
			binds := slices.ContainsFunc(resp.Binding, func(b similarity.Binding) bool {
				return b.Constraint == facilities.ConstraintBalance
			})
			r := resp.Loads
			atLimit := math.Abs(r.MaxUtilization-r.AllowedUtilization) <= tc.tol*r.AllowedUtilization
			assert.Equal(t, tc.binding, binds, "balance among the binding limits")
			assert.Equal(t, tc.binding, atLimit, "report at its limit (%.6g of %.6g on %s)", r.MaxUtilization, r.AllowedUtilization, r.BalanceID)
			assert.LessOrEqual(t, r.MaxUtilization, r.AllowedUtilization*(1+tc.tol), "balance %s: utilisation against its allowed", r.BalanceID)
			f, _ := facilities.DemoFacility(resp.FacilityID)
			in := req.Installation
			in.BalanceID = r.BalanceID
			mx, err := req.Article.Aero.Matrix(req.Alpha, req.Beta)
			require.NoError(t, err)
			ll, err := loads.NewLimit(&req.Article, &f, in, mx)
			require.NoError(t, err)
			q := ll.MaxDynamicPressure(resp.Model.Scale, resp.Test.State)
			assert.InEpsilon(t, float64(r.MaxSafeDynamicPressure), q, 1e-9, "load limit's q, Pa, against the report's safe q")
		})
	}
}

// countingCatalog counts the facility reads of a catalog.
type countingCatalog struct {
	facilities.Catalog
	reads atomic.Int64
}

func (c *countingCatalog) Facility(ctx context.Context, id string) (facilities.Facility, error) {
	c.reads.Add(1)
	return c.Catalog.Facility(ctx, id)
}

// TestBatchReadsEachFacilityOnce checks that a batch reads each catalog facility
// once however many of its requests name it, and that single plans read it each
// time.
func TestBatchReadsEachFacilityOnce(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db, err := sqlite.Open(ctx, sqlite.Path(t.TempDir()))
	require.NoError(t, err)
	defer db.Close()
	_, err = facilities.SeedDemo(ctx, db, true)
	require.NoError(t, err)
	cat := &countingCatalog{Catalog: db}
	cn2 := strings.NewReplacer(`"tsw-1"`, `"cn2-05"`, `"int-b1"`, `"int-k"`).Replace(j16Plan)
	missing := strings.Replace(j16Plan, `"tsw-1"`, `"no-such"`, 1)
	cases := []struct {
		name   string
		batch  []string
		reads  int64
		failed int // requests answered with an error
	}{
		{"batch of five in two facilities and one unknown twice",
			[]string{j16Plan, cn2, j16Plan, missing, missing, j16Plan, cn2}, 3, 2},
		{"single plan", nil, 1, 0},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) { // not parallel: the cases share the read counter
			cat.reads.Store(0)
			p := app.NewPlanner(cat, 0)
			if tc.batch == nil {
				_, err := p.PlanJSON(ctx, decodePlan(t, j16Plan))
				require.NoError(t, err)
			} else {
				raw := make([]json.RawMessage, len(tc.batch))
				for i, b := range tc.batch {
					raw[i] = json.RawMessage(b)
				}
				failed := 0
				for _, r := range p.Batch().PlanBatch(ctx, raw, nil) {
					if r.Err != nil {
						require.Equal(t, check.CodeNotFound, check.ErrorCode(r.Err), "%v", r.Err)
						failed++
					}
				}
				assert.Equal(t, tc.failed, failed, "requests answered with an error")
			}
			assert.Equal(t, tc.reads, cat.reads.Load(), "facility reads")
		})
	}
}

// TestPlanCondensationPeakMach: the request's condensation_peak_mach replaces the
// facility's for the plan. The J16 at M 0.78 in cn2-05 sits on the condensation
// rule with the default local peak Mach 1.4; told that the model reaches only
// M 0.95 locally, the planner may run colder (the expansion to 0.95 stays further
// from saturation), so the plan's T0 falls and its Reynolds number rises; the
// plan's id differs, and the answer's warnings and binding list read the same value.
func TestPlanCondensationPeakMach(t *testing.T) {
	t.Parallel()
	body, err := os.ReadFile("../../docs/requests/j16-cn2-05-free.json")
	require.NoError(t, err)
	var p app.Planner
	def, err := p.Plan(context.Background(), decodePlan(t, string(body)))
	require.NoError(t, err)
	require.True(t, slices.ContainsFunc(def.Binding, func(b similarity.Binding) bool { return b.Constraint == facilities.ConstraintCondensation }),
		"binding %v", def.Binding)

	req := decodePlan(t, string(body))
	peak := 0.95
	req.CondensationPeakMach = &peak
	low, err := p.Plan(context.Background(), req)
	require.NoError(t, err)
	assert.Less(t, low.Test.StagnationTemperature, def.Test.StagnationTemperature-0.5)
	assert.Greater(t, low.Test.Reynolds, def.Test.Reynolds)
	assert.NotEqual(t, def.ID, low.ID)
	f, _ := facilities.DemoFacility("cn2-05")
	f.CondensationPeakMach = &peak
	m := f.CondensationMargin(low.Test.State)
	assert.GreaterOrEqual(t, m, -1e-9, "no condensation with the request's peak Mach")
	assert.Empty(t, f.Violations(low.Test.State))
	// A request that names the default, 1.4, plans as one that names none.
	req = decodePlan(t, strings.Replace(string(body), `"facility_id": "cn2-05"`, `"facility_id": "cn2-05", "condensation_peak_mach": 1.4`, 1))
	same, err := p.Plan(context.Background(), req)
	require.NoError(t, err)
	assert.InDelta(t, def.Test.StagnationTemperature, same.Test.StagnationTemperature, 1e-9)
}
