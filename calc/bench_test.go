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

// BenchmarkLongestLine evaluates the longest sums the bounds allow: 2048 exact terms, and 1000
// pairs x - x of one uncertain input (its correlations carried along the chain); and refuses
// a 1.8 MB line of 300,000 terms (issue 13: it ended in a stack overflow after gigabytes).
func BenchmarkLongestLine(b *testing.B) {
	exact := repeat("1 T", " + ", MaxTokens/2)
	corr := repeat("x - x", " + ", 1000)
	huge := "x = " + repeat("1 T", " + ", 300_000)
	b.Run("2048 exact terms", func(b *testing.B) {
		for b.Loop() {
			if r := NewEnv().EvalLine(exact, 1); r.Err != nil {
				b.Fatal(r.Err)
			}
		}
	})
	b.Run("1000 correlated pairs", func(b *testing.B) {
		e := NewEnv()
		e.EvalLine("x = 1.0 ± 0.1 T", 1)
		for b.Loop() {
			if r := e.EvalLine(corr, 2); r.Err != nil {
				b.Fatal(r.Err)
			}
		}
	})
	b.Run("refuse 300,000 terms", func(b *testing.B) {
		for b.Loop() {
			if r := NewEnv().EvalLine(huge, 1); r.Err == nil {
				b.Fatal("accepted")
			}
		}
	})
}
