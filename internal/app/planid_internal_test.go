package app

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// planIDBefore is planID as it was at 8e0f770 (the request encoded by
// encoding/json's Encoder straight into the hash, an inline facility by
// json.Marshal): the reference the plan ids are held to.
func planIDBefore(kind string, req any, f *facilities.Facility) (string, error) {
	h := sha256.New()
	io.WriteString(h, "scalematch/v1 ")
	io.WriteString(h, kind)
	h.Write([]byte{'\n'})
	if err := json.NewEncoder(h).Encode(req); err != nil {
		return "", err
	}
	io.WriteString(h, f.ID)
	h.Write(strconv.AppendInt([]byte{'@'}, int64(f.Version), 10))
	h.Write([]byte{'\n'})
	if f.Version == 0 {
		fb, err := json.Marshal(f)
		if err != nil {
			return "", err
		}
		h.Write(fb)
	}
	var sum [sha256.Size]byte
	return hex.EncodeToString(h.Sum(sum[:0])[:10]), nil
}

// repoPlanRequests returns every plan request the repository ships that
// decodes as one (the examples, docs/requests and its conditions, the load
// tool's request), by file name, each also with a weighted objective, at 45 km
// and with the facility given inline (the variants BenchmarkPlanKinds and the
// service see).
func repoPlanRequests(t *testing.T) map[string]*schema.PlanRequest {
	t.Helper()
	var files []string
	for _, g := range []string{"examples/*.json", "docs/requests/*.json", "docs/requests/conditions/*.json", "api/testdata/load/*.json"} {
		m, err := filepath.Glob("../../" + g)
		require.NoError(t, err)
		files = append(files, m...)
	}
	reqs := map[string]*schema.PlanRequest{}
	for _, file := range files {
		body, err := os.ReadFile(file)
		require.NoError(t, err)
		var req schema.PlanRequest
		if unitjson.Decode(body, &req) != nil {
			continue // a campaign or a condition list, not a plan request
		}
		reqs[file] = &req
		w := req
		w.Objective = similarity.Objective{Weights: map[string]float64{"reynolds": 1, "mach": 25, "froude": 0.5}}
		reqs[file+" weighted"] = &w
		if req.Marine == nil {
			a := req
			alt := 45000.0
			a.Flight.Altitude, a.Flight.PressureAltitude = &alt, nil
			reqs[file+" 45 km"] = &a
		}
		if req.FacilityID != "" {
			if f, ok := facilities.DemoFacility(req.FacilityID); ok {
				in := req
				f.Version = 0
				in.Facility, in.FacilityID = &f, ""
				reqs[file+" inline"] = &in
			}
		}
	}
	require.GreaterOrEqual(t, len(files), 15)
	require.GreaterOrEqual(t, len(reqs), 40)
	return reqs
}

// TestIDJSONAgrees requires appendIDJSON (sonic) to write encoding/json's
// bytes for every plan request the repository ships and their variants, and
// for every demo facility given inline; and planID to give the id planIDBefore
// gives, the id stored plans have (the golden answers carry it as well).
func TestIDJSONAgrees(t *testing.T) {
	t.Parallel()
	for name, req := range repoPlanRequests(t) {
		want, err := json.Marshal(req)
		require.NoError(t, err, name)
		got, err := appendIDJSON(nil, req)
		require.NoError(t, err, name)
		require.Equal(t, string(want), string(got), name)
		var p Planner
		f, err := p.facility(context.Background(), req.Facility, req.FacilityID, nil)
		require.NoError(t, err, name)
		wantID, err := planIDBefore("plan", req, f)
		require.NoError(t, err, name)
		gotID, err := planID("plan", req, f)
		require.NoError(t, err, name)
		require.Equal(t, wantID, gotID, name)
	}
	for _, f := range facilities.Demo() {
		f.Version = 0
		want, err := json.Marshal(&f)
		require.NoError(t, err, f.ID)
		got, err := appendIDJSON(nil, &f)
		require.NoError(t, err, f.ID)
		require.Equal(t, string(want), string(got), f.ID)
	}
}

// idJSONFuzzFloats are the numbers where JSON encoders most often differ from
// encoding/json: its switch between plain and exponent notation at 1e-6 and
// 1e21, the shortest round-trip digits, negative zero, the smallest and largest
// doubles, and the numbers it refuses (NaN, infinities).
var idJSONFuzzFloats = []float64{0, math.Copysign(0, -1), 1e-6, 9.999999999999999e-7, 1e-7, 1.5e-7,
	0.000001234, 1e20, 1e21, 9.999999999999999e20, -1e21, 1.2345678901234567e21, 5e-324, math.MaxFloat64,
	-math.MaxFloat64, 1e308, 1e-308, 0.1, 1.0 / 3, 12120412.168528454, 53999.99999999999, 1 << 53, 1<<53 + 2,
	-0.0050000000000000044, 123e-20, math.NaN(), math.Inf(1), math.Inf(-1)}

// idJSONFuzzStrings are strings with HTML characters, U+2028 and U+2029,
// control characters (a backspace and a form feed: FuzzIDJSON found sonic
// writing \u000c where encoding/json writes \f), invalid UTF-8 and other
// unicode.
var idJSONFuzzStrings = []string{"", "int-b1", "<a href=\"x\">&amp;</a>", "line\u2028sep\u2029para",
	"ctl\x00\x01\x1f\t\n\r\\", "\b\f", "\\u000c", "bad \xff\xfe utf-8", "ünïcödé ✓ 𝄞", "\"quoted\" and /slash/"}

// idJSONCase sets the fuzzed numbers and strings into the load tool's request:
// a number in a pointer field, in omitempty fields, in fields always written,
// and as a map value beside the fuzzed key; the strings as a label, a balance
// id and a map key.
func idJSONCase(base schema.PlanRequest, x, y, z float64, key, label string) *schema.PlanRequest {
	req := base
	req.Flight.Altitude = &x
	req.Flight.DeltaISA = y
	req.Installation.ModelMass = z
	req.Installation.BalanceOffset.X = x
	req.Installation.CGOffset.Z = y
	req.Article.Aero.CmZero = z
	req.Alpha.Step = y
	req.Label = label
	req.Installation.BalanceID = key
	req.Objective = similarity.Objective{Weights: map[string]float64{key: x, "reynolds": z, "mach": y}}
	return &req
}

// requireIDJSONAgrees requires appendIDJSON to write json.Marshal's bytes for req, or
// to fail with its error.
func requireIDJSONAgrees(t *testing.T, req *schema.PlanRequest) {
	t.Helper()
	want, werr := json.Marshal(req)
	got, gerr := appendIDJSON(nil, req)
	if werr != nil {
		require.EqualError(t, gerr, werr.Error())
		return
	}
	require.NoError(t, gerr)
	require.Equal(t, string(want), string(got))
}

// TestIDJSONSeeds runs FuzzIDJSON's cases over every pair of its numbers and
// strings (the fuzz target draws from them only as seeds).
func TestIDJSONSeeds(t *testing.T) {
	t.Parallel()
	base := *loadToolRequest(t)
	for _, x := range idJSONFuzzFloats {
		for _, y := range idJSONFuzzFloats {
			for i, s := range idJSONFuzzStrings {
				z := idJSONFuzzFloats[(i+int(math.Float64bits(x)%7))%len(idJSONFuzzFloats)]
				requireIDJSONAgrees(t, idJSONCase(base, x, y, z, s, idJSONFuzzStrings[len(idJSONFuzzStrings)-1-i]))
			}
		}
	}
}

// FuzzIDJSON compares appendIDJSON with encoding/json on random numbers and strings
// set into the load tool's request (idJSONCase):
//
//	go test ./internal/app/ -run X -fuzz FuzzIDJSON -fuzztime 60s
func FuzzIDJSON(f *testing.F) {
	for i, x := range idJSONFuzzFloats {
		y := idJSONFuzzFloats[(i+7)%len(idJSONFuzzFloats)]
		z := idJSONFuzzFloats[(i+13)%len(idJSONFuzzFloats)]
		s := idJSONFuzzStrings[i%len(idJSONFuzzStrings)]
		f.Add(x, y, z, s, idJSONFuzzStrings[(i+3)%len(idJSONFuzzStrings)])
	}
	base := *loadToolRequest(f)
	f.Fuzz(func(t *testing.T, x, y, z float64, key, label string) {
		requireIDJSONAgrees(t, idJSONCase(base, x, y, z, key, label))
	})
}

// loadToolRequest decodes the load tool's plan request (the distinct plan's,
// api/testdata/load/plan-orrin-j16-tsw-1.json).
func loadToolRequest(tb testing.TB) *schema.PlanRequest {
	tb.Helper()
	body, err := os.ReadFile("../../api/testdata/load/plan-orrin-j16-tsw-1.json")
	require.NoError(tb, err)
	var req schema.PlanRequest
	require.NoError(tb, unitjson.Decode(body, &req))
	return &req
}

// BenchmarkPlanID times the plan id of the load tool's request: planID (the
// request by appendIDJSON) against planIDBefore (encoding/json's Encoder into the
// hash), and the two encodings alone.
func BenchmarkPlanID(b *testing.B) {
	req := loadToolRequest(b)
	var p Planner
	f, err := p.facility(context.Background(), req.Facility, req.FacilityID, nil)
	require.NoError(b, err)
	buf := make([]byte, 0, 2048)
	for _, c := range []struct {
		name string
		fn   func() error
	}{
		{"planID", func() error { _, err := planID("plan", req, f); return err }},
		{"before", func() error { _, err := planIDBefore("plan", req, f); return err }},
		{"appendIDJSON", func() error { _, err := appendIDJSON(buf[:0], req); return err }},
		{"json.Marshal", func() error { _, err := json.Marshal(req); return err }},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			cpu0 := processCPU()
			for b.Loop() {
				if err := c.fn(); err != nil {
					b.Fatal(err)
				}
			}
			// The process's CPU time per id, as BenchmarkPlanKinds reports it.
			b.ReportMetric(float64((processCPU()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/op")
		})
	}
}

// processCPU returns the CPU time, user and system, this process has used so
// far (0 where getrusage fails).
func processCPU() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
