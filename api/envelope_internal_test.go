package api

import "testing"

func TestFormatTick(t *testing.T) {
	for _, tc := range []struct {
		v    float64
		want string
	}{
		{0.2 * 3, "0.6"}, {0.2 + 0.2*5, "1.2"}, {0.8, "0.8"}, {1, "1"}, {1.5, "1.5"}, {0.05, "0.05"}, {250, "250"},
	} {
		if got := formatTick(tc.v); got != tc.want {
			t.Errorf("formatTick(%v) = %q, want %q", tc.v, got, tc.want)
		}
	}
}
