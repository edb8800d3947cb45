package unitjson_test

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/internal/check"
	"scalematch/internal/unitjson"
	"scalematch/similarity"
)

// decodeTarget stands for a request type: every kind of field the decoder handles.
type decodeTarget struct {
	Flight struct {
		Altitude float64  `json:"altitude" unit:"m"`
		DeltaISA float64  `json:"delta_isa" unit:"dK"`
		Mach     *float64 `json:"mach,omitempty"`
		Speed    float64  `json:"true_airspeed,omitempty" unit:"m/s"`
	} `json:"flight"`
	Article  *similarity.Article  `json:"article,omitempty"`
	Facility *facilities.Facility `json:"facility,omitempty"`
	Model    struct {
		Scale  float64   `json:"scale,omitempty" unit:"scale"`
		Scales []float64 `json:"scales,omitempty" unit:"scale"`
	} `json:"model"`
	Alpha struct {
		From float64 `json:"from" unit:"deg"`
		To   float64 `json:"to" unit:"deg"`
		Step float64 `json:"step" unit:"deg"`
	} `json:"alpha"`
	Offset struct {
		X float64 `json:"x"`
		Z float64 `json:"z"`
		// Weight is in the struct tagged "m" but has its own unit.
		Weight float64 `json:"weight,omitempty" unit:"N"`
		Ratio  float64 `json:"ratio,omitempty" unit:"-"`
	} `json:"offset" unit:"m"`
	Points    int                `json:"points,omitempty"`
	Small     int8               `json:"small,omitempty"`
	Name      string             `json:"name,omitempty"`
	Loads     map[string]float64 `json:"loads,omitempty" unit:"N"`
	Verbose   bool               `json:"verbose,omitempty"`
	Extra     any                `json:"extra,omitempty"`
	Precision float32            `json:"precision,omitempty"`
}

func decodeOK(t *testing.T, body string) decodeTarget {
	t.Helper()
	var d decodeTarget
	require.NoError(t, unitjson.Decode([]byte(body), &d), "Decode(%s)", body)
	return d
}

func TestDecodeUnits(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		body string
		get  func(d decodeTarget) float64
		want float64
		tol  float64 // relative
	}{
		// 1 ft = 0.3048 m exactly (international foot, 1959).
		{"feet into m", `{"flight":{"altitude":"35000 ft"}}`, func(d decodeTarget) float64 { return d.Flight.Altitude }, 10668, 1e-12},
		{"SI number unchanged", `{"flight":{"altitude":11000}}`, func(d decodeTarget) float64 { return d.Flight.Altitude }, 11000, 0},
		// 1 kt = 1852/3600 m/s exactly.
		{"knots into m/s", `{"flight":{"true_airspeed":"250 kt"}}`, func(d decodeTarget) float64 { return d.Flight.Speed }, 250 * 1852.0 / 3600, 1e-12},
		// A temperature difference: 18 °F of difference is 10 K, no offset.
		{"dK from degF", `{"flight":{"delta_isa":"18 degF"}}`, func(d decodeTarget) float64 { return d.Flight.DeltaISA }, 10, 1e-12},
		{"dK from degC", `{"flight":{"delta_isa":"-15 degC"}}`, func(d decodeTarget) float64 { return d.Flight.DeltaISA }, -15, 1e-12},
		{"ratio scale", `{"model":{"scale":"1:16"}}`, func(d decodeTarget) float64 { return d.Model.Scale }, 0.0625, 1e-15},
		{"ratio scale with spaces", `{"model":{"scale":" 1 : 24 "}}`, func(d decodeTarget) float64 { return d.Model.Scale }, 1.0 / 24, 1e-15},
		{"number scale", `{"model":{"scale":0.05}}`, func(d decodeTarget) float64 { return d.Model.Scale }, 0.05, 0},
		{"scale list element", `{"model":{"scales":[0.04,"1:20"]}}`, func(d decodeTarget) float64 { return d.Model.Scales[1] }, 0.05, 1e-15},
		// 1 bar = 1e5 Pa by definition; the unit is inherited from stagnation_pressure.
		{"range inherits Pa", `{"facility":{"stagnation_pressure":{"min":"0.5 bar","max":220000}}}`, func(d decodeTarget) float64 { return d.Facility.StagnationPressure.Min }, 50000, 1e-12},
		// 15 °C = 288.15 K (the Celsius scale's definition).
		{"range inherits K", `{"facility":{"stagnation_temperature":{"min":"15 degC","max":"45 degC"}}}`, func(d decodeTarget) float64 { return d.Facility.StagnationTemperature.Max }, 318.15, 1e-12},
		{"pointer range inherits m/s", `{"facility":{"speed":{"min":"10 kt","max":90}}}`, func(d decodeTarget) float64 { return d.Facility.Speed.Min }, 10 * 1852.0 / 3600, 1e-12},
		// 1 lbf = 4.4482216152605 N (avoirdupois pound times standard gravity).
		{"balance limit in lbf", `{"facility":{"balances":[{"id":"a"},{"id":"b","limits":{"normal":"400 lbf"}}]}}`, func(d decodeTarget) float64 { return *d.Facility.Balances[1].Limits.Normal }, 400 * 4.4482216152605, 1e-12},
		// 1 in = 0.0254 m exactly, so 300 in·lbf = 300·0.0254·4.4482216152605 N·m.
		{"moment in in*lbf", `{"facility":{"balances":[{"id":"a","limits":{"pitching_moment":"300 in*lbf"}}]}}`, func(d decodeTarget) float64 { return *d.Facility.Balances[0].Limits.PitchingMoment }, 300 * 0.0254 * 4.4482216152605, 1e-12},
		{"ft^2 area", `{"article":{"reference_area":"12 ft^2"}}`, func(d decodeTarget) float64 { return d.Article.ReferenceArea }, 12 * 0.3048 * 0.3048, 1e-12},
		{"struct unit inherited by x", `{"offset":{"x":"10 cm","z":0}}`, func(d decodeTarget) float64 { return d.Offset.X }, 0.1, 1e-12},
		{"own tag inside tagged struct", `{"offset":{"weight":"1 kN"}}`, func(d decodeTarget) float64 { return d.Offset.Weight }, 1000, 1e-12},
		{"map values inherit", `{"loads":{"normal":"2 kN"}}`, func(d decodeTarget) float64 { return d.Loads["normal"] }, 2000, 1e-12},
		// 1 rad = 180/π degrees.
		{"angle in rad", `{"alpha":{"from":"-0.1 rad","to":16,"step":1}}`, func(d decodeTarget) float64 { return d.Alpha.From }, -0.1 * 180 / math.Pi, 1e-12},
		{"bare angle string is degrees", `{"alpha":{"from":-4,"to":"16","step":1}}`, func(d decodeTarget) float64 { return d.Alpha.To }, 16, 0},
		{"pointer number", `{"flight":{"mach":0.78}}`, func(d decodeTarget) float64 { return *d.Flight.Mach }, 0.78, 0},
		{"float32", `{"precision":0.5}`, func(d decodeTarget) float64 { return float64(d.Precision) }, 0.5, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			d := decodeOK(t, tc.body)
			assert.InDelta(t, tc.want, tc.get(d), tc.tol*math.Abs(tc.want), "relative tolerance %g; the exact conversion is named beside the case", tc.tol)
		})
	}
}

func TestDecodeKeepsOtherKinds(t *testing.T) {
	t.Parallel()
	d := decodeOK(t, `{"name":"run 7","points":21,"verbose":true,"extra":{"a":[1,"b"]},
		"facility":{"medium":{"gas":{"molar_mass":0.028,"gamma":1.4,"viscosity_reference":1.7e-5,"temperature_reference":273,"sutherland_constant":111}}},
		"flight":{"mach":null}}`)
	assert.Equal(t, "run 7", d.Name)
	assert.Equal(t, 21, d.Points)
	assert.True(t, d.Verbose)
	assert.Nil(t, d.Flight.Mach, "null Mach")
	assert.Equal(t, map[string]any{"a": []any{1.0, "b"}}, d.Extra)
	assert.Equal(t, facilities.MediumGas, d.Facility.Medium.Kind)
	if assert.NotNil(t, d.Facility.Medium.Gas) {
		assert.Equal(t, 1.4, d.Facility.Medium.Gas.Gamma)
	}
}

// fieldsOf returns the field errors of a Decode error, failing unless it is a
// *check.Error with CodeInvalid.
func fieldsOf(t *testing.T, err error) []check.FieldError {
	t.Helper()
	var de *check.Error
	require.ErrorAs(t, err, &de)
	require.Equal(t, check.CodeInvalid, de.Code)
	return de.Fields
}

func TestDecodeErrors(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name string
		body string
		// want maps each expected path to a fragment of its message.
		want map[string]string
	}{
		{"empty body", ``, map[string]string{"": "empty"}},
		{"blank body", " \n\t", map[string]string{"": "empty"}},
		{"not JSON", `{"flight":`, map[string]string{"": "middle of a JSON value"}},
		{"syntax error with offset", `{"flight" 1}`, map[string]string{"": "at byte"}},
		{"NaN is not JSON", `{"flight":{"mach":NaN}}`, map[string]string{"": "not valid JSON"}},
		{"trailing data", `{"name":"a"} {"name":"b"}`, map[string]string{"": "after the JSON value"}},
		{"trailing garbage", `{"name":"a"}x`, map[string]string{"": "after the JSON value"}},
		{"array body", `[1,2]`, map[string]string{"": "want an object, got an array"}},
		{"unknown field deep", `{"article":{"aero":{"cl_maks":1.4}}}`, map[string]string{"article.aero.cl_maks": "unknown field"}},
		{"unknown field top", `{"fligth":{}}`, map[string]string{"fligth": "unknown field"}},
		{"field names are case sensitive", `{"Flight":{}}`, map[string]string{"Flight": "unknown field"}},
		{"unknown in list element", `{"facility":{"balances":[{"id":"a"},{"id":"b","limits":{"norml":1}}]}}`, map[string]string{"facility.balances[1].limits.norml": "unknown field"}},
		{"string without unit in m field", `{"flight":{"altitude":"11000"}}`, map[string]string{"flight.altitude": "no unit"}},
		{"wrong dimension", `{"flight":{"altitude":"2.5 bar"}}`, map[string]string{"flight.altitude": "the field wants"}},
		{"unknown unit", `{"flight":{"altitude":"3 furlongs"}}`, map[string]string{"flight.altitude": "furlongs"}},
		{"absolute temperature into dK with wrong dimension", `{"flight":{"delta_isa":"10 m"}}`, map[string]string{"flight.delta_isa": "temperature difference"}},
		{"string into unitless float", `{"flight":{"mach":"0.8"}}`, map[string]string{"flight.mach": "want a number, got a string"}},
		{"UnitNone stops inheritance", `{"offset":{"ratio":"3 m"}}`, map[string]string{"offset.ratio": "want a number, got a string"}},
		{"object into number", `{"flight":{"altitude":{"value":1}}}`, map[string]string{"flight.altitude": "want a number (in m) or a string with a unit, got an object"}},
		{"bool into scale", `{"model":{"scale":true}}`, map[string]string{"model.scale": `ratio such as "1:16", got a boolean`}},
		{"ratio 1:0", `{"model":{"scale":"1:0"}}`, map[string]string{"model.scale": "two positive numbers"}},
		{"negative ratio", `{"model":{"scale":"-1:16"}}`, map[string]string{"model.scale": "two positive numbers"}},
		{"ratio with unit", `{"model":{"scale":"1 m:16"}}`, map[string]string{"model.scale": "two positive numbers"}},
		{"scale without ratio", `{"model":{"scale":"0.05"}}`, map[string]string{"model.scale": "two positive numbers"}},
		{"number into string", `{"name":42}`, map[string]string{"name": "want a string, got a number"}},
		{"string into bool", `{"verbose":"yes"}`, map[string]string{"verbose": "want true or false, got a string"}},
		{"fraction into int", `{"points":2.5}`, map[string]string{"points": "want an integer"}},
		{"int8 overflow", `{"small":300}`, map[string]string{"small": "from -128 to 127"}},
		{"object into array", `{"model":{"scales":{"a":1}}}`, map[string]string{"model.scales": "want an array, got an object"}},
		{"number out of float64 range", `{"flight":{"altitude":1e400}}`, map[string]string{"flight.altitude": "out of range"}},
		{"number out of float32 range", `{"precision":1e39}`, map[string]string{"precision": "out of range"}},
		{"unit string that overflows", `{"flight":{"altitude":"1e308 mi"}}`, map[string]string{"flight.altitude": "out of range"}},
		{"medium by its own decoder", `{"facility":{"medium":"helium"}}`, map[string]string{"facility.medium": "unknown medium"}},
		{"medium unknown field", `{"facility":{"medium":{"gas":{"gama":1.4}}}}`, map[string]string{"facility.medium": "unknown field"}},
		{"many errors at once", `{"fligth":1,"flight":{"altitude":"2 bar","delta_isa":"x"},"model":{"scale":"1:0"},"alpha":{"step":"1 m"},"facility":{"balances":[{},{"limits":{"normal":"1 kg"}}]}}`,
			map[string]string{
				"fligth":                             "unknown field",
				"flight.altitude":                    "the field wants",
				"flight.delta_isa":                   "",
				"model.scale":                        "two positive numbers",
				"alpha.step":                         "angle",
				"facility.balances[1].limits.normal": "the field wants",
			}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			var d decodeTarget
			d.Name = "before"
			err := unitjson.Decode([]byte(tc.body), &d)
			require.Error(t, err, "want errors at %v", tc.want)
			fields := fieldsOf(t, err)
			got := map[string]string{}
			for _, f := range fields {
				assert.NotContains(t, got, f.Field, "path reported twice")
				got[f.Field] = f.Message
			}
			for path, frag := range tc.want {
				if assert.Contains(t, got, path, "no error at this path; got %v", fields) {
					assert.Contains(t, got[path], frag, path)
				}
			}
			assert.Len(t, got, len(tc.want), "errors %v", fields)
			assert.Equal(t, "before", d.Name, "dst changed on error")
		})
	}
}

func TestDecodeCapsErrorList(t *testing.T) {
	t.Parallel()
	var b strings.Builder
	b.WriteString(`{"model":{"scales":[`)
	for i := range 200 {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(`"x"`)
	}
	b.WriteString(`]}}`)
	var d decodeTarget
	err := unitjson.Decode([]byte(b.String()), &d)
	fields := fieldsOf(t, err)
	require.Len(t, fields, 50, "the first 50 field errors")
	assert.ErrorContains(t, err, "200 fields are invalid")
	assert.Equal(t, "model.scales[49]", fields[49].Field)
}

func TestDecodeNeedsStructPointer(t *testing.T) {
	t.Parallel()
	for _, dst := range []any{nil, decodeTarget{}, new(int), (*decodeTarget)(nil)} {
		err := unitjson.Decode([]byte(`{}`), dst)
		if assert.Error(t, err, "Decode into %T", dst) {
			assert.Empty(t, check.ErrorCode(err), "Decode into %T: want a programming error, not a domain error", dst)
		}
	}
}

// TestDecodeMatchesEncodingJSON checks that SI-only bodies decode exactly as
// encoding/json decodes them.
func TestDecodeMatchesEncodingJSON(t *testing.T) {
	t.Parallel()
	body := []byte(`{"flight":{"altitude":11000,"delta_isa":5,"mach":0.78},"model":{"scales":[0.04,0.05]},
		"alpha":{"from":-4,"to":16,"step":1},"offset":{"x":0.1,"z":-0.02},"points":3,"name":"n","loads":{"normal":1},
		"facility":{"id":"x","medium":"water","stagnation_pressure":{"min":1,"max":2},"balances":[{"id":"b","safety_factor":1.5}]}}`)
	var got, want decodeTarget
	require.NoError(t, unitjson.Decode(body, &got))
	require.NoError(t, json.Unmarshal(body, &want))
	assert.Equal(t, want, got, "Decode and encoding/json differ")
}

func ExampleDecode() {
	var req struct {
		Altitude float64 `json:"altitude" unit:"m"`
		Scale    float64 `json:"scale" unit:"scale"`
		Pressure struct {
			Min float64 `json:"min"`
			Max float64 `json:"max"`
		} `json:"pressure" unit:"Pa"`
	}
	err := unitjson.Decode([]byte(`{"altitude":"35000 ft","scale":"1:16","pressure":{"min":"0.5 bar","max":"2.2 bar"}}`), &req)
	fmt.Println(err)
	fmt.Printf("%.4g m, scale %.4g, %.4g to %.4g Pa\n", req.Altitude, req.Scale, req.Pressure.Min, req.Pressure.Max)

	err = unitjson.Decode([]byte(`{"altitude":"2 bar","scale":"1:0","presure":{}}`), &req)
	for _, f := range err.(*check.Error).Fields {
		fmt.Printf("%s: %s\n", f.Field, f.Message)
	}
	// Output:
	// <nil>
	// 1.067e+04 m, scale 0.0625, 5e+04 to 2.2e+05 Pa
	// altitude: unit "bar" is a pressure (M L^-1 T^-2); the field wants a length (L, e.g. m)
	// scale: scale "1:0": want a number or a ratio of two positive numbers such as "1:16"
	// presure: unknown field
}

func TestDecodeAnyFieldErrorsInOrder(t *testing.T) {
	t.Parallel()
	body := []byte(`{"extra":{"d":1e999,"b":[1,2e999],"a":-1e999,"c":"fine"}}`)
	want := []string{"extra.a", "extra.b[1]", "extra.d"}
	for i := range 20 {
		var d decodeTarget
		fields := fieldsOf(t, unitjson.Decode(body, &d))
		var got []string
		for _, f := range fields {
			got = append(got, f.Field)
		}
		require.Equal(t, want, got, "try %d: paths", i)
	}
}
