// Package testfixture holds what the test packages share: the demo-world requests
// they send, a silent logger, the relative error the physics checks measure
// with (RelErr, and InRelative, its assertion), the reference fixtures' reader
// (ReadCSV), an HTTP call read whole (Do), the fields a validation error
// names (InvalidFields), one bisection (Bisect), a log sink that concurrent
// requests may share (LogBuffer) and a server on a loopback listener
// (ServeLoopback). It imports nothing of the project but internal/check
// (which imports nothing), so that any package's tests may use it; servers and
// stores for tests are in testsite. It is imported only by tests.
package testfixture

import (
	"bufio"
	"bytes"
	"context"
	"io"
	"log/slog"
	"math"
	"net"
	"net/http"
	"os"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/check"
)

// J16Plan is a plan request for the Orrin J16 of the demo world (docs/demo-world.md)
// at cruise (M 0.78 at 12 000 m) in tsw-1, free scale, on balance int-b1 with a
// 20 kg model, 21 α points from −4° to 16°.
const J16Plan = `{
  "flight": {"altitude": "12000 m", "mach": 0.78},
  "article": {"reference_length": 2.4, "reference_area": 36.5, "span": 16.4, "length": 19.6,
    "frontal_area": 4.4, "wetted_area": 228,
    "aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25, "cd_min": 0.022,
      "cl_at_cd_min": 0.14, "induced_drag_factor": 0.057, "cm_zero": 0.03, "cm_slope": -1.05}},
  "facility_id": "tsw-1",
  "model": {"scale_min": 0.01, "scale_max": 0.5},
  "installation": {"balance_id": "int-b1", "model_mass": 20},
  "alpha": {"from": -4, "to": 16, "step": 1}
}`

// J16Loads is a load check of a 1:30 Orrin J16 in tsw-1 at M 0.78, p0 1.5 bar,
// T0 310 K, with a 20 kg model, on every balance of the facility.
const J16Loads = `{
  "article": {"reference_length": 2.4, "reference_area": 36.5, "span": 16.4,
    "frontal_area": 4.4, "wetted_area": 228,
    "aero": {"lift_slope": 4.9, "zero_lift_alpha": -1.6, "cl_max": 1.25, "cd_min": 0.022,
      "cl_at_cd_min": 0.14, "induced_drag_factor": 0.057, "cm_zero": 0.03, "cm_slope": -1.05}},
  "facility_id": "tsw-1",
  "model": {"scale": "1:30"},
  "installation": {"model_mass": 20},
  "alpha": {"from": -4, "to": 16, "step": 2},
  "test": {"mach": 0.78, "stagnation_pressure": "1.5 bar", "stagnation_temperature": 310}
}`

// Quiet is a logger that discards everything, for servers whose logs a test
// does not read.
func Quiet() *slog.Logger {
	return slog.New(slog.NewTextHandler(io.Discard, nil))
}

// RelErr is |got − want| / |want|, or |got| when want is 0.
func RelErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// InRelative asserts that got is within the relative tolerance tol of want, as
// RelErr measures it: assert.InEpsilon, or assert.InDelta within tol when want is
// 0 (where InEpsilon refuses). A NaN got fails unless want is NaN too.
func InRelative(t assert.TestingT, want, got, tol float64, msgAndArgs ...any) bool {
	if h, ok := t.(interface{ Helper() }); ok {
		h.Helper()
	}
	if want == 0 {
		return assert.InDelta(t, want, got, tol, msgAndArgs...)
	}
	return assert.InEpsilon(t, want, got, tol, msgAndArgs...)
}

// Bisect narrows a bracket of the boundary of a predicate: ok(good) holds and
// ok(bad) does not (good may lie on either side of bad). It halves the bracket
// until its width is at most rel (> 0) times the larger magnitude of its ends
// and returns its ends, the last point where ok held and the last where it did
// not.
func Bisect(good, bad, rel float64, ok func(float64) bool) (float64, float64) {
	for math.Abs(bad-good) > rel*math.Max(math.Abs(good), math.Abs(bad)) {
		if m := good + (bad-good)/2; ok(m) {
			good = m
		} else {
			bad = m
		}
	}
	return good, bad
}

// InvalidFields returns the field paths a validation error names, in its order,
// failing the test when err is not a *check.Error with CodeInvalid (the error
// of every layer's validation) or a field comes without a message.
func InvalidFields(t testing.TB, err error) []string {
	t.Helper()
	var e *check.Error
	require.ErrorAs(t, err, &e)
	require.Equal(t, check.CodeInvalid, e.Code, "%v", err)
	var out []string
	for _, f := range e.Fields {
		assert.NotEmpty(t, f.Message, f.Field)
		out = append(out, f.Field)
	}
	return out
}

// ReadCSV reads the numeric rows of a reference fixture under testdata/reference:
// comment lines (#) and blank lines are skipped, the first other line is the
// column header, and every row must have as many numbers as the header has names.
func ReadCSV(t testing.TB, path string) [][]float64 {
	t.Helper()
	f, err := os.Open(path)
	require.NoError(t, err)
	defer f.Close()
	var rows [][]float64
	width := 0 // columns, from the header; 0 until it is read
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		fields := strings.Split(line, ",")
		if width == 0 {
			width = len(fields)
			continue
		}
		require.Len(t, fields, width, "%s: %q", path, line)
		row := make([]float64, width)
		for i, field := range fields {
			row[i], err = strconv.ParseFloat(field, 64)
			require.NoError(t, err, "%s: %q", path, line)
		}
		rows = append(rows, row)
	}
	require.NoError(t, sc.Err(), path)
	return rows
}

// Reply is an HTTP answer read whole.
type Reply struct {
	Status int
	Header http.Header
	Body   []byte
}

// Do sends method url with body (none when nil; then Content-Type
// application/json unless header sets it) and the header's fields, through
// client (http.DefaultClient when nil), and reads the answer whole. A request
// that cannot be sent or an answer that cannot be read fails the test.
func Do(t testing.TB, client *http.Client, method, url string, header map[string]string, body []byte) Reply {
	t.Helper()
	var r io.Reader
	if body != nil {
		r = bytes.NewReader(body)
	}
	req, err := http.NewRequest(method, url, r)
	require.NoError(t, err)
	if body != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	for k, v := range header {
		req.Header.Set(k, v)
	}
	if client == nil {
		client = http.DefaultClient
	}
	resp, err := client.Do(req)
	require.NoError(t, err)
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	require.NoError(t, err)
	return Reply{resp.StatusCode, resp.Header, b}
}

// LogBuffer is a log sink that concurrent requests may share: a buffer behind a
// mutex, read whole by String.
type LogBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

// Write appends p under the lock.
func (l *LogBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

// String returns what has been written so far.
func (l *LogBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// ServeLoopback starts serve on a new loopback listener and returns its base
// URL, the function that ends it, and the channel its result arrives on.
func ServeLoopback(t testing.TB, serve func(context.Context, net.Listener) error) (base string, stop context.CancelFunc, served <-chan error) {
	t.Helper()
	ln, err := net.Listen("tcp", "127.0.0.1:0")
	require.NoError(t, err)
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- serve(ctx, ln) }()
	return "http://" + ln.Addr().String(), cancel, done
}
