package charts

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"scalematch/similarity"
)

// Envelope is the Reynolds-number envelope of a facility for a model of a given
// reference length: at each abscissa (free-stream Mach number, or speed in m/s in
// water and speed-rated facilities) the lowest and highest Reynolds number any
// setting within every facility limit reaches, and the limit that shapes each
// edge.
type Envelope struct {
	// FacilityID names the facility.
	FacilityID string
	// ReferenceLength is the model's reference length in m.
	ReferenceLength float64
	// Speed reports whether X are speeds in m/s rather than Mach numbers.
	Speed bool
	// X are the abscissae, ascending.
	X []float64
	// Low and High are the Reynolds-number bounds at each X; NaN: unreachable.
	Low, High []float64
	// LowLimit and HighLimit name the limit (a facilities.Constraint* name) that
	// sets Low and High at each X; where X is unreachable, the limit that rules it
	// out.
	LowLimit, HighLimit []string
	// FirstLimit and LastLimit name the limits that end the abscissa range on the
	// left and on the right (mach_min, mach_max, speed_min, speed_max).
	FirstLimit, LastLimit string
}

// Point is a point to mark on a chart: an abscissa (Mach number, or speed in
// m/s) and a Reynolds number.
type Point struct {
	X, Reynolds float64
}

// EnvelopeMarks is what a plan adds to its facility's envelope: the flight point
// (the full-scale Reynolds number at the flight Mach number or speed), the
// planned test point and the trade curve of the chosen model. Every field is
// optional.
type EnvelopeMarks struct {
	// PlanID names the plan the marks come from ("" for none).
	PlanID string
	// Flight is the flight point.
	Flight *Point
	// Test is the planned test point.
	Test *Point
	// Trade is the plan's trade curve; points with Reynolds 0 are unreachable and
	// left out.
	Trade []similarity.TradePoint
}

// EnvelopeCaution is the footer of every envelope chart: what the envelope
// leaves out and that it is an estimate.
const EnvelopeCaution = "Estimate only: the envelope is the Reynolds number within the facility's flow limits (Mach or speed, stagnation pressure and temperature, dynamic pressure, unit Reynolds number, condensation) for the given model reference length; it leaves out the model-size limits (span, blockage) and the balance load limits, which can lower it. The facility's approved limits, procedures and licensed engineering judgement govern."

// EnvelopeChart draws the envelope e with the marks m: the reachable region
// shaded, each edge drawn in the style of the limit that shapes it and named in
// the legend and beside the edge, the flight point, the planned test point and
// the trade curve.
func EnvelopeChart(e Envelope, m EnvelopeMarks) (*Chart, error) {
	xLabel := "free-stream Mach number (dimensionless)"
	if e.Speed {
		xLabel = "test-section speed (m/s)"
	}
	title := fmt.Sprintf("Reynolds number within the flow limits of %s, model reference length %.4g m", e.FacilityID, e.ReferenceLength)
	footer := EnvelopeCaution
	if m.PlanID != "" {
		title = fmt.Sprintf("Plan %s: %s envelope, model reference length %.4g m", m.PlanID, e.FacilityID, e.ReferenceLength)
		footer = EnvelopeCaution + " The trade curve does include the plan's model-size and balance load limits."
	}
	c := &Chart{Name: "envelope", Title: title, Footer: footer}
	p := newPlot(xLabel, fmt.Sprintf("Re on %.4g m (dimensionless)", e.ReferenceLength))
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = reynoldsTicks{}
	c.plot = p

	styles := map[string]int{}
	styleOf := func(limit string) series {
		i, ok := styles[limit]
		if !ok {
			i = len(styles)
			styles[limit] = i
		}
		return seriesStyle(i)
	}
	var labels []edgeLabel
	edgeLegend := map[string]bool{}
	addEdge := func(limit string, xys plotter.XYs, where vg.Point) error {
		if len(xys) < 2 {
			return nil
		}
		l, err := plotter.NewLine(xys)
		if err != nil {
			return err
		}
		l.LineStyle = styleOf(limit).line(2)
		p.Add(l)
		if !edgeLegend[limit] {
			edgeLegend[limit] = true
			c.addLegend("edge: "+LimitLabel(limit), l)
		}
		mid := xys[len(xys)/2]
		if len(xys)%2 == 0 {
			a, b := xys[len(xys)/2-1], xys[len(xys)/2]
			mid = plotter.XY{X: (a.X + b.X) / 2, Y: math.Sqrt(a.Y * b.Y)}
		}
		labels = append(labels, edgeLabel{mid, LimitLabel(limit), where})
		return nil
	}

	lo, hi := math.Inf(1), math.Inf(-1)
	rs := runs(e)
	for _, run := range rs {
		var poly plotter.XYs
		for _, i := range run {
			poly = append(poly, plotter.XY{X: e.X[i], Y: e.High[i]})
			lo, hi = math.Min(lo, e.Low[i]), math.Max(hi, e.High[i])
		}
		for k := len(run) - 1; k >= 0; k-- {
			poly = append(poly, plotter.XY{X: e.X[run[k]], Y: e.Low[run[k]]})
		}
		pg, err := plotter.NewPolygon(poly)
		if err != nil {
			return nil, err
		}
		pg.Color = regionFill()
		pg.LineStyle.Width = 0
		p.Add(pg)
		if len(c.legend) == 0 {
			c.addLegend("reachable within the limits", pg)
		}
	}
	grid := plotter.NewGrid()
	grid.Vertical, grid.Horizontal = gridStyle(), gridStyle()
	p.Add(grid)
	for _, run := range rs {
		for _, edge := range []struct {
			y     []float64
			limit []string
			where vg.Point
		}{{e.High, e.HighLimit, vg.Point{Y: 9}}, {e.Low, e.LowLimit, vg.Point{Y: -9}}} {
			for _, seg := range segments(run, edge.limit) {
				var xys plotter.XYs
				for _, i := range seg.idx {
					xys = append(xys, plotter.XY{X: e.X[i], Y: edge.y[i]})
				}
				if err := addEdge(seg.limit, xys, edge.where); err != nil {
					return nil, err
				}
			}
		}
		first, last := run[0], run[len(run)-1]
		if first == 0 && e.FirstLimit != "" {
			if err := addEdge(e.FirstLimit, plotter.XYs{{X: e.X[first], Y: e.Low[first]}, {X: e.X[first], Y: e.High[first]}}, vg.Point{X: -9}); err != nil {
				return nil, err
			}
		}
		if last == len(e.X)-1 && e.LastLimit != "" {
			if err := addEdge(e.LastLimit, plotter.XYs{{X: e.X[last], Y: e.Low[last]}, {X: e.X[last], Y: e.High[last]}}, vg.Point{X: 9}); err != nil {
				return nil, err
			}
		}
	}
	if len(labels) > 0 {
		p.Add(&edgeLabels{labels})
	}

	var trade plotter.XYs
	for _, tp := range m.Trade {
		if tp.Reynolds > 0 {
			x := tp.Mach
			if e.Speed {
				x = tp.Speed
			}
			trade = append(trade, plotter.XY{X: x, Y: tp.Reynolds})
			lo, hi = math.Min(lo, tp.Reynolds), math.Max(hi, tp.Reynolds)
		}
	}
	if len(trade) > 1 {
		l, err := plotter.NewLine(trade)
		if err != nil {
			return nil, err
		}
		l.LineStyle = draw.LineStyle{Color: ink(), Width: 1, Dashes: []vg.Length{5, 2, 1, 2}}
		s, err := plotter.NewScatter(trade)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: ink(), Radius: 2.2, Shape: draw.CrossGlyph{}}
		p.Add(l, s)
		c.addLegend("trade curve: best Re, chosen model", l, s)
	}
	for _, mk := range []struct {
		pt    *Point
		what  string
		glyph draw.GlyphStyle
	}{
		{m.Flight, "flight", draw.GlyphStyle{Color: ink(), Radius: 4.5, Shape: draw.CircleGlyph{}}},
		{m.Test, "planned test point", draw.GlyphStyle{Color: ink(), Radius: 6, Shape: draw.RingGlyph{}}},
	} {
		if mk.pt == nil || !(mk.pt.Reynolds > 0) {
			continue
		}
		s, err := plotter.NewScatter(plotter.XYs{{X: mk.pt.X, Y: mk.pt.Reynolds}})
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = mk.glyph
		p.Add(s)
		x := fmt.Sprintf("M %.3g", mk.pt.X)
		if e.Speed {
			x = fmt.Sprintf("%.3g m/s", mk.pt.X)
		}
		c.addLegend(fmt.Sprintf("%s: %s, Re %s", mk.what, x, sci(mk.pt.Reynolds, 3)), s)
		lo, hi = math.Min(lo, mk.pt.Reynolds), math.Max(hi, mk.pt.Reynolds)
		p.X.Min, p.X.Max = math.Min(p.X.Min, mk.pt.X), math.Max(p.X.Max, mk.pt.X)
	}
	if lo > hi {
		return nil, fmt.Errorf("charts: facility %s reaches no Reynolds number on %.4g m: nothing to draw", e.FacilityID, e.ReferenceLength)
	}
	// Room above and below for the edge labels, on the log axis.
	p.Y.Min, p.Y.Max = lo/1.6, hi*1.6
	pad := 0.03 * (p.X.Max - p.X.Min)
	p.X.Min, p.X.Max = p.X.Min-pad, p.X.Max+pad
	return c, nil
}

// runs returns the index runs of consecutive reachable columns of e.
func runs(e Envelope) [][]int {
	var out [][]int
	var cur []int
	for i := range e.X {
		ok := i < len(e.Low) && i < len(e.High) && e.Low[i] > 0 && e.High[i] > 0 &&
			!math.IsInf(e.High[i], 0)
		if ok {
			cur = append(cur, i)
			continue
		}
		if len(cur) > 0 {
			out = append(out, cur)
			cur = nil
		}
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// segment is a stretch of an edge shaped by one limit.
type segment struct {
	limit string
	idx   []int
}

// segments splits a run of columns where the limit changes; neighbouring
// segments share their end column so that the edge is drawn unbroken.
func segments(run []int, limits []string) []segment {
	lim := func(i int) string {
		if i < len(limits) {
			return limits[i]
		}
		return ""
	}
	var out []segment
	for k, i := range run {
		l := lim(i)
		if len(out) == 0 || out[len(out)-1].limit != l {
			s := segment{limit: l}
			if k > 0 {
				s.idx = append(s.idx, run[k-1])
			}
			out = append(out, s)
		}
		out[len(out)-1].idx = append(out[len(out)-1].idx, i)
	}
	return out
}

// edgeLabel names the limit of one edge segment beside its middle point, offset
// away from the region.
type edgeLabel struct {
	at     plotter.XY
	text   string
	offset vg.Point
}

// edgeLabels draws edge labels in small italic-free text with a white halo so
// that grid lines do not cross them.
type edgeLabels struct{ labels []edgeLabel }

func (el *edgeLabels) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := textStyle(8)
	for _, l := range el.labels {
		pt := vg.Point{X: trX(l.at.X) + l.offset.X, Y: trY(l.at.Y) + l.offset.Y}
		s := sty
		switch {
		case l.offset.Y > 0:
			s.XAlign, s.YAlign = draw.XCenter, draw.YBottom
		case l.offset.Y < 0:
			s.XAlign, s.YAlign = draw.XCenter, draw.YTop
		case l.offset.X < 0:
			s.Rotation = math.Pi / 2
			s.XAlign, s.YAlign = draw.XCenter, draw.YBottom
		default:
			s.Rotation = -math.Pi / 2
			s.XAlign, s.YAlign = draw.XCenter, draw.YBottom
		}
		c.FillText(s, pt, l.text)
	}
}
