// Package pages serves the service's HTML pages: a printable plan report
// (/plans/{id}), a load-check form for facility staff (/check), a facility's
// record, history and envelope (/facilities/{id}) and a list of facilities (/).
// They are server-rendered with html/template from embedded templates and one
// stylesheet of the project's own, work without JavaScript, and call the same
// code as the JSON endpoints (Backend: the service's composition), so that nothing
// is computed twice: a page shows an answer, it does not make its own.
package pages

import (
	"bytes"
	"context"
	"embed"
	"encoding/base64"
	"fmt"
	"html/template"
	"io/fs"
	"log/slog"
	"math"
	"net/http"
	"net/url"
	"strconv"
	"strings"
	"time"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/charts"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

//go:embed templates/*.html static/pages.css
var files embed.FS

// Backend is what the pages need from the service: the calls behind the JSON
// endpoints. *api.Server implements it.
type Backend interface {
	// Loads is POST /v1/loads.
	Loads(ctx context.Context, req *schema.LoadsRequest) (*schema.LoadsResponse, error)
	// StoredPlan is GET /v1/plans/{id}, with the facility version the plan used
	// (nil for a facility given inline).
	StoredPlan(ctx context.Context, id string) (*schema.PlanResponse, *facilities.Facility, error)
	// Facilities, Facility and Versions are GET /v1/facilities,
	// /v1/facilities/{id} and /v1/facilities/{id}/versions.
	Facilities(ctx context.Context) ([]facilities.Facility, error)
	Facility(ctx context.Context, id string) (facilities.Facility, error)
	Versions(ctx context.Context, id string) ([]facilities.Change, error)
}

// Mounter registers a handler for a method and a path in the service's router
// (gin path syntax); *api.Server implements it.
type Mounter interface {
	Handle(method, path string, h http.Handler)
}

// Pages serves the HTML pages. Build it with New; it is safe for concurrent use.
type Pages struct {
	b     Backend
	log   *slog.Logger
	mux   *http.ServeMux
	pages map[string]*template.Template
	css   []byte
}

// New builds the pages over b; log receives the errors that are the service's
// fault (nil: slog.Default()).
func New(b Backend, log *slog.Logger) (*Pages, error) {
	if log == nil {
		log = slog.Default()
	}
	p := &Pages{b: b, log: log, mux: http.NewServeMux(), pages: map[string]*template.Template{}}
	for _, name := range []string{"index", "facility", "plan", "check", "error"} {
		t, err := template.New(name).Funcs(funcs()).ParseFS(files, "templates/base.html", "templates/loads.html", "templates/"+name+".html")
		if err != nil {
			return nil, fmt.Errorf("pages: template %s: %w", name, err)
		}
		p.pages[name] = t
	}
	css, err := fs.ReadFile(files, "static/pages.css")
	if err != nil {
		return nil, err
	}
	p.css = css
	p.mux.HandleFunc("GET /{$}", p.index)
	p.mux.HandleFunc("GET /plans/{id}", p.plan)
	p.mux.HandleFunc("GET /facilities/{id}", p.facility)
	p.mux.HandleFunc("GET /check", p.check)
	p.mux.HandleFunc("POST /check", p.check)
	p.mux.HandleFunc("GET /static/pages.css", p.stylesheet)
	return p, nil
}

// Register mounts the pages on m: /, /plans/{id}, /facilities/{id}, /check (GET
// and POST) and /static/pages.css.
func (p *Pages) Register(m Mounter) {
	m.Handle(http.MethodGet, "/", p)
	m.Handle(http.MethodGet, "/plans/:id", p)
	m.Handle(http.MethodGet, "/facilities/:id", p)
	m.Handle(http.MethodGet, "/check", p)
	m.Handle(http.MethodPost, "/check", p)
	m.Handle(http.MethodGet, "/static/pages.css", p)
}

// ServeHTTP serves the pages.
func (p *Pages) ServeHTTP(w http.ResponseWriter, r *http.Request) { p.mux.ServeHTTP(w, r) }

// funcs are the templates' formatting helpers; every figure's unit is written
// by the template beside it.
func funcs() template.FuncMap {
	return template.FuncMap{
		"num": func(v float64) string {
			if math.IsInf(v, 0) || math.IsNaN(v) {
				return strconv.FormatFloat(v, 'g', -1, 64)
			}
			return charts.Number(v, 4)
		},
		"sci":    func(v float64) string { return charts.Number(v, 3) },
		"signed": signed,
		"pct":    func(v float64) string { return fmt.Sprintf("%.1f %%", 100*v) },
		"inv": func(v float64) float64 {
			if v == 0 {
				return 0
			}
			return 1 / v
		},
		"opt": func(v *float64) string {
			if v == nil {
				return "—"
			}
			return charts.Number(*v, 4)
		},
		"limit":   charts.LimitLabel,
		"row":     func(s string) string { return strings.ReplaceAll(s, "_", " ") },
		"verdict": verdictWords,
		"utc":     func(t time.Time) string { return t.UTC().Format("2006-01-02 15:04:05") },
		"safeq": func(c loads.Ceiling) string {
			q := float64(c)
			switch {
			case math.IsInf(q, 1):
				return "unbounded (no rated load grows with the dynamic pressure)"
			case q == 0:
				return "0 Pa: the model's weight alone exceeds the allowed load"
			}
			return charts.Number(q, 4) + " Pa"
		},
	}
}

// signed writes v with its sign and 3 significant digits; a value that rounds to
// zero is written "0", never "-0".
func signed(v float64) string {
	s := fmt.Sprintf("%+.3g", v)
	if s == "+0" || s == "-0" {
		return "0"
	}
	return s
}

// page is what every page's template gets: its title and its own data.
type page struct {
	Title string
	Data  any
}

// render writes page name with status.
func (p *Pages) render(w http.ResponseWriter, r *http.Request, status int, name, title string, data any) {
	var b bytes.Buffer
	if err := p.pages[name].ExecuteTemplate(&b, "base", page{title, data}); err != nil {
		p.log.Error("page template", "page", name, "error", err.Error())
		http.Error(w, "internal error", http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.Header().Set("Content-Length", strconv.Itoa(b.Len()))
	w.WriteHeader(status)
	if r.Method != http.MethodHead {
		w.Write(b.Bytes())
	}
}

// fail renders the error page with the status the service gives err.
func (p *Pages) fail(w http.ResponseWriter, r *http.Request, err error) {
	status := api.StatusOf(err)
	msg := err.Error()
	switch {
	case status == http.StatusServiceUnavailable:
		// The store's condition, not a fault of the code: logged as the API logs it.
		p.log.Warn("page: store unavailable", "path", r.URL.Path, "error", msg)
		w.Header().Set("Retry-After", strconv.Itoa(api.RetryAfterSeconds))
		msg = fmt.Sprintf("the store does not answer; try again in %d s", api.RetryAfterSeconds)
	case status == http.StatusInsufficientStorage:
		p.log.Warn("page: store full", "path", r.URL.Path, "error", msg)
		msg = "the store has no space left: nothing new can be stored until space is freed; reading still works"
	case status >= 500:
		p.log.Error("page", "path", r.URL.Path, "error", msg)
		msg = "internal error: the service's log has the details"
	}
	title := http.StatusText(status)
	p.render(w, r, status, "error", title, errorView{Title: title, Message: msg})
}

// errorView is the data of the error page.
type errorView struct{ Title, Message string }

// stylesheet serves the pages' stylesheet.
func (p *Pages) stylesheet(w http.ResponseWriter, r *http.Request) {
	w.Header().Set("Content-Type", "text/css; charset=utf-8")
	w.Header().Set("Cache-Control", "max-age=3600")
	w.Write(p.css)
}

// index lists the catalog's facilities.
func (p *Pages) index(w http.ResponseWriter, r *http.Request) {
	fs, err := p.b.Facilities(r.Context())
	if err != nil {
		p.fail(w, r, err)
		return
	}
	p.render(w, r, http.StatusOK, "index", "Facilities", struct{ Facilities []facilities.Facility }{fs})
}

// defaultReferenceLength is the model reference length of a facility page's
// envelope until the reader enters another, in m.
const defaultReferenceLength = "0.1"

// facilityView is the data of a facility page.
type facilityView struct {
	Facility        facilities.Facility
	Versions        []facilities.Change
	ReferenceLength string
	EnvelopeURL     string
	EnvelopePDF     string
	EnvelopeError   string
}

// facility shows a facility's record, its history and its envelope.
func (p *Pages) facility(w http.ResponseWriter, r *http.Request) {
	ctx := r.Context()
	id := r.PathValue("id")
	f, err := p.b.Facility(ctx, id)
	if err != nil {
		p.fail(w, r, err)
		return
	}
	vs, err := p.b.Versions(ctx, id)
	if err != nil {
		p.fail(w, r, err)
		return
	}
	v := facilityView{Facility: f, Versions: vs, ReferenceLength: r.URL.Query().Get("reference_length")}
	if v.ReferenceLength == "" {
		v.ReferenceLength = defaultReferenceLength
	}
	status := http.StatusOK
	if l, err := lengthOf(v.ReferenceLength); err != nil {
		v.EnvelopeError = "reference_length: " + err.Error()
		status = http.StatusBadRequest
	} else {
		q := url.Values{"reference_length": {strconv.FormatFloat(l, 'g', -1, 64)}}.Encode()
		v.EnvelopeURL = "/v1/facilities/" + url.PathEscape(f.ID) + "/envelope.svg?" + q
		v.EnvelopePDF = "/v1/facilities/" + url.PathEscape(f.ID) + "/envelope.pdf?" + q
	}
	p.render(w, r, status, "facility", "Facility "+f.ID, v)
}

// lengthOf reads a positive length in m: a bare number, or a number with a unit.
func lengthOf(s string) (float64, error) {
	s = strings.TrimSpace(s)
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		if v, err = similarity.ToSI(s, "m"); err != nil {
			return 0, err
		}
	}
	if !(v > 0) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q: want a positive length, such as 0.1 or \"85 mm\"", s)
	}
	return v, nil
}

// chartView is one chart of the plan report.
type chartView struct{ URL, PDF, Alt string }

// loadsView is one balance's loads: the report, and an inline chart on the
// load-check page.
type loadsView struct {
	Report     loads.Report
	Chart      template.URL
	ChartTitle string
}

// planView is the data of the plan report.
type planView struct {
	Plan   *schema.PlanResponse
	Water  bool
	Loads  *loadsView
	Charts []chartView
}

// chartAlt describes each chart of a plan for its image's alternative text.
func chartAlt(name string) string {
	switch name {
	case app.ChartEnvelope:
		return "Reynolds number reachable in the facility against Mach number or speed, with the flight point, the planned test point and the trade curve"
	case app.ChartLoads:
		return "Balance utilisation of every component and gauge row against the angle of attack, with the allowed line"
	case app.ChartTrade:
		return "Reynolds-number ratio against the Mach-number difference for the chosen model"
	}
	return name
}

// plan shows a stored plan as a printable report.
func (p *Pages) plan(w http.ResponseWriter, r *http.Request) {
	plan, f, err := p.b.StoredPlan(r.Context(), r.PathValue("id"))
	if err != nil {
		p.fail(w, r, err)
		return
	}
	v := planView{Plan: plan, Water: plan.Mismatch.MachDifference == nil}
	if plan.Loads != nil {
		v.Loads = &loadsView{Report: *plan.Loads}
	}
	for _, name := range app.PlanChartNames() {
		if f == nil && name != app.ChartTrade || name == app.ChartLoads && plan.Loads == nil {
			continue
		}
		base := "/v1/plans/" + url.PathEscape(plan.ID) + "/charts/" + name
		v.Charts = append(v.Charts, chartView{URL: base + ".svg", PDF: base + ".pdf", Alt: chartAlt(name)})
	}
	p.render(w, r, http.StatusOK, "plan", "Plan "+plan.ID, v)
}

// dataURL returns chart c as an SVG data URL for an inline image.
func dataURL(c *charts.Chart) (template.URL, error) {
	b, err := c.Render(charts.SVG)
	if err != nil {
		return "", err
	}
	return template.URL("data:image/svg+xml;base64," + base64.StdEncoding.EncodeToString(b)), nil
}

// verdictWords says a load verdict (loads.Verdict*) to facility staff,
// worded to its danger.
func verdictWords(v string) string {
	switch v {
	case loads.VerdictWithin:
		return "Within the allowed loads (rating ÷ safety factor) on every rated component and gauge row, by this estimate."
	case loads.VerdictOver:
		return "Over the allowed load: do not run the points marked OVER."
	case loads.VerdictDoesNotFit:
		return "Does not fit the test section: do not install the model."
	}
	return "Not verified: a loaded component has no rating, the weight was left out, or there is no balance; do not run until the loads are verified."
}
