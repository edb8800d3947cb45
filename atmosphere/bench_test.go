package atmosphere_test

import (
	"testing"

	"scalematch/atmosphere"
)

// sink keeps results alive so the compiler cannot drop the work.
var sink float64

func BenchmarkAtmosphere(b *testing.B) {
	cases := []struct {
		name string
		z    float64 // m
		dt   float64 // K
	}{
		{"troposphere", 3000, 0},
		{"tropopause", 15000, 10},
		{"mesosphere", 80000, -15},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				s, err := atmosphere.At(c.z, c.dt)
				if err != nil {
					b.Fatal(err)
				}
				sink += s.Density
			}
		})
	}
}

func BenchmarkAirspeeds(b *testing.B) {
	cases := []struct {
		name  string
		kind  atmosphere.SpeedKind
		value float64
	}{
		{"CAS subsonic", atmosphere.CalibratedAirspeed, 150},
		{"CAS supersonic", atmosphere.CalibratedAirspeed, 600},
		{"Mach", atmosphere.Mach, 0.8},
	}
	s, err := atmosphere.At(11000, 0)
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				v, err := s.Airspeeds(c.kind, c.value)
				if err != nil {
					b.Fatal(err)
				}
				sink += v.True
			}
		})
	}
}
