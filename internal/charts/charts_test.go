package charts

import (
	"bytes"
	"encoding/xml"
	"image/png"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

func ptr(v float64) *float64 { return &v }

// testBalance is an invented balance: normal 1000 N, axial 200 N, pitching
// moment 50 N·m and a combined gauge row, safety factor 1.5.
func testBalance() facilities.Balance {
	return facilities.Balance{ID: "bal-t", SafetyFactor: 1.5,
		Limits:   facilities.Limits{Normal: ptr(1000), Axial: ptr(200), PitchingMoment: ptr(50)},
		Combined: []facilities.CombinedLimit{{Name: "fore_gauge", Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": 10}, Limit: 900}},
	}
}

// testReport checks a linear lift curve (C_L = 0.08/° · α) over α from −4° to
// 12° at dynamic pressure q on a model of 0.1 m² and 0.3 m chord with the
// facilities package itself.
func testReport(t *testing.T, q float64, betas ...float64) loads.Report {
	t.Helper()
	if len(betas) == 0 {
		betas = []float64{0}
	}
	var pts []facilities.Point
	for _, b := range betas {
		for a := -4.0; a <= 12; a += 2 {
			pts = append(pts, facilities.Point{Alpha: a, Beta: b,
				Coefficients: facilities.Coefficients{CL: 0.08 * a, CD: 0.02 + 0.001*a*a, Cm: -0.01 * a, CY: 0.01 * b}})
		}
	}
	lc := loads.Setup{ReferenceArea: 0.1, ReferenceLength: 0.3, Points: pts}
	b := testBalance()
	r, err := lc.Check(&b, q)
	require.NoError(t, err)
	return r
}

func testRatings(t *testing.T) loads.Ratings {
	t.Helper()
	b := testBalance()
	rs, err := loads.NewRatings(&b)
	require.NoError(t, err)
	return rs
}

// checkRender renders c in every format and checks what each is.
func checkRender(t *testing.T, c *Chart) {
	t.Helper()
	for _, f := range Formats() {
		b, err := c.Render(f)
		require.NoError(t, err, "%s", f)
		switch f {
		case PNG:
			img, err := png.Decode(bytes.NewReader(b))
			require.NoError(t, err)
			assert.Equal(t, 768, img.Bounds().Dx(), "PNG width in pixels")
			assert.Equal(t, 528, img.Bounds().Dy(), "PNG height in pixels")
		case SVG:
			var svg struct {
				XMLName xml.Name
				Width   string `xml:"width,attr"`
				Height  string `xml:"height,attr"`
			}
			require.NoError(t, xml.Unmarshal(b, &svg))
			assert.Equal(t, "576pt", svg.Width)
			assert.Equal(t, "396pt", svg.Height)
			// The title and the footer's caution are text in the drawing.
			assert.Contains(t, string(b), "approved")
		case PDF:
			assert.True(t, bytes.HasPrefix(b, []byte("%PDF-")))
		}
	}
}

func TestLoadsChart(t *testing.T) {
	rs := testRatings(t)
	cases := []struct {
		name  string
		q     float64
		betas []float64
		// over is the number of points above the allowed line: from the report's
		// own utilisation against 1/1.5.
		wantOver bool
	}{
		{"within", 2000, nil, false},
		{"overloaded", 20000, nil, true},
		{"sideslip", 20000, []float64{-4, 0, 4}, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := testReport(t, tc.q, tc.betas...)
			require.Equal(t, tc.wantOver, !r.WithinLimits, "test set-up: max utilisation %.3g", r.MaxUtilization)
			c, err := LoadsChart(Loads{FacilityID: "fac-t", Report: r, Ratings: rs})
			require.NoError(t, err)
			legend := strings.Join(c.Legend(), "\n")
			for _, row := range []string{"normal", "axial", "pitching moment", "fore gauge", "allowed: 100 %/safety factor 1.5 = 67 %"} {
				assert.Contains(t, legend, row)
			}
			assert.Equal(t, tc.wantOver, strings.Contains(legend, "over the allowed load"))
			if len(tc.betas) > 1 {
				assert.Contains(t, c.Title, "β -4…4°")
			}
			checkRender(t, c)
		})
	}
}

// TestRowUtilization checks the per-row utilisation against the report's own:
// the largest row at each point is the point's utilisation and its limiting row.
func TestRowUtilization(t *testing.T) {
	rs := testRatings(t)
	r := testReport(t, 9000, -2, 3)
	rows := RowUtilization(r, rs)
	require.Len(t, rows, rs.Rows())
	for k, p := range r.Points {
		best, name := -1.0, ""
		for i := range rows {
			if rows[i][k] > best {
				best, name = rows[i][k], rs.RowName(i)
			}
		}
		assert.InDelta(t, p.Utilization, best, 1e-12*math.Max(1, p.Utilization), "point %d", k)
		assert.Equal(t, p.Limiting, name, "point %d", k)
	}
}

func TestLoadsChartRefuses(t *testing.T) {
	_, err := LoadsChart(Loads{Report: loads.Report{BalanceID: "b"}, Ratings: testRatings(t)})
	assert.ErrorContains(t, err, "no points")
	_, err = LoadsChart(Loads{Report: testReport(t, 1000)})
	assert.ErrorContains(t, err, "rates no component")
}

// testEnvelope is a made-up envelope: the upper edge set by the highest
// stagnation pressure and then by the dynamic-pressure limit, one column
// unreachable.
func testEnvelope() Envelope {
	e := Envelope{FacilityID: "fac-t", ReferenceLength: 0.1, FirstLimit: facilities.ConstraintMachMin, LastLimit: facilities.ConstraintMachMax}
	for i := range 9 {
		x := 0.2 + 0.1*float64(i)
		e.X = append(e.X, x)
		e.Low = append(e.Low, 1e5*x)
		hi, lim := 1e6*x, facilities.ConstraintPressureMax
		if i >= 5 {
			hi, lim = 5e5, facilities.ConstraintDynamic
		}
		e.High = append(e.High, hi)
		e.HighLimit = append(e.HighLimit, lim)
		e.LowLimit = append(e.LowLimit, facilities.ConstraintPressureMin)
	}
	e.Low[8], e.High[8], e.HighLimit[8] = math.NaN(), math.NaN(), facilities.ConstraintCondensation
	return e
}

func TestEnvelopeChart(t *testing.T) {
	cases := []struct {
		name       string
		marks      EnvelopeMarks
		wantLegend []string
		notLegend  []string
	}{
		{"facility only", EnvelopeMarks{},
			[]string{"reachable within the limits", "edge: highest stagnation pressure", "edge: dynamic-pressure limit",
				"edge: lowest stagnation pressure", "edge: lowest Mach number"},
			// The last column is unreachable, so the right edge is not the Mach range.
			[]string{"edge: highest Mach number", "flight", "trade curve"}},
		{"plan", EnvelopeMarks{PlanID: "p1", Flight: &Point{X: 0.8, Reynolds: 4e7}, Test: &Point{X: 0.7, Reynolds: 5e5},
			Trade: []similarity.TradePoint{{Mach: 0.3, Reynolds: 2e5}, {Mach: 0.5, Reynolds: 3e5}, {Mach: 0.9, Reynolds: 0}}},
			[]string{"flight: M 0.8, Re 4×10⁷", "planned test point: M 0.7, Re 5×10⁵", "trade curve: best Re, chosen model"}, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c, err := EnvelopeChart(testEnvelope(), tc.marks)
			require.NoError(t, err)
			legend := strings.Join(c.Legend(), "\n")
			for _, s := range tc.wantLegend {
				assert.Contains(t, legend, s)
			}
			for _, s := range tc.notLegend {
				assert.NotContains(t, legend, s)
			}
			checkRender(t, c)
		})
	}
	_, err := EnvelopeChart(Envelope{FacilityID: "none", X: []float64{1}, Low: []float64{math.NaN()}, High: []float64{math.NaN()}}, EnvelopeMarks{})
	assert.ErrorContains(t, err, "reaches no Reynolds number")
}

func TestTradeChart(t *testing.T) {
	fl := similarity.FlightState{Mach: 0.8, Reynolds: 1e7, TrueAirspeed: 240}
	curve := []similarity.TradePoint{{Mach: 0.6, Speed: 200, Reynolds: 2e6}, {Mach: 0.8, Speed: 250, Reynolds: 2.5e6}, {Mach: 1, Speed: 300, Reynolds: 0}}
	cases := []struct {
		name       string
		in         Trade
		wantLegend []string
	}{
		{"gas", Trade{PlanID: "p", FacilityID: "f", Flight: fl, Model: similarity.ModelSize{Scale: 0.05},
			Test: similarity.Test{State: facilities.State{Mach: 0.79, Speed: 248}, Reynolds: 2.4e6}, Curve: curve},
			[]string{"Mach number matched", "planned test: ratio 0.24 at ΔM -0.01"}},
		{"water", Trade{PlanID: "p", FacilityID: "w", Speed: true, Flight: fl, Model: similarity.ModelSize{Scale: 0.1},
			Test: similarity.Test{State: facilities.State{Speed: 250}, Reynolds: 2.5e6}, Curve: curve},
			[]string{"Reynolds number matched (ratio 1)", "planned test: ratio 0.25 at 250 m/s"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c, err := TradeChart(tc.in)
			require.NoError(t, err)
			legend := strings.Join(c.Legend(), "\n")
			for _, s := range tc.wantLegend {
				assert.Contains(t, legend, s)
			}
			assert.Equal(t, tc.name == "gas", strings.Contains(legend, "Mach number matched"))
			checkRender(t, c)
		})
	}
	_, err := TradeChart(Trade{PlanID: "p"})
	assert.ErrorContains(t, err, "no flight Reynolds number")
}

func TestNegotiate(t *testing.T) {
	cases := []struct {
		accept string
		want   Format
		ok     bool
	}{
		{"", SVG, true},
		{"*/*", SVG, true},
		{"image/png", PNG, true},
		{"application/pdf", PDF, true},
		{"text/html, image/png;q=0.4, application/pdf;q=0.9", PDF, true},
		{"image/*;q=0.2, image/png", PNG, true},
		{"text/html", "", false},
		{"image/png;q=0", "", false},
	}
	for _, tc := range cases {
		t.Run(tc.accept, func(t *testing.T) {
			f, ok := Negotiate(tc.accept)
			assert.Equal(t, tc.ok, ok)
			assert.Equal(t, tc.want, f)
		})
	}
}

func TestSci(t *testing.T) {
	cases := []struct {
		v      float64
		digits int
		want   string
	}{
		{1.24e7, 3, "1.24×10⁷"}, {1e6, 2, "10⁶"}, {5000, 2, "5000"}, {0.233, 3, "0.233"},
		{2.5e-5, 2, "2.5×10⁻⁵"}, {9.9999e6, 2, "10⁷"}, {0, 2, "0"},
	}
	for _, tc := range cases {
		assert.Equal(t, tc.want, sci(tc.v, tc.digits), "%g", tc.v)
	}
}

func TestSegments(t *testing.T) {
	limits := []string{"a", "a", "b", "b", "b", "a"}
	got := segments([]int{0, 1, 2, 3, 4, 5}, limits)
	require.Len(t, got, 3)
	assert.Equal(t, segment{"a", []int{0, 1}}, got[0])
	assert.Equal(t, segment{"b", []int{1, 2, 3, 4}}, got[1], "shares its first column with the segment before")
	assert.Equal(t, segment{"a", []int{4, 5}}, got[2])
}
