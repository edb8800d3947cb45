package docs_test

// The documents' numbers come from the code: every figure a document quotes from
// the service sits between calc markers that say how to compute it, and
// TestDocNumbers recomputes each one through the service's own HTTP handler and
// fails when the text differs. `go test ./docs/ -run TestDocNumbers -update`
// rewrites the figures in place. TestDocFields checks that every field a document
// names in backticks (`mismatch.reynolds_ratio`) exists in the OpenAPI document.
// DEVELOPERS.md ("Numbers in the documents") explains the markers.

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/docs"
)

var update = flag.Bool("update", false, "rewrite the figures between calc markers in the documents")

// documents are the files whose figures and field names are checked, relative to
// the repository; a file that does not exist is skipped.
var documents = []string{
	"README.md", "DEVELOPERS.md", "docs/planner.md", "docs/physics.md", "docs/axes.md",
	"docs/deployment.md", "docs/demo-world.md", "docs/charts-and-pages.md", "examples/README.md",
	"docs/campaigns.md",
}

// calcMarker is one figure:
//
//	<!-- calc METHOD TARGET BODY EXPR FORMAT -->figure<!-- /calc -->
//
// METHOD is GET or POST, TARGET the request path and query, BODY a request file
// relative to the repository ("-" for none), EXPR a path into the JSON answer
// (dots, [i] for an index, [key=value] for the element of a list whose key has
// that value), optionally written 1/PATH, PATH*N or PATH/N, and FORMAT a Go fmt
// verb for the number, with any text around it and no spaces ("1:%.4g", "%.3g").
var calcMarker = regexp.MustCompile(`<!-- calc (GET|POST) (\S+) (\S+) (\S+) (\S+) -->(.*?)<!-- /calc -->`)

// repoRoot is the repository, seen from this package's directory.
func repoRoot() string { return ".." }

// server is the service with the built-in demo catalog and no store.
func server(t *testing.T) http.Handler {
	t.Helper()
	s, err := api.New(api.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	return s.Handler()
}

// answers asks the handler and keeps each decoded JSON answer by request.
type answers struct {
	h     http.Handler
	cache map[string]any
}

func (a *answers) get(method, target, bodyFile string) (any, error) {
	key := method + " " + target + " " + bodyFile
	if v, ok := a.cache[key]; ok {
		return v, nil
	}
	var body io.Reader
	if bodyFile != "-" {
		b, err := os.ReadFile(filepath.Join(repoRoot(), bodyFile))
		if err != nil {
			return nil, err
		}
		body = bytes.NewReader(b)
	}
	req := httptest.NewRequest(method, target, body)
	req.Header.Set("Content-Type", "application/json")
	rec := httptest.NewRecorder()
	a.h.ServeHTTP(rec, req)
	if rec.Code != http.StatusOK && rec.Code != http.StatusCreated {
		return nil, fmt.Errorf("%s %s with %s: status %d: %s", method, target, bodyFile, rec.Code, rec.Body.String())
	}
	var v any
	if err := json.Unmarshal(rec.Body.Bytes(), &v); err != nil {
		return nil, err
	}
	a.cache[key] = v
	return v, nil
}

// lookup follows path (a.b[2].c[key=value]) through v.
func lookup(v any, path string) (any, error) {
	for _, seg := range splitPath(path) {
		switch {
		case strings.HasPrefix(seg, "[") && strings.Contains(seg, "="):
			k, want, _ := strings.Cut(seg[1:len(seg)-1], "=")
			list, ok := v.([]any)
			if !ok {
				return nil, fmt.Errorf("%s: not a list", seg)
			}
			var found any
			for _, e := range list {
				if m, ok := e.(map[string]any); ok && fmt.Sprint(m[k]) == want {
					found = e
					break
				}
			}
			if found == nil {
				return nil, fmt.Errorf("%s: no element with %s = %s", seg, k, want)
			}
			v = found
		case strings.HasPrefix(seg, "["):
			i, err := strconv.Atoi(seg[1 : len(seg)-1])
			list, ok := v.([]any)
			if err != nil || !ok || i < 0 || i >= len(list) {
				return nil, fmt.Errorf("%s: no such element", seg)
			}
			v = list[i]
		default:
			m, ok := v.(map[string]any)
			if !ok {
				return nil, fmt.Errorf("%s: not an object", seg)
			}
			if v, ok = m[seg]; !ok {
				return nil, fmt.Errorf("%s: no such field", seg)
			}
		}
	}
	return v, nil
}

// splitPath splits a.b[2].c[k=v] into a, b, [2], c, [k=v].
func splitPath(p string) []string {
	var out []string
	for _, part := range strings.Split(p, ".") {
		for part != "" {
			i := strings.Index(part, "[")
			switch {
			case i < 0:
				out, part = append(out, part), ""
			case i > 0:
				out, part = append(out, part[:i]), part[i:]
			default:
				j := strings.Index(part, "]")
				if j < 0 {
					out, part = append(out, part), ""
					continue
				}
				out, part = append(out, part[:j+1]), part[j+1:]
			}
		}
	}
	return out
}

// evaluate computes EXPR on the answer v: a number, its reciprocal (1/PATH) or
// its multiple (PATH*N, PATH/N).
func evaluate(v any, expr string) (float64, error) {
	inv := strings.HasPrefix(expr, "1/")
	expr = strings.TrimPrefix(expr, "1/")
	factor := 1.0
	if i := strings.LastIndexAny(expr, "*/"); i > 0 {
		n, err := strconv.ParseFloat(expr[i+1:], 64)
		if err != nil {
			return 0, fmt.Errorf("%s: bad factor", expr)
		}
		if expr[i] == '/' {
			n = 1 / n
		}
		factor, expr = n, expr[:i]
	}
	x, err := lookup(v, expr)
	if err != nil {
		return 0, err
	}
	f, ok := x.(float64)
	if !ok {
		return 0, fmt.Errorf("%s is %v, not a number", expr, x)
	}
	if inv {
		f = 1 / f
	}
	return f * factor, nil
}

// check recomputes the figures between calc markers of one document's text and
// returns the text with the recomputed figures, a line for every figure that
// differs (when !rewrite) or cannot be computed, and the number of markers.
func check(a *answers, doc string, text []byte, rewrite bool) (out []byte, failed []string, n int) {
	out = calcMarker.ReplaceAllFunc(text, func(m []byte) []byte {
		g := calcMarker.FindSubmatch(m)
		method, target, body, expr, format, have := string(g[1]), string(g[2]), string(g[3]), string(g[4]), string(g[5]), string(g[6])
		n++
		v, err := a.get(method, target, body)
		var f float64
		if err == nil {
			f, err = evaluate(v, expr)
		}
		if err != nil {
			failed = append(failed, fmt.Sprintf("%s: %s: %v", doc, expr, err))
			return m
		}
		want := fmt.Sprintf(format, f)
		if want != have && !rewrite {
			failed = append(failed, fmt.Sprintf("%s: %s of %s %s is %q in the code, %q in the text (run go test ./docs/ -run TestDocNumbers -update)", doc, expr, method, target, want, have))
		}
		return bytes.Replace(m, []byte("-->"+have+"<!--"), []byte("-->"+want+"<!--"), 1)
	})
	return out, failed, n
}

// TestDocNumbers recomputes every figure between calc markers; with -update it
// rewrites them.
func TestDocNumbers(t *testing.T) {
	a := &answers{h: server(t), cache: map[string]any{}}
	total := 0
	for _, doc := range documents {
		path := filepath.Join(repoRoot(), doc)
		text, err := os.ReadFile(path)
		if os.IsNotExist(err) {
			continue
		}
		require.NoError(t, err)
		out, failed, n := check(a, doc, text, *update)
		total += n
		for _, f := range failed {
			t.Error(f)
		}
		if *update && !bytes.Equal(out, text) && len(failed) == 0 {
			require.NoError(t, os.WriteFile(path, out, 0o644))
			t.Logf("rewrote %s", doc)
		}
	}
	assert.Positive(t, total, "no calc markers found: the documents quote no figure from the code?")
}

// TestCalcMarkers shows the mechanism on a text of its own: a figure that is not
// the code's fails and is named, -update's rewrite puts the code's figure in, and
// a path the answer lacks fails.
func TestCalcMarkers(t *testing.T) {
	a := &answers{h: server(t), cache: map[string]any{}}
	// A pressure altitude of 11 000 m is the tropopause of the U.S. Standard
	// Atmosphere 1976: 216.65 K and 22 632 Pa (the standard's table, from memory).
	const mk = "<!-- calc GET /v1/atmosphere?pressure_altitude=11000 - %s %s -->%s<!-- /calc -->"
	cases := []struct {
		name, text, rewritten string
		failures              int
	}{
		{"current", fmt.Sprintf(mk, "temperature", "%.2f", "216.65"), fmt.Sprintf(mk, "temperature", "%.2f", "216.65"), 0},
		{"drifted", fmt.Sprintf(mk, "temperature", "%.2f", "216.70"), fmt.Sprintf(mk, "temperature", "%.2f", "216.65"), 1},
		{"scaled", fmt.Sprintf(mk, "pressure/1000", "%.3f", "0"), fmt.Sprintf(mk, "pressure/1000", "%.3f", "22.632"), 1},
		{"no such field", fmt.Sprintf(mk, "statistics.refine_evaluations", "%g", "3"), fmt.Sprintf(mk, "statistics.refine_evaluations", "%g", "3"), 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, failed, n := check(a, "test.md", []byte(c.text), false)
			assert.Equal(t, 1, n)
			assert.Len(t, failed, c.failures, "%q", failed)
			out, _, _ := check(a, "test.md", []byte(c.text), true)
			assert.Equal(t, c.rewritten, string(out))
		})
	}
}

// fieldRef is a backticked dotted name in a document, such as
// `mismatch.reynolds_ratio` or `loads.max_safe_dynamic_pressure`.
var fieldRef = regexp.MustCompile("`([a-z][a-z_]*(?:\\.[a-z][a-z_]*)+)`")

// TestDocFields checks that every field a document names by its dotted path in
// backticks (`mismatch.reynolds_ratio`, `installation.model_mass`) exists in a
// request, an answer or the facility record of the OpenAPI document, so that no
// document promises a field no answer carries. File names (`gen.py`) are skipped.
func TestDocFields(t *testing.T) {
	var spec struct {
		Definitions map[string]struct {
			Properties map[string]struct {
				Ref   string `json:"$ref"`
				Items struct {
					Ref string `json:"$ref"`
				} `json:"items"`
				AllOf []struct {
					Ref string `json:"$ref"`
				} `json:"allOf"`
			} `json:"properties"`
		} `json:"definitions"`
	}
	require.NoError(t, json.Unmarshal(docs.OpenAPI, &spec))
	ref := func(s string) string { return strings.TrimPrefix(s, "#/definitions/") }
	// resolve reports whether path exists under definition def.
	var resolve func(def string, path []string) bool
	resolve = func(def string, path []string) bool {
		if len(path) == 0 {
			return true
		}
		d, ok := spec.Definitions[def]
		if !ok {
			return false
		}
		p, ok := d.Properties[path[0]]
		if !ok {
			return false
		}
		if len(path) == 1 {
			return true
		}
		next := ref(p.Ref)
		if next == "" {
			next = ref(p.Items.Ref)
		}
		if next == "" && len(p.AllOf) > 0 {
			next = ref(p.AllOf[0].Ref)
		}
		if next == "" {
			return false
		}
		return resolve(next, path[1:])
	}
	// Requests and answers, the facility record, and the load report (loads is a
	// LoadsValue, an object or a list of reports, in the loads answer).
	roots := []string{"schema.PlanRequest", "schema.PlanResponse", "schema.LoadsRequest", "schema.LoadsResponse",
		"schema.ConditionsRequest", "schema.ConditionsResponse", "schema.GroupsRequest", "schema.GroupsResponse",
		"facilities.Facility", "loads.Report", "campaign.Request", "campaign.Result"}
	fileExt := map[string]bool{"db": true, "tsv": true, "py": true, "sh": true, "md": true, "json": true, "go": true, "svg": true, "yaml": true, "png": true}
	checked := 0
	for _, doc := range documents {
		text, err := os.ReadFile(filepath.Join(repoRoot(), doc))
		if os.IsNotExist(err) {
			continue
		}
		require.NoError(t, err)
		for _, m := range fieldRef.FindAllStringSubmatch(string(text), -1) {
			path := strings.Split(m[1], ".")
			if len(path) == 2 && fileExt[path[1]] {
				continue // a file name
			}
			found := false
			for _, r := range roots {
				found = found || resolve(r, path)
			}
			if !found && path[0] == "loads" {
				found = resolve("loads.Report", path[1:])
			}
			checked++
			assert.True(t, found, "%s names `%s`, which no request, answer or facility field is (docs/swagger.json)", doc, m[1])
		}
	}
	t.Logf("%d field references checked", checked)
}
