package calc

import "testing"

// A typical five-line block from an invented cooldown (parsed only: evaluating it needs the
// functions of calc/library, whose benchmark evaluates it).
var benchBlock = []string{
	"n = 3.1e11 cm^-2 # from the Hall slope",
	"rho = sheet_resistance(52.3 ± 0.2 Ohm, 500 um/(100 um))",
	"mu = mobility(rho, n) -> cm^2/(V s)",
	"E_F = fermi_energy(n, GaAs.mstar)",
	"l = mean_free_path(mu, n) -> um",
}

func BenchmarkParseBlock(b *testing.B) {
	for b.Loop() {
		for i, l := range benchBlock {
			if _, err := ParseLine(l, i+1); err != nil {
				b.Fatal(err)
			}
		}
	}
}
