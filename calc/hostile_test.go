package calc

import (
	"errors"
	"math"
	"runtime/debug"
	"strings"
	"testing"

	"cleave/calc/quantity"
)

// repeat joins n copies of term with sep.
func repeat(term, sep string, n int) string {
	return strings.TrimSuffix(strings.Repeat(term+sep, n), sep)
}

// TestHostileLines: lines far beyond any real calc line (issue 13: 300,000 terms ended in a
// stack overflow after gigabytes) are positioned errors on their line; the sentinel says why.
func TestHostileLines(t *testing.T) {
	tests := []struct {
		name     string
		line     string
		col      int
		sentinel error
	}{
		{"300,000 sums", "x = " + repeat("1 T", " + ", 300_000), 1 + len([]rune("x = " + repeat("1 T", " + ", 300_000))[:MaxLineBytes]), ErrTooLarge},
		{"300,000 factors", "y = " + repeat("2", "*", 300_000), MaxLineBytes + 1, ErrTooLarge},
		{"a million field names", "a" + strings.Repeat(".a", 500_000), MaxLineBytes + 1, ErrTooLarge},
		// Within the length limit but with more tokens than allowed: the column of the first
		// token past the limit (each "1+" is two tokens; token 4097 is the "1" at column 4097).
		{"too many tokens", repeat("1", "+", 3000), MaxTokens + 1, ErrTooLarge},
		// Non-ASCII text before the limit: the column counts characters, not bytes.
		{"long line of µ", "x = " + strings.Repeat("µ", MaxLineBytes), 4 + (MaxLineBytes-4)/2 + 1, ErrTooLarge},
		{"deep parentheses", strings.Repeat("(", 300) + "1" + strings.Repeat(")", 300), maxDepth + 1, ErrTooDeep},
		{"deep unary minus", strings.Repeat("-", 300) + "1", maxDepth, ErrTooDeep},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := NewEnv().EvalLine(tc.line, 7)
			var ce *Error
			if !errors.As(r.Err, &ce) {
				t.Fatalf("err = %v, want *Error", r.Err)
			}
			if !errors.Is(r.Err, tc.sentinel) {
				t.Errorf("err %v is not %v", r.Err, tc.sentinel)
			}
			if ce.Line != 7 || ce.Col != tc.col {
				t.Errorf("at 7:%d, want 7:%d (%v)", ce.Col, tc.col, ce.Msg)
			}
			if len(r.Display) > 400 {
				t.Errorf("the error is %d bytes long; it must not repeat the line", len(r.Display))
			}
		})
	}
}

// TestLongChainsWithoutDeepRecursion: the longest lines the limits allow evaluate to the right
// value with a small stack. The evaluator walks runs of + - * / and of .field in loops, so its
// recursion is bounded by the nesting limit, not by the length of the line. With the stack
// capped at 256 KiB a recursive walk of a 2048-term chain would exceed it (and crash the test).
func TestLongChainsWithoutDeepRecursion(t *testing.T) {
	old := debug.SetMaxStack(256 << 10)
	defer debug.SetMaxStack(old)

	terms := MaxTokens / 2 // "1 T" is one token, "+" another
	r := NewEnv().EvalLine(repeat("1 T", " + ", terms), 1)
	if r.Err != nil {
		t.Fatalf("sum of %d terms: %v", terms, r.Err)
	}
	if q := r.Value.(Quantity).Q; q.Value() != float64(terms) || q.Dim() != quantity.MustUnit("T").D {
		t.Errorf("sum of %d terms of 1 T = %v, want %d T", terms, r.Display, terms)
	}
	// Mixed operators keep their precedence and left-to-right order: 1 - 2*3/6 + … .
	r = NewEnv().EvalLine(repeat("1 - 2*3/6", " + ", 400), 1)
	if r.Err != nil || r.Value.(Quantity).Q.Value() != 0 {
		t.Errorf("400 × (1 - 2*3/6) = %v, %v; want 0", r.Display, r.Err)
	}
	// Uncertain terms: x - x + x - x … is exactly 0 ± 0, the correlations carried down the chain.
	e := NewEnv()
	e.EvalLine("x = 1.0 ± 0.1 T", 1)
	r = e.EvalLine(repeat("x - x", " + ", 1000), 2)
	if r.Err != nil || r.Value.(Quantity).Q.Value() != 0 || r.Value.(Quantity).Q.Uncertainty() != 0 {
		t.Errorf("1000 × (x - x) = %v, %v; want exactly 0 ± 0", r.Display, r.Err)
	}
	// A long chain of field names: a record whose field a is itself.
	rec := &Record{}
	rec.Fields = []RecordField{{Name: "a", Value: rec}, {Name: "b", Value: Q(quantity.Scalar(3))}}
	e = NewEnv()
	e.Set("r", rec)
	r = e.EvalLine("r"+strings.Repeat(".a", 2000)+".b", 1)
	if r.Err != nil || r.Display != "3.0000" {
		t.Errorf("r.a.a….b = %q, %v; want 3.0000", r.Display, r.Err)
	}
	// Errors inside a chain keep their operand's position.
	r = NewEnv().EvalLine("1 T + 2 T + 3 K + 4 T", 1)
	var ce *Error
	if !errors.As(r.Err, &ce) || ce.Col != 11 || !errors.Is(r.Err, quantity.ErrDimMismatch) {
		t.Errorf("1 T + 2 T + 3 K: %v, want a dimension error at column 11", r.Err)
	}
}

// TestNonFinite: a result that overflows or underflows is an error at the operation that made
// it (issue 13: `1e308 T * 10` was written as `Inf T`), and a non-finite value read from
// outside is refused at the line.
func TestNonFinite(t *testing.T) {
	tests := []struct {
		line string
		col  int
		msg  string
	}{
		{"1e308 T * 10", 9, "overflows"},
		{"x = 1e308 T + 1e308 T", 13, "overflows"},
		{"1e-300 m * 1e-300 m", 10, "underflows to zero"},
		{"1e-300 / 1e300", 8, "underflows to zero"},
		{"10^400", 3, "overflows"},
		{"0.5^5000", 4, "underflows to zero"},
		{"0^-1", 2, "division by zero"},
		{"(1 ± 1e300) * 1e300 * 1e10", 13, "overflows"},
		{"inf_field", 1, "not a finite number"},
	}
	for _, tc := range tests {
		e := NewEnv()
		e.Set("inf_field", Q(quantity.Uncertain(1, math.Inf(1), quantity.Dimensionless)))
		r := e.EvalLine(tc.line, 2)
		var ce *Error
		if !errors.As(r.Err, &ce) || !errors.Is(r.Err, ErrNotFinite) {
			t.Errorf("%q: err = %v, want ErrNotFinite", tc.line, r.Err)
			continue
		}
		if ce.Line != 2 || ce.Col != tc.col || !strings.Contains(ce.Msg, tc.msg) {
			t.Errorf("%q: %v, want 2:%d …%s…", tc.line, ce, tc.col, tc.msg)
		}
	}
	// Zero is no underflow: a zero operand, or a difference that cancels.
	for _, line := range []string{"0 * 1e-300", "1e-300 - 1e-300", "0 / 5", "0^2", "1e-300 * 1e-20"} {
		if r := NewEnv().EvalLine(line, 1); r.Err != nil {
			t.Errorf("%q: %v", line, r.Err)
		}
	}
	// A subnormal result is kept and shown with its digits.
	if r := NewEnv().EvalLine("1e-300 * 1e-10", 1); r.Display != "1.0000e-310" {
		t.Errorf("1e-300 * 1e-10 shows %q, want 1.0000e-310", r.Display)
	}
	if _, err := NewEnv().Eval("1e308 * 10"); !errors.Is(err, ErrNotFinite) {
		t.Errorf("Eval: %v, want ErrNotFinite", err)
	}
}
