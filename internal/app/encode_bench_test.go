package app

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"strings"
	"testing"
	"time"

	gojson "github.com/goccy/go-json"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/internal/unitjson"
)

// benchPlanAnswer returns the plan answer of the load tool's request (the Orrin
// J16 in tsw-1, 21 α points, a 21-point load report).
func benchPlanAnswer(tb testing.TB) *schema.PlanResponse {
	body, err := os.ReadFile("../../api/testdata/load/plan-orrin-j16-tsw-1.json")
	require.NoError(tb, err)
	var req schema.PlanRequest
	require.NoError(tb, unitjson.Decode(body, &req))
	var p Planner
	resp, err := p.Plan(context.Background(), &req)
	require.NoError(tb, err)
	require.NotNil(tb, resp.Loads)
	require.Len(tb, resp.Loads.Points, 21)
	return resp
}

// encoders are the ways of encoding a plan answer that BenchmarkEncodePlan
// compares: encoding/json first (the reference of every ratio), then the two
// faster libraries gin already carries; encodePlan, what the service runs, is
// sonic's. The hand-written writers that encoding/json replaced were measured
// the same way before they were removed (docs/performance.md).
var encoders = []struct {
	name   string
	encode func(*schema.PlanResponse) ([]byte, error)
}{
	{"encoding/json", func(r *schema.PlanResponse) ([]byte, error) { return json.Marshal(r) }},
	{"goccy/go-json", func(r *schema.PlanResponse) ([]byte, error) { return gojson.Marshal(r) }},
	{"sonic std", encodePlan},
}

// TestEncodersAgree checks that every encoder of BenchmarkEncodePlan writes the
// bytes encoding/json writes (float formats, HTML escaping, field order), so
// that the benchmark compares like with like.
func TestEncodersAgree(t *testing.T) {
	t.Parallel()
	resp := benchPlanAnswer(t)
	want, err := json.Marshal(resp)
	require.NoError(t, err)
	for _, e := range encoders {
		got, err := e.encode(resp)
		require.NoError(t, err, e.name)
		if !bytes.Equal(got, want) {
			i := 0
			for i < min(len(got), len(want)) && got[i] == want[i] {
				i++
			}
			t.Errorf("%s: differs from encoding/json at byte %d: %.40q, want %.40q", e.name, i, got[i:], want[i:])
		}
	}
}

// BenchmarkEncodePlan encodes a plan answer with a 21-point load report with
// each encoder. They take turns within every iteration, so that a machine
// shared with other work weighs on each alike; each one's time per answer is
// reported as its own metric (µs/NAME) and as a ratio to encoding/json
// (×encoding/json/NAME).
func BenchmarkEncodePlan(b *testing.B) {
	resp := benchPlanAnswer(b)
	spent := make([]time.Duration, len(encoders))
	n := 0
	for b.Loop() {
		for i, e := range encoders {
			t := time.Now()
			if _, err := e.encode(resp); err != nil {
				b.Fatal(err)
			}
			spent[i] += time.Since(t)
		}
		n++
	}
	for i, e := range encoders {
		name := strings.ReplaceAll(e.name, " ", "_")
		b.ReportMetric(float64(spent[i].Microseconds())/float64(n), "µs/"+name)
		b.ReportMetric(float64(spent[i])/float64(spent[0]), "×encoding/json/"+name)
	}
}
