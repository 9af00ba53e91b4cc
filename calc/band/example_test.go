package band_test

import (
	"fmt"

	"cleave/calc/band"
)

// An invented delta-doped wafer, listed from the surface down, on a semi-insulating
// substrate (the default bottom: E_F pinned 0.75 eV below the conduction band at the end of
// the buffer).
func ExampleSolve() {
	thick := func(s string) float64 { v, _ := band.ParseThickness(s); return v }
	delta, _ := band.ParseDoping("Si delta 3e12 cm^-2")
	st := band.Stack{Layers: []band.Layer{
		{Name: "cap", Material: "GaAs", ThicknessM: thick("10 nm")},
		{Name: "barrier", Material: "Al0.3Ga0.7As", ThicknessM: thick("300 nm")},
		{Name: "doping", Material: "Al0.3Ga0.7As", Doping: delta},
		{Name: "spacer", Material: "Al0.3Ga0.7As", ThicknessM: thick("30 nm")},
		{Name: "buffer", Material: "GaAs", ThicknessM: thick("1 um")},
	}}
	r, err := band.Solve(st, band.Options{DonorDepthEV: 0.10})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("channel: %.2f e11 cm^-2 at %.0f nm\n", r.ChannelN2D/1e15, r.Subbands[0].MeanZ*1e9)
	fmt.Printf("E0 = %.0f meV below E_F, %d warnings\n", -r.Subbands[0].E*1e3, len(r.Warnings))
	// Output:
	// channel: 2.07 e11 cm^-2 at 349 nm
	// E0 = 7 meV below E_F, 0 warnings
}

// The quick estimate for illustrative inputs: a Si delta layer 30 nm behind the interface of
// Al0.3Ga0.7As/GaAs (ΔE_c of Vurgaftman et al. 2001), an effective donor level 0.1 eV deep.
func ExampleAnalytic() {
	r, err := band.Analytic(band.AnalyticInput{
		DeltaEcEV: 0.25914, DonorDepthEV: 0.10, BarrierEpsR: 12.05, SpacerM: 30e-9,
		ChannelMstar: 0.067, ChannelEpsR: 12.9,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("n = %.4g cm^-2, E0 = %.2f meV, <z> = %.1f nm\n", r.N2D/1e4, r.E0EV*1e3, 3/r.B*1e9)
	// Output:
	// n = 2.481e+11 cm^-2, E0 = 38.53 meV, <z> = 12.9 nm
}

func ExampleParseDoping() {
	d, err := band.ParseDoping("Si delta 2.5e12 cm^-2")
	fmt.Println(d.Species, d.Sheet, d.Density, err)
	_, err = band.ParseDoping("Si 1e18 furlongs")
	fmt.Println(err)
	// Output:
	// Si true 2.5e+16 <nil>
	// bad doping "Si 1e18 furlongs", column 9: expected a unit: cm^-3 or m^-3 for bulk, cm^-2 or m^-2 for a sheet; found "furlongs"
}

func ExampleLookup() {
	gaas, _ := band.Lookup("GaAs")
	al, _ := band.Lookup("Al0.3Ga0.7As")
	fmt.Printf("ΔEc = %.1f meV, barrier m* = %.4f, eps_r = %.3f\n", (al.EcEV-gaas.EcEV)*1e3, al.Mstar, al.EpsR)
	alas, _ := band.Lookup("AlAs")
	x, _ := alas.Valley(band.ValleyXz)
	fmt.Printf("AlAs: lowest edge %s, %.0f meV above the GaAs Γ edge\n", alas.Lowest().Name, (x.EcEV-gaas.EcEV)*1e3)
	_, err := band.Lookup("GaN")
	fmt.Println(err)
	// Output:
	// ΔEc = 259.1 meV, barrier m* = 0.0919, eps_r = 12.048
	// AlAs: lowest edge X_z, 191 meV above the GaAs Γ edge
	// material "GaN": unknown material (known: Al(x)Ga(1-x)As, AlAs, AlSb, GaAs, In(x)Al(1-x)As, In(x)Ga(1-x)As, InAs, InP)
}

// Reading the analytic inputs off a stack, for an estimate beside the full solution.
func ExampleAnalyticInputFor() {
	st := band.Stack{Layers: []band.Layer{
		{Name: "cap", Material: "GaAs", ThicknessM: 10e-9},
		{Name: "doped", Material: "Al0.3Ga0.7As", ThicknessM: 50e-9, Doping: band.Doping{Species: "Si", Density: 1e24}},
		{Name: "spacer", Material: "Al0.3Ga0.7As", ThicknessM: 20e-9},
		{Name: "buffer", Material: "GaAs", ThicknessM: 500e-9},
	}}
	in, err := band.AnalyticInputFor(st, 0.10)
	if err != nil {
		fmt.Println(err)
		return
	}
	r, _ := band.Analytic(in)
	fmt.Printf("spacer %.0f nm, ΔEc %.1f meV, n ≈ %.3g cm^-2\n", in.SpacerM*1e9, in.DeltaEcEV*1e3, r.N2D/1e4)
	// Output:
	// spacer 20 nm, ΔEc 259.1 meV, n ≈ 2.12e+11 cm^-2
}

// A quantum well doped from both sides through doping wells: Si sheets in 2.8 nm GaAs wells
// clad by 2 nm of AlAs. Expect solves it in the dark and after illumination (the same here:
// Si in GaAs forms no DX centres) and lists where the electrons are.
func ExampleExpect() {
	dw := func() []band.Layer {
		return []band.Layer{
			{Name: "cladding", Material: "AlAs", ThicknessM: 2e-9},
			{Name: "doping well", Material: "GaAs", ThicknessM: 1.4e-9},
			{Name: "Si", Material: "GaAs", Doping: band.Doping{Species: "Si", Sheet: true, Density: 1e16}},
			{Name: "doping well", Material: "GaAs", ThicknessM: 1.4e-9},
			{Name: "cladding", Material: "AlAs", ThicknessM: 2e-9},
		}
	}
	layers := []band.Layer{{Name: "cap", Material: "GaAs", ThicknessM: 10e-9}, {Name: "barrier", Material: "Al0.24Ga0.76As", ThicknessM: 100e-9}}
	layers = append(layers, dw()...)
	layers = append(layers, band.Layer{Name: "spacer", Material: "Al0.24Ga0.76As", ThicknessM: 80e-9},
		band.Layer{Name: "QW", Material: "GaAs", ThicknessM: 30e-9},
		band.Layer{Name: "spacer", Material: "Al0.24Ga0.76As", ThicknessM: 80e-9})
	layers = append(layers, dw()...)
	layers = append(layers, band.Layer{Name: "barrier", Material: "Al0.24Ga0.76As", ThicknessM: 300e-9},
		band.Layer{Name: "buffer", Material: "GaAs", ThicknessM: 400e-9})
	ex, err := band.Expect(band.Stack{Layers: layers}, band.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	r := ex.Dark
	for _, g := range r.Regions {
		if g.N2D > 1e12 {
			fmt.Printf("%-36s %5.1f–%5.1f nm  %.2f e11 cm^-2, %.0f %% in X\n", g.Name, g.StartM*1e9, g.EndM*1e9, g.N2D/1e15,
				100*(g.ValleyN2D[1]+g.ValleyN2D[2])/g.N2D)
		}
	}
	fmt.Println("same after illumination:", ex.Illuminated == ex.Dark)
	fmt.Println(ex.AnalyticNote)
	// Output:
	// doping well 1 (doping well, Si)      112.0–114.8 nm  2.74 e11 cm^-2, 0 % in X
	// channel (QW)                         196.8–226.8 nm  3.39 e11 cm^-2, 0 % in X
	// doping well 2 (doping well, Si)      308.8–311.6 nm  7.29 e11 cm^-2, 100 % in X
	// same after illumination: true
	// the analytic heterojunction estimate does not apply: the donors sit in doping wells (doping well 1 (doping well, Si))
}
