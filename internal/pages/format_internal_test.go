package pages

import (
	"encoding/json"
	"testing"

	"github.com/stretchr/testify/assert"
)

func TestSigned(t *testing.T) {
	cases := []struct {
		v    float64
		want string
	}{
		{0.005, "+0.005"}, {-0.0123, "-0.0123"}, {0, "0"}, {-0.0, "0"}, {-1e-300, "-1e-300"}, {12.34, "+12.3"},
	}
	for _, tc := range cases {
		assert.Equal(t, tc.want, signed(tc.v), "%g", tc.v)
	}
}

func TestRequestTree(t *testing.T) {
	got := requestTree(map[string]string{
		"facility_id": "tsw-1", "model.scale": "1:30", "test.mach": "0.8", "test.stagnation_pressure": "1.5 bar",
		"article.aero.lift_slope": "5", "installation.model_mass": "", "plan_id": "abc",
	})
	assert.Equal(t, map[string]any{
		"facility_id": "tsw-1",
		"model":       map[string]any{"scale": "1:30"},
		"test":        map[string]any{"mach": jsonNumber("0.8"), "stagnation_pressure": "1.5 bar"},
		"article":     map[string]any{"aero": map[string]any{"lift_slope": jsonNumber("5")}},
	}, got, "numbers go as numbers, units as strings, empty fields and the plan id are left out")
}

func jsonNumber(s string) json.Number { return json.Number(s) }
