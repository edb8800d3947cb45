package app

import (
	"encoding/csv"
	"io"
	"strconv"

	"scalematch/api/schema"
)

// PlanCSVHeader is the header of WritePlanCSV's table; each column name ends
// with its unit: _deg degrees, _m_s m/s, _pa Pa, _k K, _n N, _n_m N·m;
// scale, Mach and Reynolds numbers, ratios and utilisation (a fraction of the
// balance's rated load) are dimensionless.
var PlanCSVHeader = []string{"plan_id", "label", "facility_id", "facility_version", "scale",
	"mach", "speed_m_s", "stagnation_pressure_pa", "stagnation_temperature_k", "dynamic_pressure_pa",
	"reynolds", "reynolds_ratio", "mach_difference",
	"alpha_deg", "beta_deg", "corrected_dynamic_pressure_pa",
	"normal_n", "axial_n", "side_n", "rolling_moment_n_m", "pitching_moment_n_m", "yawing_moment_n_m",
	"utilization", "allowed_utilization", "limiting", "balance_id", "verdict"}

// WritePlanCSV writes a plan as a flat table (PlanCSVHeader): one row per α/β
// point of its load report with the plan's settings repeated on each, the
// point's balance loads at the balance moment centre (wall corrections and
// weight included, as in the answer's loads) and its utilisation. A plan
// without a load report (the facility lists no balance) has one row, its point
// columns empty. Numbers are written in full precision; the loads are estimates.
func WritePlanCSV(w io.Writer, p *schema.PlanResponse) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(PlanCSVHeader); err != nil {
		return err
	}
	row := make([]string, len(PlanCSVHeader))
	row[0], row[1], row[2], row[3], row[4] = p.ID, p.Label, p.FacilityID, strconv.Itoa(p.FacilityVersion), num(p.Model.Scale)
	t := p.Test
	row[5], row[6], row[7], row[8], row[9] = num(t.Mach), num(t.Speed), num(t.StagnationPressure), num(t.StagnationTemperature), num(t.DynamicPressure)
	row[10], row[11] = num(t.Reynolds), num(p.Mismatch.ReynoldsRatio)
	if p.Mismatch.MachDifference != nil {
		row[12] = num(*p.Mismatch.MachDifference)
	}
	row[26] = p.Verdict
	if p.Loads == nil || len(p.Loads.Points) == 0 {
		if err := cw.Write(row); err != nil {
			return err
		}
		cw.Flush()
		return cw.Error()
	}
	row[23], row[25] = num(p.Loads.AllowedUtilization), p.Loads.BalanceID
	for _, pt := range p.Loads.Points {
		row[13], row[14], row[15] = num(pt.Alpha), num(pt.Beta), num(pt.DynamicPressure)
		row[16], row[17], row[18] = num(pt.Normal), num(pt.Axial), num(pt.Side)
		row[19], row[20], row[21] = num(pt.RollingMoment), num(pt.PitchingMoment), num(pt.YawingMoment)
		row[22], row[24] = num(pt.Utilization), pt.Limiting
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// num writes a number in the shortest form that reads back exactly.
func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
