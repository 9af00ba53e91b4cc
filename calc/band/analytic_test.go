package band

import (
	"cleave/internal/testutil"
	"math"
	"testing"
)

// TestFangHoward checks the Fang–Howard ground state (Fang & Howard, Phys. Rev. Lett. 16, 797
// (1966); Ando, Fowler & Stern, Rev. Mod. Phys. 54, 437 (1982)), evaluated independently
// with CODATA 2018 constants for GaAs m* = 0.067, eps_r = 12.9, n = 3e11 cm^-2.
func TestFangHoward(t *testing.T) {
	tests := []struct {
		name      string
		nDepl     float64
		wantE0meV float64
		wantZnm   float64
		wantB     float64
	}{
		{"no depletion", 0, 43.737, 12.094, 2.48054e8},
		{"N_depl 5e10 cm^-2", 5e14, 49.490, 10.601, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			e0, b := FangHoward(0.067, 12.9, 3e15, tc.nDepl)
			if testutil.RelDiff(e0*1e3, tc.wantE0meV) > 1e-4 {
				t.Errorf("E0 = %.5f meV, want %.5f (independent evaluation)", e0*1e3, tc.wantE0meV)
			}
			if testutil.RelDiff(3/b*1e9, tc.wantZnm) > 1e-4 {
				t.Errorf("<z> = %.5f nm, want %.5f (independent evaluation)", 3/b*1e9, tc.wantZnm)
			}
			if tc.wantB != 0 && testutil.RelDiff(b, tc.wantB) > 1e-4 {
				t.Errorf("b = %.6g, want %.6g", b, tc.wantB)
			}
			// Without depletion charge E0 reduces to 5ħ²b²/(8m*) (Fang & Howard 1966).
			if tc.nDepl == 0 {
				closed := 5 * hbar * hbar * b * b / (8 * 0.067 * me) / qe
				if testutil.RelDiff(e0, closed) > 1e-12 {
					t.Errorf("E0 = %g, 5ħ²b²/8m* = %g", e0, closed)
				}
			}
		})
	}
}

// TestAnalyticBalance checks the energy balance of Stern, Appl. Phys. Lett. 43, 974 (1983),
// evaluated independently with CODATA 2018 constants for illustrative inputs (not a
// published structure): ΔEc = 0.25914 eV, E_D' = 0.10 eV, ε_b = 12.05, GaAs channel
// m* = 0.067, ε = 12.9.
func TestAnalyticBalance(t *testing.T) {
	base := AnalyticInput{DeltaEcEV: 0.25914, DonorDepthEV: 0.10, BarrierEpsR: 12.05,
		ChannelMstar: 0.067, ChannelEpsR: 12.9}
	tests := []struct {
		name   string
		mod    func(*AnalyticInput)
		wantN  float64 // cm^-2
		wantE0 float64 // meV, 0 = not checked
	}{
		{"delta 30 nm, no E0", func(a *AnalyticInput) { a.SpacerM = 30e-9; a.NoGroundState = true }, 3.2729e11, 0},
		{"delta 30 nm, self-consistent Fang-Howard", func(a *AnalyticInput) { a.SpacerM = 30e-9 }, 2.4805e11, 38.53},
		{"uniform 1e18, 20 nm, no E0 no EF", func(a *AnalyticInput) {
			a.SpacerM = 20e-9
			a.BulkDonorsM3 = 1e24
			a.NoGroundState, a.NoFermiEnergy = true, true
		}, 4.7376e11, 0},
		{"uniform 1e18, 20 nm, full", func(a *AnalyticInput) { a.SpacerM = 20e-9; a.BulkDonorsM3 = 1e24 }, 3.1635e11, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			in := base
			tc.mod(&in)
			r, err := Analytic(in)
			if err != nil {
				t.Fatal(err)
			}
			if testutil.RelDiff(r.N2D/1e4, tc.wantN) > 2e-4 {
				t.Errorf("n = %.5g cm^-2, want %.5g (independent evaluation)", r.N2D/1e4, tc.wantN)
			}
			if tc.wantE0 != 0 && testutil.RelDiff(r.E0EV*1e3, tc.wantE0) > 5e-4 {
				t.Errorf("E0 = %.4f meV, want %.2f (independent evaluation)", r.E0EV*1e3, tc.wantE0)
			}
			// The closed form for uniform doping (Stern 1983) must agree with the bisection
			// wherever E0 and E_F are dropped.
			if in.BulkDonorsM3 > 0 && in.NoGroundState && in.NoFermiEnergy {
				nd, d := in.BulkDonorsM3, in.SpacerM
				closed := math.Sqrt(2*in.BarrierEpsR*eps0*nd*(in.DeltaEcEV-in.DonorDepthEV)/qe+nd*nd*d*d) - nd*d
				if testutil.RelDiff(r.N2D, closed) > 1e-9 {
					t.Errorf("bisection %g, closed form %g", r.N2D, closed)
				}
			}
		})
	}
}

func TestAnalyticEdgeCases(t *testing.T) {
	r, err := Analytic(AnalyticInput{DeltaEcEV: 0.1, DonorDepthEV: 0.2, BarrierEpsR: 12, SpacerM: 10e-9, ChannelMstar: 0.067, ChannelEpsR: 12.9})
	if err != nil || r.N2D != 0 {
		t.Errorf("donor level above the offset: got n = %g, err %v; want 0, nil", r.N2D, err)
	}
	if _, err := Analytic(AnalyticInput{DeltaEcEV: 0.3}); err == nil {
		t.Error("zero permittivity and mass: want an error")
	}
	if _, err := Analytic(AnalyticInput{DeltaEcEV: 0.3, BarrierEpsR: 12, ChannelEpsR: 12, ChannelMstar: 0.067, SpacerM: -1}); err == nil {
		t.Error("negative spacer: want an error")
	}
}

// TestAnalyticMonotone: a thicker spacer or a deeper donor level can only lower n
// (property of the energy balance).
func TestAnalyticMonotone(t *testing.T) {
	prev := math.Inf(1)
	for d := 5e-9; d <= 100e-9; d += 5e-9 {
		r, err := Analytic(AnalyticInput{DeltaEcEV: 0.25914, DonorDepthEV: 0.1, BarrierEpsR: 12.05, SpacerM: d, ChannelMstar: 0.067, ChannelEpsR: 12.9})
		if err != nil {
			t.Fatal(err)
		}
		if !(r.N2D < prev) {
			t.Fatalf("spacer %g nm: n = %g not below %g", d*1e9, r.N2D, prev)
		}
		prev = r.N2D
	}
}

// TestAnalyticSurface: a Si sheet of 2.5e12 cm^-2 only 30 nm below a pinned GaAs surface
// (10 nm cap, 20 nm Al0.3Ga0.7As, the sheet, a 20 nm spacer, a 1 µm buffer on a semi-insulating
// substrate). Gauss's law in the depletion approximation with every donor ionised, worked by
// hand with E0 and E_F left out: with A = t_cap/ε_GaAs + (t_b + d)/ε_b, B = N d/ε_b and the
// substrate's depletion charge N_depl = ε_GaAs·0.75 V/(e·1 µm),
//
//	n = (0 − Φ_B)/(eA) + N − N_depl − B/A
//
// (the GaAs cap and channel share their band edge, so the band offsets met on the way cancel;
// ε of the Ioffe handbook, Φ_B = 0.7 eV), about 4.9e11 cm^-2, below the 7.8e11 cm^-2 the
// donor level alone would allow (ΔE_c = 0.25914 eV of Vurgaftman et al. 2001): the surface
// limits the density. The full estimate (with E0 and E_F) stays within 15 % of the
// self-consistent solution; the estimate without the surface overshoots it severalfold.
func TestAnalyticSurface(t *testing.T) {
	const (
		capM, barM, spM, N = 10e-9, 20e-9, 20e-9, 2.5e16
	)
	st := Stack{Layers: []Layer{
		{Name: "cap", Material: "GaAs", ThicknessM: capM},
		{Name: "barrier", Material: "Al0.3Ga0.7As", ThicknessM: barM},
		{Name: "delta", Material: "Al0.3Ga0.7As", Doping: Doping{Species: "Si", Sheet: true, Density: N}},
		{Name: "spacer", Material: "Al0.3Ga0.7As", ThicknessM: spM},
		{Name: "buffer", Material: "GaAs", ThicknessM: 1e-6},
	}}
	in, err := AnalyticInputFor(st, 0)
	if err != nil {
		t.Fatal(err)
	}
	epsC, epsB := 12.9*eps0, 12.048*eps0
	a := capM/epsC + (barM+spM)/epsB
	b := N * spM / epsB
	depl := epsC * 0.75 / (qe * 1e-6)
	hand := (0-0.7)/(qe*a) + N - depl - b/a
	bare := in
	bare.NoGroundState, bare.NoFermiEnergy = true, true
	r, err := Analytic(bare)
	if err != nil {
		t.Fatal(err)
	}
	if !r.SurfaceLimited || testutil.RelDiff(r.N2D, hand) > 1e-6 {
		t.Errorf("without E0, E_F: n = %.5g cm^-2 (surface-limited %v), worked by hand %.5g cm^-2", r.N2D*1e-4, r.SurfaceLimited, hand*1e-4)
	}
	if testutil.RelDiff(r.SurfaceN2D, N-hand-depl) > 1e-6 {
		t.Errorf("surface holds %.4g cm^-2, want N − n − N_depl = %.4g", r.SurfaceN2D*1e-4, (N-hand-depl)*1e-4)
	}
	full, err := Analytic(in)
	if err != nil {
		t.Fatal(err)
	}
	sc, err := Solve(st, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if q := full.N2D / sc.ChannelN2D; q < 0.85 || q > 1.15 {
		t.Errorf("analytic %.4g vs self-consistent %.4g cm^-2", full.N2D*1e-4, sc.ChannelN2D*1e-4)
	}
	noSurface := in
	noSurface.Surface = false
	ns, _ := Analytic(noSurface)
	if !(ns.N2D > 1.15*sc.ChannelN2D) || math.Abs(ns.N2D/sc.ChannelN2D-1) < math.Abs(full.N2D/sc.ChannelN2D-1) {
		t.Errorf("without the surface the estimate is %.4g cm^-2, with it %.4g, self-consistent %.4g: want the surface to help",
			ns.N2D*1e-4, full.N2D*1e-4, sc.ChannelN2D*1e-4)
	}
}
