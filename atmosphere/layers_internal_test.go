package atmosphere

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
)

// chain recomputes the base pressures from 101 325 Pa with the standard's pressure
// equations 33a (lapse ≠ 0) and 33b (isothermal), layer by layer.
func chain() []float64 {
	p := []float64{SeaLevelPressure}
	for i := 1; i < len(layers); i++ {
		b := layers[i-1]
		dh := layers[i].h - b.h
		t := b.t + b.lapse*dh
		if b.lapse == 0 {
			p = append(p, p[i-1]*math.Exp(-gmr*dh/b.t))
		} else {
			p = append(p, p[i-1]*math.Pow(b.t/t, gmr/b.lapse))
		}
	}
	return p
}

func TestBasePressures(t *testing.T) {
	t.Parallel()
	chained := chain()
	// Published base pressures, U.S. Standard Atmosphere 1976 (from memory; also
	// physics.md §1), each to the number of digits published.
	published := []struct {
		name string
		p    float64
		tol  float64 // absolute, half a unit in the last published digit
	}{
		{"0 m'", 101325, 0.5},
		{"11 km'", 22632.06, 0.005},
		{"20 km'", 5474.889, 0.0005},
		{"32 km'", 868.0187, 0.00005},
		{"47 km'", 110.9063, 0.00005},
		{"51 km'", 66.93887, 0.000005},
		{"71 km'", 3.956420, 0.0000005},
	}
	for i, c := range published {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			assert.InDelta(t, chained[i], layers[i].p, 1e-15*chained[i], "table against the chained equations 33a/33b")
			assert.InDelta(t, c.p, chained[i], c.tol, "U.S. Standard Atmosphere 1976 base pressure (from memory)")
		})
	}
	// The base temperatures must follow from the lapse rates too.
	for i := 1; i < len(layers); i++ {
		b := layers[i-1]
		assert.InDelta(t, layers[i].t, b.t+b.lapse*(layers[i].h-b.h), 1e-9, "layer %d: base temperature from the lapse rate", i)
	}
}
