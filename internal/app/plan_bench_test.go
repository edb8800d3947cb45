package app_test

import (
	"context"
	"fmt"
	"maps"
	"os"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// planKind is one demo facility kind of BenchmarkPlanKinds: the example request
// it is planned from, and the weights of its weighted objective.
type planKind struct {
	facility string
	file     string // the request, relative to the repository root
	weights  map[string]float64
	// marine: the request is a vessel in water (no altitude to vary).
	marine bool
}

// gasWeights and waterWeights are the weighted objectives of BenchmarkPlanKinds:
// the Reynolds and Mach numbers in a gas (as examples/orrin-j16-cn2-05.json), the
// Reynolds and Froude numbers in water (the Mach number is no target there), and
// the Reynolds and cavitation numbers for a vessel.
var (
	gasWeights    = map[string]float64{"reynolds": 1, "mach": 25}
	waterWeights  = map[string]float64{"reynolds": 1, "froude": 1}
	marineWeights = map[string]float64{"reynolds": 1, "cavitation": 4}
)

// planKinds are the demo facility kinds: atmospheric, pressurised and
// transonic air, cryogenic nitrogen, and the two water tunnels (an aircraft and a
// vessel in each).
var planKinds = []planKind{
	{facility: "lsw-2", file: "examples/pellin-p3-lsw-2.json", weights: gasWeights},
	{facility: "plp-3", file: "examples/velmar-t64-plp-3.json", weights: gasWeights},
	{facility: "tsw-1", file: "examples/orrin-j16-tsw-1.json", weights: gasWeights},
	{facility: "cn2-05", file: "docs/requests/j16-cn2-05-free.json", weights: gasWeights},
	{facility: "wtn-04", file: "examples/quill-u5-wtn-04.json", weights: waterWeights},
	{facility: "wtn-04-marine", file: "examples/tarn-a2-wtn-04.json", weights: marineWeights, marine: true},
	{facility: "cvt-07-marine", file: "examples/tarn-a2-cvt-07.json", weights: marineWeights, marine: true},
}

// readPlanRequest decodes the plan request in file (relative to the repository
// root) as the service does.
func readPlanRequest(tb testing.TB, file string) *schema.PlanRequest {
	tb.Helper()
	body, err := os.ReadFile("../../" + file)
	require.NoError(tb, err)
	var req schema.PlanRequest
	require.NoError(tb, unitjson.Decode(body, &req))
	return &req
}

// benchPlan plans req b.N times with p, failing on an error.
func benchPlan(b *testing.B, p *app.Planner, req *schema.PlanRequest) {
	b.Helper()
	benchPlanVaried(b, p, req, nil)
}

// benchPlanVaried is benchPlan with vary (when not nil) changing req before
// every plan.
func benchPlanVaried(b *testing.B, p *app.Planner, req *schema.PlanRequest, vary func(*schema.PlanRequest)) {
	b.Helper()
	ctx := context.Background()
	if _, err := p.Plan(ctx, req); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	cpu0 := app.ProcessCPU()
	for b.Loop() {
		if vary != nil {
			vary(req)
		}
		if _, err := p.Plan(ctx, req); err != nil {
			b.Fatal(err)
		}
	}
	// The process's CPU time per plan: on a shared machine the wall time
	// also counts the waits for a core, the CPU time does not.
	b.ReportMetric(float64((app.ProcessCPU()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/op")
}

// BenchmarkPlanKinds times the whole plan without HTTP (app.Planner.Plan: the
// request validated, the flight resolved, the plan with its binding gains and
// trade curve, loads, schedule and Reynolds effects) in every demo facility kind,
// with the priority objective of the example and a weighted one, at the
// example's flight condition (cruise) and at 45 km altitude (alt45km; the same
// Mach number or airspeed). A vessel has no altitude: its condition is marine.
// The targets (docs/performance.md, Planner): priority at most 100 µs in every
// kind; weighted at most 3× the priority plan of the same case; any altitude at
// most 2× the cruise case.
func BenchmarkPlanKinds(b *testing.B) {
	var p app.Planner
	for _, c := range planKindCases(b) {
		b.Run(c.name, func(b *testing.B) { benchPlan(b, &p, c.req) })
	}
}

// BenchmarkPlanColdLimit is BenchmarkPlanKinds with every plan's model mass
// 1e-13 of the example's heavier than the last plan's, so that no plan finds
// its load limit in the planner's cache (loadLimits) and each builds its own:
// the cost of a plan whose article, test matrix, installation or facility was
// not planned lately. BenchmarkPlanKinds repeats one request, and so finds the
// limit every time after its first plan, as the plans of a campaign over
// flight conditions do. (The mass moves the loads by about 1e-9 of themselves
// over 10 000 plans, and the search and the pruned tables do the same work; a
// moved balance offset would not: at tsw-1's zero offset, the moment rows of
// most points are pruned.)
func BenchmarkPlanColdLimit(b *testing.B) {
	var p app.Planner
	for _, c := range planKindCases(b) {
		b.Run(c.name, func(b *testing.B) {
			m0, i := c.req.Installation.ModelMass, 0
			benchPlanVaried(b, &p, c.req, func(req *schema.PlanRequest) {
				i++
				req.Installation.ModelMass = m0 * (1 + float64(i)*1e-13)
			})
		})
	}
}

// planKindCase is one plan of BenchmarkPlanKinds: its name (facility,
// objective, condition) and its request.
type planKindCase struct {
	name string
	req  *schema.PlanRequest
}

// planKindCases returns the plans of BenchmarkPlanKinds: every demo facility
// kind with its example's priority objective and with weights, at the example's
// flight condition (cruise) and at 45 km altitude (alt45km; the same Mach number
// or airspeed); a vessel has no altitude, its one condition is marine.
func planKindCases(tb testing.TB) []planKindCase {
	tb.Helper()
	var cases []planKindCase
	for _, k := range planKinds {
		conds := []string{"cruise", "alt45km"}
		if k.marine {
			conds = []string{"marine"}
		}
		for _, obj := range []string{"priority", "weighted"} {
			for _, cond := range conds {
				req := readPlanRequest(tb, k.file)
				if obj == "weighted" {
					req.Objective = schemaObjective(k.weights)
				}
				if cond == "alt45km" {
					alt := 45000.0
					req.Flight.Altitude, req.Flight.PressureAltitude = &alt, nil
				}
				cases = append(cases, planKindCase{k.facility + "/" + obj + "/" + cond, req})
			}
		}
	}
	return cases
}

// schemaObjective returns the weighted objective of a copy of w.
func schemaObjective(w map[string]float64) similarity.Objective {
	return similarity.Objective{Weights: maps.Clone(w)}
}

// BenchmarkPlanSweep times the whole plan of the Orrin J16 in tsw-1
// (examples/orrin-j16-tsw-1.json, balance int-b1) over α sweeps of 1, 21, 101
// and 1001 points (alpha/N), and with 21 points on a balance of 1 to 16 gauge
// rows (rows/N; balanceRows).
func BenchmarkPlanSweep(b *testing.B) {
	var p app.Planner
	for _, n := range []int{1, 21, 101, 1001} {
		b.Run(fmt.Sprintf("alpha/%d", n), func(b *testing.B) {
			req := readPlanRequest(b, "examples/orrin-j16-tsw-1.json")
			req.Alpha = alphaPoints(n)
			benchPlan(b, &p, req)
		})
	}
	f, ok := facilities.DemoFacility("tsw-1")
	require.True(b, ok)
	for _, n := range []int{1, 2, 4, 6, 8, 12, 16} {
		b.Run(fmt.Sprintf("rows/%d", n), func(b *testing.B) {
			fc := f
			fc.Balances = []facilities.Balance{balanceRows(f.Balances[0], n)}
			fc.Version = 1
			cp := app.NewPlanner(oneFacility{f: fc}, time.Hour)
			req := readPlanRequest(b, "examples/orrin-j16-tsw-1.json")
			req.Alpha = alphaPoints(21)
			req.Installation.BalanceID = fc.Balances[0].ID
			benchPlan(b, cp, req)
		})
	}
}

// alphaPoints returns an α sweep of n points from −4° to 12° (n = 1: 4° alone).
func alphaPoints(n int) similarity.Sweep {
	if n == 1 {
		return similarity.Sweep{From: 4, To: 4, Step: 1}
	}
	return similarity.Sweep{From: -4, To: 12, Step: 16 / float64(n-1)}
}

// gaugePairs are the force and moment components of the gauge rows past the
// six that each read one component: a force gauge pair reads half the force
// and the moment over its 0.1 m spacing, with either sign.
var gaugePairs = [...][2]int{
	{loads.IndexNormal, loads.IndexPitchingMoment},
	{loads.IndexSide, loads.IndexYawingMoment},
	{loads.IndexNormal, loads.IndexRollingMoment},
	{loads.IndexSide, loads.IndexRollingMoment},
	{loads.IndexAxial, loads.IndexPitchingMoment},
}

// balanceRows returns base with its ratings as n gauge rows (1 to 16): rows 1
// to 6 read one component each at its rating, in the order normal, axial, side,
// rolling, pitching, yawing moment; rows 7 to 16 read a force and a moment
// (gaugePairs, + then −), rated at half the force's rating plus the moment's
// over 0.1 m.
func balanceRows(base facilities.Balance, n int) facilities.Balance {
	rated := [6]float64{}
	for i, l := range [6]*float64{base.Limits.Normal, base.Limits.Axial, base.Limits.Side,
		base.Limits.RollingMoment, base.Limits.PitchingMoment, base.Limits.YawingMoment} {
		rated[i] = *l
	}
	b := facilities.Balance{ID: fmt.Sprintf("gauges-%d", n), SafetyFactor: base.SafetyFactor, Accuracy: base.Accuracy}
	for i := range n {
		row := facilities.CombinedLimit{Name: fmt.Sprintf("gauge %d", i+1)}
		if i < 6 {
			row.Coefficients = map[string]float64{loads.ComponentName(i): 1}
			row.Limit = rated[i]
		} else {
			pr, sign := gaugePairs[(i-6)/2], 1.0
			if i%2 == 1 {
				sign = -1
			}
			f, m := pr[0], pr[1]
			row.Coefficients = map[string]float64{loads.ComponentName(f): 0.5, loads.ComponentName(m): sign / 0.1}
			row.Limit = 0.5*rated[f] + rated[m]/0.1
		}
		b.Combined = append(b.Combined, row)
	}
	return b
}

// oneFacility is a catalog of one facility version, for BenchmarkPlanSweep's
// balances; only the reads a plan makes are implemented.
type oneFacility struct {
	facilities.Catalog
	f facilities.Facility
}

func (c oneFacility) Facility(_ context.Context, id string) (facilities.Facility, error) {
	if id != c.f.ID {
		return facilities.Facility{}, &check.Error{Code: check.CodeNotFound, Message: "no facility " + id}
	}
	return c.f, nil
}

func (c oneFacility) CurrentVersion(ctx context.Context, id string) (int, error) {
	f, err := c.Facility(ctx, id)
	return f.Version, err
}
