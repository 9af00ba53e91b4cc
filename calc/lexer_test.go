package calc

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// lexLines are lines for the differential test of the lexer: ASCII, non-ASCII characters
// before, inside and after every kind of token, invalid UTF-8, and errors at each of the
// lexer's positions.
var lexLines = []string{
	"n = wafer.design_density", "B = 1.5 T", "nu = filling_factor(n, B)", "lB = magnetic_length(B)",
	"Ec = cyclotron_energy(B, GaAs)", "E_F = fermi_energy(n, GaAs)", "W = geometry.width",
	`sq = squares("2", "3")`, "x = 2 # two", "x -> nm # note", "# only a comment", "   ",
	"µ = 2e6 cm^2/(V s) + ħ.x", "w = 12.5 ± 0.2 µm", "w = 12.5 µm ± 200 nm", "w = 12.5 µm ± 0.2 µm",
	"T = -20 °C", "T = 20 ℃ -> K", "a × b − c ÷ d · e", "x → meV", "x = 5 Ω·m", "x = 5 Ω · m",
	"(−1.05 ± 0.01)e6 T", "(- 1.05 ± 0.01)e6 T", "( 3.070 ± 0.040 )e11 cm^-2", "(3 ± 1)e2",
	"(3.0e1 ± 1)e2", "(3 +/- 1)e-2 Å", "\u00a0x\u00a0=\u00a05\u00a0T", "x = 5\u00a0T\u00a0±\u00a00.1",
	`s = "µm ± \"q\" \\ ħ"`, `s = "ħ"`, `s = ""`, `s = "a\"`, `s = "ħ\q"`, "µ = 1.2.3", `ħ = "abc`,
	"ħ = 5 ± T", "µ $", "ħ £ 2", "x = 3.07(4)e11 cm^-2", "x = 3.07e1(4)", "x = .5e-3 mK", "x = 5T*x",
	"0.8 ML(Al(0.3)Ga(0.7)As)/s", "5 ML(GaAs", "5 ML(ħ(0.3)) + µ", "Al0.33Ga0.67As.mstar", "Si(100).gv",
	"ä0.5b", "x0.5.y", "Ω0.5", "x = 1 #~ 1", `data("a#~b")`, "a .. b .. c", "1 T..2 T", "x -> ", "x -> # c",
	"ħ -> meV/K", "ħ -> µeV", "ħ -> (µ", "x\ny", "µ\rx", `"ab` + "\n", "x = 5 kg m^2 s^-2 / ħ",
	"x = 5 T / B", "x = 5 T/(a+b)", "x = 2e6 cm^2/(V s) ± 1", "f(x -> meV, 2)", "f(a=1, µ=2)",
	"[1, 2 µm, ħ][-1]", `r["ħ"]`, "x = 1e", "x = 1e+", "x = 1.", "x = 1.e5", "x=+/-1",
	"x = 1 +/- .5 T", "x = 1 ± .", "x = 1 ± µ", "x = 1 µm ±", "x = 5 µm^-2·s^+1",
	"x = 5 °", "x = 5 % + 1", "x = 5 ‰",
	// invalid UTF-8: each bad byte is one U+FFFD, one column
	"x = \xff", "x = \"a\xffb\"", "y = 1 # \xfe comment", "x = 5 ML(G\xffaAs)", "\xe2\x82 = 1", "π\xed\xa0\x80",
	"x = 1 $ \xff", "\xff\xfe\xfd", "ħ \xc3 = 1", "s = \"\xff\\\"\xfe\"", "x = 5 \xce\xbcm", "x = 1 # a \xff #= b",
	"x = 5 µ\xffm", "a\xffb",
	// the old result marker is now a comment like any other
	"x = 1 #= 1", "#= 5 T", "x = 1 # a #= b", "x = #= 5",
}

// tokensText prints tokens for comparison: kind, text, position and the number's parts.
func tokensText(toks []token, nums []numLit) string {
	var b strings.Builder
	for _, t := range toks {
		fmt.Fprintf(&b, "%d %q %v", t.kind, t.text, t.pos)
		if t.kind == tNumber {
			fmt.Fprintf(&b, " %+v", nums[t.num])
		}
		b.WriteString("\n")
	}
	return b.String()
}

func refTokensText(toks []refToken) string {
	var b strings.Builder
	for _, t := range toks {
		fmt.Fprintf(&b, "%d %q %v", t.kind, t.text, t.pos)
		if t.kind == tNumber {
			fmt.Fprintf(&b, " %+v", *t.num)
		}
		b.WriteString("\n")
	}
	return b.String()
}

func errText(err error) string {
	var ce *Error
	if err == nil {
		return "<nil>"
	}
	if !errors.As(err, &ce) {
		return "not an *Error: " + err.Error()
	}
	return fmt.Sprintf("%d:%d %q %v", ce.Line, ce.Col, ce.Msg, ce.Err)
}

// checkLexMatchesReference lexes src with the lexer and with the reference lexer over runes
// and fails unless tokens (kind, text, position, number parts) and errors are the same.
func checkLexMatchesReference(t *testing.T, src string) {
	t.Helper()
	lx := getLexer(src, 3)
	defer lx.release()
	err := lx.lex()
	var got string
	if err == nil {
		got = tokensText(lx.toks, lx.nums)
	}
	refToks, refErr := refLex(src, 3)
	var want string
	if refErr == nil {
		want = refTokensText(refToks)
	}
	if errText(err) != errText(refErr) || got != want {
		t.Fatalf("lex(%q):\n got err %s\n%s\nwant err %s\n%s", src, errText(err), got, errText(refErr), want)
	}
}

// TestLexMatchesReference: the lexer over the string gives the tokens, texts, columns and
// errors of the lexer over runes, for ASCII, non-ASCII and invalid UTF-8 lines.
func TestLexMatchesReference(t *testing.T) {
	lines := append(append([]string(nil), lexLines...), parseSeeds...)
	for _, l := range lines {
		checkLexMatchesReference(t, l)
		// the same line behind non-ASCII text shifts every column by the same count
		checkLexMatchesReference(t, "ħµ = "+l)
	}
	// a pooled lexer reused for a different line keeps nothing of the last one
	for i := range 3 {
		for _, l := range lexLines {
			checkLexMatchesReference(t, strings.Repeat(l+" + ", i)+l)
		}
	}
}

// TestOldMarkerIsAComment: "#=" was the result marker before "#~"; it is now ordinary text in
// a comment, while "#~" still ends the line.
func TestOldMarkerIsAComment(t *testing.T) {
	tests := []struct {
		in      string
		kind    LineKind
		comment string
		want    string // the expression printed, "" for none
	}{
		{"x = 1 #= 1", Assign, "= 1", "1"},
		{"#= 5 T", Comment, "= 5 T", ""},
		{"x = 1 # a #= b", Assign, " a #= b", "1"},
		{"x = 1 # a #= b #~ 1", Assign, " a #= b ", "1"},
		{"x = 1 #~ 1 #= 2", Assign, "", "1"},
		{"#~ 5 T", Blank, "", ""},
		{"x = 1 #~= 1", Assign, "", "1"},
	}
	for _, tc := range tests {
		t.Run(tc.in, func(t *testing.T) {
			st, err := ParseLine(tc.in, 1)
			if err != nil {
				t.Fatal(err)
			}
			if st.Kind != tc.kind || st.Comment != tc.comment {
				t.Errorf("kind %v, comment %q; want %v, %q", st.Kind, st.Comment, tc.kind, tc.comment)
			}
			got := ""
			if st.Expr != nil {
				got = FormatNode(st.Expr)
			}
			if got != tc.want {
				t.Errorf("expression %q, want %q", got, tc.want)
			}
		})
	}
	// a comment holding "#=" evaluates as the same line with any other comment
	e := NewEnv()
	for i, l := range []string{"x = 2 T #= 3 T", "y = x * 2 # note #= old"} {
		if r := e.EvalLine(l, i+1); r.Err != nil || r.Display == "" {
			t.Fatalf("%q: %+v", l, r)
		}
	}
	if r := e.EvalLine("y", 3); r.Display != NewEnv().EvalLine("4 T", 1).Display {
		t.Errorf("y = %s, want 4 T", r.Display)
	}
	// a line that is only a name, = and a comment is the same error whatever the comment says
	got, want := e.EvalLine("z = #= 5", 4), e.EvalLine("z = #x 5", 4)
	if got.Err == nil || got.Display != want.Display || got.Display != "error: 4:9: expected an expression after =, found the end of the line" {
		t.Errorf("z = #= 5: %q, want %q", got.Display, want.Display)
	}
}

// FuzzLex: the lexer over the string and the reference lexer over runes agree on every line.
func FuzzLex(f *testing.F) {
	for _, s := range lexLines {
		f.Add(s)
	}
	for _, s := range parseSeeds {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		if len(src) > MaxLineBytes {
			return
		}
		checkLexMatchesReference(t, src)
	})
}
