package api

import (
	"bytes"
	"fmt"
	"html"
	"image"
	"image/color"
	"image/png"
	"math"
	"strconv"
	"strings"
)

// envelopeChart is what an envelope chart shows: the lowest and highest Reynolds
// numbers a facility reaches at each abscissa (Mach number or speed in m/s), and
// optionally one marked flight point. Low and High are NaN where no setting of the
// facility reaches that abscissa.
type envelopeChart struct {
	Title string
	// Note is the caution line drawn under the chart (ASCII, at most 90 characters,
	// so that the PNG's small font fits it in the chart's width).
	Note string
	// Caution is the chart's full caution, the SVG's description.
	Caution string
	XLabel  string
	YLabel  string
	X       []float64
	Low     []float64
	High    []float64
	Mark    *chartMark
}

// chartMark is a marked point of a chart: abscissa, Reynolds number and a label.
type chartMark struct {
	X, Y  float64
	Label string
}

// Chart geometry in pixels (the SVG's user units are the same pixels).
const (
	chartWidth  = 760
	chartHeight = 480
	plotLeft    = 90
	plotRight   = chartWidth - 30
	plotTop     = 50
	plotBottom  = chartHeight - 70
)

// chartAxes maps data to pixels: linear abscissa, log10 ordinate.
type chartAxes struct {
	x0, x1     float64 // data range of the abscissa
	dec0, dec1 int     // decades of the ordinate: 10^dec0 … 10^dec1
	xTicks     []float64
}

func newChartAxes(c *envelopeChart) chartAxes {
	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for i, x := range c.X {
		if math.IsNaN(c.Low[i]) || math.IsNaN(c.High[i]) {
			continue
		}
		xmin, xmax = math.Min(xmin, x), math.Max(xmax, x)
		ymin, ymax = math.Min(ymin, c.Low[i]), math.Max(ymax, c.High[i])
	}
	if m := c.Mark; m != nil && m.X > 0 && m.Y > 0 {
		xmin, xmax = math.Min(xmin, m.X), math.Max(xmax, m.X)
		ymin, ymax = math.Min(ymin, m.Y), math.Max(ymax, m.Y)
	}
	if math.IsInf(xmin, 0) {
		xmin, xmax = 0, 1
	}
	if !(ymin > 0) || math.IsInf(ymin, 0) {
		ymin, ymax = 1e5, 1e7
	}
	step := niceStep((xmax - xmin) / 6)
	a := chartAxes{
		x0:   math.Floor(xmin/step) * step,
		x1:   math.Ceil(xmax/step) * step,
		dec0: int(math.Floor(math.Log10(ymin))),
		dec1: int(math.Ceil(math.Log10(ymax))),
	}
	if a.x1 <= a.x0 {
		a.x1 = a.x0 + step
	}
	if a.dec1 <= a.dec0 {
		a.dec1 = a.dec0 + 1
	}
	for v := a.x0; v <= a.x1+step/2; v += step {
		a.xTicks = append(a.xTicks, math.Round(v/step)*step)
	}
	return a
}

// niceStep returns the tick step 1, 2 or 5 × 10^k closest above span.
func niceStep(span float64) float64 {
	if !(span > 0) {
		return 0.1
	}
	p := math.Pow(10, math.Floor(math.Log10(span)))
	for _, m := range []float64{1, 2, 5, 10} {
		if span <= m*p {
			return m * p
		}
	}
	return 10 * p
}

func (a chartAxes) px(x float64) float64 {
	return plotLeft + (x-a.x0)/(a.x1-a.x0)*(plotRight-plotLeft)
}

func (a chartAxes) py(y float64) float64 {
	t := (math.Log10(y) - float64(a.dec0)) / float64(a.dec1-a.dec0)
	return plotBottom - t*(plotBottom-plotTop)
}

// segments splits the chart into runs of consecutive reachable abscissae.
func (c *envelopeChart) segments() [][2]int {
	var out [][2]int
	start := -1
	for i := range c.X {
		ok := !math.IsNaN(c.Low[i]) && !math.IsNaN(c.High[i])
		switch {
		case ok && start < 0:
			start = i
		case !ok && start >= 0:
			out = append(out, [2]int{start, i})
			start = -1
		}
	}
	if start >= 0 {
		out = append(out, [2]int{start, len(c.X)})
	}
	return out
}

// formatTick writes a tick value without the floating-point noise of the tick
// arithmetic (0.6000000000000001 is written 0.6).
func formatTick(v float64) string {
	return strconv.FormatFloat(v, 'g', 10, 64)
}

// svg renders the chart as a standalone SVG document.
func (c *envelopeChart) svg() []byte {
	a := newChartAxes(c)
	var b bytes.Buffer
	f := func(format string, args ...any) { fmt.Fprintf(&b, format, args...) }
	f(`<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" viewBox="0 0 %d %d" font-family="sans-serif" font-size="12">`+"\n",
		chartWidth, chartHeight, chartWidth, chartHeight)
	if c.Caution != "" {
		f("<desc>%s</desc>\n", html.EscapeString(c.Caution))
	}
	f(`<rect width="100%%" height="100%%" fill="#ffffff"/>` + "\n")
	f(`<text x="%d" y="28" font-size="15">%s</text>`+"\n", plotLeft, html.EscapeString(c.Title))
	// Grid and ticks.
	for _, t := range a.xTicks {
		x := a.px(t)
		f(`<line x1="%.1f" y1="%d" x2="%.1f" y2="%d" stroke="#dddddd"/>`+"\n", x, plotTop, x, plotBottom)
		f(`<text x="%.1f" y="%d" text-anchor="middle">%s</text>`+"\n", x, plotBottom+18, formatTick(t))
	}
	for d := a.dec0; d <= a.dec1; d++ {
		y := a.py(math.Pow(10, float64(d)))
		f(`<line x1="%d" y1="%.1f" x2="%d" y2="%.1f" stroke="#cccccc"/>`+"\n", plotLeft, y, plotRight, y)
		f(`<text x="%d" y="%.1f" text-anchor="end">10<tspan dy="-6" font-size="9">%d</tspan></text>`+"\n", plotLeft-8, y+4, d)
		if d < a.dec1 {
			for m := 2; m <= 9; m++ {
				ym := a.py(float64(m) * math.Pow(10, float64(d)))
				f(`<line x1="%d" y1="%.1f" x2="%d" y2="%.1f" stroke="#555555"/>`+"\n", plotLeft, ym, plotLeft+5, ym)
			}
		}
	}
	// Reachable region and its boundaries.
	for _, s := range c.segments() {
		var pts []string
		for i := s[0]; i < s[1]; i++ {
			pts = append(pts, fmt.Sprintf("%.1f,%.1f", a.px(c.X[i]), a.py(c.High[i])))
		}
		for i := s[1] - 1; i >= s[0]; i-- {
			pts = append(pts, fmt.Sprintf("%.1f,%.1f", a.px(c.X[i]), a.py(c.Low[i])))
		}
		f(`<polygon points="%s" fill="#9ecae1" fill-opacity="0.6" stroke="#2166ac" stroke-width="1.5"/>`+"\n", strings.Join(pts, " "))
	}
	// Axes.
	f(`<rect x="%d" y="%d" width="%d" height="%d" fill="none" stroke="#000000"/>`+"\n",
		plotLeft, plotTop, plotRight-plotLeft, plotBottom-plotTop)
	f(`<text x="%d" y="%d" text-anchor="middle">%s</text>`+"\n", (plotLeft+plotRight)/2, chartHeight-25, html.EscapeString(c.XLabel))
	if c.Note != "" {
		f(`<text x="%d" y="%d" font-size="11" fill="#b2182b">%s</text>`+"\n", 10, chartHeight-7, html.EscapeString(c.Note))
	}
	f(`<text transform="translate(22 %d) rotate(-90)" text-anchor="middle">%s</text>`+"\n", (plotTop+plotBottom)/2, html.EscapeString(c.YLabel))
	if m := c.Mark; m != nil && m.X > 0 && m.Y > 0 {
		x, y := a.px(m.X), a.py(m.Y)
		f(`<path d="M%.1f %.1fL%.1f %.1fM%.1f %.1fL%.1f %.1f" stroke="#b2182b" stroke-width="2.5"/>`+"\n",
			x-7, y-7, x+7, y+7, x-7, y+7, x+7, y-7)
		anchor, lx := "start", x+10
		if x > float64(plotRight)-160 {
			anchor, lx = "end", x-10 // near the right edge: label to the left of the mark
		}
		f(`<text x="%.1f" y="%.1f" fill="#b2182b" text-anchor="%s">%s</text>`+"\n", lx, y-8, anchor, html.EscapeString(m.Label))
	}
	f("</svg>\n")
	return b.Bytes()
}

// Colours of the PNG chart.
var (
	colGrid   = color.RGBA{0xdd, 0xdd, 0xdd, 0xff}
	colAxis   = color.RGBA{0x00, 0x00, 0x00, 0xff}
	colFill   = color.RGBA{0xc5, 0xdf, 0xee, 0xff}
	colEdge   = color.RGBA{0x21, 0x66, 0xac, 0xff}
	colMark   = color.RGBA{0xb2, 0x18, 0x2b, 0xff}
	colText   = color.RGBA{0x20, 0x20, 0x20, 0xff}
	colMinorT = color.RGBA{0x55, 0x55, 0x55, 0xff}
)

// canvas is an RGBA image with the few drawing operations the chart needs.
type canvas struct{ *image.RGBA }

func (cv canvas) hline(x0, x1, y int, c color.RGBA) {
	for x := min(x0, x1); x <= max(x0, x1); x++ {
		cv.SetRGBA(x, y, c)
	}
}

func (cv canvas) vline(x, y0, y1 int, c color.RGBA) {
	for y := min(y0, y1); y <= max(y0, y1); y++ {
		cv.SetRGBA(x, y, c)
	}
}

// line draws a line of the given width in pixels (Bresenham's algorithm, with a
// square pen).
func (cv canvas) line(x0, y0, x1, y1 float64, width int, c color.RGBA) {
	ix0, iy0, ix1, iy1 := int(math.Round(x0)), int(math.Round(y0)), int(math.Round(x1)), int(math.Round(y1))
	dx, dy := iabs(ix1-ix0), -iabs(iy1-iy0)
	sx, sy := 1, 1
	if ix0 > ix1 {
		sx = -1
	}
	if iy0 > iy1 {
		sy = -1
	}
	e := dx + dy
	h := width / 2
	for {
		for u := -h; u <= width-1-h; u++ {
			for v := -h; v <= width-1-h; v++ {
				cv.SetRGBA(ix0+u, iy0+v, c)
			}
		}
		if ix0 == ix1 && iy0 == iy1 {
			return
		}
		e2 := 2 * e
		if e2 >= dy {
			e += dy
			ix0 += sx
		}
		if e2 <= dx {
			e += dx
			iy0 += sy
		}
	}
}

func iabs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}

// glyphs is a 3×5 pixel font of the characters the chart's labels use; each glyph is
// five rows of three cells, '#' set. Lower-case letters are drawn as capitals.
var glyphs = map[rune]string{
	'0': "###" + "#.#" + "#.#" + "#.#" + "###", '1': ".#." + "##." + ".#." + ".#." + "###",
	'2': "###" + "..#" + "###" + "#.." + "###", '3': "###" + "..#" + "###" + "..#" + "###",
	'4': "#.#" + "#.#" + "###" + "..#" + "..#", '5': "###" + "#.." + "###" + "..#" + "###",
	'6': "###" + "#.." + "###" + "#.#" + "###", '7': "###" + "..#" + "..#" + "..#" + "..#",
	'8': "###" + "#.#" + "###" + "#.#" + "###", '9': "###" + "#.#" + "###" + "..#" + "###",
	'.': "..." + "..." + "..." + "..." + ".#.", '-': "..." + "..." + "###" + "..." + "...",
	'+': "..." + ".#." + "###" + ".#." + "...", '/': "..#" + "..#" + ".#." + "#.." + "#..",
	'(': ".#." + "#.." + "#.." + "#.." + ".#.", ')': ".#." + "..#" + "..#" + "..#" + ".#.",
	'=': "..." + "###" + "..." + "###" + "...", ',': "..." + "..." + "..." + ".#." + "#..",
	'^': ".#." + "#.#" + "..." + "..." + "...", ':': "..." + ".#." + "..." + ".#." + "...",
	'·': "..." + "..." + ".#." + "..." + "...", '×': "..." + "#.#" + ".#." + "#.#" + "...",
	'A': ".#." + "#.#" + "###" + "#.#" + "#.#", 'B': "##." + "#.#" + "##." + "#.#" + "##.",
	'C': ".##" + "#.." + "#.." + "#.." + ".##", 'D': "##." + "#.#" + "#.#" + "#.#" + "##.",
	'E': "###" + "#.." + "##." + "#.." + "###", 'F': "###" + "#.." + "##." + "#.." + "#..",
	'G': ".##" + "#.." + "#.#" + "#.#" + ".##", 'H': "#.#" + "#.#" + "###" + "#.#" + "#.#",
	'I': "###" + ".#." + ".#." + ".#." + "###", 'J': "..#" + "..#" + "..#" + "#.#" + ".#.",
	'K': "#.#" + "#.#" + "##." + "#.#" + "#.#", 'L': "#.." + "#.." + "#.." + "#.." + "###",
	'M': "#.#" + "###" + "###" + "#.#" + "#.#", 'N': "##." + "#.#" + "#.#" + "#.#" + "#.#",
	'O': ".#." + "#.#" + "#.#" + "#.#" + ".#.", 'P': "##." + "#.#" + "##." + "#.." + "#..",
	'Q': ".#." + "#.#" + "#.#" + "##." + ".##", 'R': "##." + "#.#" + "##." + "#.#" + "#.#",
	'S': ".##" + "#.." + ".#." + "..#" + "##.", 'T': "###" + ".#." + ".#." + ".#." + ".#.",
	'U': "#.#" + "#.#" + "#.#" + "#.#" + "###", 'V': "#.#" + "#.#" + "#.#" + "#.#" + ".#.",
	'W': "#.#" + "#.#" + "###" + "###" + "#.#", 'X': "#.#" + "#.#" + ".#." + "#.#" + "#.#",
	'Y': "#.#" + "#.#" + ".#." + ".#." + ".#.", 'Z': "###" + "..#" + ".#." + "#.." + "###",
}

// textScale is the pixel size of one font cell; a character advances 4 cells.
const textScale = 2

// textWidth returns the width in pixels of s drawn with text.
func textWidth(s string) int { return len([]rune(s)) * 4 * textScale }

// text draws s with its top-left corner at (x, y); characters without a glyph are
// left blank.
func (cv canvas) text(x, y int, s string, c color.RGBA) {
	for _, r := range strings.ToUpper(s) {
		if g, ok := glyphs[r]; ok {
			for i, cell := range g {
				if cell != '#' {
					continue
				}
				gx, gy := x+(i%3)*textScale, y+(i/3)*textScale
				for u := 0; u < textScale; u++ {
					for v := 0; v < textScale; v++ {
						cv.SetRGBA(gx+u, gy+v, c)
					}
				}
			}
		}
		x += 4 * textScale
	}
}

// vtext draws s rotated a quarter turn anticlockwise, reading upwards, with its
// bottom-left corner at (x, y).
func (cv canvas) vtext(x, y int, s string, c color.RGBA) {
	for _, r := range strings.ToUpper(s) {
		if g, ok := glyphs[r]; ok {
			for i, cell := range g {
				if cell != '#' {
					continue
				}
				col, row := i%3, i/3
				gx, gy := x+row*textScale, y-(col+1)*textScale
				for u := 0; u < textScale; u++ {
					for v := 0; v < textScale; v++ {
						cv.SetRGBA(gx+u, gy+v, c)
					}
				}
			}
		}
		y -= 4 * textScale
	}
}

// png renders the chart as a PNG image.
func (c *envelopeChart) png() ([]byte, error) {
	a := newChartAxes(c)
	cv := canvas{image.NewRGBA(image.Rect(0, 0, chartWidth, chartHeight))}
	for i := range cv.Pix {
		cv.Pix[i] = 0xff
	}
	cv.text(plotLeft, 20, c.Title, colText)
	for _, t := range a.xTicks {
		x := int(math.Round(a.px(t)))
		cv.vline(x, plotTop, plotBottom, colGrid)
		s := formatTick(t)
		cv.text(x-textWidth(s)/2, plotBottom+8, s, colText)
	}
	for d := a.dec0; d <= a.dec1; d++ {
		y := int(math.Round(a.py(math.Pow(10, float64(d)))))
		cv.hline(plotLeft, plotRight, y, colGrid)
		s := "10^" + strconv.Itoa(d)
		cv.text(plotLeft-8-textWidth(s), y-5, s, colText)
		if d < a.dec1 {
			for m := 2; m <= 9; m++ {
				ym := int(math.Round(a.py(float64(m) * math.Pow(10, float64(d)))))
				cv.hline(plotLeft, plotLeft+5, ym, colMinorT)
			}
		}
	}
	// Fill each pixel column between the interpolated boundaries.
	for _, s := range c.segments() {
		for i := s[0]; i+1 < s[1]; i++ {
			xa, xb := a.px(c.X[i]), a.px(c.X[i+1])
			for x := int(math.Ceil(xa)); float64(x) <= xb; x++ {
				t := 0.0
				if xb > xa {
					t = (float64(x) - xa) / (xb - xa)
				}
				yh := a.py(c.High[i]) + t*(a.py(c.High[i+1])-a.py(c.High[i]))
				yl := a.py(c.Low[i]) + t*(a.py(c.Low[i+1])-a.py(c.Low[i]))
				cv.vline(x, int(math.Round(yh)), int(math.Round(yl)), colFill)
			}
		}
		for i := s[0]; i+1 < s[1]; i++ {
			cv.line(a.px(c.X[i]), a.py(c.High[i]), a.px(c.X[i+1]), a.py(c.High[i+1]), 2, colEdge)
			cv.line(a.px(c.X[i]), a.py(c.Low[i]), a.px(c.X[i+1]), a.py(c.Low[i+1]), 2, colEdge)
		}
		first, last := s[0], s[1]-1
		cv.line(a.px(c.X[first]), a.py(c.Low[first]), a.px(c.X[first]), a.py(c.High[first]), 2, colEdge)
		cv.line(a.px(c.X[last]), a.py(c.Low[last]), a.px(c.X[last]), a.py(c.High[last]), 2, colEdge)
	}
	cv.hline(plotLeft, plotRight, plotTop, colAxis)
	cv.hline(plotLeft, plotRight, plotBottom, colAxis)
	cv.vline(plotLeft, plotTop, plotBottom, colAxis)
	cv.vline(plotRight, plotTop, plotBottom, colAxis)
	cv.text((plotLeft+plotRight-textWidth(c.XLabel))/2, chartHeight-35, c.XLabel, colText)
	if c.Note != "" {
		cv.text(10, chartHeight-15, c.Note, colMark)
	}
	cv.vtext(14, (plotTop+plotBottom+textWidth(c.YLabel))/2, c.YLabel, colText)
	if m := c.Mark; m != nil && m.X > 0 && m.Y > 0 {
		x, y := a.px(m.X), a.py(m.Y)
		cv.line(x-7, y-7, x+7, y+7, 3, colMark)
		cv.line(x-7, y+7, x+7, y-7, 3, colMark)
		lx := int(x) + 12
		if w := textWidth(m.Label); lx+w > chartWidth-4 {
			lx = int(x) - 12 - w // near the right edge: label to the left of the mark
		}
		cv.text(lx, int(y)-16, m.Label, colMark)
	}
	var b bytes.Buffer
	if err := png.Encode(&b, cv.RGBA); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
