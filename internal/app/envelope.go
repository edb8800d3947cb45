package app

import (
	"context"
	"math"

	"scalematch/facilities"
	"scalematch/internal/charts"
	"scalematch/internal/check"
	"scalematch/similarity"
)

// Envelope sampling: abscissae across the facility's range and stagnation
// temperatures across its range for the lowest Reynolds number.
const (
	envelopeColumns      = 81
	envelopeTemperatures = 12
)

// Envelope is the Reynolds-number envelope of a facility for a model of a given
// reference length, with the limit that shapes each edge: what the envelope
// charts draw (charts.Envelope).
type Envelope = charts.Envelope

// EnvelopeOf returns the Reynolds-number envelope of facility f for a model of
// reference length refLength in m. The upper edge is the planner's own
// (similarity.Envelope: the highest Reynolds number within every facility limit
// at each Mach number or speed, and the limit that caps it); the lower edge is
// the lowest stagnation pressure at the stagnation temperature, of a grid over
// the facility's range, that gives the lowest Reynolds number (lowLimit names
// the limit that sets it). Errors are those
// of similarity.Envelope (*check.Error).
func EnvelopeOf(f *facilities.Facility, refLength float64) (Envelope, error) {
	top, err := similarity.Envelope(f, refLength, envelopeColumns)
	if err != nil {
		return Envelope{}, err
	}
	e := Envelope{FacilityID: f.ID, ReferenceLength: refLength, Speed: f.Medium.IsLiquid()}
	e.FirstLimit, e.LastLimit = facilities.ConstraintMachMin, facilities.ConstraintMachMax
	if e.Speed || f.Mach == nil {
		e.FirstLimit, e.LastLimit = facilities.ConstraintSpeedMin, facilities.ConstraintSpeedMax
	}
	n := len(top)
	e.X, e.Low, e.High = make([]float64, n), make([]float64, n), make([]float64, n)
	e.LowLimit, e.HighLimit = make([]string, n), make([]string, n)
	temps := gridOf(f.StagnationTemperature, envelopeTemperatures)
	for i, tp := range top {
		x := tp.Mach
		if e.Speed {
			x = tp.Speed
		}
		e.X[i] = x
		e.Low[i], e.High[i] = math.NaN(), math.NaN()
		e.LowLimit[i], e.HighLimit[i] = tp.Limit, tp.Limit
		if !(tp.Reynolds > 0) {
			continue
		}
		e.High[i] = tp.Reynolds
		for _, t0 := range temps {
			if re, ok := lowestAt(f, x, t0, e.Speed); ok && (math.IsNaN(e.Low[i]) || re < e.Low[i]) {
				e.Low[i] = re
				e.LowLimit[i] = lowLimit(f, t0)
			}
		}
		e.Low[i] *= refLength
	}
	return e, nil
}

// gridOf returns n values spread evenly over r, or r.Min alone when r is fixed.
func gridOf(r facilities.Range, n int) []float64 {
	if r.Fixed() {
		return []float64{r.Min}
	}
	g := make([]float64, n)
	for i := range g {
		g[i] = r.Min + (r.Max-r.Min)*float64(i)/float64(n-1)
	}
	return g
}

// lowLimit names the limit that sets the lower edge of the envelope where the
// lowest Reynolds number is reached at stagnation temperature t0 and the lowest
// stagnation pressure: in a gas the pressure (the Reynolds number is nearly
// proportional to it); in a liquid, whose Reynolds number hardly depends on the
// pressure, the temperature bound t0 sits on, when the range is not fixed.
func lowLimit(f *facilities.Facility, t0 float64) string {
	r := f.StagnationTemperature
	switch {
	case !f.Medium.IsLiquid() || r.Fixed():
		return facilities.ConstraintPressureMin
	case t0 == r.Min:
		return facilities.ConstraintTempMin
	case t0 == r.Max:
		return facilities.ConstraintTempMax
	}
	return facilities.ConstraintPressureMin
}

// lowestAt returns the Reynolds number per metre at abscissa x (Mach number, or
// speed in m/s when speed is set), stagnation temperature t0 and the facility's
// lowest stagnation pressure, and whether that setting breaks no limit.
func lowestAt(f *facilities.Facility, x, t0 float64, speed bool) (float64, bool) {
	s := facilities.Setting{StagnationPressure: f.StagnationPressure.Min, StagnationTemperature: t0}
	if speed {
		s.Speed = x
	} else {
		s.Mach = x
	}
	st, err := f.State(s)
	if err != nil || !(x > 0) || len(f.Violations(st)) > 0 {
		return 0, false
	}
	return st.ReynoldsPerMeter, true
}

// EnvelopeCaution is the full caution of an envelope chart, drawn as its footer
// and sent as the Scalematch-Caution header of the envelope endpoints.
const EnvelopeCaution = charts.EnvelopeCaution

// Lookup returns the facility id names in the catalog, or in the demo catalog when
// none is configured.
func (p *Planner) Lookup(ctx context.Context, id string) (*facilities.Facility, error) {
	var fe check.Fields
	f, err := p.facility(ctx, nil, id, &fe)
	if err != nil {
		return nil, err
	}
	if err := fe.Err(); err != nil {
		return nil, err
	}
	return f, nil
}
