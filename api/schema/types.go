package schema

import (
	"bytes"
	"encoding/json"
	"time"

	"scalematch/facilities"
	"scalematch/internal/loads"
	"scalematch/similarity"
)

// ConditionsRequest is the body of POST /v1/conditions: a facility (inline, or by
// its catalog id) and the settings at which to compute its test-section state.
type ConditionsRequest struct {
	// Facility is the facility given inline; give this or FacilityID.
	Facility *facilities.Facility `json:"facility,omitempty"`
	// FacilityID names a facility of the catalog ("tsw-1"); give this or Facility.
	FacilityID string `json:"facility_id,omitempty" example:"tsw-1"`
	TestSettings
}

// TestSettings are the settings of a test section: one of Mach and Speed, and the
// stagnation pressure and temperature. A stagnation value may be left out when the
// facility fixes it (range min = max, as in an atmospheric tunnel).
type TestSettings struct {
	// Mach is the free-stream Mach number (dimensionless), 0 to 5; nil when Speed is
	// given. Not used in water. Mach 0 (or speed 0) is the tunnel at rest: the static
	// state is the stagnation state, q = 0 Pa and Re/m = 0, and the balance carries
	// the model's weight alone.
	Mach *float64 `json:"mach,omitempty" example:"0.8"`
	// Speed is the free-stream speed in m/s (or a string such as "250 kt"); nil when
	// Mach is given.
	Speed *float64 `json:"speed,omitempty" unit:"m/s" example:"60"`
	// StagnationPressure is the stagnation (total) pressure in Pa (or "2.2 bar").
	StagnationPressure *float64 `json:"stagnation_pressure,omitempty" unit:"Pa" example:"150000"`
	// StagnationTemperature is the stagnation (total) temperature in K (or "40 degC").
	StagnationTemperature *float64 `json:"stagnation_temperature,omitempty" unit:"K" example:"310"`
}

// ConditionsResponse is the answer of POST /v1/conditions: the test-section state
// (mach; speed m/s; stagnation_pressure Pa; stagnation_temperature K; static
// temperature K, pressure Pa, density kg/m³, viscosity Pa·s, speed_of_sound m/s,
// compressibility; dynamic_pressure Pa; reynolds_per_meter 1/m) and the facility
// limits the settings break (an empty list when none).
type ConditionsResponse struct {
	facilities.State
	// Violations are the facility limits these settings break; empty, never null,
	// when none.
	Violations []facilities.Violation `json:"violations"`
	// Warnings are notes on the accuracy of the medium's model at this state.
	Warnings []string `json:"warnings"`
	// Cautions are the safety cautions of the facility's medium and pressure.
	Cautions []string `json:"cautions"`
}

// GroupsRequest is the body of POST /v1/groups: the variables of a problem and,
// optionally, the repeating variables to build the groups from.
type GroupsRequest struct {
	// Variables are the physical quantities the problem depends on.
	Variables []GroupVariable `json:"variables" maxItems:"50"`
	// Repeating names the variables that appear in every group; empty: chosen
	// automatically.
	Repeating []string `json:"repeating,omitempty" maxItems:"50"`
}

// GroupVariable is one variable of a Buckingham Π analysis: a name and either a
// unit ("N", "kg/m^3", "Pa*s") or a dimension over M L T Θ ("M L^-1 T^-1").
type GroupVariable struct {
	// Name is the variable's name, used in the groups' exponents.
	Name string `json:"name" example:"rho"`
	// Unit is the variable's unit; give this or Dimensions.
	Unit string `json:"unit,omitempty" example:"kg/m^3"`
	// Dimensions is the variable's dimension, base symbols M, L, T, Θ (or K) with
	// integer powers; give this or Unit.
	Dimensions string `json:"dimensions,omitempty" example:"M L^-3"`
}

// GroupsResponse is the answer of POST /v1/groups: the rank of the dimension matrix,
// the repeating variables used, and the n − rank independent dimensionless groups,
// each {"exponents": {name: exponent}, "known_as": "..."} with exponents as small
// integers (JSON numbers) or exact fractions (strings such as "1/2").
type GroupsResponse = similarity.GroupsResult

// BatchRequest is the body of POST /v1/plans/batch: up to MaxBatch plan requests.
type BatchRequest struct {
	// Requests are the plan requests, each as POST /v1/plans takes it.
	Requests []PlanRequest `json:"requests" maxItems:"1000"`
}

// BatchResponse is the answer of POST /v1/plans/batch: one result per request, in
// the order of the requests.
type BatchResponse struct {
	Results []BatchResult `json:"results"`
}

// BatchResult is the outcome of one request of a batch: exactly one of Plan (the
// plan, as POST /v1/plans answers it) and Error (a problem with the status the
// request would have got on its own).
type BatchResult struct {
	// Plan is the plan, as POST /v1/plans answers it (SI units); absent on error.
	Plan *PlanResponse `json:"plan,omitempty"`
	// Error is the problem this request would have got on its own; absent when
	// planned.
	Error *Problem `json:"error,omitempty"`
}

// PlanRequest is the body of POST /v1/plans (and each item of a batch). Every
// dimensional number is SI or a string with a unit; a scale may be "1:16".
type PlanRequest struct {
	// Flight is the full-scale flight condition: one altitude (m), an optional
	// delta_isa (K), one speed (mach, or true/calibrated/equivalent airspeed in m/s).
	// Give it or Marine, not both.
	Flight similarity.Flight `json:"flight"`
	// Marine is the full-scale condition of a vessel in water, instead of Flight:
	// water "fresh" or "sea" (salinity g/kg), temperature K, depth of the reference
	// point m, atmospheric pressure Pa (default 101 325 Pa), speed m/s, and how it
	// meets the free surface. The answer's flight then has no Mach number or
	// airspeeds and carries marine (cavitation number, vapour pressure, Pa).
	Marine *similarity.Marine `json:"marine,omitempty"`
	// Article is the full-scale test article: lengths in m, areas in m², and its
	// aerodynamic estimate (slopes per radian, angles in degrees).
	Article similarity.Article `json:"article"`
	// Facility is the facility given inline; give this or FacilityID.
	Facility *facilities.Facility `json:"facility,omitempty"`
	// FacilityID names a facility of the catalog ("tsw-1"); give this or Facility.
	FacilityID string `json:"facility_id,omitempty" example:"tsw-1"`
	// Model is the model size: scale, scale_min/scale_max, or scales (model length
	// over full-scale length; numbers or "1:16"); absent: any scale that fits.
	Model similarity.Model `json:"model"`
	// Installation places the model on the balance: balance_id ("" lets the planner
	// choose), offsets in m at model scale, model_mass in kg.
	Installation loads.Installation `json:"installation"`
	// Alpha is the angle-of-attack sweep in degrees: from, to, step (at most 2001
	// points).
	Alpha similarity.Sweep `json:"alpha"`
	// Beta is an optional sideslip sweep in degrees, one run per angle; nil: β = 0.
	Beta *similarity.Sweep `json:"beta,omitempty"`
	// Objective is what to match: a priority list of groups with a Mach tolerance,
	// or weights.
	Objective similarity.Objective `json:"objective"`
	// Label is the caller's own name for this condition ("cruise-high"), at most
	// 200 bytes without control characters; the answer and the stored plan carry
	// it, and GET /v1/plans?label= finds the plans that have it. "" none.
	Label string `json:"label,omitempty" maxLength:"200" example:"cruise-high"`
	// RequiredResolution is the coarsest 2σ uncertainty of each coefficient the
	// test accepts (cl, cd_counts in drag counts, cm, cy, cl_roll, cn;
	// dimensionless): the planner keeps the dynamic pressure at or above the
	// least q at which a balance resolves them (the constraint "resolution"),
	// and the balance choice prefers the one that resolves them with the most
	// margin (docs/loads.md). Absent: no requirement.
	RequiredResolution *loads.Resolution `json:"required_resolution,omitempty"`
	// CondensationPeakMach is the highest local Mach number expected on the model
	// at the test attitude (dimensionless, 0.1 to 5), for the condensation rule of
	// nitrogen, air and custom gases with a critical point: the flow expanded to it
	// from the stagnation state must stay above saturation. Absent: the facility's
	// condensation_peak_mach, else 1.4 (common practice for transonic tests). A
	// low-speed test may give less: M_local ≈ M·√(1 − C_p,min) (docs/physics.md,
	// validity envelope).
	CondensationPeakMach *float64 `json:"condensation_peak_mach,omitempty" example:"1.4"`
	// CavitationAllowed lets a water test section run below the vapour pressure
	// (cavitating); false, the default, makes cavitation a limit the planner
	// avoids (binding name cavitation). Boiling at the stagnation pressure is
	// always avoided.
	CavitationAllowed bool `json:"cavitation_allowed,omitempty"`
}

// PlanResponse is the answer of POST /v1/plans: the plan and everything it implies.
// Numbers are SI: m, m², Pa, K, m/s, N, N·m; angles in degrees.
type PlanResponse struct {
	// FacilityChanged is present only in GET /v1/plans/{id}, and only when the
	// catalog facility the plan used has changed or been deleted since: the plan
	// is served as stored, and this field, added in front of it at read time, says
	// that it may no longer hold. POST /v1/plans never writes it.
	FacilityChanged *FacilityChange `json:"facility_changed,omitempty"`
	// ID identifies the plan; the same request against the same facility version
	// gets the same id. GET /v1/plans/{id} returns the stored answer.
	ID string `json:"id" example:"5d1c0a7e93b2f4a81c6e"`
	// Label is the request's label; absent when it gave none.
	Label string `json:"label,omitempty" example:"cruise-high"`
	// FacilityID names the facility planned in ("" for an inline facility without id).
	FacilityID string `json:"facility_id" example:"tsw-1"`
	// FacilityVersion is the catalog version of the facility used (1 for the built-in
	// demo catalog's facilities, as in a store seeded with them); 0 when inline.
	FacilityVersion int `json:"facility_version"`
	// Flight is the full-scale state: Mach, Reynolds number on the full-scale
	// reference length, airspeeds in m/s, dynamic pressure in Pa, static state; for
	// a marine condition no Mach number or airspeeds (absent) but marine, with the
	// cavitation number σ and the water's vapour pressure (Pa).
	Flight similarity.FlightState `json:"flight"`
	// Model is the chosen model: scale, reference length m, reference area m², span m,
	// frontal area m², blockage (fraction of the test-section area).
	Model similarity.ModelSize `json:"model"`
	// Test is the test condition: Mach, speed m/s, stagnation pressure Pa and
	// temperature K, static state, dynamic pressure Pa, Reynolds number on the model
	// and per metre (1/m).
	Test similarity.Test `json:"test"`
	// Mismatch is Re_test/Re_flight and M_test − M_flight.
	Mismatch similarity.Mismatch `json:"mismatch"`
	// Binding lists every limit the plan sits on, with the Reynolds gain in per cent
	// that one more per cent of it would buy.
	Binding []similarity.Binding `json:"binding"`
	// Verdict is the plan's load verdict: within_allowed_loads, not_verified,
	// over_allowed_load or does_not_fit (docs/loads.md); scalematch plan exits 0
	// only for within_allowed_loads.
	Verdict string `json:"verdict" enums:"within_allowed_loads,not_verified,over_allowed_load,does_not_fit"`
	// LoadFraction is the share of the allowed load (rating ÷ safety factor)
	// the plan was made to: installation.load_fraction, or 1.
	LoadFraction float64 `json:"load_fraction"`
	// ResolutionState says whether the balance resolves the required_resolution:
	// resolved, too_coarse, accuracy_unknown, or no_balance_resolves (no balance
	// of the facility can both keep within its allowed loads and resolve the
	// test at any setting the request allows: the plan is then made without the
	// resolution); absent when none was asked (docs/loads.md).
	ResolutionState string `json:"resolution_state,omitempty" enums:"resolved,too_coarse,accuracy_unknown,no_balance_resolves"`
	// FitBroken lists the test-section limits the model breaks (max_span_fraction,
	// max_blockage, max_model_length), before any load; empty when it fits.
	FitBroken []facilities.Violation `json:"fit_broken"`
	// Corrections are the wall corrections at the test condition (dimensionless
	// factors; lift interference in degrees).
	Corrections facilities.Corrections `json:"corrections"`
	// Loads is the balance load check over the α sweep at the test condition: forces
	// in N and moments in N·m at the balance moment centre, wall corrections and
	// weight included; null when the facility has no balance.
	Loads *loads.Report `json:"loads"`
	// Buoyancy is the model's weight, buoyancy and net weight in N in a water
	// facility (volume m³, density kg/m³), with the volume given or estimated;
	// absent in a gas facility.
	Buoyancy *loads.Buoyancy `json:"buoyancy,omitempty"`
	// ReynoldsEffects estimates the skin-friction drag change from the Reynolds
	// mismatch (drag counts, 1 count = 0.0001) and whether to trip the boundary layer.
	ReynoldsEffects *similarity.ReynoldsEffects `json:"reynolds_effects"`
	// Schedule estimates the test's time; null when the facility gives no operations
	// figures.
	Schedule *facilities.Schedule `json:"schedule"`
	// TradeCurve is the best Reynolds number reachable at each test Mach number (speed
	// in m/s in water) across the facility's range for the chosen model.
	TradeCurve []similarity.TradePoint `json:"trade_curve"`
	// Warnings are notes on the request, the models used and the result.
	Warnings []string `json:"warnings"`
	// Cautions are the safety cautions: estimates only; the facility's approved
	// limits, procedures and licensed engineering judgement govern.
	Cautions []string `json:"cautions"`
}

// FacilityChange says that a stored plan's catalog facility has changed since the
// plan was made.
type FacilityChange struct {
	// FacilityID names the facility.
	FacilityID string `json:"facility_id" example:"tsw-1"`
	// PlannedVersion is the catalog version the plan was made against.
	PlannedVersion int `json:"planned_version" example:"2"`
	// CurrentVersion is the facility's catalog version now; 0 when it has been
	// deleted.
	CurrentVersion int `json:"current_version" example:"3"`
	// Deleted reports that the facility is no longer in the catalog.
	Deleted bool `json:"deleted"`
	// Message says the same in a sentence.
	Message string `json:"message"`
}

// LoadsRequest is the body of POST /v1/loads: as a plan request, but with the
// model's scale and the test settings given rather than searched.
type LoadsRequest struct {
	// Flight is optional here: when given, the answer compares the test with it.
	Flight *similarity.Flight `json:"flight,omitempty"`
	// Marine is optional here, instead of Flight: a vessel in water to compare the
	// test with (see PlanRequest.Marine).
	Marine *similarity.Marine `json:"marine,omitempty"`
	// Article is the full-scale test article, as in a plan request.
	Article similarity.Article `json:"article"`
	// Facility is the facility given inline; give this or FacilityID.
	Facility *facilities.Facility `json:"facility,omitempty"`
	// FacilityID names a facility of the catalog; give this or Facility.
	FacilityID string `json:"facility_id,omitempty" example:"tsw-1"`
	// Model gives the model's scale: {"scale": s} (a number or "1:16").
	Model LoadsModel `json:"model"`
	// Installation places the model on the balance; without balance_id every
	// balance of the facility is checked.
	Installation loads.Installation `json:"installation"`
	// Alpha is the angle-of-attack sweep in degrees.
	Alpha similarity.Sweep `json:"alpha"`
	// Beta is an optional sideslip sweep in degrees; nil: β = 0.
	Beta *similarity.Sweep `json:"beta,omitempty"`
	// Test is the test setting: mach or speed (m/s), stagnation pressure (Pa) and
	// temperature (K).
	Test TestSettings `json:"test"`
	// RequiredResolution is the coarsest 2σ uncertainty of each coefficient the
	// test accepts (see PlanRequest.RequiredResolution): each load report says
	// whether its balance resolves it, and resolution_state sums it up.
	RequiredResolution *loads.Resolution `json:"required_resolution,omitempty"`
}

// LoadsModel is the model of a load check: its scale, model length over full-scale
// length.
type LoadsModel struct {
	// Scale is model length over full-scale length (dimensionless): a number or a
	// ratio such as "1:16". Required.
	Scale *float64 `json:"scale" unit:"scale" example:"0.0625"`
}

// LoadsResponse is the answer of POST /v1/loads. Loads is one load report when the
// request names a balance, and a list of reports, one per balance of the facility,
// when it does not.
type LoadsResponse struct {
	// FacilityID names the facility.
	FacilityID string `json:"facility_id"`
	// Model is the model's size at the given scale: lengths in m, areas in m²,
	// blockage as a fraction of the test-section area.
	Model similarity.ModelSize `json:"model"`
	// Test is the test state at the given settings: Mach, speed m/s, stagnation
	// pressure Pa and temperature K, static state, dynamic pressure Pa, Reynolds
	// number on the model and per metre (1/m).
	Test similarity.Test `json:"test"`
	// Flight is the full-scale flight state (speeds m/s, dynamic pressure Pa,
	// Reynolds number on the full-scale reference length) when one was given.
	Flight *similarity.FlightState `json:"flight,omitempty"`
	// Mismatch is Re_test/Re_flight and M_test − M_flight when a flight was given.
	Mismatch *similarity.Mismatch `json:"mismatch,omitempty"`
	// Violations are the facility limits the settings break; empty when none.
	Violations []facilities.Violation `json:"violations"`
	// Verdict is the check's verdict: within_allowed_loads, not_verified,
	// over_allowed_load or does_not_fit (docs/loads.md). With every balance
	// checked it is the best balance's. scalematch loads exits 0 only for
	// within_allowed_loads.
	Verdict string `json:"verdict" enums:"within_allowed_loads,not_verified,over_allowed_load,does_not_fit"`
	// LoadFraction is the share of the allowed load (rating ÷ safety factor)
	// the check allowed: installation.load_fraction, or 1.
	LoadFraction float64 `json:"load_fraction"`
	// ResolutionState says whether a balance resolves the required_resolution
	// at the test's dynamic pressure: resolved (a balance within its allowed
	// loads does), too_coarse or accuracy_unknown (the one balance within its
	// allowed loads does not, or cannot be told to), no_balance_resolves (no
	// balance both keeps within its allowed loads and resolves it); absent when
	// none was asked (docs/loads.md).
	ResolutionState string `json:"resolution_state,omitempty" enums:"resolved,too_coarse,accuracy_unknown,no_balance_resolves"`
	// FitBroken lists the test-section limits the model breaks (max_span_fraction,
	// max_blockage, max_model_length), before any load; empty when it fits.
	FitBroken []facilities.Violation `json:"fit_broken"`
	// Corrections are the wall corrections at the test condition.
	Corrections facilities.Corrections `json:"corrections"`
	// Loads is a load report (object) or a list of them (array): forces in N,
	// moments in N·m at the balance moment centre, utilisation as a fraction of the
	// rating, and max_safe_dynamic_pressure in Pa: where the worst point reaches the
	// allowed load by this estimate (not a safe limit; see loads.Report).
	Loads LoadsValue `json:"loads" swaggertype:"object"`
	// Buoyancy is the model's weight, buoyancy and net weight in N in a water
	// facility (volume m³, density kg/m³); absent in a gas facility.
	Buoyancy *loads.Buoyancy `json:"buoyancy,omitempty"`
	// Warnings are notes on the inputs and models.
	Warnings []string `json:"warnings"`
	// Cautions are the safety cautions.
	Cautions []string `json:"cautions"`
}

// LoadsValue holds the loads of a load check: One when a balance was named, else
// All, one report per balance. In JSON it is an object or an array.
type LoadsValue struct {
	One *loads.Report
	All []loads.Report
}

// MarshalJSON writes One as an object, or All as an array.
func (v LoadsValue) MarshalJSON() ([]byte, error) {
	if v.One != nil {
		return json.Marshal(v.One)
	}
	if v.All == nil {
		return []byte("[]"), nil
	}
	return json.Marshal(v.All)
}

// UnmarshalJSON reads an object into One or an array into All.
func (v *LoadsValue) UnmarshalJSON(b []byte) error {
	b = bytes.TrimSpace(b)
	if len(b) > 0 && b[0] == '[' {
		v.One = nil
		return json.Unmarshal(b, &v.All)
	}
	v.All = nil
	v.One = new(loads.Report)
	return json.Unmarshal(b, v.One)
}

// MaxBatch is the largest number of plan requests one POST /v1/plans/batch takes.
const MaxBatch = 1000

// FacilityList is the answer of GET /v1/facilities.
type FacilityList struct {
	// Facilities are the current, not deleted facilities ordered by id, each with
	// its version.
	Facilities []facilities.Facility `json:"facilities"`
}

// FacilityHistory is the answer of GET /v1/facilities/{id}/versions.
type FacilityHistory struct {
	// ID is the facility's id.
	ID string `json:"id" example:"tsw-1"`
	// Versions lists every change, oldest first: version, time (RFC 3339, UTC), the
	// write token's name, the action, the JSON paths that changed and the record as
	// of that version (absent for a deletion).
	Versions []facilities.Change `json:"versions"`
}

// PlanList is the answer of GET /v1/plans: a page of stored plans, newest first.
type PlanList struct {
	Plans []PlanListItem `json:"plans"`
	// NextCursor continues the listing (GET /v1/plans?cursor=…, with the same
	// filters); absent on the last page.
	NextCursor string `json:"next_cursor,omitempty"`
	// Next is the URL of the next page; absent on the last page.
	Next string `json:"next,omitempty"`
}

// PlanListItem is one stored plan of a listing.
type PlanListItem struct {
	ID string `json:"id" example:"5d1c0a7e93b2f4a81c6e"`
	// Label is the plan request's label; absent when it gave none.
	Label string `json:"label,omitempty" example:"cruise-high"`
	// FacilityID is the catalog facility planned in; "" for an inline facility
	// without id.
	FacilityID string `json:"facility_id" example:"tsw-1"`
	// FacilityVersion is the catalog version used; 0 for an inline facility.
	FacilityVersion int `json:"facility_version"`
	// CreatedAt is when the plan was first stored (UTC).
	CreatedAt time.Time `json:"created_at"`
	// Href is the plan's URL (GET answers it as JSON or, for Accept: text/csv, a
	// table).
	Href string `json:"href" example:"/v1/plans/5d1c0a7e93b2f4a81c6e"`
}

// CampaignSummary is what a campaign job keeps for its listing.
type CampaignSummary struct {
	Conditions int      `json:"conditions"`
	Facilities []string `json:"facilities"`
}

// CampaignStatus is a stored campaign's state and progress: the answer of GET
// /v1/campaigns/{id} while it is queued or running (202), of POST
// /v1/campaigns when it is planned in the background (202), of DELETE, and
// each item of GET /v1/campaigns.
type CampaignStatus struct {
	ID string `json:"id" example:"4be1f0a27c9d35e6a810"`
	// State is queued, running, done, failed or cancelled.
	State string `json:"state" enums:"queued,running,done,failed,cancelled"`
	// Conditions is the number of the campaign's conditions.
	Conditions int `json:"conditions"`
	// Done of Total steps of the current attempt are finished: each condition
	// counts twice, once planned at its own best scale in every facility and
	// once given its final plan (the scale search between is not counted).
	// Total is 0 until a replica has begun the attempt.
	Done  int `json:"done"`
	Total int `json:"total"`
	// Attempt counts the runs begun: more than 1 when a replica died, or shut
	// down, while running it and another took it over from the start.
	Attempt int `json:"attempt"`
	// Facilities are the campaign's facility ids.
	Facilities []string `json:"facilities"`
	// CreatedAt is when the campaign was stored, UpdatedAt when its state or
	// progress last changed (UTC).
	CreatedAt time.Time `json:"created_at"`
	UpdatedAt time.Time `json:"updated_at"`
	// Href is the campaign's URL: GET answers its progress, then its result.
	Href string `json:"href" example:"/v1/campaigns/4be1f0a27c9d35e6a810"`
}

// CampaignList is the answer of GET /v1/campaigns: a page of stored campaigns,
// newest first.
type CampaignList struct {
	Campaigns []CampaignStatus `json:"campaigns"`
	// NextCursor continues the listing; absent on the last page.
	NextCursor string `json:"next_cursor,omitempty"`
	// Next is the URL of the next page; absent on the last page.
	Next string `json:"next,omitempty"`
}
