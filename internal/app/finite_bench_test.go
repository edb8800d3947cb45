package app_test

import (
	"context"
	"testing"

	"github.com/stretchr/testify/require"

	"scalematch/internal/app"
)

// BenchmarkCheckFinite walks the plan answer of the transonic example
// (examples/orrin-j16-tsw-1.json: 21 α points, a 41-point trade curve) for a
// non-finite number, as Planner.Plan does for every answer it does not encode.
func BenchmarkCheckFinite(b *testing.B) {
	p := &app.Planner{}
	resp, err := p.Plan(context.Background(), readPlanRequest(b, "examples/orrin-j16-tsw-1.json"))
	require.NoError(b, err)
	b.ReportAllocs()
	for b.Loop() {
		if err := app.CheckFinite(resp, nil); err != nil {
			b.Fatal(err)
		}
	}
}
