package band

import (
	"cleave/internal/testutil"
	"errors"
	"math"
	"strings"
	"testing"
)

// deltaStack is an invented single heterojunction: a thick undoped Al0.3Ga0.7As barrier, a
// Si delta layer, a spacer, and a GaAs channel/buffer.
func deltaStack(spacer, sheet float64) Stack {
	return Stack{Layers: []Layer{
		{Name: "cap", Material: "GaAs", ThicknessM: 10e-9},
		{Name: "barrier", Material: "Al0.3Ga0.7As", ThicknessM: 300e-9},
		{Name: "delta", Material: "Al0.3Ga0.7As", Doping: Doping{Species: "Si", Sheet: true, Density: sheet}},
		{Name: "spacer", Material: "Al0.3Ga0.7As", ThicknessM: spacer},
		{Name: "buffer", Material: "GaAs", ThicknessM: 300e-9, Doping: Doping{Species: "C", Density: bufferAcceptors}},
	}, Bottom: Bottom{Kind: BottomZeroField}}
}

// bufferAcceptors is an invented p-type background in the buffer (5e14 cm^-3), so that the
// buffer band rises away from the channel as in real wafers: depletion charge
// N_depl = 5e20 m^-3 × 300 nm = 1.5e14 m^-2.
const bufferAcceptors = 5e20

// interfaceNode returns the first node of the GaAs channel below the spacer.
func interfaceNode(r *Solution, depth float64) int {
	return int(math.Round(depth/r.GridM)) + 1
}

// TestSolveAgainstAnalytic compares a converged delta-doped heterojunction with the analytic
// Fang–Howard estimate (Stern, Appl. Phys. Lett. 43, 974 (1983); Fang & Howard, Phys. Rev.
// Lett. 16, 797 (1966)) for the same inputs (ΔEc of Al0.3Ga0.7As from Vurgaftman et al.,
// an illustrative E_D' = 0.10 eV, 30 nm spacer). Fang–Howard is a
// variational upper bound of E0, and the finite barrier lowers E0 further, so the
// self-consistent density must be at least the analytic one, and close to it (one subband,
// no depletion charge).
func TestSolveAgainstAnalytic(t *testing.T) {
	st := deltaStack(30e-9, 3e16)
	r, err := Solve(st, Options{DonorDepthEV: 0.10})
	if err != nil {
		t.Fatal(err)
	}
	barrier, _ := Lookup("Al0.3Ga0.7As")
	gaas, _ := Lookup("GaAs")
	in, err := AnalyticInputFor(st, 0.10)
	if err != nil {
		t.Fatal(err)
	}
	// The surface terms by hand: A = ∫dz/ε over the 10 nm cap and 330 nm of Al0.3Ga0.7As,
	// B = ∫Q/ε = N·30 nm/ε_b (every donor lies 30 nm above the interface).
	want := AnalyticInput{DeltaEcEV: barrier.EcEV - gaas.EcEV, DonorDepthEV: 0.10, BarrierEpsR: barrier.EpsR,
		SpacerM: 30e-9, ChannelMstar: gaas.Mstar, ChannelEpsR: gaas.EpsR, DeplM2: bufferAcceptors * 300e-9,
		Surface: true, SurfaceBarrierEV: DefaultPinningEV, DonorsM2: 3e16,
		DepthOverEps:       10e-9/(gaas.EpsR*eps0) + 330e-9/(barrier.EpsR*eps0),
		DonorMomentOverEps: 3e16 * 30e-9 / (barrier.EpsR * eps0)}
	if !sameInput(in, want) {
		t.Errorf("AnalyticInputFor = %+v, want %+v", in, want)
	}
	a, err := Analytic(in)
	if err != nil {
		t.Fatal(err)
	}
	well := r.Density2D[len(r.Density2D)-1].N2D
	t.Logf("self-consistent n = %.4g cm^-2 (%d iterations), analytic %.4g cm^-2", well/1e4, r.Iterations, a.N2D/1e4)
	if well < 0.99*a.N2D || well > 1.15*a.N2D {
		t.Errorf("n = %.4g cm^-2, want within [0.99, 1.15] of the Fang–Howard estimate %.4g", well/1e4, a.N2D/1e4)
	}
	// Fang–Howard upper bound of the ground state, measured from the channel band edge at the
	// interface (a variational upper bound: Fang & Howard 1966).
	j := interfaceNode(r, 340e-9)
	e0 := r.Subbands[0].E - r.Ec[j]
	fh, _ := FangHoward(gaas.Mstar, gaas.EpsR, well, bufferAcceptors*300e-9)
	if !(e0 < fh) {
		t.Errorf("E0 − Ec(interface) = %.3f meV, not below Fang–Howard %.3f meV", e0*1e3, fh*1e3)
	}
	// One subband below E_F, as the analytic model assumes.
	if r.Subbands[1].E < 0 {
		t.Errorf("second subband at %.3f meV is occupied", r.Subbands[1].E*1e3)
	}
}

// sameInput compares analytic inputs to rounding (the integrals add up layer by layer).
func sameInput(a, b AnalyticInput) bool {
	close := func(x, y float64) bool { return math.Abs(x-y) <= 1e-12*math.Max(math.Abs(x), math.Abs(y)) }
	a2, b2 := a, b
	a2.DepthOverEps, a2.DonorMomentOverEps, b2.DepthOverEps, b2.DonorMomentOverEps = 0, 0, 0, 0
	return a2 == b2 && close(a.DepthOverEps, b.DepthOverEps) && close(a.DonorMomentOverEps, b.DonorMomentOverEps)
}

// TestNeutrality: the converged solution is charge neutral to better than 1e7 cm^-2, a
// numerical tolerance of 1e-4 of the 2DEG density (common practice), at temperatures from 0.3 K to 20 K.
func TestNeutrality(t *testing.T) {
	for _, temp := range []float64{0.3, 1.5, 4.2, 20} {
		r, err := Solve(deltaStack(20e-9, 5e16), Options{TemperatureK: temp})
		if err != nil {
			t.Fatalf("T = %g K: %v", temp, err)
		}
		if math.Abs(r.NeutralityError) > 1e11 {
			t.Errorf("T = %g K: neutrality error %.3g cm^-2 (surface %.3g, electrons %.3g)", temp,
				r.NeutralityError/1e4, r.SurfaceChargeM2/1e4, r.TotalN2D/1e4)
		}
		// Subband occupations add up to the integrated density.
		sum := 0.0
		for _, s := range r.Subbands {
			sum += s.N2D
		}
		if testutil.RelDiff(sum, r.TotalN2D) > 1e-9 {
			t.Errorf("T = %g K: Σ subbands %g ≠ ∫n dz %g", temp, sum, r.TotalN2D)
		}
		// E_c at the surface is the pinning barrier.
		if math.Abs(r.Ec[0]-DefaultPinningEV) > 1e-12 {
			t.Errorf("surface E_c = %g eV, want %g", r.Ec[0], DefaultPinningEV)
		}
	}
}

// TestGateMonotone: a more positive gate voltage can only add electrons (property), and the
// slope dn/dV_g approaches ε/(e d_eff) (parallel-plate capacitance with the quantum capacitance term; Ando, Fowler & Stern,
// Rev. Mod. Phys. 54, 437 (1982)), with d_eff = gate
// distance + ⟨z⟩ + a_B*/4; we check it lies between ε/(e (d + 30 nm)) and ε/(e d).
func TestGateMonotone(t *testing.T) {
	st := Stack{Layers: []Layer{
		{Name: "barrier", Material: "Al0.3Ga0.7As", ThicknessM: 100e-9},
		{Name: "channel", Material: "GaAs", ThicknessM: 300e-9},
	}, Surface: Surface{Kind: SurfaceGate}, Bottom: Bottom{Kind: BottomZeroField}}
	prev := -1.0
	var ns []float64
	// Ec at the gate is 0.8 eV − V_g; stay below V_g = 0.8 V so that no electrons gather
	// under the gate itself.
	vs := []float64{0.62, 0.66, 0.70, 0.74}
	for _, v := range vs {
		st.Surface.GateV = v
		r, err := Solve(st, Options{})
		if err != nil {
			t.Fatalf("V_g = %g: %v", v, err)
		}
		if !(r.TotalN2D > prev) {
			t.Fatalf("V_g = %g: n = %g not above %g", v, r.TotalN2D, prev)
		}
		prev = r.TotalN2D
		ns = append(ns, r.TotalN2D)
	}
	slope := (ns[3] - ns[2]) / (vs[3] - vs[2])
	p, _ := Lookup("Al0.3Ga0.7As")
	hi := p.EpsR * eps0 / (qe * 100e-9)
	lo := p.EpsR * eps0 / (qe * 130e-9)
	if ns[2] > 1e14 && (slope > hi || slope < lo) {
		t.Errorf("dn/dV = %.4g m^-2/V, want between %.4g and %.4g", slope, lo, hi)
	}
}

// TestPlausibleUniformDoping compares a uniformly doped Al0.3Ga0.7As/GaAs heterojunction (Si
// 1e18 cm^-3, 20 nm spacer) with the density such wafers typically show, 2e11–8e11 cm^-2
// (from memory, unverified; 1–4e11 cm^-2 for typical modulation-doped wafers is common
// practice). The tolerance is wide on purpose: this is a plausibility check, not the
// comparison with a published structure's density that is still missing (no source whose
// stack and density could both be read was found).
func TestPlausibleUniformDoping(t *testing.T) {
	st := Stack{Layers: []Layer{
		{Name: "cap", Material: "GaAs", ThicknessM: 10e-9},
		{Name: "doped", Material: "Al0.3Ga0.7As", ThicknessM: 60e-9, Doping: Doping{Species: "Si", Density: 1e24}},
		{Name: "spacer", Material: "Al0.3Ga0.7As", ThicknessM: 20e-9},
		{Name: "buffer", Material: "GaAs", ThicknessM: 400e-9},
	}}
	r, err := Solve(st, Options{DonorDepthEV: 0.10})
	if err != nil {
		t.Fatal(err)
	}
	n := r.Density2D[len(r.Density2D)-1].N2D / 1e4
	if n < 2e11 || n > 8e11 {
		t.Errorf("n = %.3g cm^-2, want 2e11–8e11 (from memory)", n)
	}
}

func TestAnalyticInputForErrors(t *testing.T) {
	noDonor := Stack{Layers: []Layer{{Material: "Al0.3Ga0.7As", ThicknessM: 50e-9}, {Material: "GaAs", ThicknessM: 100e-9}},
		Surface: Surface{Kind: SurfaceGate}}
	if _, err := AnalyticInputFor(noDonor, 0); !errors.Is(err, ErrNoDoping) {
		t.Errorf("no donors: %v, want ErrNoDoping", err)
	}
	below := Stack{Layers: []Layer{{Material: "Al0.3Ga0.7As", ThicknessM: 50e-9}, {Material: "GaAs", ThicknessM: 100e-9, Doping: Doping{Species: "Si", Density: 1e23}}}}
	if _, err := AnalyticInputFor(below, 0); !errors.Is(err, ErrNotApplicable) {
		t.Errorf("donors only below the junction (a doped well, not a heterojunction): %v, want ErrNotApplicable", err)
	}
	uni := Stack{Layers: []Layer{
		{Material: "GaAs", ThicknessM: 10e-9},
		{Material: "Al0.3Ga0.7As", ThicknessM: 50e-9, Doping: Doping{Species: "Si", Density: 1e24}},
		{Material: "Al0.3Ga0.7As", ThicknessM: 20e-9},
		{Material: "GaAs", ThicknessM: 100e-9},
	}, Bottom: Bottom{Kind: BottomZeroField}}
	in, err := AnalyticInputFor(uni, 0)
	if err != nil {
		t.Fatal(err)
	}
	al, _ := Lookup("Al0.3Ga0.7As")
	if in.BulkDonorsM3 != 1e24 || math.Abs(in.SpacerM-20e-9) > 1e-18 || in.DonorDepthEV != al.DonorEV || in.DeplM2 != 0 {
		t.Errorf("uniform doping: %+v", in)
	}
}

func TestSolveErrors(t *testing.T) {
	good := deltaStack(20e-9, 5e16)
	tests := []struct {
		name    string
		stack   Stack
		opt     Options
		is      error
		mention string
	}{
		{"unknown material", func() Stack { s := deltaStack(20e-9, 5e16); s.Layers[1].Material = "Unobtainium"; return s }(),
			Options{}, ErrUnknownMaterial, "known: Al(x)Ga(1-x)As, AlAs, AlSb"},
		{"negative thickness", func() Stack { s := deltaStack(20e-9, 5e16); s.Layers[3].ThicknessM = -5e-9; return s }(),
			Options{}, ErrBadThickness, "layer 4 (spacer)"},
		{"zero thickness bulk layer", func() Stack { s := deltaStack(20e-9, 5e16); s.Layers[0].ThicknessM = 0; return s }(),
			Options{}, ErrBadThickness, "layer 1 (cap)"},
		{"no well", Stack{Layers: []Layer{{Material: "GaAs", ThicknessM: 100e-9, Doping: Doping{Species: "Si", Density: 1e23}}}},
			Options{}, ErrNoWell, "heterojunction"},
		{"no doping", Stack{Layers: []Layer{{Material: "Al0.3Ga0.7As", ThicknessM: 100e-9}, {Material: "GaAs", ThicknessM: 100e-9}}},
			Options{}, ErrNoDoping, "no layer has donors"},
		{"empty", Stack{}, Options{}, ErrEmptyStack, "empty"},
		{"layer thinner than grid", func() Stack { s := deltaStack(20e-9, 5e16); s.Layers[0].ThicknessM = 0.1e-9; return s }(),
			Options{}, ErrBadThickness, "finer Options.GridM"},
		{"iteration cap", good, Options{MaxIter: 1}, ErrNotConverged, "after 1 iterations"},
		{"gate voltage NaN", func() Stack {
			s := deltaStack(20e-9, 5e16)
			s.Surface = Surface{Kind: SurfaceGate, GateV: math.NaN()}
			return s
		}(),
			Options{}, nil, "not a finite number"},
		{"unknown substrate", func() Stack { s := deltaStack(20e-9, 5e16); s.SubstrateMaterial = "GaN"; return s }(),
			Options{}, ErrUnknownMaterial, "substrate"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Solve(tc.stack, tc.opt)
			if err == nil || (tc.is != nil && !errors.Is(err, tc.is)) {
				t.Fatalf("err = %v, want %v", err, tc.is)
			}
			if !strings.Contains(err.Error(), tc.mention) {
				t.Errorf("error %q does not mention %q", err, tc.mention)
			}
		})
	}
	for _, o := range []Options{{GridM: math.NaN()}, {TemperatureK: math.Inf(1)}, {GridM: -1e-9}} {
		if _, err := Solve(good, o); err == nil || !strings.Contains(err.Error(), "Options.") {
			t.Errorf("options %+v: err = %v, want an Options error", o, err)
		}
	}
	var ce *ConvergenceError
	if _, err := Solve(good, Options{MaxIter: 1}); !errors.As(err, &ce) || ce.Iterations != 1 || !(ce.MaxDeltaV > 0) {
		t.Errorf("iteration cap: got %v, want a *ConvergenceError with its last residual", err)
	}
}

// BenchmarkSolve600nm: a 600 nm stack on the default 0.5 nm grid, solved to convergence.
func BenchmarkSolve600nm(b *testing.B) {
	st := Stack{Layers: []Layer{
		{Name: "cap", Material: "GaAs", ThicknessM: 10e-9},
		{Name: "barrier", Material: "Al0.3Ga0.7As", ThicknessM: 60e-9},
		{Name: "delta", Material: "Al0.3Ga0.7As", Doping: Doping{Species: "Si", Sheet: true, Density: 3e16}},
		{Name: "spacer", Material: "Al0.3Ga0.7As", ThicknessM: 30e-9},
		{Name: "buffer", Material: "GaAs", ThicknessM: 500e-9},
	}}
	opt := Options{SubstrateM: 1e-9}
	for b.Loop() {
		if _, err := Solve(st, opt); err != nil {
			b.Fatal(err)
		}
	}
}

// TestSelfConsistentGridConvergence: the self-consistent density of the delta-doped
// heterojunction converges as h² when the grid is halved (second-order finite differences
// and finite volumes; layer interfaces fall on grid nodes for these steps).
func TestSelfConsistentGridConvergence(t *testing.T) {
	steps := []float64{1e-9, 0.5e-9, 0.25e-9, 0.125e-9}
	if testing.Short() {
		steps = steps[:3]
	}
	var ns []float64
	for _, h := range steps {
		r, err := Solve(deltaStack(30e-9, 3e16), Options{DonorDepthEV: 0.10, GridM: h})
		if err != nil {
			t.Fatalf("h = %g: %v", h, err)
		}
		ns = append(ns, r.TotalN2D)
	}
	for i := 2; i < len(ns); i++ {
		ratio := (ns[i-1] - ns[i-2]) / (ns[i] - ns[i-1])
		if ratio < 3 || ratio > 5 {
			t.Errorf("successive density changes %v: ratio %.3f, want ≈ 4", ns, ratio)
		}
	}
}

// dwStack is an invented high-mobility stack, surface first: a 30 nm GaAs quantum well
// between Al0.24Ga0.76As spacers, doped from both sides by Si sheets in GaAs doping wells of
// width wdw clad by 2 nm of AlAs, on a semi-insulating substrate; about 1 µm in all.
func dwStack(wdw, sheet, spacer float64) Stack {
	dw := func() []Layer {
		return []Layer{
			{Name: "cladding", Material: "AlAs", ThicknessM: 2e-9},
			{Name: "doping well", Material: "GaAs", ThicknessM: wdw / 2},
			{Name: "Si", Material: "GaAs", Doping: Doping{Species: "Si", Sheet: true, Density: sheet}},
			{Name: "doping well", Material: "GaAs", ThicknessM: wdw / 2},
			{Name: "cladding", Material: "AlAs", ThicknessM: 2e-9},
		}
	}
	var ls []Layer
	ls = append(ls, Layer{Name: "cap", Material: "GaAs", ThicknessM: 10e-9}, Layer{Name: "barrier", Material: "Al0.24Ga0.76As", ThicknessM: 100e-9})
	ls = append(ls, dw()...)
	ls = append(ls, Layer{Name: "spacer", Material: "Al0.24Ga0.76As", ThicknessM: spacer},
		Layer{Name: "QW", Material: "GaAs", ThicknessM: 30e-9},
		Layer{Name: "spacer", Material: "Al0.24Ga0.76As", ThicknessM: spacer})
	ls = append(ls, dw()...)
	ls = append(ls, Layer{Name: "barrier", Material: "Al0.24Ga0.76As", ThicknessM: 300e-9}, Layer{Name: "buffer", Material: "GaAs", ThicknessM: 400e-9})
	return Stack{Layers: ls}
}

// BenchmarkSolve1um: the doping-well stack of dwStack (about 1 µm, Γ, X and L valleys all
// holding or nearly holding electrons: Γ in the channel and doping wells, X in the AlAs
// claddings) on the default 0.5 nm grid, solved to convergence.
func BenchmarkSolve1um(b *testing.B) {
	st := dwStack(2.8e-9, 1e16, 80e-9)
	for b.Loop() {
		if _, err := Solve(st, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
