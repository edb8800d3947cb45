package app

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/bytedance/sonic"
	gojson "github.com/goccy/go-json"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/unitjson"
)

// plainReport is facilities.LoadReport without its hand-written MarshalJSON, so
// that a library encodes it by reflection.
type plainReport facilities.LoadReport

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

// spliced encodes the answer without its load report with marshal, the report
// by reflection as plainReport with marshal too, and puts the report in its
// place: what the answer costs when a library writes all of it.
func spliced(resp *schema.PlanResponse, marshal func(any) ([]byte, error)) ([]byte, error) {
	rest := *resp
	rest.Loads = nil
	b, err := marshal(&rest)
	if err != nil {
		return nil, err
	}
	lb, err := marshal((*plainReport)(resp.Loads))
	if err != nil {
		return nil, err
	}
	i := bytes.Index(b, loadsNull) + len(`,"loads":`)
	return append(append(append([]byte{}, b[:i]...), lb...), b[i+len("null"):]...), nil
}

// encoders are the ways of encoding a plan answer that BenchmarkEncodePlan
// compares. The reflective ones encode the load report by reflection, which
// writes max_safe_dynamic_pressure in its declaration place (the hand-written
// writer puts it last), so their bytes are compared with
// spliced(encoding/json) rather than with the answer.
var encoders = []struct {
	name       string
	reflective bool
	encode     func(*schema.PlanResponse) ([]byte, error)
}{
	{"hand-written (marshalPlan)", false, marshalPlan},
	{"encoding/json + hand-written report", false, func(r *schema.PlanResponse) ([]byte, error) { return json.Marshal(r) }},
	{"encoding/json, reflective", true, func(r *schema.PlanResponse) ([]byte, error) { return spliced(r, json.Marshal) }},
	{"goccy/go-json, reflective", true, func(r *schema.PlanResponse) ([]byte, error) { return spliced(r, gojson.Marshal) }},
	{"sonic std, reflective", true, func(r *schema.PlanResponse) ([]byte, error) {
		return spliced(r, sonic.ConfigStd.Marshal)
	}},
}

// TestEncodersAgree checks which encoders of BenchmarkEncodePlan write the bytes
// encoding/json writes: the hand-written writers must; a library that does not
// is reported (and could not replace them).
func TestEncodersAgree(t *testing.T) {
	resp := benchPlanAnswer(t)
	want, err := json.Marshal(resp)
	require.NoError(t, err)
	wantReflective, err := spliced(resp, json.Marshal)
	require.NoError(t, err)
	for _, e := range encoders {
		got, err := e.encode(resp)
		require.NoError(t, err, e.name)
		w := want
		if e.reflective {
			w = wantReflective
		}
		if !bytes.Equal(got, w) {
			i := 0
			for i < min(len(got), len(w)) && got[i] == w[i] {
				i++
			}
			t.Logf("%s: differs from encoding/json at byte %d: %.40q, want %.40q", e.name, i, got[i:], w[i:])
			if !e.reflective || e.name == "encoding/json, reflective" {
				t.Errorf("%s must write encoding/json's bytes", e.name)
			}
		}
	}
}

// BenchmarkEncodePlan encodes a plan answer with a 21-point load report each
// way: the hand-written writers (the splice of marshalPlan and
// LoadReport.MarshalJSON), encoding/json calling the hand-written report writer,
// and encoding/json, goccy/go-json and sonic writing every field by reflection.
// The ways take turns within every iteration, so that a machine shared with
// other work weighs on each alike; each way's time per answer is reported as
// its own metric (µs/answer) and as a ratio to the hand-written writers (×hand).
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
		name := strings.NewReplacer(" ", "_", ",", "", "(", "", ")", "").Replace(e.name)
		b.ReportMetric(float64(spent[i].Microseconds())/float64(n), "µs/"+name)
		b.ReportMetric(float64(spent[i])/float64(spent[0]), "×hand/"+name)
	}
}
