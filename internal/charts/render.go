package charts

import (
	"bytes"
	"fmt"
	"image/color"
	"mime"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Format is an output format of a chart: "svg", "png" or "pdf".
type Format string

// The formats Render writes.
const (
	SVG Format = "svg"
	PNG Format = "png"
	PDF Format = "pdf"
)

// Formats lists every format, in the order content negotiation prefers them.
func Formats() []Format { return []Format{SVG, PNG, PDF} }

// ParseFormat returns the format named by a file extension without its dot
// ("svg", "png", "pdf"; case-insensitive).
func ParseFormat(ext string) (Format, bool) {
	f := Format(strings.ToLower(ext))
	switch f {
	case SVG, PNG, PDF:
		return f, true
	}
	return "", false
}

// ContentType returns the media type of f.
func (f Format) ContentType() string {
	switch f {
	case SVG:
		return "image/svg+xml"
	case PNG:
		return "image/png"
	case PDF:
		return "application/pdf"
	}
	return ""
}

// Negotiate picks the format an Accept header asks for: the first of its media
// ranges (in order of quality, then of appearance) that one of the formats
// matches; "*/*" and "image/*" give SVG. An empty header gives SVG. It reports
// false when nothing acceptable is drawn.
func Negotiate(accept string) (Format, bool) {
	accept = strings.TrimSpace(accept)
	if accept == "" {
		return SVG, true
	}
	type choice struct {
		f Format
		q float64
		i int
	}
	best := choice{q: -1}
	for i, part := range strings.Split(accept, ",") {
		mt, params, err := mime.ParseMediaType(strings.TrimSpace(part))
		if err != nil {
			continue
		}
		q := 1.0
		if s, ok := params["q"]; ok {
			if _, err := fmt.Sscanf(s, "%g", &q); err != nil {
				continue
			}
		}
		if q <= 0 {
			continue
		}
		var f Format
		switch mt {
		case "*/*", "image/*", "image/svg+xml":
			f = SVG
		case "image/png":
			f = PNG
		case "application/pdf", "application/*":
			f = PDF
		default:
			continue
		}
		if q > best.q {
			best = choice{f, q, i}
		}
	}
	return best.f, best.q > 0
}

// Chart is one drawing, ready to be written in any Format.
type Chart struct {
	// Name is the chart's name in URLs and file names ("envelope", "loads",
	// "reynolds-trade").
	Name string
	// Title is the chart's title, as drawn.
	Title string
	// Footer is the caution drawn under the chart: what the estimate leaves out.
	Footer string

	plot   *plot.Plot
	legend []legendEntry
}

// legendEntry is one line of a chart's legend.
type legendEntry struct {
	text   string
	thumbs []plot.Thumbnailer
}

// addLegend adds a legend line.
func (c *Chart) addLegend(text string, thumbs ...plot.Thumbnailer) {
	c.legend = append(c.legend, legendEntry{text, thumbs})
}

// Legend returns the texts of the legend's lines.
func (c *Chart) Legend() []string {
	out := make([]string, len(c.legend))
	for i, e := range c.legend {
		out[i] = e.text
	}
	return out
}

// Render writes the chart in format f: Width × Height, PNG at DPI.
func (c *Chart) Render(f Format) ([]byte, error) {
	var cw vg.CanvasWriterTo
	switch f {
	case SVG:
		cw = vgsvg.New(Width, Height)
	case PNG:
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(Width, Height), vgimg.UseDPI(DPI),
			vgimg.UseBackgroundColor(color.White))}
	case PDF:
		pc := vgpdf.New(Width, Height)
		pc.EmbedFonts(true)
		cw = pc
	default:
		return nil, fmt.Errorf("charts: unknown format %q", f)
	}
	c.draw(draw.New(cw))
	var b bytes.Buffer
	if _, err := cw.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("charts: writing %s: %w", f, err)
	}
	return b.Bytes(), nil
}

// Layout of the page around the plot, in points.
const (
	margin      vg.Length = 10
	legendGap   vg.Length = 12
	legendThumb vg.Length = 26
	footerSize  vg.Length = 8
	titleSize   vg.Length = 12
	legendSize  vg.Length = 9
	maxLegendW  vg.Length = 3 * vg.Inch
)

// draw lays out the page: the footer along the bottom, the legend down the right
// side, the plot in the rest.
func (c *Chart) draw(dc draw.Canvas) {
	dc.SetColor(color.White)
	var bg vg.Path
	bg.Move(dc.Min)
	bg.Line(vg.Point{X: dc.Max.X, Y: dc.Min.Y})
	bg.Line(dc.Max)
	bg.Line(vg.Point{X: dc.Min.X, Y: dc.Max.Y})
	bg.Close()
	dc.Fill(bg)

	inner := draw.Crop(dc, margin, -margin, margin, -margin)
	ts := textStyle(titleSize)
	ts.XAlign, ts.YAlign = draw.XCenter, draw.YTop
	titleLines := wrap(ts, c.Title, inner.Max.X-inner.Min.X)
	ty := inner.Max.Y
	for _, l := range titleLines {
		inner.FillText(ts, vg.Point{X: (inner.Min.X + inner.Max.X) / 2, Y: ty}, l)
		ty -= ts.Height("Mg") * 1.2
	}
	inner = draw.Crop(inner, 0, 0, 0, ty-inner.Max.Y-6)
	fs := textStyle(footerSize)
	lines := wrap(fs, c.Footer, inner.Max.X-inner.Min.X)
	lineH := fs.Height("Mg") * 1.15
	footerH := lineH*vg.Length(len(lines)) + 6
	fs.YAlign = draw.YTop
	y := inner.Min.Y + footerH - 2
	for _, l := range lines {
		inner.FillText(fs, vg.Point{X: inner.Min.X, Y: y}, l)
		y -= lineH
	}
	area := draw.Crop(inner, 0, 0, footerH+4, 0)
	if len(c.legend) > 0 {
		ls := textStyle(legendSize)
		w := vg.Length(0)
		for _, e := range c.legend {
			w = max(w, ls.Width(e.text))
		}
		w = min(w+legendThumb+ls.Width(" ")+4, maxLegendW)
		l := plot.NewLegend()
		l.TextStyle = ls
		l.Top, l.Left = true, true
		l.ThumbnailWidth = legendThumb
		l.Padding = 3
		for _, e := range c.legend {
			l.Add(e.text, e.thumbs...)
		}
		lc := draw.Crop(area, area.Max.X-area.Min.X-w, 0, 0, -8)
		l.Draw(lc)
		area = draw.Crop(area, 0, -(w + legendGap), 0, 0)
	}
	c.plot.Draw(area)
}

// wrap breaks s into lines no wider than w in style sty.
func wrap(sty text.Style, s string, w vg.Length) []string {
	var lines []string
	for _, para := range strings.Split(s, "\n") {
		line := ""
		for _, word := range strings.Fields(para) {
			try := word
			if line != "" {
				try = line + " " + word
			}
			if line != "" && sty.Width(try) > w {
				lines = append(lines, line)
				line = word
				continue
			}
			line = try
		}
		if line != "" {
			lines = append(lines, line)
		}
	}
	return lines
}
