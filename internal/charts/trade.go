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

// Trade is what the Reynolds-trade chart draws, all from a plan's answer: the
// flight, the test condition, the mismatch and the trade curve of the chosen
// model.
type Trade struct {
	// PlanID names the plan.
	PlanID string
	// FacilityID names the facility.
	FacilityID string
	// Speed reports a water facility, where the Mach number is no similarity
	// target: the abscissa is then the test speed in m/s.
	Speed bool
	// Flight is the full-scale flight state.
	Flight similarity.FlightState
	// Model is the chosen model.
	Model similarity.ModelSize
	// Test is the planned test condition.
	Test similarity.Test
	// Curve is the trade curve: the best Reynolds number at each test Mach number
	// (speed) for the chosen model; points with Reynolds 0 are left out.
	Curve []similarity.TradePoint
}

// TradeChart draws the Reynolds-number ratio Re_test/Re_flight reachable with the
// chosen model against the Mach-number difference M_test − M_flight (speed
// speed in m/s in water), with the planned point and the lines where each number
// is matched.
func TradeChart(in Trade) (*Chart, error) {
	if !(in.Flight.Reynolds > 0) {
		return nil, fmt.Errorf("charts: plan %s has no flight Reynolds number", in.PlanID)
	}
	dx := func(mach, speed float64) float64 {
		if in.Speed {
			return speed
		}
		return mach - in.Flight.Mach
	}
	xLabel := "Mach-number difference ΔM = M_test − M_flight (dimensionless)"
	if in.Speed {
		xLabel = "test-section speed (m/s)"
	}
	title := fmt.Sprintf("Reynolds trade of the 1:%.3g model in %s (plan %s)", 1/in.Model.Scale, in.FacilityID, in.PlanID)
	c := &Chart{Name: "reynolds-trade", Title: title,
		Footer: "Estimate: the best Reynolds number the chosen model reaches at each test Mach number (speed) within the facility's limits, its size limits and the balance's rated loads. " +
			"It leaves out drive power, run time and the Reynolds effects themselves (transition, separation); other scales trade differently. " +
			"The facility's approved limits, procedures and licensed engineering judgement govern."}
	p := newPlot(xLabel, "Re_test / Re_flight (dimensionless)")
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = ratioTicks{}
	c.plot = p
	grid := plotter.NewGrid()
	grid.Vertical, grid.Horizontal = gridStyle(), gridStyle()
	p.Add(grid)

	var xys plotter.XYs
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, tp := range in.Curve {
		if tp.Reynolds > 0 {
			y := tp.Reynolds / in.Flight.Reynolds
			xys = append(xys, plotter.XY{X: dx(tp.Mach, tp.Speed), Y: y})
			lo, hi = math.Min(lo, y), math.Max(hi, y)
		}
	}
	if len(xys) > 0 {
		s := seriesStyle(0)
		line, pts, err := plotter.NewLinePoints(xys)
		if err != nil {
			return nil, err
		}
		line.LineStyle = s.line(1.8)
		pts.GlyphStyle = s.mark(2)
		p.Add(line, pts)
		c.addLegend("best ratio for the chosen model", line, pts)
	}
	tx, ty := dx(in.Test.Mach, in.Test.Speed), in.Test.Reynolds/in.Flight.Reynolds
	lo, hi = math.Min(lo, ty), math.Max(hi, ty)
	lo, hi = math.Min(lo, 1), math.Max(hi, 1)
	xmin, xmax := math.Min(p.X.Min, tx), math.Max(p.X.Max, tx)
	if !in.Speed {
		xmin, xmax = math.Min(xmin, 0), math.Max(xmax, 0)
	}
	if xmin == xmax {
		xmin, xmax = xmin-0.05, xmax+0.05
	}
	ymin, ymax := lo/1.3, hi*1.3

	match := draw.LineStyle{Color: seriesStyle(1).color, Width: 1.2, Dashes: []vg.Length{6, 3}}
	reLine, err := plotter.NewLine(plotter.XYs{{X: xmin, Y: 1}, {X: xmax, Y: 1}})
	if err != nil {
		return nil, err
	}
	reLine.LineStyle = match
	machLine, err := plotter.NewLine(plotter.XYs{{X: 0, Y: ymin}, {X: 0, Y: ymax}})
	if err != nil {
		return nil, err
	}
	machLine.LineStyle = draw.LineStyle{Color: seriesStyle(4).color, Width: 1.2, Dashes: []vg.Length{2, 2}}
	p.Add(reLine)
	c.addLegend("Reynolds number matched (ratio 1)", reLine)
	if !in.Speed {
		p.Add(machLine)
		c.addLegend("Mach number matched", machLine)
	}
	test, err := plotter.NewScatter(plotter.XYs{{X: tx, Y: ty}})
	if err != nil {
		return nil, err
	}
	test.GlyphStyle = draw.GlyphStyle{Color: ink(), Radius: 6, Shape: draw.RingGlyph{}}
	p.Add(test)
	at := fmt.Sprintf("ΔM %+.3g", tx)
	if in.Speed {
		at = fmt.Sprintf("%.3g m/s", tx)
	}
	c.addLegend(fmt.Sprintf("planned test: ratio %.3g at %s", ty, at), test)
	p.X.Min, p.X.Max = xmin-0.03*(xmax-xmin), xmax+0.03*(xmax-xmin)
	p.Y.Min, p.Y.Max = ymin, ymax
	return c, nil
}

// ratioTicks marks a logarithmic ratio axis at 1, 2 and 5 of each decade (with
// 1.5, 3 and 7 too when it spans less than a decade), labelled plainly.
type ratioTicks struct{}

func (ratioTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) {
		return nil
	}
	steps := []float64{1, 2, 5}
	if hi/lo < 10 {
		steps = []float64{1, 1.5, 2, 3, 5, 7}
	}
	var ts []plot.Tick
	for d := int(math.Floor(math.Log10(lo))); d <= int(math.Ceil(math.Log10(hi))); d++ {
		for _, s := range steps {
			v := s * math.Pow(10, float64(d))
			if v >= lo && v <= hi {
				ts = append(ts, plot.Tick{Value: v, Label: sci(v, 2)})
			}
		}
	}
	return ts
}
