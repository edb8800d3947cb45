package campaign

import (
	"scalematch/facilities"
)

// Result is a planned campaign. Numbers are SI (Pa, K, m/s, hours where named);
// a Reynolds ratio is Re_test/Re_flight and its closeness min(r, 1/r), the
// quantity the aim maximises (a test Reynolds number above the flight's is as
// far off as one below it by the same factor).
type Result struct {
	// Policy is the model policy used.
	Policy string `json:"policy" enums:"one_model,model_per_facility,existing_models"`
	// Aim is the campaign's aim.
	Aim string `json:"aim" enums:"lowest_reynolds_ratio,mean_reynolds_ratio"`
	// Facilities are the candidate facilities in the request's order, each with
	// its model, the conditions it serves and its schedule.
	Facilities []FacilityPlan `json:"facilities"`
	// Conditions are every condition in the request's order (explicit, then
	// grid), with the facility serving it or the limits that exclude it.
	Conditions []ConditionPlan `json:"conditions"`
	// Summary sums the campaign up.
	Summary Summary `json:"summary"`
	// Search says how the model scales were found.
	Search SearchStats `json:"search"`
	// Warnings are notes on the request and the result.
	Warnings []string `json:"warnings"`
	// Cautions are the safety cautions of every facility and load check:
	// estimates only; the facility's approved limits, procedures and licensed
	// engineering judgement govern.
	Cautions []string `json:"cautions"`
}

// FacilityPlan is one facility's part of the campaign.
type FacilityPlan struct {
	// FacilityID names the facility ("" for an inline facility without id).
	FacilityID string `json:"facility_id"`
	// FacilityVersion is the catalog version used; 0 when inline.
	FacilityVersion int `json:"facility_version"`
	// Scale is the model scale tested here (model length over full-scale
	// length); 0 when the facility serves no condition and no scale was fixed.
	Scale float64 `json:"scale"`
	// ScaleReason says why the scale is what it is.
	ScaleReason ScaleReason `json:"scale_reason"`
	// LargestScale is the largest scale the test section takes (span and
	// blockage limits).
	LargestScale float64 `json:"largest_scale"`
	// BalanceIDs are the balances the served conditions use, most used first;
	// empty without balances. More than one means a balance change between runs.
	BalanceIDs []string `json:"balance_ids"`
	// ConditionsServed is the number of conditions assigned here.
	ConditionsServed int `json:"conditions_served"`
	// RunOrder lists the labels of the conditions served, in the order to run
	// them.
	RunOrder []string `json:"run_order"`
	// Schedule is the time of the conditions served in RunOrder; null when the
	// facility gives no operations figures.
	Schedule *facilities.Schedule `json:"schedule"`
	// HoursWithoutSharing is the schedule's hours, in the best order, before
	// level sharing; equal to Schedule.Hours when sharing is off or changed
	// nothing.
	HoursWithoutSharing float64 `json:"hours_without_sharing"`
	// HoursCallerOrder is the schedule's hours with the conditions in the
	// request's order (before sharing).
	HoursCallerOrder float64 `json:"hours_caller_order"`
	// LowestReynoldsRatio and MeanReynoldsRatio are over the conditions served
	// here (0 when none).
	LowestReynoldsRatio float64 `json:"lowest_reynolds_ratio"`
	MeanReynoldsRatio   float64 `json:"mean_reynolds_ratio"`
}

// ScaleReason says what set a facility's model scale.
type ScaleReason struct {
	// Kind is fixed (the request fixed it), existing_model (chosen among the
	// listed models), test_section (the largest that fits), condition_best (a
	// condition's own best scale), crossing (where two conditions' Reynolds
	// ratios meet: one rises with scale, the other falls), or none (the
	// facility serves nothing).
	Kind string `json:"kind" enums:"fixed,existing_model,test_section,condition_best,crossing,scale_bound,none"`
	// Condition is the label of the condition that limits the campaign at this
	// scale (the lowest Reynolds closeness among those served here).
	Condition string `json:"condition,omitempty"`
	// Limits are that condition's binding limits at this scale.
	Limits []string `json:"limits,omitempty"`
	// Note says the same in a sentence.
	Note string `json:"note"`
}

// ConditionPlan is one condition's answer.
type ConditionPlan struct {
	// Label is the caller's label.
	Label string `json:"label"`
	// FlightMach is the flight Mach number; FlightReynolds the flight's Reynolds
	// number on the full-scale reference length; Altitude the geometric
	// altitude in m.
	FlightMach     float64 `json:"flight_mach"`
	FlightReynolds float64 `json:"flight_reynolds"`
	Altitude       float64 `json:"altitude"`
	// Served reports that a facility serves it.
	Served bool `json:"served"`
	// FacilityID names the facility serving it ("" when none; the inline
	// facility's position otherwise, see FacilityIndex).
	FacilityID string `json:"facility_id"`
	// FacilityIndex is the serving facility's position in the request's list;
	// -1 when none.
	FacilityIndex int `json:"facility_index"`
	// RunPosition is its place in its facility's run order, from 1; 0 when not
	// served.
	RunPosition int `json:"run_position"`
	// Plan is the plan in the serving facility at its scale; null when not
	// served.
	Plan *PlanSummary `json:"plan"`
	// OwnScale is the scale of a model made for this condition alone in the
	// facility that serves it best with such a model, and OwnReynoldsRatio the
	// Reynolds ratio it would reach: beside Plan's ratio this is the price of
	// one model. 0 when no facility serves it at any scale.
	OwnScale         float64 `json:"own_scale"`
	OwnReynoldsRatio float64 `json:"own_reynolds_ratio"`
	// OwnFacilityID names that facility.
	OwnFacilityID string `json:"own_facility_id"`
	// Excluded lists, for each facility that cannot serve it at the campaign's
	// scale, the limits that exclude it; empty when every facility could.
	Excluded []Exclusion `json:"excluded"`
}

// PlanSummary is a condition's plan in its facility: the settings, the match,
// the binding limits and the loads.
type PlanSummary struct {
	// Scale is the model scale.
	Scale float64 `json:"scale"`
	// Mach is the test Mach number (0 in water); Speed m/s.
	Mach  float64 `json:"mach"`
	Speed float64 `json:"speed"`
	// StagnationPressure Pa and StagnationTemperature K are the tunnel's
	// settings; DynamicPressure Pa.
	StagnationPressure    float64 `json:"stagnation_pressure"`
	StagnationTemperature float64 `json:"stagnation_temperature"`
	DynamicPressure       float64 `json:"dynamic_pressure"`
	// Reynolds is the test Reynolds number on the model's reference length.
	Reynolds float64 `json:"reynolds"`
	// ReynoldsRatio is Re_test/Re_flight.
	ReynoldsRatio float64 `json:"reynolds_ratio"`
	// MachDifference is M_test − M_flight (the corrected Mach number with
	// closed walls, as plans match it); null in water.
	MachDifference *float64 `json:"mach_difference"`
	// MachMatched reports |ΔM| within the condition's tolerance; null in water.
	MachMatched *bool `json:"mach_matched"`
	// Binding lists the limits the plan sits on (value and limit in the limit's
	// unit, as in a plan's binding; no Reynolds gain is computed here).
	Binding []Limit `json:"binding"`
	// SharedLevel reports that level sharing moved this condition's settings
	// to a level shared with others; ReynoldsRatioBeforeSharing is then its
	// ratio before.
	SharedLevel                bool    `json:"shared_level"`
	ReynoldsRatioBeforeSharing float64 `json:"reynolds_ratio_before_sharing,omitempty"`
	// BalanceID is the balance of the load check ("" without one).
	BalanceID string `json:"balance_id"`
	// MaxUtilization is the largest share of the balance's rating any point
	// reaches; AllowedUtilization the share allowed (rating ÷ safety factor).
	MaxUtilization     float64 `json:"max_utilization"`
	AllowedUtilization float64 `json:"allowed_utilization"`
	// Verdict is the load check's verdict (docs/loads.md).
	Verdict string `json:"verdict" enums:"within_allowed_loads,not_verified,over_allowed_load,does_not_fit"`
	// Points are the α/β points: angles in degrees, the utilisation of each.
	Points []PointLoad `json:"points"`
	// Hours is this condition's own time: points and runs, without condition
	// changes.
	Hours float64 `json:"hours"`
	// Warnings are the plan's notes.
	Warnings []string `json:"warnings,omitempty"`
}

// Limit is one limit a plan sits on.
type Limit struct {
	Constraint string  `json:"constraint"`
	Value      float64 `json:"value"`
	Limit      float64 `json:"limit"`
}

// PointLoad is one α/β point of a condition: angles in degrees, the balance
// utilisation (a fraction of the rating; 0 without a balance).
type PointLoad struct {
	Alpha       float64 `json:"alpha"`
	Beta        float64 `json:"beta"`
	Utilization float64 `json:"utilization"`
}

// Exclusion says why a facility cannot serve a condition.
type Exclusion struct {
	FacilityID    string   `json:"facility_id"`
	FacilityIndex int      `json:"facility_index"`
	Limits        []string `json:"limits"`
	Message       string   `json:"message"`
}

// Summary sums a campaign up.
type Summary struct {
	// Conditions is the number of conditions; ConditionsServed those a
	// facility serves.
	Conditions       int `json:"conditions"`
	ConditionsServed int `json:"conditions_served"`
	// MachMatched counts the served conditions whose Mach number is matched
	// (water facilities, which do not target it, count as matched).
	MachMatched int `json:"mach_matched"`
	// LowestReynoldsRatio and MeanReynoldsRatio are over the conditions served
	// (ratios Re_test/Re_flight); LowestCloseness the aim's lowest min(r, 1/r).
	LowestReynoldsRatio float64 `json:"lowest_reynolds_ratio"`
	MeanReynoldsRatio   float64 `json:"mean_reynolds_ratio"`
	// AimValue is the aim's value: the lowest or the mean closeness.
	AimValue float64 `json:"aim_value"`
	// WorstBalanceUtilization is the highest max_utilization of any condition
	// served (a fraction of the rating).
	WorstBalanceUtilization float64 `json:"worst_balance_utilization"`
	// Hours is the campaign's tunnel time summed over facilities;
	// HoursSavedBySharing the time level sharing saved (0 when off).
	Hours               float64 `json:"hours"`
	HoursSavedBySharing float64 `json:"hours_saved_by_sharing"`
	// ModelScales are the distinct model scales to build, smallest first.
	ModelScales []float64 `json:"model_scales"`
}

// SearchStats are the scale search's work counts.
type SearchStats struct {
	// OwnPlans is the number of plans at each condition's own best scale (one
	// per condition and facility).
	OwnPlans int `json:"own_plans"`
	// CandidateScales is the number of scales the search compared, and
	// FixedScalePlans the fixed-scale plans it made to compare them (a scale
	// stops being evaluated as soon as it cannot beat the best found).
	CandidateScales int `json:"candidate_scales"`
	FixedScalePlans int `json:"fixed_scale_plans"`
}
