package library

import (
	"testing"

	"cleave/calc"
)

// A typical five-line block from an invented cooldown.
var benchBlock = []string{
	"n = 3.1e11 cm^-2 # from the Hall slope",
	"rho = sheet_resistance(52.3 ± 0.2 Ohm, 500 um/(100 um))",
	"mu = mobility(rho, n) -> cm^2/(V s)",
	"E_F = fermi_energy(n, GaAs.mstar)",
	"l = mean_free_path(mu, n) -> um",
}

// BenchmarkEvalBlock includes making the Env with the whole library, as the notebook does
// once per file.
func BenchmarkEvalBlock(b *testing.B) {
	for b.Loop() {
		e := NewEnv()
		for i, l := range benchBlock {
			if r := e.EvalLine(l, i+1); r.Err != nil {
				b.Fatal(r.Err)
			}
		}
	}
}

// The lines of the generated notebook of the scale benchmark (scale_bench_test.go): a device's
// block reading its geometry, and a cooldown's reading its wafer's design density, each file
// in an Env of its own as the engine evaluates them.
var (
	benchDeviceBlock   = []string{"W = geometry.width", `sq = squares("2", "3")`}
	benchCooldownBlock = []string{"n = wafer.design_density", "B = 1.5 T", "nu = filling_factor(n, B)",
		"lB = magnetic_length(B)", "Ec = cyclotron_energy(B, GaAs)", "E_F = fermi_energy(n, GaAs)"}
)

// benchNotebook stands in for the notebook's records: the wafer with its design density and
// the Hall bar's geometry (the mask of the scale benchmark).
func benchNotebook() stubResolver {
	probe := func(name, pos, side string) *calc.Record {
		return calc.NewRecord("", "name", calc.String(name), "position", qv(pos), "arm_width", qv("10 um"), "side", calc.String(side))
	}
	return stubResolver{
		"wafer": calc.NewRecord("wafer", "id", calc.String("W00001"), "channel", calc.String("GaAs"), "design_density", qv("2.1e11 cm^-2")),
		"geometry": calc.NewRecord("geometry", "width", qv("100 um"), "length", qv("1000 um"), "probes", calc.List{
			probe("1", "0 um", "top"), probe("2", "250 um", "top"), probe("3", "750 um", "top"), probe("4", "250 um", "bottom")}),
	}
}

// BenchmarkEvalNotebookLines evaluates one device file and one cooldown file of the scale
// benchmark's notebook, each with a fresh Env.
func BenchmarkEvalNotebookLines(b *testing.B) {
	nb := benchNotebook()
	for b.Loop() {
		for _, block := range [][]string{benchDeviceBlock, benchCooldownBlock} {
			e := NewEnv(calc.WithResolver(nb))
			for i, l := range block {
				if r := e.EvalLine(l, i+7); r.Err != nil {
					b.Fatal(r.Err)
				}
			}
		}
	}
}
