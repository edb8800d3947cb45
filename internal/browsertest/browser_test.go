package browsertest

import (
	"bytes"
	"context"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"image/png"
	"io"
	"net/http"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api/schema"
	"scalematch/internal/loads"
	"scalematch/internal/testfixture/testsite"
)

// chromium returns the browser to drive, or skips the test naming what is
// missing (a failure when SCALEMATCH_BROWSER_TESTS=require, as in CI).
func chromium(t *testing.T) string {
	t.Helper()
	if p := os.Getenv("SCALEMATCH_CHROMIUM"); p != "" {
		return p
	}
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	msg := "browser tests need chromium: no SCALEMATCH_CHROMIUM, and neither chromium nor chromium-browser is on PATH (Debian: apt-get install chromium)"
	if os.Getenv("SCALEMATCH_BROWSER_TESTS") == "require" {
		t.Fatal(msg)
	}
	t.Skip(msg)
	return ""
}

// console collects what the page reports as errors: console.error calls,
// uncaught exceptions and error entries of the browser's log (failed loads).
type console struct {
	mu   sync.Mutex
	errs []string
}

func (c *console) listen(ev any) {
	var msg string
	switch ev := ev.(type) {
	case *runtime.EventConsoleAPICalled:
		if ev.Type == runtime.ConsoleAPICalledTypeError {
			var parts []string
			for _, a := range ev.Args {
				parts = append(parts, string(a.Value))
			}
			msg = "console.error: " + strings.Join(parts, " ")
		}
	case *runtime.EventExceptionThrown:
		msg = "exception: " + ev.ExceptionDetails.Text
	case *log.EventEntryAdded:
		if ev.Entry.Level == log.EntryLevelError {
			msg = fmt.Sprintf("log %s: %s %s", ev.Entry.Source, ev.Entry.Text, ev.Entry.URL)
		}
	}
	if msg == "" {
		return
	}
	c.mu.Lock()
	c.errs = append(c.errs, msg)
	c.mu.Unlock()
}

// take returns the errors so far and forgets them.
func (c *console) take() []string {
	c.mu.Lock()
	defer c.mu.Unlock()
	e := c.errs
	c.errs = nil
	return e
}

// browser starts chromium with the flags this machine needs (no network: no
// background networking, component updates, sync or QUIC) and a fresh profile,
// and returns a tab's context and its console.
func browser(t *testing.T) (context.Context, *console) {
	t.Helper()
	path := chromium(t)
	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(path),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1100, 900),
	)
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	t.Cleanup(cancelAlloc)
	ctx, cancel := chromedp.NewContext(actx)
	t.Cleanup(cancel)
	c := &console{}
	// The first Run starts the browser; it must not carry a timeout.
	require.NoError(t, chromedp.Listen(ctx, c.listen))
	_, err := chromedp.Run(ctx, chromedp.Evaluate[chromedp.Void]("1"))
	require.NoError(t, err, "starting %s", path)
	return ctx, c
}

// step runs one browser action with a time limit.
func step[T any](t *testing.T, ctx context.Context, a chromedp.Action[T]) T {
	t.Helper()
	sctx, cancel := context.WithTimeout(ctx, 30*time.Second)
	defer cancel()
	v, err := chromedp.Run(sctx, a)
	require.NoError(t, err)
	return v
}

// screenshot keeps a full-page PNG of the tab in dir and returns its size.
func screenshot(t *testing.T, ctx context.Context, dir, name string) (w, h, n int) {
	t.Helper()
	b := step(t, ctx, chromedp.FullScreenshot(100))
	img, err := png.Decode(bytes.NewReader(b))
	require.NoError(t, err, "the screenshot is a PNG")
	require.NoError(t, os.WriteFile(filepath.Join(dir, name+".png"), b, 0o644))
	t.Logf("screenshot %s.png: %d × %d pixels, %d bytes", name, img.Bounds().Dx(), img.Bounds().Dy(), len(b))
	return img.Bounds().Dx(), img.Bounds().Dy(), len(b)
}

// images returns the natural size of every image of the page once all have
// loaded (0 × 0 for one that failed).
func images(t *testing.T, ctx context.Context) [][2]int {
	t.Helper()
	step(t, ctx, chromedp.Poll[bool](`Array.from(document.images).every(i => i.complete)`))
	return step(t, ctx, chromedp.Evaluate[[][2]int](`Array.from(document.images).map(i => [i.naturalWidth, i.naturalHeight])`))
}

func TestPagesInBrowser(t *testing.T) {
	s := testsite.Start(t)
	ctx, con := browser(t)
	shots := t.TempDir()
	if d := os.Getenv("SCALEMATCH_SCREENSHOTS"); d != "" {
		require.NoError(t, os.MkdirAll(d, 0o755))
		shots = d
	}
	nav := func(t *testing.T, path string) int64 {
		t.Helper()
		sctx, cancel := context.WithTimeout(ctx, 30*time.Second)
		defer cancel()
		resp, err := chromedp.RunResponse(sctx, chromedp.Navigate(s.URL+path))
		require.NoError(t, err)
		return resp.Status
	}

	t.Run("facilities", func(t *testing.T) {
		require.EqualValues(t, http.StatusOK, nav(t, "/"))
		text := step(t, ctx, chromedp.Text("main"))
		for _, id := range []string{"tsw-1", "cn2-05", "wtn-04"} {
			assert.Contains(t, text, id)
		}
		screenshot(t, ctx, shots, "facilities")
		assert.Empty(t, con.take(), "console errors")
	})

	t.Run("facility", func(t *testing.T) {
		require.EqualValues(t, http.StatusOK, nav(t, "/facilities/tsw-1?reference_length=85%20mm"))
		text := step(t, ctx, chromedp.Text("main"))
		assert.Contains(t, text, "Version history")
		assert.Contains(t, text, "int-b1")
		imgs := images(t, ctx)
		require.Len(t, imgs, 1)
		assert.Equal(t, [2]int{768, 528}, imgs[0], "the envelope SVG's size in CSS pixels")
		src := step(t, ctx, chromedp.AttributeValue("figure img", "src"))
		assert.Contains(t, src.Value, "reference_length=0.085")
		screenshot(t, ctx, shots, "facility")
		assert.Empty(t, con.take(), "console errors")
	})

	t.Run("plan report", func(t *testing.T) {
		require.EqualValues(t, http.StatusOK, nav(t, "/plans/"+s.PlanID))
		heads := step(t, ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll("main h2")).map(h => h.textContent.trim())`))
		assert.Equal(t, []string{"Cautions", "Flight", "Model", "Test setting", "Mismatch", "Binding limits",
			"Wall corrections", "Balance loads", "Charts", "Reynolds effects", "Schedule"}, heads, "the report's sections, cautions first")
		link := step(t, ctx, chromedp.AttributeValue(`a[href^="/v1/plans/"]`, "href"))
		assert.Equal(t, "/v1/plans/"+s.PlanID, link.Value, "a link to the JSON")
		rows := step(t, ctx, chromedp.Evaluate[int](`document.querySelectorAll("table.loads tbody tr").length`))
		assert.Equal(t, 17, rows, "one load row per α of the example's sweep, −4° to 12°")
		imgs := images(t, ctx)
		require.Len(t, imgs, 3, "envelope, loads and Reynolds-trade charts")
		for i, sz := range imgs {
			assert.Equal(t, [2]int{768, 528}, sz, "chart %d", i)
		}
		// Each chart the page shows, fetched as SVG and as PNG, decodes at its size.
		srcs := step(t, ctx, chromedp.Evaluate[[]string](`Array.from(document.images).map(i => i.getAttribute("src"))`))
		for _, src := range srcs {
			checkChart(t, s.URL+src)
			checkChart(t, s.URL+strings.TrimSuffix(src, ".svg")+".png")
		}
		screenshot(t, ctx, shots, "plan")
		assert.Empty(t, con.take(), "console errors")
	})

	t.Run("check form", func(t *testing.T) {
		require.EqualValues(t, http.StatusOK, nav(t, "/check"))
		form := map[string]string{
			"#f-facility-id": "tsw-1", "#f-installation-balance-id": "int-b1",
			"#f-article-reference-length": "2.6 m", "#f-article-reference-area": "50 m^2", "#f-article-span": "19 m",
			"#f-article-frontal-area": "5.5 m^2", "#f-article-wetted-area": "290 m^2",
			"#f-article-aero-lift-slope": "5.0", "#f-article-aero-zero-lift-alpha": "-1.5", "#f-article-aero-cl-max": "1.3",
			"#f-article-aero-cd-min": "0.021", "#f-article-aero-cl-at-cd-min": "0.15", "#f-article-aero-induced-drag-factor": "0.055",
			"#f-article-aero-cm-zero": "0.02", "#f-article-aero-cm-slope": "-1.1",
			"#f-model-scale": "1:30", "#f-installation-model-mass": "20 kg",
			"#f-test-mach": "0.8", "#f-test-stagnation-pressure": "1.5 bar", "#f-test-stagnation-temperature": "310 K",
			"#f-alpha-from": "-4", "#f-alpha-to": "16", "#f-alpha-step": "2",
		}
		var steps []chromedp.Action[chromedp.Void]
		for sel, v := range form {
			steps = append(steps, chromedp.SetValue(sel, v))
		}
		step(t, ctx, chromedp.Steps(steps...))
		sctx, cancel := context.WithTimeout(ctx, 30*time.Second)
		defer cancel()
		resp, err := chromedp.RunResponse(sctx, chromedp.Click("#submit"))
		require.NoError(t, err)
		require.EqualValues(t, http.StatusOK, resp.Status)

		// What POST /v1/loads answers for the same request: the page must agree.
		want := loadsAnswer(t, s.URL)
		fits := step(t, ctx, chromedp.Text("#verdict-fits"))
		loadsText := step(t, ctx, chromedp.Text("#verdict-loads"))
		if len(want.Violations) == 0 && len(want.FitBroken) == 0 {
			assert.Contains(t, strings.ToLower(fits), "yes")
		} else {
			assert.Contains(t, strings.ToLower(fits), "no")
		}
		require.NotEmpty(t, want.Verdict)
		assert.Contains(t, step(t, ctx, chromedp.Text("#verdict-word")), want.Verdict, "the page shows the answer's verdict")
		if want.Loads.One.Verdict == loads.VerdictWithin {
			assert.True(t, strings.HasPrefix(strings.ToLower(loadsText), "yes"), "%q", loadsText)
		} else {
			assert.True(t, strings.HasPrefix(strings.ToLower(loadsText), "no"), "%q", loadsText)
		}
		assert.Contains(t, loadsText, fmt.Sprintf("largest %.1f %%", 100*want.Loads.One.MaxUtilization))
		assert.Contains(t, step(t, ctx, chromedp.Text("#verdict-resolution")), "no balance resolution")
		cells := step(t, ctx, chromedp.Evaluate[[][]string](`Array.from(document.querySelectorAll("table.loads tbody tr")).map(r => Array.from(r.cells).map(c => c.textContent.trim()))`))
		require.Len(t, cells, len(want.Loads.One.Points), "one table row per α")
		for i, p := range want.Loads.One.Points {
			assert.Equal(t, fmt.Sprintf("%.1f %%", 100*p.Utilization), cells[i][8], "utilisation at α %g°", p.Alpha)
			over := p.Utilization > want.Loads.One.AllowedUtilization
			assert.Equal(t, map[bool]string{true: "OVER", false: "ok"}[over], cells[i][10], "verdict at α %g°", p.Alpha)
		}
		imgs := images(t, ctx)
		require.Len(t, imgs, 1, "the load chart")
		assert.Equal(t, [2]int{768, 528}, imgs[0])
		screenshot(t, ctx, shots, "check-verdict")
		assert.Empty(t, con.take(), "console errors")
	})

	t.Run("check form bad input", func(t *testing.T) {
		require.EqualValues(t, http.StatusOK, nav(t, "/check"))
		step(t, ctx, chromedp.Steps(
			chromedp.SetValue("#f-facility-id", "tsw-1"),
			chromedp.SetValue("#f-model-scale", "1:30"),
			chromedp.SetValue("#f-test-stagnation-pressure", "1.5 furlongs"),
		))
		sctx, cancel := context.WithTimeout(ctx, 30*time.Second)
		defer cancel()
		resp, err := chromedp.RunResponse(sctx, chromedp.Click("#submit"))
		require.NoError(t, err)
		assert.EqualValues(t, http.StatusBadRequest, resp.Status)
		msg := step(t, ctx, chromedp.Text("#f-test-stagnation-pressure-error"))
		assert.Contains(t, msg, "furlongs")
		assert.Contains(t, step(t, ctx, chromedp.Text("#form-errors")), "test.stagnation_pressure")
		assert.Equal(t, "1.5 furlongs", step(t, ctx, chromedp.Value("#f-test-stagnation-pressure")), "the entered value is kept")
		screenshot(t, ctx, shots, "check-bad-input")
		// The only error the browser reports is the 400 of the submission itself.
		for _, e := range con.take() {
			assert.Contains(t, e, "400", "console error %q", e)
		}
	})
}

// loadsAnswer posts the check form's request to POST /v1/loads.
func loadsAnswer(t *testing.T, url string) schema.LoadsResponse {
	t.Helper()
	body := `{"facility_id": "tsw-1", "installation": {"balance_id": "int-b1", "model_mass": "20 kg"},
	  "article": {"reference_length": "2.6 m", "reference_area": "50 m^2", "span": "19 m", "frontal_area": "5.5 m^2", "wetted_area": "290 m^2",
	    "aero": {"lift_slope": 5.0, "zero_lift_alpha": -1.5, "cl_max": 1.3, "cd_min": 0.021, "cl_at_cd_min": 0.15, "induced_drag_factor": 0.055, "cm_zero": 0.02, "cm_slope": -1.1}},
	  "model": {"scale": "1:30"}, "alpha": {"from": -4, "to": 16, "step": 2},
	  "test": {"mach": 0.8, "stagnation_pressure": "1.5 bar", "stagnation_temperature": "310 K"}}`
	resp, err := http.Post(url+"/v1/loads", "application/json", strings.NewReader(body))
	require.NoError(t, err)
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	require.Equal(t, http.StatusOK, resp.StatusCode, "%s", b)
	var out schema.LoadsResponse
	require.NoError(t, json.Unmarshal(b, &out))
	require.NotNil(t, out.Loads.One)
	return out
}

// checkChart fetches a chart and checks that it decodes at its stated size:
// an SVG document of 576 × 396 pt, or a PNG image of 768 × 528 pixels.
func checkChart(t *testing.T, url string) {
	t.Helper()
	resp, err := http.Get(url)
	require.NoError(t, err)
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	require.NoError(t, err)
	require.Equal(t, http.StatusOK, resp.StatusCode, "%s: %s", url, b)
	switch ct := resp.Header.Get("Content-Type"); ct {
	case "image/png":
		img, err := png.Decode(bytes.NewReader(b))
		require.NoError(t, err, url)
		assert.Equal(t, [2]int{768, 528}, [2]int{img.Bounds().Dx(), img.Bounds().Dy()}, url)
	case "image/svg+xml":
		var svg struct {
			XMLName xml.Name
			Width   string `xml:"width,attr"`
			Height  string `xml:"height,attr"`
		}
		require.NoError(t, xml.Unmarshal(b, &svg), url)
		assert.Equal(t, "svg", svg.XMLName.Local, url)
		assert.Equal(t, [2]string{"576pt", "396pt"}, [2]string{svg.Width, svg.Height}, url)
	default:
		assert.Fail(t, "unexpected content type", "%s: content type %q", url, ct)
	}
}
