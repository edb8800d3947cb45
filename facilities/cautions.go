package facilities

import (
	"fmt"
	"math"
	"slices"
	"sync"
)

// pressureCautionAbove is the stagnation pressure in Pa above which a facility is
// treated as a pressure vessel in the cautions: 0.5 bar above a standard
// atmosphere, a common threshold of pressure-equipment rules (common practice).
const pressureCautionAbove = 101325 + 50000

// subAtmosphericBelow is the stagnation pressure in Pa below which a facility with
// a variable stagnation pressure is treated as a sub-atmospheric circuit in the
// cautions. The record does not carry the site's ambient pressure, so the standard
// sea-level atmosphere (101 325 Pa, U.S. Standard Atmosphere 1976) stands in for
// it: a site above sea level has a lower ambient, so the caution errs towards
// being given. A facility with a fixed stagnation pressure is taken to be open to
// its site's atmosphere.
const subAtmosphericBelow = 101325

// cryogenicBelow is the stagnation temperature in K below which a facility is
// treated as cryogenic in the cautions (common practice).
const cryogenicBelow = 200

// CautionEstimate is the first caution of every answer that carries cautions.
// It is exported so that callers and tests can recognise it; its wording is the
// contract.
const CautionEstimate = "These figures are engineering estimates from simplified published models, not a clearance to run: the facility's approved limits and balance ratings, the model's stress analysis, the facility's operating procedures and the judgement of a licensed engineer govern."

// CautionWaterLoads is the caution of every load check in a water facility.
const CautionWaterLoads = "These are steady-load estimates in water: cavitation, added-mass and unsteady flow loads can be larger and fluctuate; the balance must be waterproofed and electrically isolated for immersion and checked before filling. The facility's approved limits, procedures and licensed engineering judgement govern."

// Cautions returns the standing cautions of an answer about facility f (f may
// be nil) that carries no balance loads: CautionEstimate, then
// FacilityCautions(f, false). The load check's cautions are loads.Cautions.
func Cautions(f *Facility) []string {
	return append([]string{CautionEstimate}, FacilityCautions(f, false)...)
}

// FacilityCautions returns the cautions facility f calls for (none for a nil
// f), each worded to its danger: a pressure vessel (stagnation pressure above
// 1.5 bar absolute), a sub-atmospheric circuit (a variable stagnation pressure
// reaching below the standard sea-level atmosphere), any cold circuit
// (stagnation temperature below 200 K, any gas), nitrogen (asphyxiation, at
// any temperature), CautionWaterLoads when the answer carries balance loads
// (loaded) in water, and water.
func FacilityCautions(f *Facility, loaded bool) []string {
	if f == nil {
		return nil
	}
	p, what := f.StagnationPressure, "stagnation pressure"
	if f.StaticPressure != nil {
		p, what = *f.StaticPressure, "test-section static pressure"
	}
	k := cautionKey{id: f.ID, what: what, pMin: math.Float64bits(p.Min), pMax: math.Float64bits(p.Max),
		medium: f.Medium.Kind, tMin: math.Float64bits(f.StagnationTemperature.Min), loaded: loaded}
	return slices.Clone(facilityCautions.get(k))
}

// cautionKey is everything FacilityCautions reads of a facility, its numbers
// by their bits (so that 0 and -0, which print differently, are two keys).
type cautionKey struct {
	id, what string
	// pMin and pMax: the stagnation pressure's range, or the static one's where
	// the facility holds that.
	pMin, pMax uint64
	medium     string
	tMin       uint64
	loaded     bool
}

// cautionMemo keeps the cautions of each cautionKey seen: every plan asks for
// its facility's cautions twice (the planner's and the load check's), and
// formatting their figures cost 2.5 to 5 µs a plan. Past maxCautionKeys (inline
// facilities, each request its own) it starts again empty.
type cautionMemo struct {
	mu sync.Mutex
	m  map[cautionKey][]string
}

const maxCautionKeys = 1024

var facilityCautions = cautionMemo{m: map[cautionKey][]string{}}

// get returns the cautions of k, made once; callers do not change them.
func (cm *cautionMemo) get(k cautionKey) []string {
	cm.mu.Lock()
	out, ok := cm.m[k]
	cm.mu.Unlock()
	if ok {
		return out
	}
	out = makeCautions(k)
	cm.mu.Lock()
	if len(cm.m) >= maxCautionKeys {
		clear(cm.m)
	}
	cm.m[k] = out
	cm.mu.Unlock()
	return out
}

// makeCautions words the cautions of FacilityCautions.
func makeCautions(k cautionKey) []string {
	var out []string
	p, what := Range{Min: math.Float64frombits(k.pMin), Max: math.Float64frombits(k.pMax)}, k.what
	tMin := math.Float64frombits(k.tMin)
	if p.Max > pressureCautionAbove {
		out = append(out, fmt.Sprintf("Facility %s is a pressure vessel (%s up to %.0f kPa): only its certified pressure limits and its pressurisation procedures apply; access to the circuit and model changes need it vented first.",
			k.id, what, p.Max/1000))
	}
	if !p.Fixed() && p.Min < subAtmosphericBelow {
		out = append(out, fmt.Sprintf("Facility %s runs below atmospheric pressure (%s down to %.0f kPa): the circuit is loaded from outside and can buckle or implode, hatches and windows are held by the pressure difference, and a leak draws air or water in; only its certified vacuum limits and its procedures apply, and access needs it brought back to ambient first.",
			k.id, what, p.Min/1000))
	}
	if k.medium != MediumWater && tMin > 0 && tMin < cryogenicBelow {
		out = append(out, fmt.Sprintf("Facility %s runs cold (stagnation temperature down to %.0f K): cold gas and cold surfaces burn skin and embrittle materials; follow the facility's cold-running and warm-up procedures, and check the model's materials, fits and balance calibration at the test temperature.",
			k.id, tMin))
	}
	if k.medium == MediumNitrogen {
		out = append(out, fmt.Sprintf("Facility %s runs on nitrogen: nitrogen displaces oxygen without warning and can kill in an enclosed space; follow the facility's oxygen monitoring, ventilation and confined-space procedures.", k.id))
	}
	if k.medium == MediumWater && k.loaded {
		out = append(out, CautionWaterLoads)
	}
	if k.medium == MediumWater {
		out = append(out, fmt.Sprintf("Facility %s is a water circuit: the water's mass, pressure and flow store energy, a model or fairing that comes loose travels downstream, and wet electrical equipment and open hatches are hazards; follow the facility's filling, draining, isolation and entry procedures, and check the model's sealing and fastening for immersion.", k.id))
	}
	return out
}
