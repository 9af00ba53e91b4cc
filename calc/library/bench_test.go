package library

import "testing"

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
