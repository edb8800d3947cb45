package charts

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"scalematch/internal/loads"
)

// Loads is what the loads chart draws: one balance's load report (from a plan or
// a load check) and the balance's compiled ratings, which turn each point's loads
// into the utilisation of every component and gauge row.
type Loads struct {
	// FacilityID names the facility.
	FacilityID string
	// PlanID names the plan the report comes from; "" for a load check.
	PlanID string
	// Report is the balance's load report.
	Report loads.Report
	// Ratings are the balance's ratings (loads.BalanceRatings).
	Ratings loads.Ratings
}

// RowUtilization is the utilisation (|load| over the rated load, a fraction,
// not divided by the safety factor) of every rated row of ratings at each point
// of report: rows[i][k] is row i at point k.
func RowUtilization(report loads.Report, ratings loads.Ratings) [][]float64 {
	sf := ratings.SafetyFactor
	if sf == 0 {
		sf = 1
	}
	rows := make([][]float64, ratings.Rows())
	for i := range rows {
		rows[i] = make([]float64, len(report.Points))
		rated := ratings.Allowed(i) * sf
		for k, p := range report.Points {
			l := loadOf(p)
			rows[i][k] = math.Abs(ratings.Row(i, &l)) / rated
		}
	}
	return rows
}

// loadOf returns the loads of a point as a loads.Vector.
func loadOf(p loads.PointResult) loads.Vector {
	var l loads.Vector
	l[loads.IndexNormal] = p.Normal
	l[loads.IndexAxial] = p.Axial
	l[loads.IndexSide] = p.Side
	l[loads.IndexRollingMoment] = p.RollingMoment
	l[loads.IndexPitchingMoment] = p.PitchingMoment
	l[loads.IndexYawingMoment] = p.YawingMoment
	return l
}

// LoadsChart draws the utilisation of every component and gauge row of the
// balance against the angle of attack, in per cent of its rating, with the
// allowed line at 100 %/safety factor and every point above it marked. With
// several sideslip angles, each row's curve is its largest utilisation over β at
// each α, and the marks name the β of each point over the line.
func LoadsChart(in Loads) (*Chart, error) {
	r := in.Report
	if len(r.Points) == 0 {
		return nil, fmt.Errorf("charts: the load report of balance %s has no points", r.BalanceID)
	}
	if in.Ratings.Rows() == 0 {
		return nil, fmt.Errorf("charts: balance %s rates no component", r.BalanceID)
	}
	util := RowUtilization(r, in.Ratings)
	alphas, betas := []float64{}, []float64{}
	for _, p := range r.Points {
		if !slices.Contains(alphas, p.Alpha) {
			alphas = append(alphas, p.Alpha)
		}
		if !slices.Contains(betas, p.Beta) {
			betas = append(betas, p.Beta)
		}
	}
	slices.Sort(alphas)
	slices.Sort(betas)
	where := fmt.Sprintf("%s, balance %s", in.FacilityID, r.BalanceID)
	if in.PlanID != "" {
		where = fmt.Sprintf("plan %s, %s", in.PlanID, where)
	}
	title := fmt.Sprintf("Balance utilisation over the α sweep at q = %s Pa (%s)", sci(r.DynamicPressure, 4), where)
	yLabel := "utilisation (% of rated load)"
	if len(betas) > 1 {
		yLabel = "largest over β (% of rated load)"
		title += fmt.Sprintf(", β %.3g…%.3g°", betas[0], betas[len(betas)-1])
	}
	c := &Chart{Name: "loads", Title: title,
		Footer: "Estimate of steady loads from the article's aerodynamic estimate, with wall corrections" + weightNote(r.WeightIncluded) +
			". It leaves out unsteady, buffet, start-up and shut-down loads, model vibration and temperature effects on the balance. " +
			"The facility's approved limits, procedures and licensed engineering judgement govern; do not run a point above the allowed line."}
	p := newPlot("angle of attack α (degrees)", yLabel)
	c.plot = p
	grid := plotter.NewGrid()
	grid.Vertical, grid.Horizontal = gridStyle(), gridStyle()
	p.Add(grid)

	allowed := 100 * r.AllowedUtilization
	top := allowed
	for i := range util {
		xys := make(plotter.XYs, len(alphas))
		for j, a := range alphas {
			xys[j] = plotter.XY{X: a, Y: 0}
			for k, pt := range r.Points {
				if pt.Alpha == a {
					xys[j].Y = math.Max(xys[j].Y, 100*util[i][k])
				}
			}
			top = math.Max(top, xys[j].Y)
		}
		s := seriesStyle(i)
		line, pts, err := plotter.NewLinePoints(xys)
		if err != nil {
			return nil, err
		}
		line.LineStyle = s.line(1.5)
		pts.GlyphStyle = s.mark(2.6)
		p.Add(line, pts)
		c.addLegend(rowLabel(in.Ratings.RowName(i)), line, pts)
	}
	lim, err := plotter.NewLine(plotter.XYs{{X: alphas[0], Y: allowed}, {X: alphas[len(alphas)-1], Y: allowed}})
	if err != nil {
		return nil, err
	}
	lim.LineStyle = draw.LineStyle{Color: ink(), Width: 2.2, Dashes: []vg.Length{9, 3}}
	p.Add(lim)
	c.addLegend(fmt.Sprintf("allowed: 100 %%/safety factor %.3g = %.0f %%", r.SafetyFactor, allowed), lim)

	var over plotter.XYs
	var overText []string
	for _, pt := range r.Points {
		if pt.Utilization > r.AllowedUtilization*(1+1e-12) {
			over = append(over, plotter.XY{X: pt.Alpha, Y: 100 * pt.Utilization})
			t := rowLabel(pt.Limiting)
			if len(betas) > 1 {
				t += fmt.Sprintf(", β %.3g°", pt.Beta)
			}
			overText = append(overText, t)
		}
	}
	if len(over) > 0 {
		ring, err := plotter.NewScatter(over)
		if err != nil {
			return nil, err
		}
		ring.GlyphStyle = draw.GlyphStyle{Color: ink(), Radius: 6.5, Shape: draw.RingGlyph{}}
		cross, err := plotter.NewScatter(over)
		if err != nil {
			return nil, err
		}
		cross.GlyphStyle = draw.GlyphStyle{Color: ink(), Radius: 4.5, Shape: heavyCross{}}
		p.Add(ring, cross)
		c.addLegend(fmt.Sprintf("over the allowed load: %d point(s)", len(over)), ring, cross)
		if len(over) <= 12 {
			lb, err := plotter.NewLabels(plotter.XYLabels{XYs: over, Labels: overText})
			if err != nil {
				return nil, err
			}
			for i := range lb.TextStyle {
				lb.TextStyle[i] = textStyle(7.5)
				lb.TextStyle[i].XAlign = draw.XCenter
				lb.TextStyle[i].YAlign = draw.YBottom
			}
			lb.Offset = vg.Point{Y: 8}
			p.Add(lb)
		}
	}
	p.Y.Min = 0
	p.Y.Max = top * 1.12
	pad := 0.02 * (alphas[len(alphas)-1] - alphas[0])
	p.X.Min, p.X.Max = alphas[0]-pad, alphas[len(alphas)-1]+pad
	if p.X.Min == p.X.Max {
		p.X.Min, p.X.Max = p.X.Min-1, p.X.Max+1
	}
	return c, nil
}

// weightNote says whether the model's weight is in the loads.
func weightNote(included bool) string {
	if included {
		return " and the model's weight"
	}
	return "; the model's weight is left out (no model mass given)"
}

// rowLabel writes a component or gauge-row name in words.
func rowLabel(name string) string {
	return strings.ReplaceAll(name, "_", " ")
}

// heavyCross is a cross drawn with thick strokes, the over-the-limit mark.
type heavyCross struct{}

func (heavyCross) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	ls := draw.LineStyle{Color: sty.Color, Width: 2}
	r := sty.Radius * 0.75
	c.StrokeLine2(ls, pt.X-r, pt.Y-r, pt.X+r, pt.Y+r)
	c.StrokeLine2(ls, pt.X-r, pt.Y+r, pt.X+r, pt.Y-r)
}
