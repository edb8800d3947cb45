package api_test

import (
	"context"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strconv"
	"strings"
	"testing"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
	"scalematch/internal/app"
	"scalematch/internal/testfixture"
	"scalematch/internal/unitjson"
)

// benchHandler returns the full handler stack of a service over the demo catalog,
// logging nowhere.
func benchHandler(b *testing.B) http.Handler {
	b.Helper()
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		b.Fatal(err)
	}
	return s.Unvalidated()
}

// benchPost posts body to path through h b.N times and checks every answer is 200.
func benchPost(b *testing.B, h http.Handler, path, body string) {
	b.Helper()
	b.ReportAllocs()
	b.SetBytes(int64(len(body)))
	b.ResetTimer()
	for range b.N {
		rec := httptest.NewRecorder()
		req := httptest.NewRequest(http.MethodPost, path, strings.NewReader(body))
		req.Header.Set("Content-Type", "application/json")
		h.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK {
			b.Fatalf("status %d: %s", rec.Code, rec.Body)
		}
	}
}

// BenchmarkPlanEndpoint is POST /v1/plans of the Orrin J16 in tsw-1, 21 α points,
// through the whole handler stack (request id, metrics, decoding, planning with
// the balance limit, loads, encoding).
func BenchmarkPlanEndpoint(b *testing.B) {
	benchPost(b, benchHandler(b), "/v1/plans", testfixture.J16Plan)
}

// batchBody returns a batch of n distinct plan requests: the Orrin J16 in tsw-1
// at n different flight Mach numbers from 0.60 to 0.89, at 12 000 m raised by
// lift mm, so that batches of different lifts share no plan.
func batchBody(n int, lift float64) string {
	var sb strings.Builder
	sb.WriteString(`{"requests": [`)
	flight := `"flight": {"altitude": "` + strconv.FormatFloat(12000+lift/1000, 'f', -1, 64) + ` m", "mach": `
	for i := range n {
		if i > 0 {
			sb.WriteByte(',')
		}
		mach := 0.60 + 0.29*float64(i)/float64(max(n-1, 1))
		sb.WriteString(strings.Replace(testfixture.J16Plan, `"flight": {"altitude": "12000 m", "mach": 0.78`, flight+strconvFloat(mach), 1))
	}
	sb.WriteString(`]}`)
	return sb.String()
}

func strconvFloat(v float64) string { return strconv.FormatFloat(v, 'f', 6, 64) }

// BenchmarkBatch1000 is POST /v1/plans/batch of 1000 distinct plan requests
// through the whole handler stack, without a store; the goal on a 2-core machine
// is under 0.5 s per batch.
func BenchmarkBatch1000(b *testing.B) {
	benchPost(b, benchHandler(b), "/v1/plans/batch", batchBody(1000, 0))
}

// BenchmarkBatch1000Store is BenchmarkBatch1000 against an SQLite catalog, as the
// service runs: each plan's facility is read from the store and each plan
// planned and stored durably. Every iteration sends 1000 plans that no earlier
// iteration sent (the flight altitude raised by 0.1 mm a batch), so none is
// answered from the store.
func BenchmarkBatch1000Store(b *testing.B) {
	h := storeHandler(b)
	bodies := make([]string, b.N)
	for i := range bodies {
		bodies[i] = batchBody(1000, 0.1*float64(i+1))
	}
	b.ReportAllocs()
	b.SetBytes(int64(len(bodies[0])))
	b.ResetTimer()
	for i := range b.N {
		rec := httptest.NewRecorder()
		req := httptest.NewRequest(http.MethodPost, "/v1/plans/batch", strings.NewReader(bodies[i]))
		req.Header.Set("Content-Type", "application/json")
		h.ServeHTTP(rec, req)
		if rec.Code != http.StatusOK {
			b.Fatalf("status %d: %s", rec.Code, rec.Body)
		}
		if n := strings.Count(rec.Body.String(), `{"plan":`); n != 1000 {
			b.Fatalf("%d plans in the answer, want 1000", n)
		}
	}
}

// storeHandler returns the full handler stack of a service over a fresh SQLite
// catalog seeded with the demo facilities, logging nowhere.
func storeHandler(b *testing.B) http.Handler {
	b.Helper()
	ctx := context.Background()
	db, err := sqlite.Open(ctx, sqlite.Path(b.TempDir()))
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { db.Close() })
	if _, err := facilities.SeedDemo(ctx, db, true); err != nil {
		b.Fatal(err)
	}
	s, err := api.New(api.Config{Catalog: db, Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		b.Fatal(err)
	}
	return s.Unvalidated()
}

// BenchmarkPlanEndpointStore is POST /v1/plans of the Orrin J16 in tsw-1 against an
// SQLite catalog, as the service runs: the first request plans and stores it, every
// later one is the same request and is answered with the stored bytes after its
// decoding, validation and id.
func BenchmarkPlanEndpointStore(b *testing.B) {
	benchPost(b, storeHandler(b), "/v1/plans", testfixture.J16Plan)
}

// BenchmarkPlannerPlan is the composition behind POST /v1/plans without HTTP,
// decoding or encoding: the Orrin J16 in tsw-1 with a 21-point α sweep on balance
// int-b1 of the demo catalog (validation, the load limit from the real balance,
// the planner, wall corrections, balance loads, schedule, Reynolds effects, id).
// Goal: under 300 µs a plan.
func BenchmarkPlannerPlan(b *testing.B) {
	var req schema.PlanRequest
	if err := unitjson.Decode([]byte(testfixture.J16Plan), &req); err != nil {
		b.Fatal(err)
	}
	var p app.Planner
	ctx := context.Background()
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		if _, err := p.Plan(ctx, &req); err != nil {
			b.Fatal(err)
		}
	}
}
