package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/app"
	"scalematch/internal/charts"
	"scalematch/internal/check"
)

// writeCharts writes every chart plan has into o.chartDir as NAME.svg, NAME.png
// and NAME.pdf, and names each file written on o.stderr. A chart the plan
// cannot have (no balance, an inline facility) is noted there and skipped.
func (o *computeOptions) writeCharts(ctx context.Context, p *app.Planner, plan *schema.PlanResponse, inline *facilities.Facility) error {
	if o.chartDir == "" {
		return nil
	}
	f, err := p.FacilityOf(ctx, plan, inline)
	if err != nil {
		return explain(err)
	}
	if err := os.MkdirAll(o.chartDir, 0o755); err != nil {
		return err
	}
	for _, name := range app.PlanChartNames() {
		ch, err := app.PlanChart(name, plan, f)
		if check.ErrorCode(err) == check.CodeNotFound {
			fmt.Fprintf(o.stderr, "chart %s: %v\n", name, err)
			continue
		}
		if err != nil {
			return err
		}
		for _, format := range charts.Formats() {
			b, err := ch.Render(format)
			if err != nil {
				return err
			}
			path := filepath.Join(o.chartDir, name+"."+string(format))
			if err := os.WriteFile(path, b, 0o644); err != nil {
				return err
			}
			fmt.Fprintf(o.stderr, "chart %s: wrote %s\n", name, path)
		}
	}
	return nil
}
