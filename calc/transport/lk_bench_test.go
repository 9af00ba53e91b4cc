package transport

import "testing"

// BenchmarkQuantumLifetime: Dingle analysis of one 6000-point sweep (includes
// the SdH frequency search).
func BenchmarkQuantumLifetime(b *testing.B) {
	d, err := Sweep(dingleSweep(1))
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := QuantumLifetime(d, 0.2, 1, 0.067*mE, 3e15, 1.5); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLKMassSweeps: six 6000-point sweeps, about 27 extrema.
func BenchmarkLKMassSweeps(b *testing.B) {
	ds := lkSweeps(b, 1, 0.05, lkTemps, 0)
	for b.Loop() {
		if _, err := LKMassSweeps(ds, nil, 0.3, 1); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPlateaus: plateau search on a 10^6-point quantum Hall sweep.
func BenchmarkPlateaus(b *testing.B) {
	p := gaas()
	p.Plateaus, p.Temperature, p.BStart, p.BEnd, p.Points, p.Noise = true, 0.3, 0, 10, 1_000_000, 0.5
	d, err := Sweep(p)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := Plateaus(d, PlateauOptions{Density: 3e15}); err != nil {
			b.Fatal(err)
		}
	}
}
