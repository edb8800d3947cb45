package app

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"

	"github.com/bytedance/sonic"
	sonicenc "github.com/bytedance/sonic/encoder"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// Planner is the composition behind the planning endpoints and the command line:
// it validates a request, resolves the facility, runs the physics packages and
// assembles the answer. The zero value plans against the embedded demo catalog.
// It is safe for concurrent use.
type Planner struct {
	// Catalog resolves facility_id; nil: the demo facilities (facilities.Demo).
	Catalog facilities.Catalog

	// memo, when set (by Batch), keeps each catalog facility read once.
	memo *facilityMemo
	// cache, when set (by the Server), keeps decoded facility versions between
	// requests; stored, the bodies of plans stored already (plancache.go).
	cache  *facilityCache
	stored *storedPlans
}

// Batch returns a planner over the same catalog that reads each catalog facility
// once, the first time a request names it, and answers every later request from
// that copy: every plan of a batch then uses one version of each facility, and a
// batch of 1000 plans in one facility reads the store once, not 1000 times.
func (p *Planner) Batch() *Planner {
	return &Planner{Catalog: p.Catalog, memo: &facilityMemo{m: map[string]*memoEntry{}}, cache: p.cache, stored: p.stored}
}

// facilityMemo holds the catalog facilities a batch has read, by id.
type facilityMemo struct {
	mu sync.Mutex
	m  map[string]*memoEntry
}

// memoEntry is one id's lookup, done once.
type memoEntry struct {
	once sync.Once
	f    facilities.Facility
	err  error
}

// get returns the catalog's facility id, reading it once per memo (through the
// service's facility cache fc when there is one).
func (fm *facilityMemo) get(ctx context.Context, c facilities.Catalog, fc *facilityCache, id string) (facilities.Facility, error) {
	fm.mu.Lock()
	e, ok := fm.m[id]
	if !ok {
		e = &memoEntry{}
		fm.m[id] = e
	}
	fm.mu.Unlock()
	e.once.Do(func() { e.f, e.err = fc.get(ctx, c, id) })
	return e.f, e.err
}

// collapseWarnings keeps each distinct warning once, where it first appears,
// saying how often it was given when more than once.
func collapseWarnings(ws []string) []string {
	if len(ws) < 2 {
		return ws
	}
	count := make(map[string]int, len(ws))
	for _, w := range ws {
		count[w]++
	}
	if len(count) == len(ws) {
		return ws
	}
	out := make([]string, 0, len(count))
	for _, w := range ws {
		switch n := count[w]; {
		case n == 0:
			continue
		case n > 1:
			out = append(out, fmt.Sprintf("%s (given %d times)", w, n))
		default:
			out = append(out, w)
		}
		count[w] = 0
	}
	return out
}

// facility resolves a request's facility: the inline one (validated, its errors
// under "facility."), or the one facility_id names in the catalog (the demo
// catalog when none is configured). Problems with the choice itself are added to
// fe; a facility_id that names nothing is a CodeNotFound error, returned only when
// fe is otherwise empty so that a 400 lists every bad field first.
func (p *Planner) facility(ctx context.Context, inline *facilities.Facility, id string, fe *check.Fields) (*facilities.Facility, error) {
	switch {
	case inline != nil && id != "":
		fe.Add("facility_id", "give facility or facility_id, not both")
		return nil, nil
	case inline == nil && id == "":
		fe.Add("facility_id", "give facility_id (a catalog id such as \"tsw-1\") or an inline facility")
		return nil, nil
	case inline != nil:
		f := *inline
		f.Version = 0
		if err := f.Validate(); err != nil {
			if !fe.Merge("facility", err) {
				return nil, err
			}
			return nil, nil
		}
		return &f, nil
	}
	if p.Catalog == nil {
		f, ok := demoFacilities()[id]
		if !ok {
			return nil, &check.Error{Code: check.CodeNotFound, Message: fmt.Sprintf("facility %q not found", id)}
		}
		return &f, nil
	}
	var f facilities.Facility
	var err error
	if p.memo != nil {
		f, err = p.memo.get(ctx, p.Catalog, p.cache, id)
	} else {
		f, err = p.cache.get(ctx, p.Catalog, id)
	}
	if err != nil {
		return nil, err
	}
	return &f, nil
}

// demoFacilities returns the embedded demo facilities by id, decoded once
// (facilities.Demo decodes its JSON on every call, a third of a plan's time). The
// map and the facilities in it are never changed: callers get copies of the
// structs and only read what their pointers and slices share.
var demoFacilities = sync.OnceValue(func() map[string]facilities.Facility {
	m := map[string]facilities.Facility{}
	for _, f := range facilities.Demo() {
		m[f.ID] = f
	}
	return m
})

// planID returns the id of a plan: the first 20 hex digits of the SHA-256 of the
// canonical JSON of the decoded request, the facility's id and its catalog version.
// The same request against the same facility version gets the same id; a changed
// facility gets a new one. The canonical JSON is encoding/json's bytes
// (appendIDJSON), followed by the newline its Encoder writes; the text hashed is
// unchanged, so stored plans keep their ids (the golden answers carry them).
func planID(kind string, req any, f *facilities.Facility) (string, error) {
	buf := idScratch.Get().(*[]byte)
	defer idScratch.Put(buf)
	h := sha256.New()
	io.WriteString(h, "scalematch/v1 ")
	io.WriteString(h, kind)
	h.Write([]byte{'\n'})
	rb, err := appendIDJSON((*buf)[:0], req)
	if err != nil {
		return "", err
	}
	rb = append(rb, '\n')
	h.Write(rb)
	io.WriteString(h, f.ID)
	h.Write(strconv.AppendInt([]byte{'@'}, int64(f.Version), 10))
	h.Write([]byte{'\n'})
	if f.Version == 0 {
		// An inline facility: its content is part of the request already.
		if rb, err = appendIDJSON(rb[:0], f); err != nil {
			return "", err
		}
		h.Write(rb)
	}
	*buf = rb[:0]
	var sum [sha256.Size]byte
	return hex.EncodeToString(h.Sum(sum[:0])[:10]), nil
}

// idScratch holds planID's buffers for the encoded request (*[]byte; 1 kB
// holds the load tool's request, 0.7 kB).
var idScratch = sync.Pool{New: func() any { b := make([]byte, 0, 1024); return &b }}

// idOptions are sonic's options of appendIDJSON: ConfigStd's (encoding/json's
// map key order, compacted Marshaler output, invalid UTF-8 replaced by
// U+FFFD) without its HTML escape, which escapes into a new buffer; a value
// whose bytes need that escape is encoded by encoding/json instead.
const idOptions = sonicenc.SortMapKeys | sonicenc.CompactMarshaler | sonicenc.ValidateString

// appendIDJSON appends v to dst as encoding/json's Marshal writes it, byte for
// byte, for the plan id: encoded by sonic (github.com/bytedance/sonic, its
// encoder with idOptions, into planID's pooled buffer), in about half the CPU
// of encoding/json's reflection for a plan request and without its copy
// (BenchmarkPlanID). Where sonic's bytes may differ from encoding/json's (a
// character encoding/json escapes for HTML, <, >, &, U+2028 or U+2029; a
// negative zero, which sonic writes in an omitempty field where encoding/json
// omits it; a backspace or form feed: sonicMayDiffer), and for a value sonic
// refuses (a NaN or an infinity), v is encoded by encoding/json itself, so
// that such a request keeps its id and gets encoding/json's error.
// TestIDJSONAgrees, TestIDJSONSeeds and FuzzIDJSON hold the two encodings
// equal.
func appendIDJSON(dst []byte, v any) ([]byte, error) {
	b := dst
	err := sonicenc.EncodeInto(&b, v, idOptions)
	if err == nil && !sonicMayDiffer(b[len(dst):]) && !needsHTMLEscape(b[len(dst):]) {
		return b, nil
	}
	jb, err := json.Marshal(v)
	if err != nil {
		return dst, err
	}
	return append(dst, jb...), nil
}

// needsHTMLEscape reports whether JSON text b holds a character encoding/json
// escapes for HTML (<, >, &, U+2028, U+2029).
func needsHTMLEscape(b []byte) bool {
	return bytes.IndexByte(b, '<') >= 0 || bytes.IndexByte(b, '>') >= 0 || bytes.IndexByte(b, '&') >= 0 ||
		bytes.Contains(b, lineSep) || bytes.Contains(b, paraSep)
}

var lineSep, paraSep = []byte("\u2028"), []byte("\u2029")

// isFinite reports whether v is neither NaN nor infinite.
func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// checkArticle adds the problems of the article's geometry and estimate to fe.
func checkArticle(a *similarity.Article, fe *check.Fields) {
	*fe = append(*fe, a.FieldErrors()...)
}

// checkInstallation adds the problems of an installation in facility f (nil when
// unresolved) to fe.
func checkInstallation(in *loads.Installation, f *facilities.Facility, fe *check.Fields) {
	*fe = append(*fe, in.FieldErrors()...)
	if f == nil || in.BalanceID == "" {
		return
	}
	ids := make([]string, len(f.Balances))
	for i, b := range f.Balances {
		if b.ID == in.BalanceID {
			return
		}
		ids[i] = b.ID
	}
	if len(ids) == 0 {
		fe.Add("installation.balance_id", "facility %s has no balances", f.ID)
		return
	}
	fe.Add("installation.balance_id", "facility %s has no balance %q; it has: %s", f.ID, in.BalanceID, strings.Join(ids, ", "))
}

// checkResolution adds the problems of a required resolution (nil: none asked)
// to fe.
func checkResolution(r *loads.Resolution, fe *check.Fields) {
	if r != nil {
		*fe = append(*fe, r.FieldErrors("required_resolution")...)
	}
}

// Plan validates a plan request, plans it and assembles the answer. Bad input is a
// *check.Error with CodeInvalid naming every bad field; an unknown facility
// CodeNotFound; a problem no plan can satisfy CodeUnprocessable naming the limits.
// The answer's ID is set; nothing is stored.
func (p *Planner) Plan(ctx context.Context, req *schema.PlanRequest) (*schema.PlanResponse, error) {
	pr, err := p.prepare(ctx, req)
	if err != nil {
		return nil, err
	}
	defer pr.release()
	return pr.plan()
}

// preparedPlan is a plan request that passed validation, with its facility, flight
// state and test matrix resolved and its id computed: everything up to the
// optimisation.
type preparedPlan struct {
	req    *schema.PlanRequest
	f      *facilities.Facility
	flight similarity.FlightState
	mx     similarity.Matrix
	id     string
	// encoded: the answer is encoded as JSON next, which refuses a non-finite
	// number, so plan leaves CheckFinite to the encoding's failure (planJSON)
	// instead of walking every number of every answer.
	encoded bool
	// points is the pooled buffer of mx.Points (matrixScratch), which release
	// returns: the answer copies what it shows of the points.
	points *[]facilities.Point
}

// matrixScratch holds the buffers of prepared plans' test points
// (*[]facilities.Point, no pointers in them).
var matrixScratch = sync.Pool{New: func() any { return new([]facilities.Point) }}

// release returns the test points' buffer once the plan is made; the prepared
// plan is not used after.
func (pp *preparedPlan) release() {
	if pp.points != nil {
		*pp.points = pp.mx.Points[:0]
		matrixScratch.Put(pp.points)
		pp.points, pp.mx.Points = nil, nil
	}
}

// prepare validates req, resolves its facility, flight and test matrix and
// computes the plan's id; errors are those of Plan.
func (p *Planner) prepare(ctx context.Context, req *schema.PlanRequest) (*preparedPlan, error) {
	var fe check.Fields
	f, err := p.facility(ctx, req.Facility, req.FacilityID, &fe)
	if err := notFoundOrFail(err, &fe, "facility_id"); err != nil {
		return nil, err
	}
	if err := validateFullScale(&req.Flight, req.Marine, true); err != nil && !fe.Merge("", err) {
		return nil, err
	}
	checkArticle(&req.Article, &fe)
	if err := req.Model.Validate(); err != nil && !fe.Merge("", err) {
		return nil, err
	}
	if err := req.Objective.Validate(); err != nil && !fe.Merge("", err) {
		return nil, err
	}
	checkInstallation(&req.Installation, f, &fe)
	CheckLabel(req.Label, "label", &fe)
	checkResolution(req.RequiredResolution, &fe)
	if v := req.CondensationPeakMach; v != nil {
		if msg := facilities.BoundCondensationPeakMach.Problem(*v); msg != "" {
			fe.Add("condensation_peak_mach", "%s", msg)
		}
	}
	points := matrixScratch.Get().(*[]facilities.Point)
	mx, err := req.Article.Aero.MatrixIn(*points, req.Alpha, req.Beta)
	if err != nil && !fe.Merge("", err) {
		return nil, err
	}
	if err := fe.Err(); err != nil {
		return nil, err
	}
	flight, err := resolveFullScale(&req.Flight, req.Marine, req.Article.ReferenceLength)
	if err != nil {
		return nil, err
	}
	id, err := planID("plan", req, f)
	if err != nil {
		return nil, err
	}
	if v := req.CondensationPeakMach; v != nil {
		// The request's local peak Mach number replaces the facility's for this
		// plan: the planner, the violations and the warnings all read it there.
		fc := *f
		fc.CondensationPeakMach = v
		f = &fc
	}
	return &preparedPlan{req: req, f: f, flight: flight, mx: mx, id: id, points: points}, nil
}

// plan runs the planner on a prepared request and assembles the answer.
func (pp *preparedPlan) plan() (*schema.PlanResponse, error) {
	req, f, flight, mx := pp.req, pp.f, pp.flight, pp.mx
	var err error
	prob := &similarity.Problem{Flight: flight, Article: &req.Article, Facility: f, Model: req.Model, Objective: req.Objective,
		MatrixDrag: mx.DragRange(), CavitationAllowed: req.CavitationAllowed}
	// base is the load limit without the required resolution, for the plan
	// made without it below.
	var base *loads.Limit
	if len(f.Balances) > 0 {
		var ll *loads.Limit
		base, ll, err = loadLimits.Limits(&req.Article, f, req.Installation.WithBuoyancy(f), mx, req.RequiredResolution)
		if err != nil {
			return nil, err
		}
		prob.LoadLimit = ll
		if !req.RequiredResolution.Empty() {
			prob.LoadFloor = ll
		}
	}
	res, err := similarity.Plan(prob, nil)
	// unresolved: no balance can both carry the loads and resolve the required
	// resolution at any setting; the plan is then made without the resolution
	// and says so (loads.ResolutionNoBalance).
	unresolved := false
	if err != nil && prob.LoadFloor != nil && check.ErrorCode(err) == check.CodeUnprocessable {
		prob.LoadLimit, prob.LoadFloor = base, nil
		res, err = similarity.Plan(prob, nil)
		unresolved = true
	}
	if err != nil {
		return nil, err
	}
	out := &schema.PlanResponse{
		FacilityID:      f.ID,
		FacilityVersion: f.Version,
		Flight:          res.Flight,
		Model:           res.Model,
		Test:            res.Test,
		Mismatch:        res.Mismatch,
		Binding:         res.Binding,
		TradeCurve:      res.Trade,
		Warnings:        append([]string{}, res.Warnings...),
		Cautions:        append([]string{}, res.Cautions...),
	}
	if out.Binding == nil {
		out.Binding = []similarity.Binding{}
	}
	if out.TradeCurve == nil {
		out.TradeCurve = []similarity.TradePoint{}
	}
	out.Warnings = appendUnique(out.Warnings, mx.Warnings...)
	out.Warnings = appendUnique(out.Warnings, f.Warnings(res.Test.State)...)
	lr, err := loads.Check(&loads.Case{Facility: f, Article: &req.Article, Installation: req.Installation, Matrix: mx,
		Scale: res.Model.Scale, State: res.Test.State, Resolution: req.RequiredResolution})
	if err != nil {
		return nil, err
	}
	if unresolved {
		lr.ResolutionState = loads.ResolutionNoBalance
	}
	out.Corrections, out.Verdict, out.FitBroken = lr.Corrections, lr.Verdict, lr.FitBroken
	out.LoadFraction, out.ResolutionState = req.Installation.Fraction(), lr.ResolutionState
	if w := lr.ResolutionWarning(); w != "" {
		out.Warnings = append(out.Warnings, w)
	}
	if out.FitBroken == nil {
		out.FitBroken = []facilities.Violation{}
	}
	out.Warnings = append(out.Warnings, lr.Warnings...)
	if len(lr.Reports) > 0 {
		out.Loads = &lr.Reports[0]
		if lr.Reason != "" {
			out.Warnings = append(out.Warnings, lr.Reason)
		}
		out.Warnings = append(out.Warnings, out.Loads.Warnings...)
	}
	if len(f.Balances) == 0 {
		out.Warnings = append(out.Warnings, fmt.Sprintf("facility %s lists no balance: no load check", f.ID))
	}
	sch, err := facilities.ScheduleTest(f, facilities.Test{AlphaPoints: mx.AlphaPoints, BetaValues: mx.BetaValues,
		Conditions: []facilities.Condition{{StagnationPressure: res.Test.StagnationPressure, StagnationTemperature: res.Test.StagnationTemperature}}})
	switch {
	case err == nil:
		out.Schedule = &sch
	case errors.Is(err, facilities.ErrNoOperations):
		out.Warnings = append(out.Warnings, "the facility gives no operations figures: no schedule")
	default:
		return nil, err
	}
	if out.Loads != nil {
		// The plan's cautions are facilities.Cautions(f) already: only the load
		// report's caution can be new, so the facility's are not written again.
		out.Cautions = appendUnique(out.Cautions, loads.Cautions(nil, *out.Loads)...)
		if f.Medium.IsLiquid() {
			out.Cautions = appendUnique(out.Cautions, facilities.CautionWaterLoads)
		}
	}
	if b := modelBuoyancy(f, &req.Article, req.Installation, res.Model.Scale); b != nil {
		out.Buoyancy = b
		out.Warnings = append(out.Warnings, b.Note())
	}
	out.Cautions = appendUnique(out.Cautions, lr.Cautions()...)
	medium := f.Medium.Kind
	re, err := similarity.ReynoldsEffect(&req.Article, res.Flight.Reynolds, res.Flight.Mach, res.Test.Reynolds, res.Test.Mach, medium)
	if err != nil {
		return nil, err
	}
	if re.TripsRecommended {
		t := similarity.SizeTrip(res.Test.Reynolds, res.Model.ReferenceLength, re.NaturalTransitionFraction)
		re.Trip = &t
	}
	out.ReynoldsEffects = &re
	out.ID, out.Label = pp.id, req.Label
	out.Warnings = collapseWarnings(out.Warnings)
	if pp.encoded {
		return out, nil
	}
	if err := CheckFinite(out, planInputs); err != nil {
		return nil, err
	}
	return out, nil
}

// loadLimits keeps the load limits of the last plans (loads.LimitCache): the
// plans of a campaign, or the load tool's, differ in their flight condition
// alone, which the limit does not read, and build it once. 32 entries of a
// plan's usual size (17 points, two balances) hold about 150 kB.
var loadLimits = loads.NewLimitCache(32)

// planInputs names the request field that feeds each top-level field of a plan
// answer, for CheckFinite.
func planInputs(top string) string {
	switch top {
	case "flight", "mismatch":
		return "flight"
	case "model", "reynolds_effects":
		return "article"
	case "loads":
		return "installation"
	case "schedule":
		return "facility.operations"
	case "corrections":
		return "facility.test_section"
	}
	return "facility"
}

// appendCautions adds the cautions of facility f and its load reports
// (loads.Cautions), once each.
func appendCautions(c []string, f *facilities.Facility, reports ...loads.Report) []string {
	return appendUnique(c, loads.Cautions(f, reports...)...)
}

// appendUnique appends the notes of add that list does not hold yet, in order.
func appendUnique(list []string, add ...string) []string {
	for _, s := range add {
		if !slices.Contains(list, s) {
			list = append(list, s)
		}
	}
	return list
}

// PlanJSON plans req and returns the answer's JSON exactly as POST /v1/plans sends
// it. With a catalog the plan is stored under its id; when that id is stored
// already, the stored bytes are returned, so a repeated request is answered byte
// for byte as the first time.
func (p *Planner) PlanJSON(ctx context.Context, req *schema.PlanRequest) ([]byte, error) {
	pj, err := p.planJSON(ctx, req)
	if err != nil || pj.stored {
		return pj.body, err
	}
	return p.save(ctx, pj)
}

// plannedJSON is a plan's answer as JSON, with what its record needs.
type plannedJSON struct {
	id, facilityID, label string
	facilityVersion       int
	body                  []byte
	// stored: nothing is left to save; body is the stored record's, or the
	// planner has no catalog.
	stored bool
}

// planJSON validates req and computes its id; when the service holds that plan as
// stored it answers with the stored bytes, else it plans and encodes the answer,
// which is stored when the planner has a catalog (save).
func (p *Planner) planJSON(ctx context.Context, req *schema.PlanRequest) (plannedJSON, error) {
	pr, err := p.prepare(ctx, req)
	if err != nil {
		return plannedJSON{}, err
	}
	defer pr.release()
	pj := plannedJSON{id: pr.id, facilityID: pr.f.ID, facilityVersion: pr.f.Version, label: req.Label}
	if pj.body, pj.stored = p.stored.get(pr.id); pj.stored {
		return pj, nil
	}
	pr.encoded = true
	resp, err := pr.plan()
	if err != nil {
		return plannedJSON{}, err
	}
	if pj.body, err = encodePlan(resp); err != nil {
		return plannedJSON{}, err
	}
	if len(pj.body) > MaxPlanBytes {
		return plannedJSON{}, &check.Error{Code: check.CodeUnprocessable, Limits: []string{"plan_size"},
			Message: fmt.Sprintf("the plan's answer is %d bytes, more than the %d a stored plan may have: plan fewer α or β points", len(pj.body), MaxPlanBytes)}
	}
	pj.stored = p.Catalog == nil
	return pj, nil
}

// encodePlan encodes a plan answer as encoding/json does, byte for byte, with
// sonic's encoding/json-compatible configuration (github.com/bytedance/sonic,
// ConfigStd; on platforms sonic does not compile for, that is encoding/json
// itself). BenchmarkEncodePlan measures it against encoding/json and
// goccy/go-json (docs/performance.md). Two differences are known and caught: a
// negative zero in an omitempty field, which encoding/json omits as zero and
// sonic writes, and a backspace or form feed in a string (sonicMayDiffer); an
// answer holding either anywhere is encoded again by encoding/json
// (TestSonicFloatsAgree). A non-finite number, which the encoding
// refuses, is answered as CheckFinite answers it: naming the number and the
// input behind it.
func encodePlan(resp *schema.PlanResponse) ([]byte, error) {
	b, err := sonic.ConfigStd.Marshal(resp)
	if err == nil && sonicMayDiffer(b) {
		b, err = json.Marshal(resp)
	}
	if err != nil {
		if ferr := CheckFinite(resp, planInputs); ferr != nil {
			return nil, ferr
		}
	}
	return b, err
}

// sonicMayDiffer reports whether sonic's encoding b may differ from
// encoding/json's: where it holds the number -0 (hasNegativeZero), or a
// backspace or form feed, which sonic writes as \u0008 and \u000c and
// encoding/json (since Go 1.22) as \b and \f (or, rarely, the same six
// characters after an escaped backslash, which costs only a second encoding).
func sonicMayDiffer(b []byte) bool {
	return hasNegativeZero(b) || bytes.Contains(b, escBackspace) || bytes.Contains(b, escFormFeed)
}

var escBackspace, escFormFeed = []byte(`\u0008`), []byte(`\u000c`)

// hasNegativeZero reports whether the JSON b holds the number -0 (or, rarely,
// the same three characters inside a string, which costs only a second
// encoding).
func hasNegativeZero(b []byte) bool {
	for {
		i := bytes.Index(b, negativeZero)
		if i < 0 {
			return false
		}
		b = b[i+len(negativeZero):]
		if len(b) == 0 || b[0] == ',' || b[0] == '}' || b[0] == ']' {
			return true
		}
	}
}

var negativeZero = []byte("-0")

// MaxPlanBytes is the largest plan answer the service stores and sends, in bytes
// (4 MiB; a 2001-point sweep on two balances is about 1.5 MiB).
const MaxPlanBytes = 4 << 20

// save stores a planned answer and returns the stored bytes: the first record of
// its id, which is the answer itself unless an equal request was stored before.
func (p *Planner) save(ctx context.Context, pj plannedJSON) ([]byte, error) {
	rec, err := p.Catalog.SavePlan(ctx, facilities.PlanRecord{ID: pj.id, FacilityID: pj.facilityID, FacilityVersion: pj.facilityVersion, Label: pj.label, Body: pj.body})
	if err != nil {
		return nil, err
	}
	body := pj.body
	if len(rec.Body) > 0 {
		body = rec.Body
	}
	p.stored.put(pj.id, body)
	return body, nil
}

// validateFullScale checks that a request gives exactly one full-scale condition, a
// flight or a marine condition (required says one must be given: without marine,
// the flight is then validated even when empty, naming its missing altitude and
// speed), and validates it. Errors name the field: "marine" when both are given, or
// the bad field inside one ("flight.altitude", "marine.temperature").
func validateFullScale(fl *similarity.Flight, m *similarity.Marine, required bool) error {
	given := fl != nil && *fl != (similarity.Flight{})
	switch {
	case given && m != nil:
		return check.Invalid("invalid full-scale condition", []check.FieldError{{Field: "marine",
			Message: "give flight (an aircraft in the atmosphere) or marine (a vessel in water), not both"}})
	case m != nil:
		return m.Validate()
	case given || required && fl != nil:
		// An absent flight names its missing altitude and speed, as it always has.
		return fl.Validate()
	}
	return nil
}

// resolveFullScale resolves the request's flight or marine condition on the
// full-scale reference length l in m (validateFullScale has passed).
func resolveFullScale(fl *similarity.Flight, m *similarity.Marine, l float64) (similarity.FlightState, error) {
	if m != nil {
		return m.Resolve(l)
	}
	return fl.Resolve(l)
}

// modelBuoyancy returns the weight, buoyancy and net weight of the model of the
// given scale in water facility f (loads.BuoyancyOf), with the model's frontal
// area and overall length (the reference length when the article gives none) for
// the volume estimate; nil in a gas facility.
func modelBuoyancy(f *facilities.Facility, a *similarity.Article, in loads.Installation, scale float64) *loads.Buoyancy {
	length := a.Length
	if length == 0 {
		length = a.ReferenceLength
	}
	return loads.BuoyancyOf(f, in, a.FrontalArea*scale*scale, length*scale)
}

// MaxLabel is the longest label a request may give, in bytes.
const MaxLabel = 200

// CheckLabel adds to fe the problem of a caller's label at field: longer than
// MaxLabel bytes, not UTF-8, or holding control characters.
func CheckLabel(label, field string, fe *check.Fields) {
	switch {
	case len(label) > MaxLabel:
		fe.Add(field, "%d bytes: at most %d", len(label), MaxLabel)
	case !utf8.ValidString(label):
		fe.Add(field, "not UTF-8 text")
	case strings.ContainsFunc(label, unicode.IsControl):
		fe.Add(field, "holds a control character: give a plain one-line name")
	}
}
