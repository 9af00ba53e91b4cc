package calc

import (
	"fmt"
	"reflect"
	"sync"
	"testing"
	"unsafe"
)

// memoLines is a file's worth of lines for the tests of the parse memo: assignments that
// later lines read, notebook fields, materials, functions, redefinitions and failed ones,
// and every error the lexer, the parser and the evaluator give, then the lexer's and the
// parser's own test lines, a line longer than the memo keeps and one longer than a line may
// be.
func memoLines() []string {
	lines := []string{
		"x = 5 ± 0.1 T", "y = x - x", "n = 3.1e11 cm^-2 # from the Hall slope", "B = 1.5 T", "z = n * B",
		"device.width", "d = device.mask.name", "w = width", "a = device.mask.arm -> um", "GaAs.mstar",
		"Si(100).gv", "Al0.3Ga0.7As.mstar", "field_times_mass(B, GaAs)", "count(1, 2, 3)", "count([1, 2])",
		"second_is_wrong(1, 2)", "not_finite()", "x = x * 2", "x", "q = 1 +", "q", "B = 6 T +", "B",
		"[1, 2][5]", "[1, 2][-1]", `device["width"]`, "-20 °C", "T = 20 °C -> K", "5 rpm", "1 meV -> K",
		"3e11 cm^-2 + 5 T", "3e11 cm^-2 -> meV", "5 furlong", "5 T/B", "magnetc_length(1 T)", "hbar_x",
		"GaAs.mass", "[1] + 2", "(1 T)^(2 T)", "1 T .. 2 K", "x = 1 +", "wafer", "devic.width",
		"1 / 0", "1e308 * 1e308", "2^-1", "(3.070 ± 0.040)e11 cm^-2", "x = 1 #= 1", "x = 2 T #~ 2 T",
		"x = 12.5 um ± 200 nm", "x = 3.07(4)e11 cm^-2", "h * 2", "e = 2", "e * 2", "pi", "π * 2",
		"", "   ", "# a comment", "x = 5 ML(GaAs)/s", "x = 5 ML(Si)/s",
	}
	lines = append(lines, "s = "+repeat("1 T", " + ", 100), "s", "t = "+repeat("1 T", " + ", MaxLineBytes))
	for _, l := range []string{"x = ", "1 +", "(1 + 2", "f(1, 2", "[1, 2", "a .. b .. c", "x -> ", "x.5", "x.",
		`"abc`, `"a\n"`, `data("a#~b")`, "1.2.3", "5 ± T", "a = b = c", "f(a=1, 2)", "a $ b", "3.07(4)e11("} {
		lines = append(lines, l)
	}
	lines = append(lines, lexLines...)
	return append(lines, parseSeeds...)
}

// resultText prints everything a line's result says.
func resultText(r LineResult) string {
	typ := "<nil>"
	if r.Value != nil {
		typ = r.Value.Type()
	}
	return fmt.Sprintf("%v %q %s %q %s", r.Kind, r.Name, typ, r.Display, errText(r.Err))
}

func memoEnv(t *testing.T) *Env {
	return NewEnv(WithResolver(demoResolver(t)), WithFuncs(testFuncs()...))
}

// TestParseMemoChangesNothing: evaluating a file's lines through the memo of parsed lines
// gives, line by line, what parsing every line afresh gives: kinds, names, values, displays,
// errors with their positions, and the variables left defined. The lines are evaluated three
// times (the second time every tree comes from the memo; the third time at other line
// numbers, so the errors must move with them), and as expressions through Eval. Then the trees
// in the memo are still those a fresh parse gives: evaluation changed none of them.
func TestParseMemoChangesNothing(t *testing.T) {
	lines := memoLines()
	shared, fresh := memoEnv(t), memoEnv(t)
	for pass, offset := range []int{1, 1, 40} {
		for i, l := range lines {
			n := i + offset
			got, want := shared.EvalLine(l, n), fresh.evalLine(l, n, ParseLine)
			if resultText(got) != resultText(want) {
				t.Fatalf("pass %d, line %d %q:\n memo  %s\n fresh %s", pass, n, l, resultText(got), resultText(want))
			}
			if !reflect.DeepEqual(shared.Vars(), fresh.Vars()) {
				t.Fatalf("pass %d, after line %d %q: variables %v, fresh %v", pass, n, l, shared.Vars(), fresh.Vars())
			}
			v, err := shared.Eval(l)
			fv, ferr := fresh.evalExpr(l, ParseExpr)
			if Display(v) != Display(fv) || errText(err) != errText(ferr) {
				t.Fatalf("Eval(%q) = %s, %s; fresh %s, %s", l, Display(v), errText(err), Display(fv), errText(ferr))
			}
		}
	}
	parsedLines.mu.RLock()
	defer parsedLines.mu.RUnlock()
	checked := 0
	for k, st := range parsedLines.m {
		want, err := ParseLine(k.text, k.line)
		if err != nil || !reflect.DeepEqual(st, want) {
			t.Errorf("the memo's tree of line %d %q differs from a fresh parse (%v)", k.line, k.text, err)
		}
		checked++
	}
	if checked == 0 {
		t.Error("the memo holds no line")
	}
}

// TestParseMemoConcurrent: files evaluated in parallel (as the engine does) share the memo's
// trees and each gets the results of a serial evaluation without the memo; run with -race.
func TestParseMemoConcurrent(t *testing.T) {
	lines := memoLines()
	fresh := memoEnv(t)
	want := make([]string, len(lines))
	for i, l := range lines {
		want[i] = resultText(fresh.evalLine(l, i+100, ParseLine))
	}
	var wg sync.WaitGroup
	for range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			e := memoEnv(t)
			for i, l := range lines {
				if got := resultText(e.EvalLine(l, i+100)); got != want[i] {
					t.Errorf("line %d %q: %s, want %s", i+100, l, got, want[i])
					return
				}
			}
		}()
	}
	wg.Wait()
}

// TestParseMemoBounded: the memo never holds more than maxMemoLines trees, nor a line longer
// than maxMemoLineBytes, and what it keeps shares no memory with the caller's text.
func TestParseMemoBounded(t *testing.T) {
	e := NewEnv()
	for i := range maxMemoLines + 10 {
		e.EvalLine(fmt.Sprintf("v%d = %d T", i, i), 1)
	}
	long := "s = " + repeat("1 T", " + ", 100)
	e.EvalLine(long, 2)
	buf := []byte("k = 7 T # in a larger text")
	text := string(buf)
	e.EvalLine(text[:7], 3)
	parsedLines.mu.RLock()
	defer parsedLines.mu.RUnlock()
	if len(parsedLines.m) > maxMemoLines {
		t.Errorf("the memo holds %d lines, more than %d", len(parsedLines.m), maxMemoLines)
	}
	if _, ok := parsedLines.m[lineKey{long, 2}]; ok {
		t.Errorf("a line of %d bytes was kept", len(long))
	}
	found := false
	for k := range parsedLines.m {
		if k.line == 3 && k.text == "k = 7 T" {
			found = true
			if unsafe.StringData(k.text) == unsafe.StringData(text) {
				t.Error("the memo's key is a slice of the caller's text")
			}
		}
	}
	if !found {
		t.Error("the short line was not kept")
	}
}
