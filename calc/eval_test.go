package calc

import (
	"errors"
	"math"
	"testing"

	"cleave/calc/quantity"
)

// within reports whether got agrees with want to relative tolerance tol.
func within(got, want, tol float64) bool {
	if want == 0 {
		return math.Abs(got) <= tol
	}
	return math.Abs(got-want) <= tol*math.Abs(want)
}

func evalQ(t *testing.T, e *Env, src string) quantity.Quantity {
	t.Helper()
	v, err := e.Eval(src)
	if err != nil {
		t.Fatalf("Eval(%q): %v", src, err)
	}
	q, ok := v.(Quantity)
	if !ok {
		t.Fatalf("Eval(%q) = %s, want a quantity", src, v.Type())
	}
	return q.Q
}

// TestPhysicsThroughLanguage evaluates the physics functions as a user writes them and
// checks the worked values. Unless noted, the expected values are REFERENCE.md §5, computed
// from CODATA 2018 with the closed forms of Ando, Fowler, Stern, Rev. Mod. Phys. 54, 437
// (1982) and the cited textbooks; the row number is given. They carry 5-6 significant
// figures, so the tolerance is 1e-4 relative.
func TestPhysicsThroughLanguage(t *testing.T) {
	tests := []struct {
		name, expr string
		unit       string
		want       float64
		tol        float64
	}{
		{"row 1: l_B at 1 T", "magnetic_length(1 T)", "nm", 25.6556, 1e-5},
		{"row 2: l_B at 10 T", "magnetic_length(B=10 T)", "nm", 8.11303, 1e-5},
		{"row 3: hbar omega_c GaAs at 1 T", "cyclotron_energy(1 T, GaAs)", "meV", 1.72788, 1e-5},
		{"row 3: omega_c GaAs at 1 T", "cyclotron_frequency(1 T, 0.067 m_e)", "s^-1", 2.6251e12, 1e-4},
		{"row 3: half of hbar omega_c is the N=0 level", "landau_level(0, 1 T, GaAs.mstar)", "meV", 1.72788 / 2, 1e-5},
		{"row 4: nu at 5 T", "filling_factor(3e11 cm^-2, 5 T)", "", 2.4814, 1e-4},
		{"row 5: B at nu=1", "field_at_filling(3e11 cm^-2, 1)", "T", 12.407, 1e-4},
		{"row 5: B at nu=2", "field_at_filling(3e11 cm^-2, nu=2)", "T", 6.2035, 1e-4},
		{"row 6: E_F GaAs", "fermi_energy(3e11 cm^-2, 0.067 m_e)", "meV", 10.719, 1e-4},
		{"row 7: k_F", "fermi_wavevector(3e11 cm^-2)", "m^-1", 1.37294e8, 1e-5},
		{"row 7: v_F", "fermi_velocity(3e11 cm^-2, GaAs)", "m/s", 2.3723e5, 1e-4},
		{"row 9: mobility from rho = 50 Ohm * 100 um/500 um", "mobility(sheet_resistance(50 Ohm, 500 um/100 um), 3e11 cm^-2)", "cm^2/(V s)", 2.0805e6, 1e-4},
		{"row 10: tau_t", "transport_time(1e6 cm^2/(V s), 0.067 m_e)", "ps", 38.094, 1e-4},
		{"row 11: mean free path", "mean_free_path(1e6 cm^2/(V s), 3e11 cm^-2)", "um", 9.0368, 1e-4},
		{"row 13: van der Pauw symmetric", "vdp_sheet_resistance(10 Ohm, 10 Ohm)", "Ohm", 45.3236, 1e-5},
		{"row 14: van der Pauw 10/20", "vdp_sheet_resistance(10 Ohm, 20 Ohm)", "Ohm", 65.285, 1e-4},
		{"row 15: SdH frequency", "sdh_frequency(3e11 cm^-2)", "T", 6.2035, 1e-4},
		{"row 18: Zeeman, |g| = 0.44", "zeeman_energy(1 T, 0.44)", "ueV", 25.469, 1e-4},
		{"row 19: R_K/2", "hall_resistance(2)", "Ohm", 12906.403730, 1e-9},
		{"row 26: graphene N=1 at 1 T", "dirac_landau_level(1, 1 T, graphene)", "meV", 36.283, 1e-4},
		{"row 26: graphene N=1 at 10 T", "dirac_landau_level(1, 10 T, 1e6 m/s)", "meV", 114.74, 1e-4},
		{"row 27: Si(100) E_F with gv=2", "fermi_energy(1e12 cm^-2, 0.19 m_e, gv=2)", "meV", 6.2997, 1e-4},
		{"row 28: Ge holes E_F", "fermi_energy(2.2e11 cm^-2, 0.061 m_e)", "meV", 8.6337, 1e-4},
		{"§2.1: level degeneracy e B/h per tesla", "e*(1 T)/h", "cm^-2", 2.41799e10, 1e-5},
		{"§2.6: Hall density from a 2080.5 Ohm/T slope", "density_from_slope(2080.5 Ohm/T)", "cm^-2", 3.0000e11, 1e-4},
		// CODATA 2018: R_K = h/e^2 exactly = 25812.807459304513 Ohm as a float64.
		{"R_K is h/e^2", "h/e^2", "Ohm", 25812.807459304513, 1e-15},
		// CODATA 2018: hbar = h/(2 pi) = 1.0545718176461565e-34 J s.
		{"hbar from h", "h/(2*pi)", "J s", 1.0545718176461565e-34, 1e-15},
		// Arithmetic closed forms.
		{"power binds tighter than unary minus", "-2^2", "", -4, 0},
		{"right-assoc power", "2^3^2", "", 512, 0},
		{"negative exponent", "2^-1", "", 0.5, 0},
		{"sqrt of an area", "sqrt(16 um^2)", "um", 4, 1e-15},
		{"ln of e^2 (math)", "ln(exp(2))", "", 2, 1e-15},
		{"log10", "log10(1e5)", "", 5, 1e-15},
		{"abs", "abs(-3 T)", "T", 3, 0},
		{"min of list", "min([3 T, 1 T, 2 T])", "T", 1, 0},
		{"max of args", "max(3 T, 1 T, 2 T)", "T", 3, 0},
		{"mean", "mean(1 T, 2 T, 6 T)", "T", 3, 1e-15},
		{"unit group", "2e6 cm^2/(V s)", "m^2/(V s)", 200, 1e-15},
		{"juxtaposed unit", "3 kg m^2 s^-2", "J", 3, 0},
		{"material mass in m_e", "Al0.33Ga0.67As.mstar", "m_e", 0.067 + 0.083*0.33, 1e-12},
		{"graphene vF", "graphene.vF", "m/s", 1e6, 0},
		{"degeneracy field", "GaAs.gv", "", 1, 0},
		// calc/materials: Si(100) has gv = 2 (Ando, Fowler, Stern 1982); Ge holes 0.061 m_e (Lodari et al. 2019).
		{"material written like a call", "Si(100).gv", "", 2, 0},
		{"Ge holes mass", "Ge(holes).mstar", "m_e", 0.061, 1e-12},
		{"grouped result form reads back", "(3.070 ± 0.040)e11 cm^-2", "cm^-2", 3.07e11, 1e-15},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			q := evalQ(t, NewEnv(), tc.expr)
			u := quantity.Unit{Scale: 1}
			if tc.unit != "" {
				u = quantity.MustUnit(tc.unit)
			}
			got, err := q.In(u)
			if err != nil {
				t.Fatalf("%s in %s: %v", tc.expr, tc.unit, err)
			}
			if !within(got, tc.want, tc.tol) {
				t.Errorf("%s = %.8g %s, want %.8g (tol %g)", tc.expr, got, tc.unit, tc.want, tc.tol)
			}
		})
	}
}

// TestCorrelations checks that uncertainties keep their correlations through the language:
// first-order propagation (GUM, JCGM 100:2008, eq. 13) with each literal an independent input.
func TestCorrelations(t *testing.T) {
	e := NewEnv()
	for i, l := range []string{"x = 5 ± 0.1 T", "y = 5 ± 0.1 T", "w = 12.5 um ± 200 nm", "n = 3.07(4)e11 cm^-2"} {
		if r := e.EvalLine(l, i+1); r.Err != nil {
			t.Fatalf("%s: %v", l, r.Err)
		}
	}
	tests := []struct {
		expr      string
		unit      string
		val, unc  float64
		tolerance float64
	}{
		{"x - x", "T", 0, 0, 0},                    // fully correlated: exactly 0 ± 0
		{"x / x", "", 1, 0, 1e-15},                 // likewise
		{"x * x", "T^2", 25, 1.0, 1e-12},           // relative uncertainty doubles: 2 * 0.02 * 25
		{"x - y", "T", 0, 0.1 * math.Sqrt2, 1e-12}, // independent: sqrt(0.1^2 + 0.1^2)
		{"mean(x, x)", "T", 5, 0.1, 1e-12},         // correlated mean keeps sigma
		{"mean(x, y)", "T", 5, 0.1 / math.Sqrt2, 1e-12},
		{"w", "um", 12.5, 0.2, 1e-12},           // uncertainty written in another unit
		{"n", "cm^-2", 3.07e11, 0.04e11, 1e-12}, // concise notation
		{"-x", "T", -5, 0.1, 1e-12},
		{"3 * x", "T", 15, 0.3, 1e-12},
	}
	for _, tc := range tests {
		q := evalQ(t, e, tc.expr)
		u := quantity.Unit{Scale: 1}
		if tc.unit != "" {
			u = quantity.MustUnit(tc.unit)
		}
		v, err := q.In(u)
		if err != nil {
			t.Fatalf("%s: %v", tc.expr, err)
		}
		sigma := q.Uncertainty() / u.Scale
		if !within(v, tc.val, tc.tolerance) || !within(sigma, tc.unc, tc.tolerance) {
			t.Errorf("%s = %g ± %g %s, want %g ± %g", tc.expr, v, sigma, tc.unit, tc.val, tc.unc)
		}
	}
	if q := evalQ(t, e, "x - x"); q.Uncertainty() != 0 || q.Value() != 0 {
		t.Errorf("x - x = %g ± %g, want exactly 0 ± 0", q.Value(), q.Uncertainty())
	}
}

// TestEvalLineKinds checks what EvalLine returns for each kind of line, that names carry
// across lines, and that a variable shadows a constant.
func TestEvalLineKinds(t *testing.T) {
	e := NewEnv()
	tests := []struct {
		line    string
		kind    LineKind
		name    string
		display string
	}{
		{"", Blank, "", ""},
		{"# a comment", Comment, "", ""},
		{"B = 2 T # the field", Assign, "B", "2.0000 T"},
		{"B * 2 #~ old result", Expr, "", "4.0000 T"},
		{"E = 1 meV", Assign, "E", "1.0000 meV"},
		{"E -> ueV", Expr, "", "1000.0 ueV"},
		{"e = 2", Assign, "e", "2.0000"},
		{"e * 3", Expr, "", "6.0000"},
		{"[1 T, 2 T] -> mT", Expr, "", "[1000.0 mT, 2000.0 mT]"},
		{"0 T .. 0.5 T -> mT", Expr, "", "0 mT .. 500.00 mT"},
		{`"raw/a.csv"`, Expr, "", `"raw/a.csv"`},
	}
	for i, tc := range tests {
		r := e.EvalLine(tc.line, i+1)
		if r.Err != nil {
			t.Fatalf("%q: %v", tc.line, r.Err)
		}
		if r.Kind != tc.kind || r.Name != tc.name || r.Display != tc.display {
			t.Errorf("%q: got (%v, %q, %q), want (%v, %q, %q)", tc.line, r.Kind, r.Name, r.Display, tc.kind, tc.name, tc.display)
		}
	}
	if got, want := e.Vars(), []string{"B", "E", "e"}; !equalStrings(got, want) {
		t.Errorf("Vars() = %v, want %v", got, want)
	}
}

func equalStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// TestEvalErrors checks positions and sentinel errors of evaluation failures.
func TestEvalErrors(t *testing.T) {
	tests := []struct {
		line     string
		col      int
		sentinel error
	}{
		{"3e11 cm^-2 + 5 T", 12, quantity.ErrDimMismatch},
		{"magnetic_length(5 m)", 17, quantity.ErrDimMismatch},
		{"3e11 cm^-2 -> meV", 15, quantity.ErrDimMismatch},
		{"5 furlong", 3, quantity.ErrUnknownUnit},
		{"5 T/B", 5, quantity.ErrUnknownUnit},
		{"magnetc_length(1 T)", 1, ErrUnknownFunction},
		{"magnetic_length(1 T, m=2)", 22, ErrArgument},
		{"fermi_energy(3e11 cm^-2)", 1, ErrArgument},
		{"magnetic_length(1 T, 2 T)", 22, ErrArgument},
		{"hbar_x", 1, ErrUnknownName},
		{"GaAs.mass", 6, ErrUnknownName},
		{`data(5)`, 6, ErrType},
		{`data("x.csv")`, 6, nil},
		{`data("/etc/passwd")`, 6, ErrPath},
		{"[1] + 2", 1, ErrType},
		{"(1 T)^(2 T)", 8, quantity.ErrDimMismatch},
		{"1 T .. 2 K", 5, quantity.ErrDimMismatch},
		{"x = 1 +", 8, nil},
	}
	for _, tc := range tests {
		r := NewEnv().EvalLine(tc.line, 4)
		var ce *Error
		if !errors.As(r.Err, &ce) {
			t.Errorf("%q: err = %v, want *Error", tc.line, r.Err)
			continue
		}
		if ce.Line != 4 || ce.Col != tc.col {
			t.Errorf("%q: at %d:%d, want 4:%d (%v)", tc.line, ce.Line, ce.Col, tc.col, ce)
		}
		if tc.sentinel != nil && !errors.Is(r.Err, tc.sentinel) {
			t.Errorf("%q: %v is not %v", tc.line, r.Err, tc.sentinel)
		}
		if r.Display == "" || r.Value != nil {
			t.Errorf("%q: an error must show in the result region and give no value", tc.line)
		}
	}
}

// TestFailedDefinition checks that a failed assignment removes the old value and later
// uses name the failing line.
func TestFailedDefinition(t *testing.T) {
	e := NewEnv()
	e.EvalLine("n = 3e11 cm^-2", 1)
	if r := e.EvalLine("n = 3e11 cm^-2 + 1 T", 2); r.Err == nil {
		t.Fatal("want a dimension error")
	}
	r := e.EvalLine("n * 2", 3)
	if r.Err == nil || !contains(r.Err.Error(), "definition on line 2 failed") {
		t.Errorf("got %v, want an error naming line 2", r.Err)
	}
	// A syntax error in a redefinition also undefines the name.
	e.EvalLine("B = 5 T", 4)
	r = e.EvalLine("B = 6 T +", 5)
	if r.Kind != Assign || r.Name != "B" || r.Err == nil {
		t.Errorf("got kind %v name %q err %v, want a failed assignment of B", r.Kind, r.Name, r.Err)
	}
	if r := e.EvalLine("B", 6); r.Err == nil || !contains(r.Err.Error(), "definition on line 5 failed") {
		t.Errorf("got %v, want an error naming line 5", r.Err)
	}
}
