package constants

import (
	"cleave/internal/testutil"
	"math"
	"strings"
	"testing"
)

// TestValues checks every table entry against its published value.
func TestValues(t *testing.T) {
	tests := []struct {
		sym   string
		want  float64
		unc   float64
		exact bool
		tol   float64 // relative
		src   string
	}{
		{"e", 1.602176634e-19, 0, true, 0, "CODATA 2018, exact [src:CODATA2018]"},
		{"h", 6.62607015e-34, 0, true, 0, "CODATA 2018, exact [src:CODATA2018]"},
		{"hbar", 1.0545718176461565e-34, 0, true, 1e-15, "CODATA 2018 h/2π, the float64 nearest the exact value [src:CODATA2018]"},
		{"k_B", 1.380649e-23, 0, true, 0, "CODATA 2018, exact [src:CODATA2018]"},
		{"c", 299792458, 0, true, 0, "SI definition of the metre, exact (from memory)"},
		{"N_A", 6.02214076e23, 0, true, 0, "SI 2019 defining constant, exact (from memory)"},
		{"m_e", 9.1093837015e-31, 2.8e-40, false, 0, "CODATA 2018 value [src:CODATA2018]; uncertainty (28) from memory"},
		{"eps0", 8.8541878128e-12, 1.3e-21, false, 0, "CODATA 2018, 8.8541878128(13)e-12 F/m [src:CODATA2018]"},
		{"mu0", 1.25663706212e-6, 1.9e-16, false, 0, "CODATA 2018, 1.25663706212(19)e-6 N/A^2 (from memory)"},
		{"mu_B", 9.2740100783e-24, 2.8e-33, false, 0, "CODATA 2018, 9.2740100783(28)e-24 J/T [src:CODATA2018]"},
		{"R_K", 25812.807459304513, 0, true, 1e-15, "h/e^2 from CODATA 2018 e and h, as a float64 [src:CODATA2018]"},
		{"R_K90", 25812.807, 0, true, 0, "CIPM 1988 Recommendation 2 [src:CIPM1988]"},
		{"h_e", 4.135667696e-15, 0, true, 1e-9, "h/e from CODATA 2018, to 10 digits [src:CODATA2018]"},
		{"Phi_0", 2.067833848e-15, 0, true, 1e-9, "h/2e from CODATA 2018, to 10 digits [src:CODATA2018]"},
		{"G_0", 7.748091729e-5, 0, true, 1e-9, "2e^2/h from CODATA 2018, to 10 digits [src:CODATA2018]"},
	}
	seen := map[string]bool{}
	for _, tc := range tests {
		t.Run(tc.sym, func(t *testing.T) {
			c, ok := Lookup(tc.sym)
			if !ok {
				t.Fatalf("Lookup(%q) not found", tc.sym)
			}
			seen[tc.sym] = true
			if d := testutil.RelDiff(c.Value, tc.want); d > tc.tol {
				t.Errorf("%s = %.12g, want %.12g (rel diff %.2g > %.2g; %s)", tc.sym, c.Value, tc.want, d, tc.tol, tc.src)
			}
			if d := testutil.RelDiff(c.Uncertainty, tc.unc); d > 1e-12 {
				t.Errorf("u(%s) = %g, want %g (%s)", tc.sym, c.Uncertainty, tc.unc, tc.src)
			}
			if c.Exact != tc.exact {
				t.Errorf("%s.Exact = %v, want %v", tc.sym, c.Exact, tc.exact)
			}
			if c.Exact && c.Uncertainty != 0 {
				t.Errorf("%s is exact but has uncertainty %g", tc.sym, c.Uncertainty)
			}
			if c.Source == "" || c.Unit == "" || c.Name == "" {
				t.Errorf("%s: empty Source, Unit or Name: %+v", tc.sym, c)
			}
		})
	}
	for _, c := range All() {
		if !seen[c.Symbol] {
			t.Errorf("table entry %q has no value check", c.Symbol)
		}
	}
}

// TestIdentities checks exact SI relations between constants: the 2019 SI fixes e, h and
// k_B exactly, so relations among them hold exactly [src:SI2019].
func TestIdentities(t *testing.T) {
	get := func(s string) Constant {
		c, ok := Lookup(s)
		if !ok {
			t.Fatalf("missing %s", s)
		}
		return c
	}
	e, h, hbar, c := get("e").Value, get("h").Value, get("hbar").Value, get("c").Value
	me, muB := get("m_e"), get("mu_B")
	eps0, mu0 := get("eps0"), get("mu0")
	tests := []struct {
		name     string
		got      float64
		want     float64
		relTol   float64
		provider string
	}{
		{"h = 2π ħ", 2 * math.Pi * hbar, h, 1e-15, "definition of ħ"},
		{"R_K = h/e²", get("R_K").Value, h / (e * e), 1e-15, "definition of R_K (von Klitzing et al. 1980)"},
		{"Φ₀ = h/2e", get("Phi_0").Value, h / (2 * e), 1e-15, "definition of the flux quantum"},
		{"h/e = 2Φ₀", get("h_e").Value, 2 * get("Phi_0").Value, 1e-15, "definition"},
		{"G₀ R_K = 2", get("G_0").Value * get("R_K").Value, 2, 1e-15, "definition"},
		// mu0 eps0 c^2 = 1 holds exactly in SI; the measured values agree within their
		// combined relative standard uncertainty (about 2.1e-10), so allow 3 sigma.
		{"μ₀ ε₀ c² = 1", mu0.Value * eps0.Value * c * c, 1,
			3 * math.Hypot(mu0.RelativeUncertainty(), eps0.RelativeUncertainty()), "Maxwell; CODATA 2018"},
		// mu_B = e hbar / (2 m_e): e and hbar exact, so the relative uncertainty is that of m_e.
		{"μ_B = eħ/2m_e", muB.Value, e * hbar / (2 * me.Value),
			3 * math.Hypot(muB.RelativeUncertainty(), me.RelativeUncertainty()), "definition; CODATA 2018"},
		// R = N_A k_B = 8.314462618... J/(mol K), exact (CODATA 2018, from memory).
		{"N_A k_B = R", get("N_A").Value * get("k_B").Value, 8.314462618, 1e-9, "CODATA 2018 (from memory)"},
		// R_K relative to R_K-90: +1.7794e-8, computed from CODATA 2018 and CIPM 1988 [src:CODATA2018].
		{"(R_K − R_K-90)/R_K-90", (get("R_K").Value - get("R_K90").Value) / get("R_K90").Value, 1.7794e-8, 1e-4, "[src:CODATA2018], [src:CIPM1988]"},
		// k_B in meV/K: 0.0861733, computed from CODATA 2018 k_B and e [src:CODATA2018].
		{"k_B/e in meV/K", get("k_B").Value / e * 1e3, 0.0861733, 1e-6, "[src:CODATA2018]"},
		// mu_B/k_B = 0.67171381563 K/T (CODATA 2018 [src:CODATA2018]).
		{"μ_B/k_B", muB.Value / get("k_B").Value, 0.67171381563, 1e-10, "[src:CODATA2018]"},
		// e^2/h = 3.874045865e-5 S (CODATA 2018 [src:CODATA2018]).
		{"e²/h", e * e / h, 3.874045865e-5, 1e-9, "[src:CODATA2018]"},
	}
	for _, tc := range tests {
		if d := testutil.RelDiff(tc.got, tc.want); d > tc.relTol {
			t.Errorf("%s: got %.15g, want %.15g (rel diff %.3g > %.3g; %s)", tc.name, tc.got, tc.want, d, tc.relTol, tc.provider)
		}
	}
}

func TestLookupAliases(t *testing.T) {
	tests := []struct {
		in, want string
	}{
		{"ħ", "hbar"}, {"kB", "k_B"}, {"μ_B", "mu_B"}, {"R_K-90", "R_K90"}, {"h/e", "h_e"},
		{"h/2e", "Phi_0"}, {"ε0", "eps0"}, {"eps_0", "eps0"}, {"RK", "R_K"}, {"e", "e"},
	}
	for _, tc := range tests {
		c, ok := Lookup(tc.in)
		if !ok || c.Symbol != tc.want {
			t.Errorf("Lookup(%q) = %q, %v; want %q", tc.in, c.Symbol, ok, tc.want)
		}
	}
	for _, bad := range []string{"", "E", "H", "hbar/e", "R_k", "Rk90", "m_E", "x"} {
		if c, ok := Lookup(bad); ok {
			t.Errorf("Lookup(%q) = %q, want not found", bad, c.Symbol)
		}
	}
}

func TestAllSortedAndCopied(t *testing.T) {
	all := All()
	if len(all) != len(table) {
		t.Fatalf("All() has %d entries, table %d", len(all), len(table))
	}
	for i := 1; i < len(all); i++ {
		if all[i-1].Symbol >= all[i].Symbol {
			t.Errorf("All() not sorted or duplicated at %d: %q, %q", i, all[i-1].Symbol, all[i].Symbol)
		}
	}
	all[0].Value = -1
	if c, _ := Lookup(all[0].Symbol); c.Value == -1 {
		t.Error("All() returned the table itself, not a copy")
	}
	if got := strings.Join(Symbols(), " "); !strings.Contains(got, "R_K") || !strings.Contains(got, "mu_B") {
		t.Errorf("Symbols() = %s", got)
	}
	// R_K-90 is only reachable by an explicit name: no alias of R_K points at it.
	for a, s := range aliases {
		if s == "R_K90" && !strings.Contains(a, "90") {
			t.Errorf("alias %q reaches R_K-90 without naming it", a)
		}
	}
}
