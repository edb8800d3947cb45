package similarity

import (
	"fmt"
	"math"

	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/check"
)

// Waters a marine condition can name.
const (
	WaterFresh = "fresh"
	WaterSea   = "sea"
)

// How a vessel meets the free surface (Marine.FreeSurface).
const (
	// SurfaceSubmerged: deeply submerged; the free surface plays no part (default).
	SurfaceSubmerged = "submerged"
	// SurfaceNear: runs near the free surface; waves it makes matter.
	SurfaceNear = "near"
	// SurfacePiercing: pierces the free surface (a strut, a surface-piercing foil).
	SurfacePiercing = "piercing"
)

// DefaultSeaSalinity is the absolute salinity in g/kg of sea water when a marine
// condition names the sea and gives none: standard sea water, S_A = 35.16504 g/kg
// (practical salinity 35; Millero et al. 2008).
const DefaultSeaSalinity = 35.16504

// StandardAtmosphericPressure is the default atmospheric pressure over the water in
// Pa (one standard atmosphere).
const StandardAtmosphericPressure = 101325.0

// Documented ranges of a marine condition (SI units; facilities.Bound).
var (
	// BoundWaterTemperature bounds the full-scale water temperature, K (0–40 °C).
	BoundWaterTemperature = facilities.Bound{Min: facilities.SeaMinTemperature, Max: facilities.SeaMaxTemperature, Unit: "K"}
	// BoundSalinity bounds the absolute salinity of sea water, g/kg.
	BoundSalinity = facilities.Bound{Min: 0, MinExclusive: true, Max: facilities.SeaMaxSalinity, Unit: "g/kg"}
	// BoundDepth bounds the depth of the reference point below the free surface, m.
	BoundDepth = facilities.Bound{Min: 0, Max: 11000, Unit: "m"}
	// BoundAtmosphericPressure bounds the atmospheric pressure over the water, Pa.
	BoundAtmosphericPressure = facilities.Bound{Min: 50000, Max: 110000, Unit: "Pa"}
	// BoundMarineSpeed bounds the speed through the water, m/s.
	BoundMarineSpeed = facilities.Bound{Min: 0.01, Max: 100, Unit: "m/s"}
	// BoundCavitationTolerance bounds the objective's cavitation tolerance.
	BoundCavitationTolerance = facilities.Bound{Min: 0, Max: 10}
)

// Marine is a full-scale condition in water, as a plan or loads request gives it
// instead of a flight (`marine`): the water, its temperature, the depth of the
// vessel's reference point, the atmospheric pressure and the speed.
type Marine struct {
	// Water is "fresh" or "sea".
	Water string `json:"water"`
	// Salinity is the absolute salinity of sea water in g/kg (0 < S ≤ 42); nil:
	// DefaultSeaSalinity for the sea. Fresh water takes none.
	Salinity *float64 `json:"salinity,omitempty"`
	// Temperature is the water temperature in K (273.15–313.15 K, 0–40 °C; a
	// string such as "18 degC" is accepted).
	Temperature float64 `json:"temperature" unit:"K"`
	// Depth is the depth in m of the reference point (where the cavitation number
	// is taken) below the free surface, 0–11 000 m.
	Depth float64 `json:"depth" unit:"m"`
	// AtmosphericPressure is the pressure over the free surface in Pa
	// (50–110 kPa); nil: StandardAtmosphericPressure.
	AtmosphericPressure *float64 `json:"atmospheric_pressure,omitempty" unit:"Pa"`
	// Speed is the speed through the water in m/s (0.01–100 m/s; "27 kn" is
	// accepted).
	Speed float64 `json:"speed" unit:"m/s"`
	// FreeSurface says how the vessel meets the free surface: "submerged"
	// (default: deep, the free surface plays no part), "near" (runs near it) or
	// "piercing" (pierces it). With "near" or "piercing" the answer gives the
	// Froude number on depth and says that a closed water tunnel cannot match it.
	FreeSurface string `json:"free_surface,omitempty"`
}

// MarineState is a resolved marine condition, all SI: the `marine` part of the
// full-scale condition of an answer.
type MarineState struct {
	// Water is "fresh" or "sea".
	Water string `json:"water"`
	// Salinity is the absolute salinity in g/kg (0 for fresh water).
	Salinity float64 `json:"salinity"`
	// Temperature is the water temperature in K.
	Temperature float64 `json:"temperature"`
	// Depth is the depth of the reference point below the free surface in m.
	Depth float64 `json:"depth"`
	// AtmosphericPressure is the pressure over the free surface in Pa.
	AtmosphericPressure float64 `json:"atmospheric_pressure"`
	// Pressure is the static pressure at the reference point, p_atm + ρ·g0·h, in Pa.
	Pressure float64 `json:"pressure"`
	// VapourPressure is the water's vapour pressure in Pa.
	VapourPressure float64 `json:"vapour_pressure"`
	// Speed is the speed through the water in m/s.
	Speed float64 `json:"speed"`
	// Cavitation is the cavitation number at the reference point,
	// σ = (p_atm + ρ·g0·h − p_v)/(½·ρ·V²).
	Cavitation float64 `json:"cavitation"`
	// FreeSurface is "submerged", "near" or "piercing".
	FreeSurface string `json:"free_surface"`
	// FroudeDepth is V/√(g0·h) on the depth h of the reference point; present
	// only when the vessel runs near or pierces the free surface and h > 0.
	FroudeDepth *float64 `json:"froude_depth,omitempty"`
}

// Validate checks every field of the marine condition. It returns a
// *check.Error with CodeInvalid naming each bad field by its JSON path
// ("marine.temperature"), or nil.
func (m *Marine) Validate() error {
	var fe []check.FieldError
	add := func(field, msg string) {
		fe = append(fe, check.FieldError{Field: "marine." + field, Message: msg})
	}
	switch m.Water {
	case WaterFresh:
		if m.Salinity != nil {
			add("salinity", "fresh water takes no salinity: name the water \"sea\" to give one")
		}
	case WaterSea:
		if m.Salinity != nil && !BoundSalinity.Contains(*m.Salinity) {
			add("salinity", BoundSalinity.Problem(*m.Salinity))
		}
	case "":
		add("water", "give the water: \"fresh\" or \"sea\"")
	default:
		add("water", fmt.Sprintf("unknown water %q: want \"fresh\" or \"sea\"", m.Water))
	}
	if m.Temperature == 0 {
		add("temperature", "give the water temperature (K, or a string such as \"18 degC\"), "+BoundWaterTemperature.String())
	} else if !BoundWaterTemperature.Contains(m.Temperature) {
		add("temperature", BoundWaterTemperature.Problem(m.Temperature))
	}
	if !BoundDepth.Contains(m.Depth) {
		add("depth", BoundDepth.Problem(m.Depth))
	}
	if m.AtmosphericPressure != nil && !BoundAtmosphericPressure.Contains(*m.AtmosphericPressure) {
		add("atmospheric_pressure", BoundAtmosphericPressure.Problem(*m.AtmosphericPressure))
	}
	if m.Speed == 0 {
		add("speed", "give the speed through the water (m/s, or a string such as \"27 kn\"), "+BoundMarineSpeed.String())
	} else if !BoundMarineSpeed.Contains(m.Speed) {
		add("speed", BoundMarineSpeed.Problem(m.Speed))
	}
	switch m.FreeSurface {
	case "", SurfaceSubmerged, SurfaceNear, SurfacePiercing:
	default:
		add("free_surface", fmt.Sprintf("unknown %q: want \"submerged\", \"near\" or \"piercing\"", m.FreeSurface))
	}
	return check.Invalid("invalid marine condition", fe)
}

// Resolve validates the marine condition and returns the full-scale state on the
// reference length referenceLength in m: the water's properties
// (facilities.NaturalWater: Kell and IAPWS 2008 for fresh water, EOS-80 and
// Sharqawy et al. 2010 for sea water, the IAPWS-IF97 vapour pressure), the
// Reynolds number ρ·V·L/μ, the Froude number V/√(g0·L) on length, the cavitation
// number at the reference depth h,
//
//	σ = (p_atm + ρ·g0·h − p_v)/(½·ρ·V²),
//
// and, near or through the free surface, the Froude number V/√(g0·h) on depth.
// The returned FlightState has Mach, TrueAirspeed and the other airspeeds 0 (they
// are absent from its JSON) and Marine set; FlightState.Speed gives V.
func (m *Marine) Resolve(referenceLength float64) (FlightState, error) {
	if err := m.Validate(); err != nil {
		return FlightState{}, err
	}
	if !(referenceLength > 0) || math.IsInf(referenceLength, 0) {
		return FlightState{}, check.Invalid("invalid article", []check.FieldError{{
			Field: "article.reference_length", Message: fmt.Sprintf("%g m must be a positive length", referenceLength)}})
	}
	sa := 0.0
	if m.Water == WaterSea {
		sa = DefaultSeaSalinity
		if m.Salinity != nil {
			sa = *m.Salinity
		}
	}
	patm := StandardAtmosphericPressure
	if m.AtmosphericPressure != nil {
		patm = *m.AtmosphericPressure
	}
	surface := m.FreeSurface
	if surface == "" {
		surface = SurfaceSubmerged
	}
	w := facilities.NaturalWater(m.Temperature, sa)
	v := m.Speed
	q := 0.5 * w.Density * v * v
	p := patm + w.Density*atmosphere.G0*m.Depth
	ms := MarineState{
		Water:               m.Water,
		Salinity:            sa,
		Temperature:         m.Temperature,
		Depth:               m.Depth,
		AtmosphericPressure: patm,
		Pressure:            p,
		VapourPressure:      w.VapourPressure,
		Speed:               v,
		Cavitation:          (p - w.VapourPressure) / q,
		FreeSurface:         surface,
	}
	if surface != SurfaceSubmerged && m.Depth > 0 {
		fr := Froude(v, m.Depth)
		ms.FroudeDepth = &fr
	}
	return FlightState{
		Reynolds:        w.Density * v * referenceLength / w.Viscosity,
		Froude:          Froude(v, referenceLength),
		ReferenceLength: referenceLength,
		DynamicPressure: q,
		Static: facilities.Static{
			Temperature:     m.Temperature,
			Pressure:        p,
			Density:         w.Density,
			Viscosity:       w.Viscosity,
			Compressibility: 1,
		},
		Marine: &ms,
	}, nil
}

// Speed returns the full-scale speed in m/s: the true airspeed of a flight, the
// speed through the water of a marine condition.
func (f *FlightState) Speed() float64 {
	if f.Marine != nil {
		return f.Marine.Speed
	}
	return f.TrueAirspeed
}

// WaterCavitation returns the cavitation number (p − p_v)/(½·ρ·V²) of a water
// test-section state st, with p its static pressure and p_v the IAPWS-IF97 vapour
// pressure of the tunnel's fresh water at its temperature; ok is false when the
// state has no dynamic pressure.
func WaterCavitation(st facilities.State) (sigma float64, ok bool) {
	if !(st.DynamicPressure > 0) {
		return 0, false
	}
	return (st.Static.Pressure - facilities.WaterVapourPressure(st.Static.Temperature)) / st.DynamicPressure, true
}

// CompareCavitation fills a water test's cavitation number and vapour pressure, and,
// for a marine full-scale condition fl, the mismatch's cavitation difference and
// its matched flag within tol (absolute). Gas facilities are left alone.
func CompareCavitation(t *Test, m *Mismatch, fl FlightState, f *facilities.Facility, tol float64) {
	if !f.Medium.IsLiquid() {
		return
	}
	pv := facilities.WaterVapourPressure(t.Static.Temperature)
	t.VapourPressure = &pv
	sig, ok := WaterCavitation(t.State)
	if !ok {
		return
	}
	t.Cavitation = &sig
	if fl.Marine != nil && m != nil {
		d := sig - fl.Marine.Cavitation
		matched := math.Abs(d) <= tol*(1+machSlack)+1e-12*fl.Marine.Cavitation
		m.CavitationDifference, m.CavitationMatched, m.CavitationTolerance = &d, &matched, tol
	}
}
