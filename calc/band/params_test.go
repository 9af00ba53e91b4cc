package band

import (
	"errors"
	"math"
	"testing"

	"cleave/calc/materials"
)

// TestLookup checks the band table against Vurgaftman, Meyer & Ram-Mohan,
// J. Appl. Phys. 89, 5815 (2001) at 0 K, and the Ioffe handbook permittivity 12.90 − 2.84x.
func TestLookup(t *testing.T) {
	gaas, err := Lookup("GaAs")
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		got  float64
		want float64
		tol  float64
		src  string
	}{
		{"GaAs Eg", gaas.EgEV, 1.519, 1e-12, "Vurgaftman 2001"},
		{"GaAs m*", gaas.Mstar, 0.067, 1e-12, "Vurgaftman 2001"},
		{"GaAs eps_r", gaas.EpsR, 12.9, 1e-12, "Ioffe"},
		{"GaAs VBO", gaas.VBOEV, -0.80, 1e-12, "Vurgaftman 2001"},
	}
	al, err := Lookup("Al0.3Ga0.7As")
	if err != nil {
		t.Fatal(err)
	}
	tests = append(tests, []struct {
		name string
		got  float64
		want float64
		tol  float64
		src  string
	}{
		{"Al0.3 Eg_Gamma", al.EgEV, 1.93714, 1e-5, "Vurgaftman 2001: 1.519·0.7 + 3.099·0.3 − 0.21·(−0.127 + 0.393)"},
		{"Al0.3 dEv", gaas.VBOEV - al.VBOEV, 0.15900, 1e-5, "Vurgaftman 2001: 0.3·(1.33 − 0.80)"},
		{"Al0.3 dEc", al.EcEV - gaas.EcEV, 0.25914, 1e-5, "Vurgaftman 2001: ΔEg − ΔEv"},
		{"Al0.3 m*", al.Mstar, 0.0919, 1e-4, "0.067 + 0.083·0.3, linear between the Vurgaftman 2001 Γ masses"},
		{"Al0.3 eps_r", al.EpsR, 12.048, 1e-4, "Ioffe 12.90 − 2.84x"},
		{"Al0.3 dEc/dEg", (al.EcEV - gaas.EcEV) / (al.EgEV - gaas.EgEV), 0.620, 2e-3, "Vurgaftman 2001: 0.25914/0.41814"},
	}...)
	for _, tc := range tests {
		if math.Abs(tc.got-tc.want) > tc.tol*math.Max(1, math.Abs(tc.want)) {
			t.Errorf("%s = %.6g, want %.6g (%s)", tc.name, tc.got, tc.want, tc.src)
		}
	}
	if al.Sources["EgEV"] == "" || al.Sources["EpsR"] == "" {
		t.Error("parameters must carry their sources")
	}
}

// TestRydberg: the hydrogen Rydberg energy from CODATA 2018 e, h, m_e, ε0 is 13.605693 eV
// (CODATA 2018 R∞hc = 13.605693122994 eV, from memory), and the GaAs hydrogenic donor is
// Ry·0.067/12.9² = 5.478 meV, within 10 % of the measured Si donor level 5.8 meV (Ioffe
// handbook, from memory).
func TestRydberg(t *testing.T) {
	if relErr(rydbergEV, 13.605693122994) > 1e-9 {
		t.Errorf("Ry = %.12g eV", rydbergEV)
	}
	g, _ := Lookup("GaAs")
	if relErr(g.DonorEV*1e3, 5.478) > 1e-3 {
		t.Errorf("GaAs hydrogenic donor %.4f meV, want 5.478", g.DonorEV*1e3)
	}
	if relErr(g.DonorEV*1e3, 5.8) > 0.1 {
		t.Errorf("GaAs hydrogenic donor %.4f meV, more than 10 %% from 5.8 meV", g.DonorEV*1e3)
	}
}

func TestLookupErrors(t *testing.T) {
	for _, name := range []string{"GaN", "Unobtainium", "AlGaAs", "Al0.3Ga0.5As", "GaAs0.5", "InGaAs"} {
		if _, err := Lookup(name); err == nil {
			t.Errorf("Lookup(%q): want an error", name)
		} else if name == "GaN" && !errors.Is(err, ErrUnknownMaterial) {
			t.Errorf("Lookup(%q) = %v, want ErrUnknownMaterial", name, err)
		}
	}
}

// TestMassPermittivityFromMaterials: m* and ε_r are not kept here but taken from
// cleave/calc/materials, so they match it exactly (both end points and an alloy), with the
// same sources (Vurgaftman et al. 2001 masses, Ioffe handbook 12.90 − 2.84x).
func TestMassPermittivityFromMaterials(t *testing.T) {
	for _, name := range []string{"GaAs", "AlAs", "Al0.3Ga0.7As", "Al(0.33)Ga(0.67)As"} {
		p, err := Lookup(name)
		if err != nil {
			t.Fatal(err)
		}
		m, err := materials.Lookup(name)
		if err != nil {
			t.Fatal(err)
		}
		if p.Mstar != m.Mstar || p.EpsR != m.EpsR {
			t.Errorf("%s: band m* %v eps %v, materials m* %v eps %v", name, p.Mstar, p.EpsR, m.Mstar, m.EpsR)
		}
		if p.Sources["Mstar"] == "" || p.Sources["EpsR"] == "" {
			t.Errorf("%s: mass and permittivity must carry their sources", name)
		}
	}
	if a, _ := Lookup("AlAs"); a.Mstar != 0.15 || math.Abs(a.EpsR-10.06) > 1e-12 {
		t.Errorf("AlAs Γ m* %v, eps %v; want 0.15 (Vurgaftman 2001), 10.06 (Ioffe 12.90 − 2.84)", a.Mstar, a.EpsR)
	}
}
