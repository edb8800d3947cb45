package facilities

import (
	"bytes"
	"encoding/json"
	"fmt"
)

// Test media names.
const (
	MediumAir      = "air"
	MediumNitrogen = "nitrogen"
	MediumWater    = "water"
	MediumGas      = "gas"
)

// Medium is a facility's test medium. In JSON it is the string "air", "nitrogen" or
// "water", or {"gas": {...}} for a custom ideal gas.
type Medium struct {
	// Kind is MediumAir, MediumNitrogen, MediumWater or MediumGas.
	Kind string
	// Gas holds the custom gas's constants when Kind is MediumGas, else nil.
	Gas *GasProperties
}

// GasProperties are the constants of a custom ideal gas. Viscosity follows
// Sutherland's law μ = μ_ref·(T/T_ref)^1.5·(T_ref+S)/(T+S).
type GasProperties struct {
	// MolarMass in kg/mol.
	MolarMass float64 `json:"molar_mass"`
	// Gamma is the ratio of specific heats.
	Gamma float64 `json:"gamma"`
	// ViscosityReference is μ_ref in Pa·s at TemperatureReference.
	ViscosityReference float64 `json:"viscosity_reference"`
	// TemperatureReference is T_ref in K.
	TemperatureReference float64 `json:"temperature_reference"`
	// SutherlandConstant is S in K.
	SutherlandConstant float64 `json:"sutherland_constant"`
	// CriticalTemperature is the gas's critical temperature in K, optional, given
	// with CriticalPressure: with both the condensation rule (Lee–Kesler vapour
	// pressure) and the near-critical warning apply to the gas; without them
	// neither is checked and a warning says so.
	CriticalTemperature *float64 `json:"critical_temperature,omitempty"`
	// CriticalPressure is the gas's critical pressure in Pa, optional, given with
	// CriticalTemperature.
	CriticalPressure *float64 `json:"critical_pressure,omitempty"`
	// AcentricFactor is Pitzer's acentric factor ω, optional (0, a simple fluid,
	// when absent; only used with a critical point).
	AcentricFactor *float64 `json:"acentric_factor,omitempty"`
}

// MarshalJSON writes the medium as a name or as {"gas": {...}}.
func (m Medium) MarshalJSON() ([]byte, error) {
	if m.Kind == MediumGas {
		return json.Marshal(struct {
			Gas *GasProperties `json:"gas"`
		}{m.Gas})
	}
	return json.Marshal(m.Kind)
}

// UnmarshalJSON reads a medium name or {"gas": {...}}; unknown names and unknown
// fields are errors.
func (m *Medium) UnmarshalJSON(b []byte) error {
	b = bytes.TrimSpace(b)
	if len(b) > 0 && b[0] == '"' {
		var s string
		if err := json.Unmarshal(b, &s); err != nil {
			return err
		}
		switch s {
		case MediumAir, MediumNitrogen, MediumWater:
			*m = Medium{Kind: s}
			return nil
		}
		return fmt.Errorf("unknown medium %q: want \"air\", \"nitrogen\", \"water\" or {\"gas\": {...}}", s)
	}
	var v struct {
		Gas *GasProperties `json:"gas"`
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&v); err != nil {
		return fmt.Errorf("medium: %v", err)
	}
	if v.Gas == nil {
		return fmt.Errorf("medium: want \"air\", \"nitrogen\", \"water\" or {\"gas\": {...}}")
	}
	*m = Medium{Kind: MediumGas, Gas: v.Gas}
	return nil
}
