package facilities_test

import (
	"context"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

func TestDemoDecodes(t *testing.T) {
	t.Parallel()
	assert.Len(t, facilities.Demo(), 6, "demo facilities")
	_, ok := facilities.DemoFacility("tsw-1")
	assert.True(t, ok, "tsw-1 in the demo catalog")
}

func TestDemoCatalogIsReadOnly(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	var c facilities.DemoCatalog
	fs, err := c.Facilities(ctx)
	require.NoError(t, err)
	require.Len(t, fs, 6, "the demo facilities")
	for i := 1; i < len(fs); i++ {
		assert.Less(t, fs[i-1].ID, fs[i].ID, "ordered by id")
	}
	f, err := c.Facility(ctx, "cn2-05")
	require.NoError(t, err)
	require.Equal(t, 1, f.Version, "Facility(cn2-05) version")
	_, err = c.Facility(ctx, "nope")
	assert.Equal(t, facilities.CodeNotFound, facilities.ErrorCode(err), "unknown id: %v", err)
	err = c.DeleteFacility(ctx, "cn2-05", 1, "x")
	assert.Equal(t, facilities.CodeForbidden, facilities.ErrorCode(err), "delete: %v", err)
	_, err = c.UpdateFacility(ctx, f, 1, "x")
	assert.Equal(t, facilities.CodeForbidden, facilities.ErrorCode(err), "update: %v", err)
	_, err = c.CreateFacility(ctx, f, "x")
	assert.Equal(t, facilities.CodeForbidden, facilities.ErrorCode(err), "create: %v", err)
	_, err = c.Plan(ctx, "abc")
	assert.Equal(t, facilities.CodeNotFound, facilities.ErrorCode(err), "plan: %v", err)
}

// TestHeldStaticPressure checks the water state of a facility that sets its
// test-section static pressure independently of speed (cvt-07, 15–260 kPa) against
// one that does not (wtn-04, p0 = 101 kPa): cvt-07 holds p at its range's top
// (260 kPa) and p0 = p + q; wtn-04 keeps p = p0 − q. Water is incompressible here,
// so both give the same Reynolds number per metre and q at the same speed and
// temperature (identities of the definitions q = ½ρV², Re/m = ρV/μ).
func TestHeldStaticPressure(t *testing.T) {
	t.Parallel()
	cvt, ok := facilities.DemoFacility("cvt-07")
	require.True(t, ok)
	wtn, ok := facilities.DemoFacility("wtn-04")
	require.True(t, ok)
	require.NoError(t, cvt.Validate())
	require.Equal(t, 260000.0, cvt.HeldStaticPressure())

	held, err := cvt.State(facilities.Setting{Speed: 3, StagnationTemperature: 293.15})
	require.NoError(t, err)
	open, err := wtn.State(facilities.Setting{Speed: 3, StagnationPressure: 101000, StagnationTemperature: 293.15})
	require.NoError(t, err)
	cases := []struct {
		name      string
		got, want float64
		tol       float64 // relative
	}{
		{"cvt-07 static pressure, Pa", held.Static.Pressure, 260000, 1e-15},
		{"cvt-07 stagnation pressure = p + q, Pa", held.StagnationPressure, 260000 + held.DynamicPressure, 1e-15},
		{"wtn-04 static pressure = p0 − q, Pa", open.Static.Pressure, 101000 - open.DynamicPressure, 1e-15},
		{"same q, Pa", held.DynamicPressure, open.DynamicPressure, 1e-15},
		{"same Re/m, 1/m", held.ReynoldsPerMeter, open.ReynoldsPerMeter, 1e-15},
	}
	for _, c := range cases {
		assert.InDelta(t, c.want, c.got, c.tol*c.want, c.name)
	}
	assert.Empty(t, cvt.Violations(held))

	// A stagnation pressure given to cvt-07 is refused, naming the field.
	_, err = cvt.State(facilities.Setting{Speed: 3, StagnationPressure: 150000, StagnationTemperature: 293.15})
	var fe *facilities.Error
	require.ErrorAs(t, err, &fe)
	require.Len(t, fe.Fields, 1)
	assert.Equal(t, "stagnation_pressure", fe.Fields[0].Field)
}
