package testutil

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"
)

// recorder is a testing.TB that keeps what a helper reports instead of failing.
type recorder struct {
	testing.TB
	errors []string
	fatal  bool
}

func (r *recorder) Helper() {}
func (r *recorder) Errorf(format string, args ...any) {
	r.errors = append(r.errors, fmt.Sprintf(format, args...))
}
func (r *recorder) Fatalf(format string, args ...any) {
	r.errors = append(r.errors, fmt.Sprintf(format, args...))
	r.fatal = true
	runtime.Goexit()
}
func (r *recorder) Fatal(args ...any) { r.Fatalf("%s", fmt.Sprint(args...)) }

// run calls f with a recorder in its own goroutine, so that a Fatal ends only f.
func run(f func(t testing.TB)) *recorder {
	r := &recorder{}
	done := make(chan struct{})
	go func() {
		defer close(done)
		f(r)
	}()
	<-done
	return r
}

func TestFirstDiff(t *testing.T) {
	tests := []struct {
		got, want, diff string
	}{
		{"a\nb\n", "a\nb\n", ""},
		{"a\nb\n", "a\nc\n", "line 2:\n got: \"b\"\nwant: \"c\""},
		{"a\nb\r\n", "a\nb\n", "line 2:\n got: \"b\\r\"\nwant: \"b\""},
		{"a\n", "a\nb\n", "line 2:\n got: \"\"\nwant: \"b\""},
		{"a\nb\nc", "a\nb\n", "line 3:\n got: \"c\"\nwant: \"\""},
		{"a\nb\n", "a\nb", "line 3:\n got: \"\"\nwant: (end of file)"},
		{"a", "a\n", "line 2:\n got: (end of output)\nwant: \"\""},
	}
	for _, tc := range tests {
		if got := FirstDiff([]byte(tc.got), []byte(tc.want)); got != tc.diff {
			t.Errorf("FirstDiff(%q, %q) = %q, want %q", tc.got, tc.want, got, tc.diff)
		}
	}
}

func TestGolden(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "x.golden")
	if err := os.WriteFile(path, []byte("one\ntwo\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if r := run(func(tb testing.TB) { Golden(tb, path, []byte("one\ntwo\n")) }); len(r.errors) != 0 {
		t.Errorf("equal output reported %q", r.errors)
	}
	r := run(func(tb testing.TB) { GoldenString(tb, path, "one\nthree\n") })
	if len(r.errors) != 1 || r.fatal {
		t.Fatalf("a difference gave %q (fatal %v), want one error", r.errors, r.fatal)
	}
	for _, part := range []string{path, "line 2:", `got: "three"`, `want: "two"`, "-update"} {
		if !strings.Contains(r.errors[0], part) {
			t.Errorf("message %q lacks %q", r.errors[0], part)
		}
	}
	r = run(func(tb testing.TB) { Golden(tb, filepath.Join(dir, "none.golden"), nil) })
	if !r.fatal || !strings.Contains(r.errors[0], "does not exist") {
		t.Errorf("a missing golden file gave %q (fatal %v)", r.errors, r.fatal)
	}

	// With -update the file is rewritten (its folder made) and the comparison passes.
	*update = true
	defer func() { *update = false }()
	newPath := filepath.Join(dir, "sub", "y.golden")
	if r := run(func(tb testing.TB) { GoldenString(tb, newPath, "fresh\n") }); len(r.errors) != 0 {
		t.Errorf("-update reported %q", r.errors)
	}
	if b, err := os.ReadFile(newPath); err != nil || string(b) != "fresh\n" {
		t.Errorf("-update wrote %q, %v", b, err)
	}
	if !Update() {
		t.Error("Update() is false while -update is set")
	}
}

func TestTolerances(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		got, want, abs, rel float64
		within, withinRel   bool
	}{
		{1.0001, 1, 0, 1e-4, true, true},
		{1.0002, 1, 0, 1e-4, false, false},
		{-4, -4, 0, 0, true, true},
		{1e-13, 0, 1e-12, 1e-4, true, false},         // an absolute tolerance is what meets a want of 0
		{1.5e-12, 1.6e-12, 1e-12, 1e-3, true, false}, // the pitfall: abs 1e-12 s passes 6 % off
		{nan, nan, 0, 0, true, true},
		{1, nan, 1, 1, false, false},
		{nan, 1, 1, 1, false, false},
		{math.Inf(1), math.Inf(1), 0, 0, true, true},
	}
	for _, tc := range tests {
		if got := Within(tc.got, tc.want, tc.abs, tc.rel); got != tc.within {
			t.Errorf("Within(%g, %g, %g, %g) = %v", tc.got, tc.want, tc.abs, tc.rel, got)
		}
		if got := WithinRel(tc.got, tc.want, tc.rel); got != tc.withinRel {
			t.Errorf("WithinRel(%g, %g, %g) = %v", tc.got, tc.want, tc.rel, got)
		}
	}
	if got := RelDiff(1.1, 1); math.Abs(got-0.1) > 1e-15 {
		t.Errorf("RelDiff(1.1, 1) = %g", got)
	}
	if got := RelDiff(-3, 0); got != 3 {
		t.Errorf("RelDiff(-3, 0) = %g, want 3", got)
	}

	r := run(func(tb testing.TB) {
		CheckRel(tb, "n", 2.6e15, 2.6e15, 0)
		CheckWithin(tb, "offset", 1e-7, 0, 1e-6, 0)
	})
	if len(r.errors) != 0 {
		t.Errorf("agreeing values reported %q", r.errors)
	}
	r = run(func(tb testing.TB) {
		if CheckRel(tb, "hall.n", 2.7e15, 2.6e15, 0.01) {
			tb.Errorf("CheckRel returned true")
		}
	})
	if len(r.errors) != 1 || !strings.Contains(r.errors[0], "hall.n = 2.7e+15, want 2.6e+15 (relative difference 0.0385 > 0.01)") {
		t.Errorf("CheckRel reported %q", r.errors)
	}
	r = run(func(tb testing.TB) { CheckWithin(tb, "R_xy(0)", 0.5, 0, 0.1, 0) })
	if len(r.errors) != 1 || !strings.Contains(r.errors[0], "R_xy(0) = 0.5, want 0") {
		t.Errorf("CheckWithin reported %q", r.errors)
	}
}

// TestRandomLines: every document holds 1 to max lines of the pool, and about one in four
// lacks its final newline.
func TestRandomLines(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	pool := []string{"a", "b c", " "}
	open := 0
	const n = 4000
	for range n {
		doc := RandomLines(r, pool, 5)
		if !strings.HasSuffix(doc, "\n") {
			open++
			doc += "\n"
		}
		lines := strings.Split(strings.TrimSuffix(doc, "\n"), "\n")
		if len(lines) < 1 || len(lines) > 5 {
			t.Fatalf("%q: %d lines, want 1 to 5", doc, len(lines))
		}
		for _, l := range lines {
			if !slices.Contains(pool, l) {
				t.Fatalf("%q: line %q is not from the pool", doc, l)
			}
		}
	}
	if open < n/5 || open > n/3 {
		t.Errorf("%d of %d documents lack the final newline, want about a quarter", open, n)
	}
}
