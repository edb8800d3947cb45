package campaign

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"io"
	"strconv"
	"strings"
)

// CSVHeader is the header of WriteCSV's table. As in a stored plan's table
// (app.PlanCSVHeader), a column with a unit ends with it: _deg degrees, _m_s
// m/s, _pa Pa, _k K; scale (model length over full-scale length), Mach and
// Reynolds numbers, ratios and utilization (a fraction of the balance's rating)
// are dimensionless.
var CSVHeader = []string{"label", "served", "facility_id", "run_position", "scale", "alpha_deg", "beta_deg",
	"mach", "speed_m_s", "stagnation_pressure_pa", "stagnation_temperature_k", "dynamic_pressure_pa", "reynolds",
	"reynolds_ratio", "mach_difference", "mach_matched", "own_scale", "own_reynolds_ratio", "shared_level",
	"balance_id", "utilization", "verdict", "binding", "excluded_limits"}

// WriteCSV writes the campaign as one flat table: a row per condition and α/β
// point (CSVHeader; a condition no facility serves has one row, its plan's
// columns empty and excluded_limits naming every facility's limits, as
// "tsw-1: max_span_fraction; cn2-05: mach_max"). Numbers are written in full
// precision; booleans as true or false.
func (r *Result) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(CSVHeader); err != nil {
		return err
	}
	row := make([]string, len(CSVHeader))
	for _, c := range r.Conditions {
		for i := range row {
			row[i] = ""
		}
		row[0], row[1] = c.Label, strconv.FormatBool(c.Served)
		row[16], row[17] = num(c.OwnScale), num(c.OwnReynoldsRatio)
		row[23] = excludedText(c.Excluded)
		p := c.Plan
		if p == nil {
			if err := cw.Write(row); err != nil {
				return err
			}
			continue
		}
		row[2], row[3], row[4] = c.FacilityID, strconv.Itoa(c.RunPosition), num(p.Scale)
		row[7], row[8], row[9], row[10], row[11], row[12] = num(p.Mach), num(p.Speed), num(p.StagnationPressure),
			num(p.StagnationTemperature), num(p.DynamicPressure), num(p.Reynolds)
		row[13] = num(p.ReynoldsRatio)
		if p.MachDifference != nil {
			row[14] = num(*p.MachDifference)
		}
		if p.MachMatched != nil {
			row[15] = strconv.FormatBool(*p.MachMatched)
		}
		row[18], row[19], row[21] = strconv.FormatBool(p.SharedLevel), p.BalanceID, p.Verdict
		names := make([]string, len(p.Binding))
		for i, b := range p.Binding {
			names[i] = b.Constraint
		}
		row[22] = strings.Join(names, ";")
		for _, pt := range p.Points {
			row[5], row[6], row[20] = num(pt.Alpha), num(pt.Beta), num(pt.Utilization)
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// num writes a number in the shortest form that reads back exactly.
func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// excludedText joins a condition's exclusions as "id: limit, limit; id: ...".
func excludedText(ex []Exclusion) string {
	parts := make([]string, 0, len(ex))
	for _, e := range ex {
		id := e.FacilityID
		if id == "" {
			id = "facilities[" + strconv.Itoa(e.FacilityIndex) + "]"
		}
		parts = append(parts, id+": "+strings.Join(e.Limits, ","))
	}
	return strings.Join(parts, "; ")
}

// Tail is the last line of WriteNDJSON: the campaign without its conditions.
type Tail struct {
	Policy     string         `json:"policy"`
	Aim        string         `json:"aim"`
	Facilities []FacilityPlan `json:"facilities"`
	Summary    Summary        `json:"summary"`
	Search     SearchStats    `json:"search"`
	Warnings   []string       `json:"warnings"`
	Cautions   []string       `json:"cautions"`
}

// WriteNDJSON writes the campaign as newline-delimited JSON: one line per
// condition (a ConditionPlan, in the request's order), then one line with the
// rest (a Tail, told apart by its "summary" key).
func (r *Result) WriteNDJSON(w io.Writer) error {
	bw := bufio.NewWriter(w)
	enc := json.NewEncoder(bw)
	enc.SetEscapeHTML(false)
	for i := range r.Conditions {
		if err := enc.Encode(&r.Conditions[i]); err != nil {
			return err
		}
	}
	t := Tail{Policy: r.Policy, Aim: r.Aim, Facilities: r.Facilities, Summary: r.Summary, Search: r.Search,
		Warnings: r.Warnings, Cautions: r.Cautions}
	if err := enc.Encode(&t); err != nil {
		return err
	}
	return bw.Flush()
}
