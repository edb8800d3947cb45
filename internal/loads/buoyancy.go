package loads

import (
	"fmt"
	"math"

	"scalematch/atmosphere"
	"scalematch/facilities"
)

// HullVolumeCoefficient is the share of the box "frontal area × overall length" a
// streamlined hull, strut or foil fills, used to estimate a model's volume when the
// request gives none: 0.65 (common practice for bodies of revolution and thick
// foils, whose prismatic coefficients lie near 0.6–0.7). An estimate only.
const HullVolumeCoefficient = 0.65

// BuoyancyDensity returns the density in kg/m³ of water facility f's water at its
// highest temperature: the smallest buoyancy over its range (within 0.6 % of any
// other between 8 and 34 °C), which the planner's load limit and the load report
// both take, so that they agree. 0 for a gas facility.
func BuoyancyDensity(f *facilities.Facility) float64 {
	if f == nil || !f.Medium.IsLiquid() {
		return 0
	}
	return facilities.WaterDensity(f.StagnationTemperature.Max)
}

// WithBuoyancy returns the installation with its Buoyancy set for facility f: the
// upthrust ρ·g0·V of its ModelVolume in f's water (BuoyancyDensity); unchanged in
// a gas facility or without a volume.
func (in Installation) WithBuoyancy(f *facilities.Facility) Installation {
	if rho := BuoyancyDensity(f); rho > 0 && in.ModelVolume > 0 {
		in.Buoyancy = rho * atmosphere.G0 * in.ModelVolume
	}
	return in
}

// Buoyancy is the weight, buoyancy and net weight of a model in a water facility,
// for the answer: forces in N (positive down for the weight, up for the buoyancy),
// volume in m³, density in kg/m³.
type Buoyancy struct {
	// ModelVolume is the model's displaced volume in m³.
	ModelVolume float64 `json:"model_volume"`
	// VolumeBasis says where the volume comes from: "given" (installation.model_volume)
	// or "estimated" (HullVolumeCoefficient × frontal area × overall length of the
	// model; an estimate).
	VolumeBasis string `json:"volume_basis"`
	// WaterDensity is the tunnel water's density in kg/m³ the buoyancy is taken at.
	WaterDensity float64 `json:"water_density"`
	// Weight is m·g0 in N (0 when model_mass is not given).
	Weight float64 `json:"weight"`
	// Buoyancy is ρ·g0·V in N, acting up.
	Buoyancy float64 `json:"buoyancy"`
	// Net is Weight − Buoyancy in N: positive down, negative when the model floats.
	Net float64 `json:"net"`
	// InLoadCheck reports whether the balance loads include the buoyancy: true
	// when the volume is given; an estimated volume is shown, not used.
	InLoadCheck bool `json:"in_load_check"`
}

// BuoyancyOf returns the weight, buoyancy and net of a model installed as in, in
// water facility f, with frontal area frontal (m²) and overall length length (m) at
// model scale for the estimate when in gives no volume; nil in a gas facility, or
// when neither a volume nor a length for the estimate exists. The buoyancy acts
// up at the centre of gravity (cg_offset): a centre of buoyancy elsewhere adds a
// pitching moment this estimate leaves out.
func BuoyancyOf(f *facilities.Facility, in Installation, frontal, length float64) *Buoyancy {
	rho := BuoyancyDensity(f)
	if rho == 0 {
		return nil
	}
	b := &Buoyancy{ModelVolume: in.ModelVolume, VolumeBasis: "given", WaterDensity: rho, InLoadCheck: true}
	if in.ModelVolume == 0 {
		if !(frontal > 0 && length > 0) {
			return nil
		}
		b.ModelVolume, b.VolumeBasis, b.InLoadCheck = HullVolumeCoefficient*frontal*length, "estimated", false
	}
	b.Weight = in.ModelMass * atmosphere.G0
	b.Buoyancy = rho * atmosphere.G0 * b.ModelVolume
	b.Net = b.Weight - b.Buoyancy
	if math.IsInf(b.Net, 0) || math.IsNaN(b.Net) {
		return nil
	}
	return b
}

// Note returns the sentence the answer's warnings carry about b.
func (b *Buoyancy) Note() string {
	if b.InLoadCheck {
		return fmt.Sprintf("buoyancy %.4g N (model volume %.4g m³ in water of %.5g kg/m³) acts up against the weight %.4g N: net %.4g N, in the balance loads",
			b.Buoyancy, b.ModelVolume, b.WaterDensity, b.Weight, b.Net)
	}
	return fmt.Sprintf("buoyancy estimated at %.4g N from a model volume of %.4g m³ (%.2f × frontal area × overall length, an estimate): net weight %.4g N; it is not in the balance loads: give installation.model_volume (m³) to include it",
		b.Buoyancy, b.ModelVolume, HullVolumeCoefficient, b.Net)
}
