package transport

import (
	"math"
	"testing"
)

// TestPlateauModelRxxZero: the plateau model of Sweep (ρ_xx from the empirical
// rule ρ_xx ∝ B |dρ_xy/dB|, Chang & Tsui 1985, from memory, where the levels
// are resolved) on an invented high-mobility GaAs 2DEG: n = 2.2e11 cm^-2,
// μ = 2.5e6 cm²/(V s), τ_q = 3 ps, 30 mK, 0–9 T, 0.1 Ohm noise. Plateaus must
// find ν = 8, 6, 4, 2 (B_ν = n h/(ν e) = 1.137, 1.516, 2.275, 4.550 T; spin is
// not resolved by the model, so no ν = 1), each with |R_xy − R_K/ν| < 1e-3
// R_K/ν, R_xx near zero (mean within 1 % of the low-field R_xx, which is
// 5 ρ_0 = 56.5 Ohm) and no warning.
func TestPlateauModelRxxZero(t *testing.T) {
	t.Parallel()
	p := SweepParams{Density: 2.2e15, Mobility: 250, MassRatio: 0.067, QuantumLifetime: 3e-12, Temperature: 0.03,
		Squares: 5, BStart: 0, BEnd: 9, Points: 9001, Noise: 0.1, Seed: 401, Plateaus: true}
	d, err := Sweep(p)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Plateaus(d, PlateauOptions{Density: p.Density})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Warnings) != 0 {
		t.Errorf("warnings %v", r.Warnings)
	}
	var nus []int
	for _, pl := range r.Plateaus {
		nus = append(nus, pl.P)
		bnu := hPl * p.Density / (qe * pl.Nu())
		if math.Abs(pl.Deviation) > 1e-3 || !pl.RxxNearZero || math.Abs(pl.RxxMean) > 0.01*r.RxxRef || !(pl.BMin < bnu && bnu < pl.BMax) {
			t.Errorf("ν = %d (%.3g–%.3g T, B_ν = %.4g T): deviation %.2g, R_xx mean %.3g min %.3g Ohm (ref %.3g)",
				pl.P, pl.BMin, pl.BMax, bnu, pl.Deviation, pl.RxxMean, pl.RxxMin, r.RxxRef)
		}
	}
	if want := []int{8, 6, 4, 2}; !equalInts(nus, want) {
		t.Errorf("filling factors %v, want %v", nus, want)
	}
}

// TestPlateauModelRxx: noise-free properties of the model. At low field
// (w ≪ 1) ρ_xx stays within the low-field amplitude of ρ_0; on the ν = 2
// plateau centre it is below 1e-3 ρ_0; between plateaus it peaks above ρ_0; it
// is never negative.
func TestPlateauModelRxx(t *testing.T) {
	t.Parallel()
	p := SweepParams{Density: 2.2e15, Mobility: 250, MassRatio: 0.067, QuantumLifetime: 3e-12, Temperature: 0.03, Plateaus: true}
	rho0 := 1 / (p.Density * qe * p.Mobility)
	b2 := hPl * p.Density / (2 * qe) // ν = 2
	if x, _ := p.Resistivity(b2); !(x >= 0 && x < 1e-3*rho0) {
		t.Errorf("ρ_xx(B_2 = %.4g T) = %.3g Ohm, want < %.3g", b2, x, 1e-3*rho0)
	}
	if x, _ := p.Resistivity(hPl * p.Density / (3 * qe)); !(x > rho0) {
		t.Errorf("ρ_xx at ν = 3 (between plateaus) = %.3g Ohm, want > ρ_0 = %.3g", x, rho0)
	}
	if x, _ := p.Resistivity(0.05); math.Abs(x-rho0) > 0.01*rho0 {
		t.Errorf("ρ_xx(0.05 T) = %.4g Ohm, want ρ_0 = %.4g within 1 %%", x, rho0)
	}
	for i := 1; i <= 9000; i++ {
		if x, _ := p.Resistivity(float64(i) * 1e-3); !(x >= 0) {
			t.Fatalf("ρ_xx(%g T) = %g", float64(i)*1e-3, x)
		}
	}
}
