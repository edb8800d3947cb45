package atmosphere_test

import (
	"errors"
	"fmt"

	"scalematch/atmosphere"
)

func ExampleAt() {
	s, err := atmosphere.At(11000, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("T %.4g K, p %.4g Pa, ρ %.4g kg/m³, a %.4g m/s, μ %.4g Pa·s\n",
		s.Temperature, s.Pressure, s.Density, s.SpeedOfSound, s.Viscosity)
	// Output:
	// T 216.8 K, p 2.27e+04 Pa, ρ 0.3648 kg/m³, a 295.2 m/s, μ 1.422e-05 Pa·s
}

func ExampleAt_outOfRange() {
	_, err := atmosphere.At(90000, 0)
	fmt.Println(errors.Is(err, atmosphere.ErrRange))
	fmt.Println(err)
	// Output:
	// true
	// atmosphere: altitude 90000 m is outside -5000 m to 86000 m: out of range
}

func ExamplePressureAltitude() {
	hp, err := atmosphere.PressureAltitude(50000) // Pa
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.4g m\n", hp)
	// Output:
	// 5574 m
}

func ExampleState_Airspeeds() {
	// 250 kt calibrated at flight level 100 (pressure altitude 3048 m).
	s, _ := atmosphere.AtPressureAltitude(3048, 0)
	v, err := s.Airspeeds(atmosphere.CalibratedAirspeed, 250*1852.0/3600)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("M %.4g, TAS %.4g m/s, EAS %.4g m/s, q %.4g Pa, qc %.4g Pa\n",
		v.Mach, v.True, v.Equivalent, v.DynamicPressure, v.ImpactPressure)
	// Output:
	// M 0.4523, TAS 148.5 m/s, EAS 127.6 m/s, q 9978 Pa, qc 1.05e+04 Pa
}

func ExamplePitotPressureRatio() {
	for _, m := range []float64{0.5, 1, 2} {
		fmt.Printf("M %g: (p+qc)/p %.4g, p0/p %.4g\n", m,
			atmosphere.PitotPressureRatio(m, atmosphere.Gamma), atmosphere.PressureRatio(m, atmosphere.Gamma))
	}
	// Output:
	// M 0.5: (p+qc)/p 1.186, p0/p 1.186
	// M 1: (p+qc)/p 1.893, p0/p 1.893
	// M 2: (p+qc)/p 5.64, p0/p 7.824
}
