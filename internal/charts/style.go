package charts

import (
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"scalematch/facilities"
)

// Page size of every chart: 8 in × 5.5 in, 768 × 528 pixels in PNG (96 dots per
// inch).
const (
	Width  = 8 * vg.Inch
	Height = 5.5 * vg.Inch
	// DPI is the resolution of PNG output in dots per inch.
	DPI = 96
)

// ink is the colour of text, axes and marks that need no colour.
func ink() color.Color { return color.RGBA{R: 0x1a, G: 0x1a, B: 0x1a, A: 0xff} }

// regionFill is the fill of an envelope's reachable region.
func regionFill() color.Color { return color.RGBA{R: 0xdc, G: 0xe5, B: 0xee, A: 0xff} }

// series is the look of one data series: colour, dash pattern and marker.
type series struct {
	color  color.Color
	dashes []vg.Length
	glyph  draw.GlyphDrawer
}

// seriesStyle returns the look of the i-th series (cycling after 8); see the
// package doc for the reasoning.
func seriesStyle(i int) series {
	rgb := func(r, g, b uint8) color.Color { return color.RGBA{R: r, G: g, B: b, A: 0xff} }
	d := func(l ...vg.Length) []vg.Length { return l }
	all := [...]series{
		{rgb(0x1d, 0x35, 0x57), nil, draw.CircleGlyph{}},             // navy, solid
		{rgb(0xd9, 0x7a, 0x1c), d(7, 3), draw.TriangleGlyph{}},       // orange, dashed
		{rgb(0x4a, 0x98, 0xd4), d(2, 2), draw.SquareGlyph{}},         // sky blue, dotted
		{rgb(0x7d, 0x4a, 0x12), d(10, 3, 2, 3), draw.PyramidGlyph{}}, // brown, dash-dot
		{rgb(0x70, 0x70, 0x70), d(4, 2), draw.PlusGlyph{}},           // grey, short dashes
		{rgb(0xb0, 0x3a, 0x6e), d(12, 4), draw.BoxGlyph{}},           // rose, long dashes
		{rgb(0x3c, 0x55, 0x6b), d(2, 2, 6, 2), draw.RingGlyph{}},     // slate, dot-dash
		{rgb(0x10, 0x10, 0x10), d(1, 3), draw.CrossGlyph{}},          // black, fine dots
	}
	return all[((i%len(all))+len(all))%len(all)]
}

// lineStyle returns the line style of series i with width w.
func (s series) line(w vg.Length) draw.LineStyle {
	return draw.LineStyle{Color: s.color, Width: w, Dashes: s.dashes}
}

// glyphStyle returns the marker style of series s with radius r.
func (s series) mark(r vg.Length) draw.GlyphStyle {
	return draw.GlyphStyle{Color: s.color, Radius: r, Shape: s.glyph}
}

// sans returns the sans-serif face of the given size (Liberation Sans, shipped
// with gonum/plot).
func sans(size vg.Length) font.Font {
	return font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, size)
}

// textStyle returns a near-black sans-serif text style of the given size.
func textStyle(size vg.Length) text.Style {
	return text.Style{Color: ink(), Font: sans(size), Handler: plot.DefaultTextHandler}
}

// newPlot returns a plot in the package's look: sans-serif text, near-black
// axes, a light grid drawn by the caller when wanted.
func newPlot(xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	// The chart draws its title across the whole page (Chart.draw), not over
	// the plot area alone.
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = sans(10.5)
		a.Label.TextStyle.Color = ink()
		a.Tick.Label.Font = sans(9)
		a.Tick.Label.Color = ink()
		a.Color = ink()
		a.Tick.Color = ink()
	}
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	return p
}

// gridStyle is the faint grid behind the data.
func gridStyle() draw.LineStyle {
	return draw.LineStyle{Color: color.Gray{Y: 0xd8}, Width: 0.5}
}

// LimitLabel names a limit (a facilities.Constraint* name or a balance load
// limit's name) in words for a chart or a page; an unknown name is returned with
// its underscores as spaces.
func LimitLabel(name string) string {
	switch name {
	case facilities.ConstraintMachMin:
		return "lowest Mach number"
	case facilities.ConstraintMachMax:
		return "highest Mach number"
	case facilities.ConstraintSpeedMin:
		return "lowest speed"
	case facilities.ConstraintSpeedMax:
		return "highest speed"
	case facilities.ConstraintPressureMin:
		return "lowest stagnation pressure"
	case facilities.ConstraintPressureMax:
		return "highest stagnation pressure"
	case facilities.ConstraintTempMin:
		return "lowest stagnation temperature"
	case facilities.ConstraintTempMax:
		return "highest stagnation temperature"
	case facilities.ConstraintDynamic:
		return "dynamic-pressure limit"
	case facilities.ConstraintReynoldsUnit:
		return "unit Reynolds number limit"
	case facilities.ConstraintCondensation:
		return "condensation margin"
	case facilities.ConstraintSpan:
		return "span limit"
	case facilities.ConstraintBlockage:
		return "blockage limit"
	case facilities.ConstraintScaleMin:
		return "smallest scale"
	case facilities.ConstraintScaleMax:
		return "largest scale"
	case facilities.ConstraintBalance:
		return "balance load limit"
	case "":
		return "no limit named"
	}
	return strings.ReplaceAll(name, "_", " ")
}

// superscript maps the digits and minus sign of an exponent to superscripts.
var superscript = strings.NewReplacer("0", "⁰", "1", "¹", "2", "²", "3", "³", "4", "⁴",
	"5", "⁵", "6", "⁶", "7", "⁷", "8", "⁸", "9", "⁹", "-", "⁻")

// sci formats v with digits significant digits as "4.2×10⁷" (plain below 10⁴
// and above 10⁻³).
func sci(v float64, digits int) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return strconv.FormatFloat(v, 'g', digits, 64)
	}
	e := int(math.Floor(math.Log10(math.Abs(v))))
	if e >= -3 && e < 4 {
		r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', digits, 64), 64)
		return strconv.FormatFloat(r, 'f', -1, 64)
	}
	m := v / math.Pow(10, float64(e))
	ms := strconv.FormatFloat(m, 'g', digits, 64)
	if r, _ := strconv.ParseFloat(ms, 64); math.Abs(r) >= 10 { // rounding carried into the next decade
		e++
		ms = strconv.FormatFloat(m/10, 'g', digits, 64)
	}
	if ms == "1" {
		return "10" + superscript.Replace(strconv.Itoa(e))
	}
	return ms + "×10" + superscript.Replace(strconv.Itoa(e))
}

// reynoldsTicks marks a logarithmic Reynolds-number axis: 1, 2 and 5 in each
// decade when the axis spans fewer than three decades, else the decades alone,
// labelled as powers of ten.
type reynoldsTicks struct{}

func (reynoldsTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) {
		return nil
	}
	d0 := int(math.Floor(math.Log10(lo)))
	d1 := int(math.Ceil(math.Log10(hi)))
	steps := []float64{1, 2, 5}
	if d1-d0 > 3 {
		steps = []float64{1}
	}
	var ts []plot.Tick
	for d := d0; d <= d1; d++ {
		for _, s := range steps {
			v := s * math.Pow(10, float64(d))
			if v < lo*(1-1e-9) || v > hi*(1+1e-9) {
				continue
			}
			ts = append(ts, plot.Tick{Value: v, Label: sci(v, 2)})
		}
		for m := 2; m <= 9 && len(steps) == 1; m++ {
			v := float64(m) * math.Pow(10, float64(d))
			if v >= lo && v <= hi {
				ts = append(ts, plot.Tick{Value: v})
			}
		}
	}
	return ts
}

// percent formats a fraction as a percentage with no decimals.
func percent(f float64) string { return fmt.Sprintf("%.0f %%", 100*f) }

// Number formats v with digits significant digits as the charts label it:
// plainly from 10⁻³ to 10⁴, else as "4.2×10⁷". The pages use it too.
func Number(v float64, digits int) string { return sci(v, digits) }
