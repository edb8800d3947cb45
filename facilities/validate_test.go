package facilities_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/testfixture"
)

func TestValidateDemo(t *testing.T) {
	t.Parallel()
	for _, f := range facilities.Demo() {
		t.Run(f.ID, func(t *testing.T) {
			t.Parallel()
			assert.NoError(t, f.Validate(), "demo facility")
		})
	}
}

func fp(v float64) *float64 { return &v }

func TestValidateBadFacilities(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name   string
		id     string // demo facility to start from
		modify func(f *facilities.Facility)
		want   []string
	}{
		{"missing id", "lsw-2", func(f *facilities.Facility) { f.ID = "" }, []string{"id"}},
		{"upper-case id", "lsw-2", func(f *facilities.Facility) { f.ID = "LSW-2" }, []string{"id"}},
		{"double dash id", "lsw-2", func(f *facilities.Facility) { f.ID = "lsw--2" }, []string{"id"}},
		{"trailing dash id", "lsw-2", func(f *facilities.Facility) { f.ID = "lsw-" }, []string{"id"}},
		{"negative version", "lsw-2", func(f *facilities.Facility) { f.Version = -1 }, []string{"version"}},
		{"unknown medium", "lsw-2", func(f *facilities.Facility) { f.Medium.Kind = "helium" }, []string{"medium"}},
		{"gas constants on air", "lsw-2", func(f *facilities.Facility) { f.Medium.Gas = &facilities.GasProperties{} }, []string{"medium.gas"}},
		{"custom gas without constants", "lsw-2", func(f *facilities.Facility) { f.Medium = facilities.Medium{Kind: facilities.MediumGas} }, []string{"medium.gas"}},
		{"custom gas bad gamma", "lsw-2", func(f *facilities.Facility) {
			f.Medium = facilities.Medium{Kind: facilities.MediumGas, Gas: &facilities.GasProperties{
				MolarMass: 0.04, Gamma: 1.8, ViscosityReference: 2e-5, TemperatureReference: 273, SutherlandConstant: -1}}
		}, []string{"medium.gas.gamma", "medium.gas.sutherland_constant"}},
		{"zero width", "lsw-2", func(f *facilities.Facility) { f.TestSection.Width = 0 }, []string{"test_section.width"}},
		{"NaN height", "lsw-2", func(f *facilities.Facility) { f.TestSection.Height = math.NaN() }, []string{"test_section.height"}},
		{"huge length", "lsw-2", func(f *facilities.Facility) { f.TestSection.Length = 1000 }, []string{"test_section.length"}},
		{"negative area", "lsw-2", func(f *facilities.Facility) { f.TestSection.Area = fp(-1) }, []string{"test_section.area"}},
		{"unknown walls", "lsw-2", func(f *facilities.Facility) { f.TestSection.Walls = "mesh" }, []string{"test_section.walls"}},
		{"no mach and no speed", "lsw-2", func(f *facilities.Facility) { f.Speed = nil }, []string{"mach"}},
		{"water without speed", "wtn-04", func(f *facilities.Facility) { f.Speed = nil }, []string{"speed"}},
		{"water with mach", "wtn-04", func(f *facilities.Facility) { f.Mach = &facilities.Range{Min: 0, Max: 0.01} }, []string{"mach"}},
		{"mach reversed", "tsw-1", func(f *facilities.Facility) { f.Mach = &facilities.Range{Min: 1.12, Max: 0.22} }, []string{"mach.min"}},
		{"mach above 5", "tsw-1", func(f *facilities.Facility) { f.Mach.Max = 6 }, []string{"mach.max"}},
		{"negative speed", "lsw-2", func(f *facilities.Facility) { f.Speed.Min = -5 }, []string{"speed.min"}},
		{"infinite speed", "lsw-2", func(f *facilities.Facility) { f.Speed.Max = math.Inf(1) }, []string{"speed.max"}},
		{"zero pressure", "lsw-2", func(f *facilities.Facility) { f.StagnationPressure = facilities.Range{} }, []string{"stagnation_pressure.min", "stagnation_pressure.max"}},
		{"pressure reversed", "plp-3", func(f *facilities.Facility) { f.StagnationPressure = facilities.Range{Min: 4e5, Max: 1e5} }, []string{"stagnation_pressure.min"}},
		{"static pressure reversed", "cvt-07", func(f *facilities.Facility) { f.StaticPressure = &facilities.Range{Min: 2e5, Max: 1e5} }, []string{"static_pressure.min"}},
		{"static pressure and stagnation pressure", "cvt-07", func(f *facilities.Facility) { f.StagnationPressure = facilities.Range{Min: 1e5, Max: 2e5} }, []string{"stagnation_pressure"}},
		{"static pressure in a gas facility", "lsw-2", func(f *facilities.Facility) { f.StaticPressure = &facilities.Range{Min: 1e5, Max: 2e5} }, []string{"static_pressure", "stagnation_pressure"}},
		{"temperature reversed", "plp-3", func(f *facilities.Facility) { f.StagnationTemperature = facilities.Range{Min: 311, Max: 288} }, []string{"stagnation_temperature.min"}},
		{"water too hot", "wtn-04", func(f *facilities.Facility) { f.StagnationTemperature.Max = 430 }, []string{"stagnation_temperature.max"}},
		{"nitrogen below its triple point", "cn2-05", func(f *facilities.Facility) { f.StagnationTemperature.Min = 60 }, []string{"stagnation_temperature.min"}},
		{"zero max q", "lsw-2", func(f *facilities.Facility) { f.MaxDynamicPressure = fp(0) }, []string{"max_dynamic_pressure"}},
		{"negative max Re/m", "lsw-2", func(f *facilities.Facility) { f.MaxReynoldsPerMeter = fp(-1) }, []string{"max_reynolds_per_meter"}},
		{"span fraction above 1", "lsw-2", func(f *facilities.Facility) { f.MaxSpanFraction = fp(1.2) }, []string{"max_span_fraction"}},
		{"blockage 1", "lsw-2", func(f *facilities.Facility) { f.MaxBlockage = fp(1) }, []string{"max_blockage"}},
		{"lift interference 2", "lsw-2", func(f *facilities.Facility) { f.LiftInterferenceFactor = fp(2) }, []string{"lift_interference_factor"}},
		{"zero peak Mach", "cn2-05", func(f *facilities.Facility) { f.CondensationPeakMach = fp(0) }, []string{"condensation_peak_mach"}},
		{"balance without id", "lsw-2", func(f *facilities.Facility) { f.Balances[1].ID = "" }, []string{"balances[1].id"}},
		{"duplicate balance id", "lsw-2", func(f *facilities.Facility) { f.Balances[1].ID = f.Balances[0].ID }, []string{"balances[1].id"}},
		{"zero normal limit", "lsw-2", func(f *facilities.Facility) { f.Balances[1].Limits.Normal = fp(0) }, []string{"balances[1].limits.normal"}},
		{"negative yawing moment limit", "lsw-2", func(f *facilities.Facility) { f.Balances[0].Limits.YawingMoment = fp(-1) }, []string{"balances[0].limits.yawing_moment"}},
		{"safety factor below 1", "lsw-2", func(f *facilities.Facility) { f.Balances[0].SafetyFactor = 0.9 }, []string{"balances[0].safety_factor"}},
		{"safety factor missing", "lsw-2", func(f *facilities.Facility) { f.Balances[1].SafetyFactor = 0 }, []string{"balances[1].safety_factor"}},
		{"combined row unknown component", "lsw-2", func(f *facilities.Facility) {
			f.Balances[0].Combined = []facilities.CombinedLimit{gaugeRow()}
			f.Balances[0].Combined[0].Coefficients = map[string]float64{"normal": 0.5, "pitch": 4}
		}, []string{"balances[0].combined[0].coefficients.pitch"}},
		{"combined row all zero", "lsw-2", func(f *facilities.Facility) {
			f.Balances[0].Combined = []facilities.CombinedLimit{gaugeRow()}
			f.Balances[0].Combined[0].Coefficients = map[string]float64{"normal": 0}
		}, []string{"balances[0].combined[0].coefficients"}},
		{"combined row no coefficients, no limit, no name", "lsw-2", func(f *facilities.Facility) {
			f.Balances[0].Combined = []facilities.CombinedLimit{gaugeRow()}
			f.Balances[0].Combined[0] = facilities.CombinedLimit{}
		}, []string{"balances[0].combined[0].name", "balances[0].combined[0].coefficients", "balances[0].combined[0].limit"}},
		{"combined rows with one name", "lsw-2", func(f *facilities.Facility) {
			f.Balances[0].Combined = []facilities.CombinedLimit{gaugeRow()}
			f.Balances[0].Combined = append(f.Balances[0].Combined, f.Balances[0].Combined[0])
		}, []string{"balances[0].combined[1].name"}},
		{"negative operations", "lsw-2", func(f *facilities.Facility) {
			f.Operations.SecondsPerPoint = -1
			f.Operations.MinutesPerTemperatureChange = math.NaN()
		}, []string{"operations.seconds_per_point", "operations.minutes_per_temperature_change"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			f := mustDemo(t, tc.id)
			tc.modify(&f)
			err := f.Validate()
			require.Error(t, err)
			assert.Equal(t, tc.want, testfixture.InvalidFields(t, err), "fields")
		})
	}
}

// TestValidateEverythingAtOnce: a facility with a problem in every part reports all
// of them in one error, in field order.
func TestValidateEverythingAtOnce(t *testing.T) {
	t.Parallel()
	f := facilities.Facility{
		ID:                    "Bad Id",
		Medium:                facilities.Medium{Kind: "plasma"},
		TestSection:           facilities.TestSection{Width: -1, Height: 0, Length: 2, Walls: "glass"},
		Mach:                  &facilities.Range{Min: -1, Max: 9},
		StagnationPressure:    facilities.Range{Min: 2e5, Max: 1e5},
		StagnationTemperature: facilities.Range{Min: 0, Max: 300},
		MaxDynamicPressure:    fp(-5),
		MaxSpanFraction:       fp(0),
		Balances: []facilities.Balance{
			{ID: "b", Limits: facilities.Limits{Axial: fp(-1)}, SafetyFactor: 1.5},
			{ID: "b", SafetyFactor: 0.5, Combined: []facilities.CombinedLimit{
				{Name: "row", Coefficients: map[string]float64{"lift": 1, "normal": math.Inf(1)}, Limit: 0},
			}},
		},
		Operations: &facilities.Operations{MinutesPerRun: -10},
	}
	want := []string{
		"id", "medium",
		"test_section.width", "test_section.height", "test_section.walls",
		"mach.min", "mach.max",
		"stagnation_pressure.min", "stagnation_temperature.min",
		"max_dynamic_pressure", "max_span_fraction",
		"balances[0].limits.axial",
		"balances[1].id", "balances[1].safety_factor",
		"balances[1].combined[0].coefficients.lift", "balances[1].combined[0].coefficients.normal",
		"balances[1].combined[0].coefficients", "balances[1].combined[0].limit",
		"operations.minutes_per_run",
	}
	err := f.Validate()
	require.Error(t, err)
	assert.Equal(t, want, testfixture.InvalidFields(t, err), "fields in field order")
}

// gaugeRow is a combined gauge row invented for the tests (the demo balances have
// none): |0.5·N + 4 m⁻¹·m| ≤ 5000 N.
func gaugeRow() facilities.CombinedLimit {
	return facilities.CombinedLimit{Name: "gauge 1", Limit: 5000,
		Coefficients: map[string]float64{facilities.ComponentNormal: 0.5, facilities.ComponentPitchingMoment: 4}}
}
