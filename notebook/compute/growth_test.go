package compute

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/calc/quantity"
)

// checkRel compares relatively, as TestRecoversSynthetic does (this package keeps its own
// -update flag, so it does not import internal/testutil).
func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got/want-1) > tol {
		t.Errorf("%s = %.10g, want %.10g within %g", what, got, want, tol)
	}
}

// growthNotebook writes a small notebook whose growth and fabrication records compute:
// three Si calibration wafers, a wafer that logs its growth per layer, a mask with a TLM
// pattern, a process run that measured it, a device and a cooldown that reads the run's TLM.
// All names and numbers are invented; the calibration follows N = A exp(−E_a/(k_B T)) with
// E_a = 4.2 eV and N(1150 °C) = 1e18 cm^-3 at 1 ML(GaAs)/s (so the fit is exact).
func growthNotebook(t *testing.T) string {
	t.Helper()
	root := filepath.Join(t.TempDir(), "nb")
	files := map[string]string{
		"wafers/C-1.md": "---\nid: C-1\nkind: wafer\ncalibration:\n  - {cell: Si, cell_temperature: 1100 °C, density: 2.8736e17 cm^-3, growth_rate: 1 ML(GaAs)/s, method: Hall at 300 K}\n---\n",
		"wafers/C-2.md": "---\nid: C-2\nkind: wafer\ncalibration:\n  - {cell: Si, cell_temperature: 1150 °C, density: 1e18 cm^-3, growth_rate: 1 ML(GaAs)/s}\n---\n",
		"wafers/C-3.md": "---\nid: C-3\nkind: wafer\ncalibration:\n  - {cell: Si, cell_temperature: 1200 °C, density: 3.1975e18 cm^-3, growth_rate: 1 ML(GaAs)/s}\n---\n",
		"wafers/G1.md": `---
id: G1
kind: wafer
channel: GaAs
---
## Layers

| layer   | material       | thickness | doping        | time   | rate      | t_sub  | cells                 |
| ------- | -------------- | --------- | ------------- | ------ | --------- | ------ | --------------------- |
| cap     | GaAs           |           | -             | 35 s   | 1 ML/s    | 580 °C | Ga 905 °C             |
| donors  | Al0.33Ga0.67As | 40 nm     | Si 1e18 cm^-3 | 140 s  | 1 ML/s    | 600 °C | Ga 905 °C, Si 1150 °C |
| spacer  | Al0.33Ga0.67As | 20 nm     | -             | 71 s   | 1 ML/s    | 600 °C |                       |
| channel | GaAs           | 600 nm    | -             | 2123 s | 1 ML/s    | 580 °C | Ga 905 °C             |

` + "```cleave\ncal = cell_calibration(\"Si\", [entry(\"C-1\"), entry(\"C-2\"), entry(\"C-3\")])\nchk = growth_check(wafer.layers, cal = cal)\nsp = expected_density(wafer.layers, T = 1.5 K)\nsp_grown = expected_density(chk.layers, T = 1.5 K)\n```\n",
		"masks/M1.md":        "---\nid: M1\nkind: mask\nwidth: 100 um\nlength: 1000 um\ntlm:\n  TLM-A: {width: 100 um, contact_length: 100 um, gaps: [5 um, 10 um, 20 um, 40 um, 80 um]}\n---\n",
		"pieces/G1-a.md":     "---\nid: G1-a\nkind: piece\nfrom: G1\n---\n",
		"processes/P1.md":    "---\nid: P1\nkind: process\npieces: [G1-a]\nmasks: [M1]\nsteps:\n  litho: {kind: lithography, spin: 4000 rpm, bake: 115 °C}\n  anneal: {kind: anneal, temperature: 440 °C, time: 60 s, gas: forming gas, caution: flammable gas; local rules first}\n  tlm_rt: {kind: tlm, pattern: TLM-A, resistances: [60 Ohm, 110 Ohm, 210 Ohm, 410 Ohm, 810 Ohm], temperature: 21 °C}\n---\n```cleave\ntl = tlm(steps.tlm_rt)\n```\n",
		"devices/G1-a-D1.md": "---\nid: G1-a-D1\nkind: device\nfrom: G1-a\nmask: M1\nprocess: [P1]\n---\n",
		"cooldowns/K1.md":    "---\nid: K1\nkind: cooldown\ndevices: [G1-a-D1]\n---\n```cleave\ntl = tlm(process.steps.tlm_rt)\ncc = contact_resistance(1.3 kOhm, 1.0 kOhm, width = 100 um, reference = tl)\n```\n",
	}
	for name, text := range files {
		p := filepath.Join(root, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Mkdir(filepath.Join(root, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	return root
}

// TestGrowthAndFabRecordsCompute: the growth wafer's check and stack, the calibration read
// from other wafers, the TLM of the process run read again by a cooldown.
func TestGrowthAndFabRecordsCompute(t *testing.T) {
	root := growthNotebook(t)
	rep, err := runTree(root, CheckOptions{Write: true})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Bad(true) != 0 {
		t.Fatalf("problems: %+v %+v %v", rep.Problems, rep.Failures, rep.Files)
	}
	get := func(file, expr string) calc.Value {
		t.Helper()
		v, err := Eval(root, filepath.Join(root, file), expr)
		if err != nil {
			t.Fatalf("%s: %s: %v", file, expr, err)
		}
		return v
	}
	q := func(file, expr, unit string) float64 {
		t.Helper()
		x, err := get(file, expr).(calc.Quantity).Q.In(quantity.MustUnit(unit))
		if err != nil {
			t.Fatalf("%s: %v", expr, err)
		}
		return x
	}
	// Calibration: E_a = 4.2 eV within the rounding of the densities written (5 digits).
	checkRel(t, "E_a", q("wafers/G1.md", "cal.Ea", "eV"), 4.2, 1e-4)
	// The donor layer's Si cell at 1150 °C at 1 ML/s: 1e18 cm^-3 as the table says.
	checkRel(t, "predicted doping", q("wafers/G1.md", "cell_density(cal, 1150 °C, rate = 1 ML(GaAs)/s).n", "cm^-3"), 1e18, 1e-3)
	if got := calc.Display(get("wafers/G1.md", "chk")); !strings.Contains(got, "doping: donors") || !strings.Contains(got, "predicted, table 1.0000e18 cm^-3 (+0.0 %)") {
		t.Errorf("growth check: %s", got)
	}
	// rate × time: the cap has no thickness, 35 ML of GaAs (a/2 = 0.2826625 nm) = 9.8932 nm.
	layers := get("wafers/G1.md", "wafer.layers").(calc.List)
	cap, _ := layers[0].(*calc.Record).Field("thickness")
	checkRel(t, "cap from rate × time", cap.(calc.Quantity).Q.Value(), 35*0.2826625e-9, 1e-12)
	// The solver reads what the grower logged.
	if n1, n2 := q("wafers/G1.md", "sp.n", "cm^-2"), q("wafers/G1.md", "sp_grown.n", "cm^-2"); !(n1 > 1e10 && n2 > 1e10) {
		t.Errorf("expected densities %g and %g", n1, n2)
	}
	// TLM in the process run and again in the cooldown: R_c = 5 Ohm, R_c W = 0.5 Ohm mm.
	checkRel(t, "Rc (process)", q("processes/P1.md", "tl.Rc", "Ohm"), 5, 1e-9)
	checkRel(t, "Rc (cooldown)", q("cooldowns/K1.md", "tl.Rc", "Ohm"), 5, 1e-9)
	// The contact check: (1.3 − 1.0) kOhm / 2 = 150 Ohm, × 100 µm = 15 Ohm mm, 30 × the TLM's.
	checkRel(t, "contact ratio", q("cooldowns/K1.md", "cc.ratio", "1"), 30, 1e-9)

	// Front-matter values: °C stays absolute, rpm as written.
	for expr, want := range map[string]string{"steps.litho.spin": "4000.0 rpm", "steps.litho.bake": "115.00 °C", "steps.anneal.temperature -> K": "713.15 K"} {
		if got := calc.Display(get("processes/P1.md", expr)); got != want {
			t.Errorf("%s = %q, want %q", expr, got, want)
		}
	}

	// The cache follows the calibration wafers: a corrected density makes G1's result stale.
	p := filepath.Join(root, "wafers", "C-2.md")
	b, _ := os.ReadFile(p)
	if err := os.WriteFile(p, []byte(strings.Replace(string(b), "density: 1e18", "density: 1.1e18", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	rep, err = runTree(root, CheckOptions{})
	if err != nil {
		t.Fatal(err)
	}
	stale := map[string]bool{}
	for _, f := range rep.Files {
		if len(f.Stale) > 0 {
			stale[f.Path] = true
		}
	}
	if !stale["wafers/G1.md"] || stale["processes/P1.md"] {
		t.Errorf("stale after a calibration change: %v, want wafers/G1.md only", stale)
	}
}
