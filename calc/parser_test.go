package calc

import (
	"errors"
	"reflect"
	"testing"
)

// TestParseLine checks the grammar: precedence, associativity, unit attachment and the
// statement kinds, by printing the tree fully parenthesised.
func TestParseLine(t *testing.T) {
	tests := []struct {
		name, in string
		kind     LineKind
		assign   string
		want     string // FormatNode of the expression
		comment  string
	}{
		{"blank", "   ", Blank, "", "", ""},
		{"comment", "# densities", Comment, "", "", " densities"},
		{"result region only", "#~ 5 T", Blank, "", "", ""},
		{"assign number with unit", "B = 5 T", Assign, "B", "5 T", ""},
		{"mass in m_e", "m = 0.067 m_e", Assign, "m", "0.067 m_e", ""},
		{"density", "n = 3.1e11 cm^-2", Assign, "n", "3.1e11 cm^-2", ""},
		{"mobility unit with group", "mu = 2e6 cm^2/(V s)", Assign, "mu", "2e6 cm^2/(V s)", ""},
		{"juxtaposed unit", "E = 1 kg m^2 s^-2", Assign, "E", "1 kg m^2 s^-2", ""},
		{"unit glued", "x = 5T", Assign, "x", "5 T", ""},
		{"uncertainty before unit", "w = 12.5 ± 0.2 um", Assign, "w", "12.5 ± 0.2 um", ""},
		{"ascii uncertainty", "w = 12.5 +/- 0.2 um", Assign, "w", "12.5 ± 0.2 um", ""},
		{"uncertainty after unit", "w = 12.5 um ± 200 nm", Assign, "w", "12.5 um ± 200 nm", ""},
		{"concise uncertainty", "n = 3.07(4)e11 cm^-2", Assign, "n", "3.07(4)e11 cm^-2", ""},
		{"division after unit with spaces is arithmetic", "5 T / B", Expr, "", "(5 T / B)", ""},
		{"multiplication after unit with spaces", "5 T * x", Expr, "", "(5 T * x)", ""},
		{"unit stops before number", "5 T*2", Expr, "", "(5 T * 2)", ""},
		{"unit stops at bad group", "5 T/(a+b)", Expr, "", "(5 T / (a + b))", ""},
		{"precedence", "a + b * c - d / e", Expr, "", "((a + (b * c)) - (d / e))", ""},
		{"power right assoc", "a ^ b ^ c", Expr, "", "(a ^ (b ^ c))", ""},
		{"unary minus below power", "-x^2", Expr, "", "(-(x ^ 2))", ""},
		{"negative exponent", "2^-1", Expr, "", "(2 ^ (-1))", ""},
		{"parens", "(a + b) * c", Expr, "", "((a + b) * c)", ""},
		{"range", "0 T .. 0.5 T", Expr, "", "(0 T .. 0.5 T)", ""},
		{"range no spaces", "1 T..2 T", Expr, "", "(1 T .. 2 T)", ""},
		{"list", "[1, 2 T, x]", Expr, "", "[1, 2 T, x]", ""},
		{"empty list", "[]", Expr, "", "[]", ""},
		{"call named", "fermi_energy(n, 0.067 m_e, gs=1)", Expr, "", "fermi_energy(n, 0.067 m_e, gs=1)", ""},
		{"field", "device.width", Expr, "", "device.width", ""},
		{"alloy field", "Al0.33Ga0.67As.mstar", Expr, "", "Al0.33Ga0.67As.mstar", ""},
		{"convert", "E_F -> meV", Expr, "", "(E_F -> meV)", ""},
		{"convert compound", "mu = 1/(e*n*rho) -> cm^2/(V s)", Assign, "mu", "((1 / ((e * n) * rho)) -> cm^2/(V s))", ""},
		{"convert then comment", "x -> nm # note", Expr, "", "(x -> nm)", " note"},
		{"convert in call", "f(x -> meV, 2)", Expr, "", "f((x -> meV), 2)", ""},
		{"string", `data("raw/a \"b\".csv")`, Expr, "", `data("raw/a \"b\".csv")`, ""},
		{"trailing comment", "x = 2 # two", Assign, "x", "2", " two"},
		{"result region stripped", "x = 2 T #~ 2 T", Assign, "x", "2 T", ""},
		{"leading dot number", "x = .5", Assign, "x", ".5", ""},
		{"unicode names", "ħ * μ_B", Expr, "", "(ħ * μ_B)", ""},
		{"grouped result form", "(3.070 ± 0.040)e11 cm^-2", Expr, "", "3.070e11 ± 0.040e11 cm^-2", ""},
		{"negative grouped result form", "(-1.05 ± 0.01)e6 T", Expr, "", "(-1.05e6 ± 0.01e6 T)", ""},
		{"parenthesised sum stays a sum", "(3 ± 1)", Expr, "", "3 ± 1", ""},
		{"unicode operators", "a × b − c", Expr, "", "((a * b) - c)", ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			st, err := ParseLine(tc.in, 1)
			if err != nil {
				t.Fatalf("ParseLine(%q): %v", tc.in, err)
			}
			if st.Kind != tc.kind {
				t.Errorf("kind = %v, want %v", st.Kind, tc.kind)
			}
			if st.Name != tc.assign {
				t.Errorf("name = %q, want %q", st.Name, tc.assign)
			}
			if st.Comment != tc.comment {
				t.Errorf("comment = %q, want %q", st.Comment, tc.comment)
			}
			if tc.want != "" {
				if got := FormatNode(st.Expr); got != tc.want {
					t.Errorf("tree = %s, want %s", got, tc.want)
				}
			}
		})
	}
}

// TestParsePositions checks the positions recorded in the tree (columns in characters).
func TestParsePositions(t *testing.T) {
	st, err := ParseLine("µ = 2e6 cm^2/(V s) + ħ.x", 7)
	if err != nil {
		t.Fatal(err)
	}
	b, ok := st.Expr.(*Binary)
	if !ok {
		t.Fatalf("got %T, want *Binary", st.Expr)
	}
	if want := (Pos{7, 20}); b.Pos != want {
		t.Errorf("+ at %v, want %v", b.Pos, want)
	}
	num := b.X.(*NumberLit)
	if want := (Pos{7, 5}); num.Pos != want {
		t.Errorf("number at %v, want %v", num.Pos, want)
	}
	if want := (Pos{7, 9}); num.UnitPos != want {
		t.Errorf("unit at %v, want %v", num.UnitPos, want)
	}
	f := b.Y.(*FieldAccess)
	if want := (Pos{7, 24}); f.Pos != want {
		t.Errorf("field at %v, want %v", f.Pos, want)
	}
}

// TestParseErrors checks that syntax errors carry the line and column of the offending
// token and say what was expected.
func TestParseErrors(t *testing.T) {
	tests := []struct {
		in       string
		line     int
		col      int
		contains string
	}{
		{"x = ", 3, 5, "expected an expression after ="},
		{"1 +", 3, 4, "expected a number, name, string, ( or [, found the end of the line"},
		{"(1 + 2", 3, 7, "expected ) to close the ( at column 1"},
		{"f(1, 2", 3, 7, "expected , or ) in the call of f"},
		{"[1, 2", 3, 6, "expected , or ] in the list"},
		{"a .. b .. c", 3, 8, "a range has two ends"},
		{"x -> ", 3, 6, "expected a unit after ->"},
		{"x.5", 3, 2, "expected an operator or the end of the line, found number .5"},
		{"x.", 3, 3, "expected a field name after ."},
		{`"abc`, 3, 1, "unterminated string"},
		{`"a\n"`, 3, 3, "unknown escape"},
		{`data("a#~b")`, 3, 6, "unterminated string"},
		{"1.2.3", 3, 4, "a second decimal point"},
		{"5 ± T", 3, 5, "expected a number (the uncertainty) after ±"},
		{"a = b = c", 3, 7, "unexpected ="},
		{"f(a=1, 2)", 3, 8, "positional argument after a named one"},
		{"a $ b", 3, 3, `unexpected character '$'`},
		{"3.07(4)e11(", 3, 11, "expected an operator"},
	}
	for _, tc := range tests {
		t.Run(tc.in, func(t *testing.T) {
			_, err := ParseLine(tc.in, tc.line)
			var ce *Error
			if !errors.As(err, &ce) {
				t.Fatalf("ParseLine(%q) error = %v, want *Error", tc.in, err)
			}
			if ce.Line != tc.line || ce.Col != tc.col {
				t.Errorf("position %d:%d, want %d:%d (%v)", ce.Line, ce.Col, tc.line, tc.col, err)
			}
			if !contains(ce.Msg, tc.contains) {
				t.Errorf("message %q does not contain %q", ce.Msg, tc.contains)
			}
		})
	}
}

func contains(s, sub string) bool { return len(sub) == 0 || indexOf(s, sub) >= 0 }

func indexOf(s, sub string) int {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return i
		}
	}
	return -1
}

// clearPos zeroes every position in a tree so that trees can be compared structurally.
func clearPos(n Node) {
	switch n := n.(type) {
	case *NumberLit:
		n.Pos, n.UnitPos, n.UncPos, n.UncUPos = Pos{}, Pos{}, Pos{}, Pos{}
	case *Ident:
		n.Pos = Pos{}
	case *StringLit:
		n.Pos = Pos{}
	case *Unary:
		n.Pos = Pos{}
		clearPos(n.X)
	case *Binary:
		n.Pos = Pos{}
		clearPos(n.X)
		clearPos(n.Y)
	case *RangeExpr:
		n.Pos = Pos{}
		clearPos(n.Lo)
		clearPos(n.Hi)
	case *ListExpr:
		n.Pos = Pos{}
		for _, e := range n.Elems {
			clearPos(e)
		}
	case *FieldAccess:
		n.Pos = Pos{}
		clearPos(n.X)
	case *IndexExpr:
		n.Pos = Pos{}
		clearPos(n.X)
		clearPos(n.Index)
	case *Call:
		n.Pos = Pos{}
		for i := range n.Args {
			n.Args[i].Pos = Pos{}
			clearPos(n.Args[i].Value)
		}
	case *Convert:
		n.Pos, n.ArrowAt = Pos{}, Pos{}
		clearPos(n.X)
	}
}

// checkRoundTrip parses src, prints the tree, reparses the print, and compares the trees.
func checkRoundTrip(t *testing.T, src string) {
	t.Helper()
	x, err := ParseExpr(src)
	if err != nil {
		return
	}
	printed := FormatNode(x)
	y, err := ParseExpr(printed)
	if errors.Is(err, ErrTooDeep) {
		return // the printed form adds parentheses, so it may pass the nesting limit
	}
	if err != nil {
		t.Fatalf("reparse of %q (printed from %q): %v", printed, src, err)
	}
	clearPos(x)
	clearPos(y)
	if !reflect.DeepEqual(x, y) {
		t.Fatalf("round trip changed the tree:\n src     %q\n printed %q\n again   %q", src, printed, FormatNode(y))
	}
}

var parseSeeds = []string{
	"5 T", "0.067 m_e", "3.1e11 cm^-2", "2e6 cm^2/(V s)", "12.5 ± 0.2 um", "12.5 +/- 0.2 um",
	"12.5 um ± 200 nm", "3.07(4)e11 cm^-2", "-x^2", "a ^ b ^ c", "2^-1", "(a + b) * c / d",
	"0 T .. 0.5 T", "[1, 2, [3]]", `fermi_energy(n, m=GaAs.mstar, gs=1)`, "device.width",
	"Al0.33Ga0.67As.mstar", "E_F -> meV", `data("raw/hall.csv")`, "1 kg m^2 s^-2", "5 T / B",
	"f(x -> meV, 2)", "x -> cm^2/(V s)", "-(-(1))", "1 T..2 T", "5T*x", "ħ*μ_B", ".5e-3 mK",
	"(3.070 ± 0.040)e11 cm^-2", "(-1.05 ± 0.01)e6 T", "Si(100).gv",
	"sp.wells[0].n", "x[-1]", "[1, 2][i + 1]", `r["n"]`, "f(x)[0][1].y", "a[0] ^ 2",
	"-20 °C", "0.8 ML(Al(0.3)Ga(0.7)As)/s", "5 ML(GaAs", "x -> ℃",
}

func TestRoundTripSeeds(t *testing.T) {
	for _, s := range parseSeeds {
		checkRoundTrip(t, s)
	}
}

// FuzzParse: parsing never panics, and printing a parsed tree and parsing the print
// gives the same tree.
func FuzzParse(f *testing.F) {
	for _, s := range parseSeeds {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		_, _ = ParseLine(src, 1)
		checkRoundTrip(t, src)
	})
}
