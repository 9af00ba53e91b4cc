package calc

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

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

// TestValuesThroughLanguage evaluates constants, materials, units and arithmetic as a user
// writes them (no functions: those are tested in calc/library) and checks the values.
func TestValuesThroughLanguage(t *testing.T) {
	tests := []struct {
		name, expr string
		unit       string
		want       float64
		tol        float64
	}{
		{"W4: level degeneracy e B/h per tesla", "e*(1 T)/h", "cm^-2", 2.41799e10, 1e-5},
		// CODATA 2018: R_K = h/e^2 exactly = 25812.807459304513 Ohm as a float64.
		{"R_K is h/e^2", "h/e^2", "Ohm", 25812.807459304513, 1e-15},
		// CODATA 2018: hbar = h/(2 pi) = 1.0545718176461565e-34 J s.
		{"hbar from h", "h/(2*pi)", "J s", 1.0545718176461565e-34, 1e-15},
		// Arithmetic closed forms.
		{"power binds tighter than unary minus", "-2^2", "", -4, 0},
		{"right-assoc power", "2^3^2", "", 512, 0},
		{"negative exponent", "2^-1", "", 0.5, 0},
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
			if !testutil.WithinRel(got, tc.want, tc.tol) {
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
		{"w", "um", 12.5, 0.2, 1e-12},              // uncertainty written in another unit
		{"n", "cm^-2", 3.07e11, 0.04e11, 1e-12},    // concise notation
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
		// A want of 0 is met within the tolerance as an absolute one.
		if !testutil.Within(v, tc.val, tc.tolerance, tc.tolerance) || !testutil.Within(sigma, tc.unc, tc.tolerance, tc.tolerance) {
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
		{"3e11 cm^-2 -> meV", 15, quantity.ErrDimMismatch},
		{"5 furlong", 3, quantity.ErrUnknownUnit},
		{"5 T/B", 5, quantity.ErrUnknownUnit},
		{"magnetc_length(1 T)", 1, ErrUnknownFunction},
		{"hbar_x", 1, ErrUnknownName},
		{"GaAs.mass", 6, ErrUnknownName},
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

// testFuncs are the tests' own functions, for checking how the evaluator matches and checks
// arguments without the library.
func testFuncs() []Func {
	tesla := quantity.MustUnit("T").D
	mass := quantity.Mass
	return []Func{
		{Name: "field_times_mass", Params: []Param{{Name: "B", Dim: &tesla}, {Name: "m", Dim: &mass, FromRecord: "mstar"}},
			Call: func(_ *Env, a []Value) (Value, error) {
				return Q(quantity.Mul(a[0].(Quantity).Q, a[1].(Quantity).Q)), nil
			}},
		{Name: "count", Variadic: true, Params: []Param{{Name: "xs"}},
			Call: func(_ *Env, a []Value) (Value, error) { return Q(quantity.Scalar(float64(len(a[0].(List))))), nil }},
		{Name: "second_is_wrong", Params: []Param{{Name: "x"}, {Name: "y"}},
			Call: func(_ *Env, a []Value) (Value, error) {
				return nil, &ArgError{Arg: 1, Err: fmt.Errorf("%w: y is wrong", ErrArgument)}
			}},
		{Name: "not_finite", Call: func(_ *Env, _ []Value) (Value, error) { return Q(quantity.Scalar(math.Inf(1))), nil }},
	}
}

// TestArguments checks what the evaluator does between a call and a function: dimensions
// checked before the call with the error at the argument, a hint for a bare number, a
// record standing in for a parameter by one of its fields, variadic arguments gathered, a
// function's ArgError placed at its argument, and a result that is not finite refused.
func TestArguments(t *testing.T) {
	e := NewEnv(WithFuncs(testFuncs()...))
	tests := []struct {
		expr     string
		col      int
		sentinel error
		msg      string // a part of the message; "" for no error
	}{
		{"field_times_mass(5 m, 1 kg)", 18, quantity.ErrDimMismatch, "field_times_mass: argument B must be kg s^-2 A^-1 (T), found m"},
		{"field_times_mass(1 T, 0.067)", 23, quantity.ErrDimMismatch, "; write it with its unit, e.g. `0.067 m_e` or a material such as GaAs"},
		{"field_times_mass(2, 1 kg)", 18, quantity.ErrDimMismatch, "; write it with its unit, e.g. `2 T`"},
		{"field_times_mass(1 T)", 1, ErrArgument, "missing argument m: field_times_mass(B, m)"},
		{"field_times_mass(1 T, m=GaAs, B=2 T)", 31, ErrArgument, "argument B given twice"},
		{"field_times_mass(1 T, GaAs.name)", 23, ErrType, "argument m must be a quantity"},
		{"second_is_wrong(1, 2)", 20, ErrArgument, "second_is_wrong: bad argument: y is wrong"},
		{"not_finite()", 1, nil, "not_finite: the result is not a finite number"},
		{"field_times_mass(1 T, GaAs)", 0, nil, ""},
		{"count(1, 2, 3)", 0, nil, ""},
	}
	for _, tc := range tests {
		v, err := e.Eval(tc.expr)
		if tc.msg == "" {
			if err != nil {
				t.Errorf("%s: %v", tc.expr, err)
			}
			continue
		}
		var ce *Error
		if !errors.As(err, &ce) {
			t.Errorf("%s = %v, %v; want an *Error", tc.expr, v, err)
			continue
		}
		if ce.Col != tc.col || !strings.Contains(ce.Error(), tc.msg) {
			t.Errorf("%s: %v; want column %d and %q", tc.expr, ce, tc.col, tc.msg)
		}
		if tc.sentinel != nil && !errors.Is(err, tc.sentinel) {
			t.Errorf("%s: %v is not %v", tc.expr, err, tc.sentinel)
		}
	}
	// The material stands in for the mass by its mstar: 1 T times 0.067 m_e.
	want := 0.067 * quantity.ElectronMass
	testutil.CheckRel(t, "field_times_mass(1 T, GaAs)", evalQ(t, e, "field_times_mass(1 T, GaAs)").Value(), want, 1e-12)
	// Several arguments are gathered into one list; one list alone is the list.
	for expr, want := range map[string]float64{"count(1, 2, 3)": 3, "count([1, 2])": 2, "count(7)": 1} {
		if got := evalQ(t, e, expr).Value(); got != want {
			t.Errorf("%s = %g, want %g", expr, got, want)
		}
	}
}
