package app_test

import (
	"context"
	"encoding/json"
	"errors"
	"os"
	"slices"
	"strings"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// withInstallation replaces the installation of the J16 request.
func withInstallation(body, in string) string {
	return strings.Replace(body, `"installation": {"balance_id": "int-b1", "model_mass": 20}`, `"installation": `+in, 1)
}

// TestPlanRequiredResolution plans the J16 in tsw-1 (balance chosen) with a
// required resolution: a coarse one every plan meets, and one finer than any
// balance of tsw-1 resolves within its allowed loads (int-b1 resolves about
// 3.2 counts at the tunnel's 54 kPa ceiling at 1:24, docs/loads.md; 0.5 counts
// would need over six times that q).
func TestPlanRequiredResolution(t *testing.T) {
	t.Parallel()
	var p app.Planner
	t.Run("resolved", func(t *testing.T) {
		t.Parallel()
		body := strings.Replace(withInstallation(j16Plan, `{"model_mass": 20}`), `"alpha"`,
			`"required_resolution": {"cd_counts": 20, "cl": 0.01}, "alpha"`, 1)
		resp, err := p.Plan(context.Background(), decodePlan(t, body))
		require.NoError(t, err)
		assert.Equal(t, loads.ResolutionResolved, resp.ResolutionState)
		require.NotNil(t, resp.Loads)
		require.NotNil(t, resp.Loads.Resolution)
		assert.Equal(t, loads.ResolutionResolved, resp.Loads.Resolution.State)
		assert.GreaterOrEqual(t, resp.Loads.Resolution.Margin, 1-1e-9)
		require.Len(t, resp.Loads.Uncertainty, len(resp.Loads.Points))
		for _, u := range resp.Loads.Uncertainty {
			assert.LessOrEqual(t, u.CDCounts, 20*(1+1e-9), "α %g°", u.Alpha)
			assert.LessOrEqual(t, u.CL, 0.01*(1+1e-9), "α %g°", u.Alpha)
		}
		assert.Equal(t, 1.0, resp.LoadFraction)
	})
	t.Run("no balance resolves", func(t *testing.T) {
		t.Parallel()
		body := strings.Replace(withInstallation(j16Plan, `{"model_mass": 20}`), `"alpha"`,
			`"required_resolution": {"cd_counts": 0.5}, "alpha"`, 1)
		resp, err := p.Plan(context.Background(), decodePlan(t, body))
		require.NoError(t, err, "the plan is made without the resolution and says so")
		assert.Equal(t, loads.ResolutionNoBalance, resp.ResolutionState)
		assert.Contains(t, resp.Warnings, loads.ResolutionNoBalanceWarning)
		assert.False(t, slices.ContainsFunc(resp.Binding, func(b similarity.Binding) bool { return b.Constraint == facilities.ConstraintResolution }))
	})
}

// TestPlanLoadFraction plans the J16 on int-b1, whose axial rating binds
// (TestBalanceBindingAgreesWithLoads), to all and to 90 % of the allowed load:
// at 0.9 the worst point sits at 0.9 ÷ 1.5 = 60 % of its rating, and the
// answer states the fraction.
func TestPlanLoadFraction(t *testing.T) {
	t.Parallel()
	var p app.Planner
	full, err := p.Plan(context.Background(), decodePlan(t, j16Plan))
	require.NoError(t, err)
	part, err := p.Plan(context.Background(), decodePlan(t, withInstallation(j16Plan, `{"balance_id": "int-b1", "model_mass": 20, "load_fraction": 0.9}`)))
	require.NoError(t, err)
	assert.Equal(t, 0.9, part.LoadFraction)
	assert.Equal(t, 0.9, part.Loads.LoadFraction)
	assert.InDelta(t, 0.6, part.Loads.AllowedUtilization, 1e-12)
	assert.InDelta(t, 0.6, part.Loads.MaxUtilization, 1e-6, "the balance binds at 90 %% of the allowed load")
	assert.Less(t, part.Test.Reynolds, full.Test.Reynolds, "a tighter load ceiling costs Reynolds number")
	assert.True(t, slices.ContainsFunc(part.Binding, func(b similarity.Binding) bool { return b.Constraint == facilities.ConstraintBalance }))
	for _, r := range part.Loads.Points[0].Rows {
		if r.Rated {
			assert.InDelta(t, 0.9*r.Rating/1.5, r.Allowed, 1e-9*r.Rating, r.Name)
		}
	}
}

// TestResolutionFieldErrors: bad resolution and margin figures are 400s naming
// the field.
func TestResolutionFieldErrors(t *testing.T) {
	t.Parallel()
	var p app.Planner
	for _, tc := range []struct {
		name, edit, field string
	}{
		{"empty resolution", `"required_resolution": {}, "alpha"`, "required_resolution"},
		{"zero counts", `"required_resolution": {"cd_counts": 0}, "alpha"`, "required_resolution.cd_counts"},
		{"negative cl", `"required_resolution": {"cl": -0.01}, "alpha"`, "required_resolution.cl"},
		{"cm above 1", `"required_resolution": {"cm": 2}, "alpha"`, "required_resolution.cm"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := p.Plan(context.Background(), decodePlan(t, strings.Replace(j16Plan, `"alpha"`, tc.edit, 1)))
			requireField(t, err, tc.field)
		})
	}
	for _, f := range []string{"0", "1.5", "-0.2"} {
		t.Run("load_fraction "+f, func(t *testing.T) {
			t.Parallel()
			_, err := p.Plan(context.Background(), decodePlan(t, withInstallation(j16Plan, `{"model_mass": 20, "load_fraction": `+f+`}`)))
			requireField(t, err, "installation.load_fraction")
		})
	}
}

// requireField asks that err be a CodeInvalid error naming field.
func requireField(t *testing.T, err error, field string) {
	t.Helper()
	var e *check.Error
	require.True(t, errors.As(err, &e), "want a field error, got %v", err)
	assert.Equal(t, check.CodeInvalid, e.Code)
	assert.True(t, slices.ContainsFunc(e.Fields, func(f check.FieldError) bool { return f.Field == field }), "fields %+v, want %s", e.Fields, field)
}

// TestPlanResolutionWater plans the demo vessel of examples/tarn-a2-wtn-04.json
// (a marine condition in the water tunnel wtn-04: cavitation number first) with
// and without a required C_D resolution of 200 counts. Without it the plan runs
// at a dynamic pressure where the balance resolves only about 264 counts; with
// it the planner raises q to the floor (the water's q caps the temperature) and
// lists "resolution" among the binding limits with its Reynolds gain, and every
// point meets 200 counts.
func TestPlanResolutionWater(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("../../examples/tarn-a2-wtn-04.json")
	require.NoError(t, err)
	var p app.Planner
	plain, err := p.Plan(context.Background(), decodePlan(t, string(b)))
	require.NoError(t, err)
	req := decodePlan(t, string(b))
	req.RequiredResolution = &loads.Resolution{CDCounts: fptr(200)}
	resp, err := p.Plan(context.Background(), req)
	require.NoError(t, err)
	assert.Equal(t, loads.ResolutionResolved, resp.ResolutionState)
	rc := resp.Loads.Resolution
	require.NotNil(t, rc)
	assert.Less(t, plain.Test.DynamicPressure, rc.MinDynamicPressure, "the floor is above the plan made without it")
	assert.InDelta(t, rc.MinDynamicPressure, resp.Test.DynamicPressure, 1e-6*rc.MinDynamicPressure, "the plan sits on the floor")
	i := slices.IndexFunc(resp.Binding, func(b similarity.Binding) bool { return b.Constraint == facilities.ConstraintResolution })
	require.GreaterOrEqual(t, i, 0, "binding %+v", resp.Binding)
	assert.NotZero(t, resp.Binding[i].ReynoldsGainPerPercent)
	for _, u := range resp.Loads.Uncertainty {
		assert.LessOrEqual(t, u.CDCounts, 200*(1+1e-9), "α %g°", u.Alpha)
	}
}

func fptr(v float64) *float64 { return &v }

// TestPlanLoadLimitShared plans the J16 in tsw-1 with a resolution every plan
// meets, one no balance resolves (the plan is then made again on the limit
// without it) and none, each first on its own (the load limit built: its
// installation, 20.5 kg, is this test's alone) and then again and again from
// six goroutines at once (the limit shared from the planner's cache): every
// answer is the first one, byte for byte. Run with -race.
func TestPlanLoadLimitShared(t *testing.T) {
	t.Parallel()
	var p app.Planner
	ctx := context.Background()
	var reqs []string
	for _, res := range []string{`"required_resolution": {"cd_counts": 20, "cl": 0.01}, `, `"required_resolution": {"cd_counts": 0.5}, `, ``} {
		reqs = append(reqs, strings.Replace(withInstallation(j16Plan, `{"model_mass": 20.5}`), `"alpha"`, res+`"alpha"`, 1))
	}
	first := make([][]byte, len(reqs))
	for i, body := range reqs {
		resp, err := p.Plan(ctx, decodePlan(t, body))
		require.NoError(t, err)
		first[i], err = json.Marshal(resp)
		require.NoError(t, err)
	}
	require.Contains(t, string(first[1]), loads.ResolutionNoBalance, "the second plan falls back to the limit without the resolution")
	var wg sync.WaitGroup
	for w := range 6 {
		wg.Go(func() {
			for k := range 9 {
				i := (w + k) % len(reqs)
				resp, err := p.Plan(ctx, decodePlan(t, reqs[i]))
				if !assert.NoError(t, err) {
					return
				}
				got, err := json.Marshal(resp)
				assert.NoError(t, err)
				assert.Equal(t, string(first[i]), string(got), "request %d, goroutine %d", i, w)
			}
		})
	}
	wg.Wait()
}
