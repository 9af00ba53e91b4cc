package physics

import (
	"errors"
	"math"
	"strings"
	"testing"

	"cleave/calc/quantity"
)

// q builds an exact quantity from a number in a unit.
func q(v float64, unit string) quantity.Quantity {
	u := quantity.MustUnit(unit)
	return quantity.New(v*u.Scale, u.D)
}

// qu builds an uncertain quantity from a number and its standard uncertainty in a unit.
func qu(v, sigma float64, unit string) quantity.Quantity {
	u := quantity.MustUnit(unit)
	return quantity.Uncertain(v*u.Scale, sigma*u.Scale, u.D)
}

func in(t *testing.T, x quantity.Quantity, unit string) float64 {
	t.Helper()
	v, err := x.In(quantity.MustUnit(unit))
	if err != nil {
		t.Fatalf("In(%q): %v", unit, err)
	}
	return v
}

func must(x quantity.Quantity, err error) quantity.Quantity {
	if err != nil {
		panic(err)
	}
	return x
}

var (
	mGaAs = EffectiveMass(0.067)
	n3e11 = q(3e11, "cm^-2")
)

// TestWorkedValues checks every function against the worked values W1–W28 of
// calc/SOURCES.md (computed from CODATA 2018 with mpmath at 30 digits, independently of this
// code); a case named "W9" is [src:W9]. Unless a case says otherwise: GaAs m* = 0.067 m_e,
// n = 3.0e11 cm^-2. Tolerance 1e-4 relative, safe for values given to 5-6 significant figures.
func TestWorkedValues(t *testing.T) {
	mu1e6 := q(1e6, "cm^2/(V s)")
	tq := q(1, "ps")
	tests := []struct {
		name string
		got  func() (quantity.Quantity, error)
		unit string
		want float64
	}{
		// W1: l_B at 1 T = sqrt(hbar/e) = 25.6556 nm (AFS 1982 definition).
		{"W1 l_B 1T", func() (quantity.Quantity, error) { return MagneticLength(q(1, "T")) }, "nm", 25.6556},
		// W2: l_B at 10 T = 8.11303 nm; the sign of B does not matter.
		{"W2 l_B 10T", func() (quantity.Quantity, error) { return MagneticLength(q(-10, "T")) }, "nm", 8.11303},
		// W3: hbar omega_c at 1 T, GaAs = 1.72788 meV; omega_c = 2.6251e12 s^-1; 20.051 K.
		{"W3 hbar wc", func() (quantity.Quantity, error) { return CyclotronEnergy(q(1, "T"), mGaAs) }, "meV", 1.72788},
		{"W3 wc", func() (quantity.Quantity, error) { return CyclotronFrequency(q(1, "T"), mGaAs) }, "s^-1", 2.6251e12},
		{"W3 hbar wc / k_B", func() (quantity.Quantity, error) {
			e, err := CyclotronEnergy(q(1, "T"), mGaAs)
			return quantity.Div(e, cKB), err
		}, "K", 20.051},
		// Landau level N = 2 is (2 + 1/2) hbar omega_c = 2.5 * 1.72788 meV (textbook closed form).
		{"landau level N=2", func() (quantity.Quantity, error) { return LandauLevel(2, q(1, "T"), mGaAs) }, "meV", 2.5 * 1.72788},
		// W4: nu at 5 T = 2.4814.
		{"W4 nu 5T", func() (quantity.Quantity, error) { return FillingFactor(n3e11, q(5, "T")) }, "1", 2.4814},
		// W5: B(nu=1) = 12.407 T, B(nu=2) = 6.2035 T.
		{"W5 B nu=1", func() (quantity.Quantity, error) { return FieldAtFilling(n3e11, quantity.Scalar(1)) }, "T", 12.407},
		{"W5 B nu=2", func() (quantity.Quantity, error) { return FieldAtFilling(n3e11, quantity.Scalar(2)) }, "T", 6.2035},
		// W6: E_F = 10.719 meV; T_F = 124.39 K.
		{"W6 E_F", func() (quantity.Quantity, error) { return FermiEnergy(n3e11, mGaAs, 2, 1) }, "meV", 10.719},
		{"W6 T_F", func() (quantity.Quantity, error) {
			e, err := FermiEnergy(n3e11, mGaAs, 2, 1)
			return quantity.Div(e, cKB), err
		}, "K", 124.39},
		// D = m*/(πħ²) = 2.7988e10 cm^-2 meV^-1 for GaAs [src:W6].
		{"2.4 DOS", func() (quantity.Quantity, error) { return DensityOfStates(mGaAs, 2, 1) }, "cm^-2 meV^-1", 2.7988e10},
		// W7: k_F = 1.37294e8 m^-1; v_F = 2.3723e5 m/s.
		{"W7 k_F", func() (quantity.Quantity, error) { return FermiWavevector(n3e11, 2, 1) }, "m^-1", 1.37294e8},
		{"W7 v_F", func() (quantity.Quantity, error) { return FermiVelocity(n3e11, mGaAs, 2, 1) }, "m/s", 2.3723e5},
		// W8: r_s = 1.0110 (eps_r = 12.9, a_B* = 10.189 nm).
		{"W8 a_B*", func() (quantity.Quantity, error) { return EffectiveBohrRadius(mGaAs, quantity.Scalar(12.9)) }, "nm", 10.189},
		{"W8 r_s", func() (quantity.Quantity, error) { return InteractionParameter(n3e11, mGaAs, quantity.Scalar(12.9)) }, "1", 1.0110},
		// W9: R_xx = 50 Ohm, W = 100 um, L = 500 um -> 10 Ohm/sq; mu = 2.0805e6 cm^2/Vs.
		{"W9 rho", func() (quantity.Quantity, error) { return SheetResistance(q(50, "Ohm"), quantity.Scalar(5)) }, "Ohm", 10},
		{"W9 mu", func() (quantity.Quantity, error) { return Mobility(q(10, "Ohm"), n3e11) }, "cm^2/(V s)", 2.0805e6},
		// W10: tau_t at 1e6 cm^2/Vs = 38.094 ps.
		{"W10 tau_t", func() (quantity.Quantity, error) { return TransportTime(mu1e6, mGaAs) }, "ps", 38.094},
		// W11: mean free path 9.0368 um; k_F l = 1240.7.
		{"W11 l", func() (quantity.Quantity, error) { return MeanFreePath(mu1e6, n3e11, 2, 1) }, "um", 9.0368},
		{"W11 k_F l", func() (quantity.Quantity, error) {
			l, err := MeanFreePath(mu1e6, n3e11, 2, 1)
			return quantity.Mul(must(FermiWavevector(n3e11, 2, 1)), l), err
		}, "1", 1240.7},
		// W11: omega_c tau at 1 T = mu B = 100.
		{"W11 wc tau", func() (quantity.Quantity, error) {
			return quantity.Mul(must(CyclotronFrequency(q(1, "T"), mGaAs)), must(TransportTime(mu1e6, mGaAs))), nil
		}, "1", 100},
		// W12: Hall slope 2080.5 Ohm/T gives 3.0000e11 cm^-2 (either sign).
		{"W12 n from slope", func() (quantity.Quantity, error) { return HallDensity(q(-2080.5, "Ohm/T")) }, "cm^-2", 3.0000e11},
		// W13: van der Pauw symmetric, R = 10 Ohm: 45.3236 Ohm/sq.
		{"W13 vdp symmetric", func() (quantity.Quantity, error) { return VdpSheetResistance(q(10, "Ohm"), q(10, "Ohm")) }, "Ohm", 45.3236},
		// W14: R_A = 10, R_B = 20 Ohm: 65.285 Ohm/sq, f = 0.96028.
		{"W14 vdp", func() (quantity.Quantity, error) { return VdpSheetResistance(q(10, "Ohm"), q(20, "Ohm")) }, "Ohm", 65.285},
		{"W14 vdp swapped", func() (quantity.Quantity, error) { return VdpSheetResistance(q(20, "Ohm"), q(10, "Ohm")) }, "Ohm", 65.285},
		{"W14 f", func() (quantity.Quantity, error) { return VdpFactor(q(10, "Ohm"), q(20, "Ohm")) }, "1", 0.96028},
		// W15: f_B = 6.2035 T, Delta(1/B) = 0.161199 T^-1; spin-resolved f = 12.407 T.
		{"W15 f_B", func() (quantity.Quantity, error) { return SdHFrequency(n3e11, 2, 1) }, "T", 6.2035},
		{"W15 period", func() (quantity.Quantity, error) {
			f, err := SdHFrequency(n3e11, 2, 1)
			return quantity.Div(quantity.Scalar(1), f), err
		}, "T^-1", 0.161199},
		{"W15 spin-resolved", func() (quantity.Quantity, error) { return SdHFrequency(n3e11, 1, 1) }, "T", 12.407},
		// W16: X/sinh X at 1.5 K, 1 T = 0.71166; at 4.2 K: 0.13241 (Lifshitz-Kosevich).
		{"W16 LK 1.5K", func() (quantity.Quantity, error) { return ThermalDamping(q(1.5, "K"), q(1, "T"), mGaAs) }, "1", 0.71166},
		{"W16 LK 4.2K", func() (quantity.Quantity, error) { return ThermalDamping(q(4.2, "K"), q(1, "T"), mGaAs) }, "1", 0.13241},
		{"LK T=0", func() (quantity.Quantity, error) { return ThermalDamping(q(0, "K"), q(1, "T"), mGaAs) }, "1", 1},
		// W17: tau_q = 1 ps at 1 T: Dingle factor 0.30217, T_D = 1.21566 K, mu_q = 26251 cm^2/Vs,
		// tau_t/tau_q = 38.094 (with W10).
		{"W17 Dingle factor", func() (quantity.Quantity, error) { return DingleFactor(q(1, "T"), tq, mGaAs) }, "1", 0.30217},
		{"W17 T_D", func() (quantity.Quantity, error) { return DingleTemperature(tq) }, "K", 1.21566},
		{"W17 mu_q", func() (quantity.Quantity, error) { return QuantumMobility(tq, mGaAs) }, "cm^2/(V s)", 26251},
		{"W17 ratio", func() (quantity.Quantity, error) {
			return quantity.Div(must(TransportTime(mu1e6, mGaAs)), tq), nil
		}, "1", 38.094},
		// W18: Zeeman energy |g| = 0.44 at 1 T: 25.469 ueV; E_Z/(hbar omega_c) = 0.01474.
		{"W18 E_Z", func() (quantity.Quantity, error) { return ZeemanEnergy(q(1, "T"), quantity.Scalar(-0.44)) }, "ueV", 25.469},
		{"W18 ratio", func() (quantity.Quantity, error) {
			return quantity.Div(must(ZeemanEnergy(q(-1, "T"), quantity.Scalar(0.44))), must(CyclotronEnergy(q(1, "T"), mGaAs))), nil
		}, "1", 0.01474},
		// W19: R_K/nu for nu = 1..6 (R_K = h/e^2 exact, CODATA 2018).
		{"W19 nu=1", func() (quantity.Quantity, error) { return HallResistance(quantity.Scalar(1)) }, "Ohm", 25812.807459},
		{"W19 nu=2", func() (quantity.Quantity, error) { return HallResistance(quantity.Scalar(2)) }, "Ohm", 12906.403730},
		{"W19 nu=3", func() (quantity.Quantity, error) { return HallResistance(quantity.Scalar(3)) }, "Ohm", 8604.269153},
		{"W19 nu=4", func() (quantity.Quantity, error) { return HallResistance(quantity.Scalar(4)) }, "Ohm", 6453.201865},
		{"W19 nu=5", func() (quantity.Quantity, error) { return HallResistance(quantity.Scalar(5)) }, "Ohm", 5162.561492},
		{"W19 nu=6", func() (quantity.Quantity, error) { return HallResistance(quantity.Scalar(6)) }, "Ohm", 4302.134577},
		// Tsui, Stormer, Gossard (1982): nu = 1/3 gives 3 R_K.
		{"nu=1/3", func() (quantity.Quantity, error) { return HallResistance(quantity.Scalar(1.0 / 3)) }, "Ohm", 3 * 25812.807459},
		// W26: graphene, v_F = 1e6 m/s: E_1 = 36.283 meV at 1 T, 114.74 meV at 10 T;
		// n = 1e12 cm^-2: E_F = 116.67 meV, m_c = 0.020519 m_e, f_SdH = 10.339 T.
		{"W26 E_1 1T", func() (quantity.Quantity, error) { return DiracLandauLevel(1, q(1, "T"), q(1e6, "m/s")) }, "meV", 36.283},
		{"W26 E_1 10T", func() (quantity.Quantity, error) { return DiracLandauLevel(1, q(10, "T"), q(1e6, "m/s")) }, "meV", 114.74},
		{"W26 E_-1 1T", func() (quantity.Quantity, error) { return DiracLandauLevel(-1, q(1, "T"), q(1e6, "m/s")) }, "meV", -36.283},
		{"W26 E_F", func() (quantity.Quantity, error) { return DiracFermiEnergy(q(1e12, "cm^-2"), q(1e6, "m/s")) }, "meV", 116.67},
		{"W26 m_c", func() (quantity.Quantity, error) { return DiracCyclotronMass(q(1e12, "cm^-2"), q(1e6, "m/s")) }, "m_e", 0.020519},
		{"W26 f_SdH", func() (quantity.Quantity, error) { return SdHFrequency(q(1e12, "cm^-2"), 2, 2) }, "T", 10.339},
		// W27: Si(100), n = 1e12 cm^-2, m* = 0.19, gs gv = 4: E_F = 6.2997 meV; f_SdH = 10.339 T.
		{"W27 E_F", func() (quantity.Quantity, error) { return FermiEnergy(q(1e12, "cm^-2"), EffectiveMass(0.19), 2, 2) }, "meV", 6.2997},
		{"W27 f_SdH", func() (quantity.Quantity, error) { return SdHFrequency(q(1e12, "cm^-2"), 2, 2) }, "T", 10.339},
		// W28: Ge holes, p = 2.2e11 cm^-2, m* = 0.061: E_F = 8.6337 meV.
		{"W28 E_F", func() (quantity.Quantity, error) { return FermiEnergy(q(2.2e11, "cm^-2"), EffectiveMass(0.061), 2, 1) }, "meV", 8.6337},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			x, err := tc.got()
			if err != nil {
				t.Fatal(err)
			}
			got := in(t, x, tc.unit)
			if rel := math.Abs(got-tc.want) / math.Abs(tc.want); rel > 1e-4 {
				t.Errorf("got %.7g %s, want %.7g (rel diff %.2g)", got, tc.unit, tc.want, rel)
			}
		})
	}
}

// W13 in closed form: R_s = πR/ln 2 exactly for equal resistances (van der Pauw 1958), over
// many decades; and the solver satisfies the defining equation for unequal ones.
func TestVdpClosedFormAndResidual(t *testing.T) {
	for _, r := range []float64{1e-3, 0.37, 10, 1234.5, 1e7} {
		got := must(VdpSheetResistance(q(r, "Ohm"), q(r, "Ohm"))).Value()
		if want := math.Pi * r / math.Ln2; math.Abs(got-want) > 1e-14*want {
			t.Errorf("R = %g: got %.17g, want πR/ln2 = %.17g", r, got, want)
		}
	}
	for _, p := range [][2]float64{{10, 20}, {1, 1000}, {5e-3, 7e-3}, {1e5, 3}, {1, 1 + 1e-12}} {
		rs := must(VdpSheetResistance(q(p[0], "Ohm"), q(p[1], "Ohm"))).Value()
		res := math.Exp(-math.Pi*p[0]/rs) + math.Exp(-math.Pi*p[1]/rs) - 1
		if math.Abs(res) > 1e-14 {
			t.Errorf("R1=%g R2=%g: residual %g of the van der Pauw equation", p[0], p[1], res)
		}
	}
}

func relUnc(x quantity.Quantity) float64 { return x.Uncertainty() / math.Abs(x.Value()) }

// TestUncertaintyPropagation checks first-order propagation against the analytic
// derivatives of each formula (power laws give relative uncertainty times the exponent).
func TestUncertaintyPropagation(t *testing.T) {
	B := qu(2, 0.02, "T")           // 1 %
	n := qu(3e11, 0.06e11, "cm^-2") // 2 %
	m := qu(0.067, 0.00067, "m_e")  // 1 %
	tests := []struct {
		name string
		got  quantity.Quantity
		want float64 // relative uncertainty
		why  string
	}{
		{"l_B ~ B^-1/2", must(MagneticLength(B)), 0.005, "half that of B"},
		{"omega_c ~ B/m", must(CyclotronFrequency(B, m)), math.Hypot(0.01, 0.01), "independent B and m add in quadrature"},
		{"nu ~ n/B", must(FillingFactor(n, B)), math.Hypot(0.02, 0.01), "quadrature"},
		{"k_F ~ n^1/2", must(FermiWavevector(n, 2, 1)), 0.01, "half that of n"},
		{"E_F ~ n/m", must(FermiEnergy(n, m, 2, 1)), math.Hypot(0.02, 0.01), "quadrature"},
		{"E_F/E_c with the same m", quantity.Div(must(FermiEnergy(n, m, 2, 1)), must(CyclotronEnergy(B, m))),
			math.Hypot(0.02, 0.01), "m cancels exactly: only n and B remain"},
		{"R_K/nu", must(HallResistance(qu(2, 0.002, "1"))), 0.001, "R_K exact"},
		{"E_Z ~ |g| B", must(ZeemanEnergy(B, qu(-0.44, 0.0044, "1"))), math.Hypot(0.01, 0.01), "mu_B uncertainty negligible (3e-10)"},
		{"Dirac E_N ~ B^1/2", must(DiracLandauLevel(3, B, q(1e6, "m/s"))), 0.005, "half that of B"},
		// Euler's theorem for the degree-1 homogeneous R_s(R1, R2): equal relative errors that are
		// fully correlated (one input scaled) give the same relative error in R_s.
		{"vdp fully correlated scale", vdpScaled(), 0.01, "R_s(λR1, λR2) = λ R_s"},
	}
	for _, tc := range tests {
		if got := relUnc(tc.got); math.Abs(got-tc.want) > 1e-3*tc.want {
			t.Errorf("%s: relative uncertainty %.6g, want %.6g (%s)", tc.name, got, tc.want, tc.why)
		}
	}
	// vdp symmetric: R_s = πR/ln2 with R1 = R2 = R independent: each partial is π/(2 ln2).
	r1, r2 := qu(10, 0.1, "Ohm"), qu(10, 0.1, "Ohm")
	rs := must(VdpSheetResistance(r1, r2))
	if want := math.Pi / (2 * math.Ln2) * math.Hypot(0.1, 0.1); math.Abs(rs.Uncertainty()-want) > 1e-9*want {
		t.Errorf("vdp symmetric uncertainty %g, want %g", rs.Uncertainty(), want)
	}
	// x - x: mobility from the same rho twice gives an exactly zero difference.
	rho := qu(10, 0.5, "Ohm")
	d, _ := quantity.Sub(must(Mobility(rho, n)), must(Mobility(rho, n)))
	if d.Value() != 0 || d.Uncertainty() != 0 {
		t.Errorf("mu - mu = %v ± %v, want exact 0", d.Value(), d.Uncertainty())
	}
}

// vdpScaled returns R_s for R1 = 10λ, R2 = 20λ with λ = 1 ± 1 %.
func vdpScaled() quantity.Quantity {
	lam := quantity.Uncertain(1, 0.01, quantity.Dimensionless)
	return must(VdpSheetResistance(quantity.Mul(q(10, "Ohm"), lam), quantity.Mul(q(20, "Ohm"), lam)))
}

// The implicit-differentiation partials of R_s agree with central finite differences.
func TestVdpPartials(t *testing.T) {
	r1, r2 := 10.0, 20.0
	x1 := quantity.Uncertain(r1, 1, quantity.MustUnit("Ohm").D)
	x2 := q(r2, "Ohm")
	got := must(VdpSheetResistance(x1, x2)).Uncertainty() // = |dR_s/dR1| * 1 Ohm
	h := 1e-4
	fd := (vdpSolve(r1+h, r2) - vdpSolve(r1-h, r2)) / (2 * h)
	if math.Abs(got-fd) > 1e-6*fd {
		t.Errorf("dR_s/dR1 = %.10g, finite difference %.10g", got, fd)
	}
}

// Properties: l_B^2 * e|B|/hbar = 1; nu(B_nu) = nu; Landau levels are equally spaced by
// hbar omega_c; Dirac levels are odd in N and scale as sqrt(|N|).
func TestProperties(t *testing.T) {
	for _, b := range []float64{0.01, 0.5, 3, 17, 45} {
		B := q(b, "T")
		nu := must(FillingFactor(n3e11, B))
		back := must(FieldAtFilling(n3e11, nu))
		if math.Abs(back.Value()-b) > 1e-12*b {
			t.Errorf("field_at_filling(filling_factor(B)) = %v, want %v", back.Value(), b)
		}
		l := must(MagneticLength(B))
		if v := l.Value() * l.Value() * cE.Value() * b / cHbar.Value(); math.Abs(v-1) > 1e-12 {
			t.Errorf("l_B^2 eB/hbar = %v at %v T", v, b)
		}
		ec := must(CyclotronEnergy(B, mGaAs)).Value()
		for N := 0; N < 5; N++ {
			d := must(LandauLevel(N+1, B, mGaAs)).Value() - must(LandauLevel(N, B, mGaAs)).Value()
			if math.Abs(d-ec) > 1e-12*ec {
				t.Errorf("level spacing %v, want hbar omega_c %v", d, ec)
			}
		}
		e1 := must(DiracLandauLevel(1, B, q(1e6, "m/s"))).Value()
		for _, N := range []int{2, 3, 7} {
			ep := must(DiracLandauLevel(N, B, q(1e6, "m/s"))).Value()
			em := must(DiracLandauLevel(-N, B, q(1e6, "m/s"))).Value()
			if ep != -em || math.Abs(ep-e1*math.Sqrt(float64(N))) > 1e-12*ep {
				t.Errorf("Dirac levels N=±%d: %v, %v; want ±%v", N, ep, em, e1*math.Sqrt(float64(N)))
			}
		}
	}
	if e0 := must(DiracLandauLevel(0, q(1, "T"), q(1e6, "m/s"))); e0.Value() != 0 {
		t.Errorf("Dirac N=0 level %v, want 0", e0.Value())
	}
	// Mean free path equals v_F tau_t for a parabolic band [src:AFS1982].
	mu := q(3e5, "cm^2/(V s)")
	l := must(MeanFreePath(mu, n3e11, 2, 1)).Value()
	vt := must(FermiVelocity(n3e11, mGaAs, 2, 1)).Value() * must(TransportTime(mu, mGaAs)).Value()
	if math.Abs(l-vt) > 1e-12*l {
		t.Errorf("l = %v, v_F tau_t = %v", l, vt)
	}
	// Graphene: m_c = E_F/v_F^2 [src:NOVOSELOV2005].
	ng, vf := q(1e12, "cm^-2"), q(1e6, "m/s")
	mc := must(DiracCyclotronMass(ng, vf)).Value()
	if ef := must(DiracFermiEnergy(ng, vf)).Value(); math.Abs(mc-ef/1e12) > 1e-12*mc {
		t.Errorf("m_c = %v, E_F/v_F^2 = %v", mc, ef/1e12)
	}
	// X/sinh X is decreasing in T and its derivative matches a finite difference.
	for _, x := range []float64{1e-6, 0.5, 1.47666, 5} {
		h := 1e-6
		fd := (xOverSinh(x+h) - xOverSinh(x-h)) / (2 * h)
		if math.Abs(dxOverSinh(x)-fd) > 1e-6 {
			t.Errorf("d(X/sinh X) at %v: %v, finite difference %v", x, dxOverSinh(x), fd)
		}
	}
}

func TestArgumentErrors(t *testing.T) {
	B, m := q(1, "T"), mGaAs
	tests := []struct {
		name   string
		call   func() (quantity.Quantity, error)
		dimErr bool
		msg    string
	}{
		{"B as length", func() (quantity.Quantity, error) { return MagneticLength(q(1, "nm")) }, true, "magnetic_length: argument B: has dimension m, expected a magnetic field (T)"},
		{"B zero", func() (quantity.Quantity, error) { return MagneticLength(q(0, "T")) }, false, "magnetic_length: argument B: must be nonzero"},
		{"mass as ratio", func() (quantity.Quantity, error) { return CyclotronEnergy(B, quantity.Scalar(0.067)) }, true, "cyclotron_energy: argument m: has dimension no unit (dimensionless), expected a mass"},
		{"negative mass", func() (quantity.Quantity, error) { return CyclotronFrequency(B, m.Neg()) }, false, "argument m: must be positive"},
		{"density as volume", func() (quantity.Quantity, error) { return FillingFactor(q(1e17, "cm^-3"), B) }, true, "filling_factor: argument n: has dimension m^-3, expected a sheet density"},
		{"nu zero", func() (quantity.Quantity, error) { return FieldAtFilling(n3e11, quantity.Scalar(0)) }, false, "field_at_filling: argument nu: must be nonzero"},
		{"nu with unit", func() (quantity.Quantity, error) { return HallResistance(q(2, "T")) }, true, "hall_resistance: argument nu"},
		{"level index", func() (quantity.Quantity, error) { return LandauLevel(-1, B, m) }, false, "landau_level: argument N: the level index must be 0 or more"},
		{"gs", func() (quantity.Quantity, error) { return FermiEnergy(n3e11, m, 0, 1) }, false, "fermi_energy: argument gs"},
		{"gv", func() (quantity.Quantity, error) { return FermiWavevector(n3e11, 2, 0) }, false, "fermi_wavevector: argument gv"},
		{"negative n", func() (quantity.Quantity, error) { return FermiVelocity(n3e11.Neg(), m, 2, 1) }, false, "fermi_velocity: argument n: must not be negative"},
		{"rho as resistivity", func() (quantity.Quantity, error) { return Mobility(q(1, "Ohm m"), n3e11) }, true, "mobility: argument rho"},
		{"squares zero", func() (quantity.Quantity, error) { return SheetResistance(q(1, "Ohm"), quantity.Scalar(0)) }, false, "sheet_resistance: argument squares"},
		{"mu as density", func() (quantity.Quantity, error) { return TransportTime(n3e11, m) }, true, "transport_time: argument mu: has dimension m^-2, expected a mobility"},
		{"mfp n", func() (quantity.Quantity, error) { return MeanFreePath(q(1, "m^2/(V s)"), q(1, "m"), 2, 1) }, true, "mean_free_path: argument n"},
		{"g with unit", func() (quantity.Quantity, error) { return ZeemanEnergy(B, q(1, "T")) }, true, "zeeman_energy: argument g"},
		{"vdp negative", func() (quantity.Quantity, error) { return VdpSheetResistance(q(-1, "Ohm"), q(1, "Ohm")) }, false, "vdp_sheet_resistance: argument R1: must be positive"},
		{"vdp dims", func() (quantity.Quantity, error) { return VdpSheetResistance(q(1, "Ohm"), q(1, "V")) }, true, "vdp_sheet_resistance: argument R2"},
		{"vF", func() (quantity.Quantity, error) { return DiracLandauLevel(1, B, q(1e6, "m")) }, true, "dirac_landau_level: argument vF: has dimension m, expected a velocity"},
		{"T_D", func() (quantity.Quantity, error) { return DingleTemperature(q(1, "K")) }, true, "dingle_temperature: argument tau_q"},
		{"tau_q zero", func() (quantity.Quantity, error) { return QuantumMobility(q(0, "s"), m) }, false, "quantum_mobility: argument tau_q: must be positive"},
		{"LK negative T", func() (quantity.Quantity, error) { return ThermalDamping(q(-1, "K"), B, m) }, false, "thermal_damping: argument T"},
		{"Dingle B zero", func() (quantity.Quantity, error) { return DingleFactor(q(0, "T"), q(1, "ps"), m) }, false, "dingle_factor: argument B"},
		{"slope", func() (quantity.Quantity, error) { return HallDensity(q(1, "Ohm")) }, true, "hall_density: argument slope"},
		{"eps_r", func() (quantity.Quantity, error) { return InteractionParameter(n3e11, m, q(1, "F/m")) }, true, "interaction_parameter: argument eps_r"},
		{"sdh n", func() (quantity.Quantity, error) { return SdHFrequency(q(0, "cm^-2"), 2, 1) }, false, "sdh_frequency: argument n"},
		{"DOS", func() (quantity.Quantity, error) { return DensityOfStates(q(1, "J"), 2, 1) }, true, "density_of_states: argument m"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := tc.call()
			if err == nil {
				t.Fatal("want an error")
			}
			var ae *ArgError
			if !errors.As(err, &ae) {
				t.Fatalf("error %v is not an *ArgError", err)
			}
			if tc.dimErr != errors.Is(err, quantity.ErrDimMismatch) || tc.dimErr == errors.Is(err, quantity.ErrDomain) {
				t.Errorf("error %v: dimension error = %v, want %v", err, errors.Is(err, quantity.ErrDimMismatch), tc.dimErr)
			}
			if !strings.Contains(err.Error(), tc.msg) {
				t.Errorf("error %q does not contain %q", err, tc.msg)
			}
		})
	}
}
