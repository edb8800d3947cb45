package app

import (
	"context"
	"encoding/json"
	"fmt"
	"strings"

	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/charts"
	"scalematch/internal/check"
	"scalematch/internal/loads"
)

// Names of a plan's charts, as in GET /v1/plans/{id}/charts/{name}.{svg,png,pdf}.
const (
	ChartEnvelope = "envelope"
	ChartLoads    = "loads"
	ChartTrade    = "reynolds-trade"
)

// PlanChartNames lists the charts of a plan, in the order a report shows them.
func PlanChartNames() []string { return []string{ChartEnvelope, ChartLoads, ChartTrade} }

// PlanChart draws chart name of plan: the envelope of facility f (the version the
// plan used) with the plan's flight point, test point and trade curve; the load
// sweep of the plan's balance; or the Reynolds trade of the chosen model. f may be
// nil for a plan whose facility was given inline and not stored: its envelope and
// loads charts are then not available. Errors are *check.Error:
// CodeNotFound for an unknown name or a chart the plan cannot have.
func PlanChart(name string, plan *schema.PlanResponse, f *facilities.Facility) (*charts.Chart, error) {
	switch name {
	case ChartEnvelope:
		if f == nil {
			return nil, noChart(name, plan, "its facility was given inline and is not stored")
		}
		m := charts.EnvelopeMarks{PlanID: plan.ID, Trade: plan.TradeCurve,
			Test: &charts.Point{X: plan.Test.Mach, Reynolds: plan.Test.Reynolds}}
		if f.Medium.IsLiquid() {
			m.Test.X = plan.Test.Speed
		} else {
			m.Flight = &charts.Point{X: plan.Flight.Mach, Reynolds: plan.Flight.Reynolds}
		}
		e, err := EnvelopeOf(f, plan.Model.ReferenceLength)
		if err != nil {
			return nil, err
		}
		return charts.EnvelopeChart(e, m)
	case ChartLoads:
		if plan.Loads == nil {
			return nil, noChart(name, plan, "it has no balance loads (the facility lists no balance)")
		}
		if f == nil {
			return nil, noChart(name, plan, "its facility was given inline and is not stored, so its balance ratings are not known")
		}
		rs, err := BalanceRatings(f, plan.Loads.BalanceID)
		if err != nil {
			return nil, err
		}
		return charts.LoadsChart(charts.Loads{FacilityID: plan.FacilityID, PlanID: plan.ID, Report: *plan.Loads, Ratings: rs})
	case ChartTrade:
		return charts.TradeChart(charts.Trade{PlanID: plan.ID, FacilityID: plan.FacilityID,
			Speed: plan.Mismatch.MachDifference == nil, Flight: plan.Flight, Model: plan.Model,
			Test: plan.Test, Curve: plan.TradeCurve})
	}
	return nil, &check.Error{Code: check.CodeNotFound,
		Message: fmt.Sprintf("no chart %q: a plan's charts are %s", name, strings.Join(PlanChartNames(), ", "))}
}

// noChart is the error for a chart that plan cannot have, and why.
func noChart(name string, plan *schema.PlanResponse, why string) error {
	return &check.Error{Code: check.CodeNotFound,
		Message: fmt.Sprintf("plan %s has no %s chart: %s", plan.ID, name, why)}
}

// BalanceRatings compiles the ratings of facility f's balance id.
func BalanceRatings(f *facilities.Facility, id string) (loads.Ratings, error) {
	for i := range f.Balances {
		if f.Balances[i].ID == id {
			return loads.BalanceRatings(f, i)
		}
	}
	return loads.Ratings{}, &check.Error{Code: check.CodeNotFound,
		Message: fmt.Sprintf("facility %s has no balance %q", f.ID, id)}
}

// DecodePlan reads a stored plan's JSON body. A load report's
// max_safe_dynamic_pressure written as null (no rated load grows with the
// dynamic pressure) is read back as +Inf, as the planner answered it
// (loads.Ceiling).
func DecodePlan(body []byte) (*schema.PlanResponse, error) {
	var p schema.PlanResponse
	if err := json.Unmarshal(body, &p); err != nil {
		return nil, fmt.Errorf("decoding a stored plan: %w", err)
	}
	return &p, nil
}

// FacilityOf returns the facility version plan was made in: inline, when the
// request gave the facility inline, else the catalog's version plan names (the
// demo catalog's facility when p has no catalog).
func (p *Planner) FacilityOf(ctx context.Context, plan *schema.PlanResponse, inline *facilities.Facility) (*facilities.Facility, error) {
	if inline != nil {
		f := *inline
		return &f, nil
	}
	var cat facilities.Catalog = facilities.DemoCatalog{}
	if p.Catalog != nil {
		cat = p.Catalog
	}
	return facilityVersion(ctx, cat, plan.FacilityID, plan.FacilityVersion)
}

// facilityVersion returns version v of catalog facility id; v 0 (a plan made
// against the built-in demo facilities) is the current version.
func facilityVersion(ctx context.Context, cat facilities.Catalog, id string, v int) (*facilities.Facility, error) {
	var f facilities.Facility
	var err error
	if v > 0 {
		f, err = cat.FacilityVersion(ctx, id, v)
	} else {
		f, err = cat.Facility(ctx, id)
	}
	if err != nil {
		return nil, err
	}
	return &f, nil
}

// StoredPlan returns the answer of plan id stored in cat and the facility version it used (nil
// for a facility given inline). The plan not being stored is CodeNotFound.
func StoredPlan(ctx context.Context, cat facilities.Catalog, id string) (*schema.PlanResponse, *facilities.Facility, error) {
	rec, err := cat.Plan(ctx, id)
	if err != nil {
		return nil, nil, err
	}
	plan, err := DecodePlan(rec.Body)
	if err != nil {
		return nil, nil, err
	}
	if rec.FacilityID == "" {
		return plan, nil, nil
	}
	f, err := facilityVersion(ctx, cat, rec.FacilityID, rec.FacilityVersion)
	if err != nil {
		return nil, nil, err
	}
	return plan, f, nil
}
