// Package testutil holds the helpers cleave's tests share: golden files with one -update
// flag, and comparisons of floating-point numbers within a tolerance.
//
// # Golden files
//
// A golden file (by convention testdata/NAME.golden) holds the exact output a test expects.
// [Golden] compares a test's output with it and, when the tests run with -update
// (`go test ./PKG -update`), first rewrites it; read the diff before committing. The flag is
// registered once, here, for every test binary that imports this package, so a package that
// uses testutil must not define its own -update flag. [Update] reports the flag for tests
// that write several files or other artefacts.
//
// # Tolerances
//
// [Within] and [WithinRel] are predicates over gonum's floats/scalar comparisons
// (EqualWithinAbsOrRel, EqualWithinRel): a relative tolerance is taken of the larger
// magnitude of the two numbers, an absolute one is in the numbers' own unit, and a want of
// NaN is met only by NaN. [CheckWithin] and [CheckRel] report a failure through t.Errorf,
// naming the quantity and its relative difference ([RelDiff]).
//
// # Random documents
//
// [RandomLines] draws documents from a pool of lines, for tests that compare a fast path with
// the parser it shadows.
package testutil

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io/fs"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata with the current output")

// Update reports whether the tests run with -update.
func Update() bool { return *update }

// Golden compares got with the file at path (relative to the package's folder). With
// -update it first writes got there, creating the folder if needed. A difference fails the
// test with the file's name, the first line that differs and the line counts.
func Golden(t testing.TB, path string, got []byte) {
	t.Helper()
	if *update {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("golden file %s does not exist (run go test with -update to create it, then read it)", path)
	}
	if err != nil {
		t.Fatal(err)
	}
	if d := FirstDiff(got, want); d != "" {
		t.Errorf("output differs from %s at %s\n(got %d lines, want %d; if the change is intended, run go test with -update and read the diff)",
			path, d, lineCount(got), lineCount(want))
	}
}

// GoldenString is Golden for text.
func GoldenString(t testing.TB, path, got string) {
	t.Helper()
	Golden(t, path, []byte(got))
}

// FirstDiff describes the first line where got and want differ ("line 3:\n got: ...\nwant:
// ..."), with both lines quoted so that a carriage return or a trailing space shows, or
// returns "" when they are equal byte for byte.
func FirstDiff(got, want []byte) string {
	if bytes.Equal(got, want) {
		return ""
	}
	g, w := strings.Split(string(got), "\n"), strings.Split(string(want), "\n")
	for i := 0; i < max(len(g), len(w)); i++ {
		var gl, wl string
		gok, wok := i < len(g), i < len(w)
		if gok {
			gl = g[i]
		}
		if wok {
			wl = w[i]
		}
		switch {
		case gl == wl && gok == wok:
			continue
		case !gok:
			return fmt.Sprintf("line %d:\n got: (end of output)\nwant: %q", i+1, wl)
		case !wok:
			return fmt.Sprintf("line %d:\n got: %q\nwant: (end of file)", i+1, gl)
		}
		return fmt.Sprintf("line %d:\n got: %q\nwant: %q", i+1, gl, wl)
	}
	return "an unknown place" // not reached: unequal bytes split into unequal lines
}

func lineCount(b []byte) int {
	n := bytes.Count(b, []byte("\n"))
	if len(b) > 0 && b[len(b)-1] != '\n' {
		n++
	}
	return n
}

// RelDiff is |got − want|/|want|, or |got| when want is 0: the relative difference a
// failure message prints.
func RelDiff(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// Within reports whether got agrees with want within the absolute tolerance abs or the
// relative tolerance rel (scalar.EqualWithinAbsOrRel). A want of NaN is met only by NaN.
// Choose abs in the numbers' own unit: an absolute tolerance of 1e-4 passes any two
// lifetimes in seconds.
func Within(got, want, abs, rel float64) bool {
	if math.IsNaN(want) || math.IsNaN(got) {
		return scalar.Same(got, want)
	}
	return scalar.EqualWithinAbsOrRel(got, want, abs, rel)
}

// WithinRel reports whether got agrees with want within the relative tolerance rel, taken
// of the larger magnitude (scalar.EqualWithinRel); equal numbers always agree, so rel = 0
// asks for equality. A want of NaN is met only by NaN.
func WithinRel(got, want, rel float64) bool {
	if math.IsNaN(want) || math.IsNaN(got) {
		return scalar.Same(got, want)
	}
	return scalar.EqualWithinRel(got, want, rel)
}

// CheckWithin reports through t.Errorf, naming what, unless Within(got, want, abs, rel);
// it returns whether they agreed.
func CheckWithin(t testing.TB, what string, got, want, abs, rel float64) bool {
	t.Helper()
	if Within(got, want, abs, rel) {
		return true
	}
	t.Errorf("%s = %.10g, want %.10g (difference %.3g, relative %.3g; tolerance %g absolute or %g relative)",
		what, got, want, got-want, RelDiff(got, want), abs, rel)
	return false
}

// CheckRel reports through t.Errorf, naming what, unless WithinRel(got, want, rel); it
// returns whether they agreed.
func CheckRel(t testing.TB, what string, got, want, rel float64) bool {
	t.Helper()
	if WithinRel(got, want, rel) {
		return true
	}
	t.Errorf("%s = %.10g, want %.10g (relative difference %.3g > %g)", what, got, want, RelDiff(got, want), rel)
	return false
}

// RandomLines joins 1 to max lines drawn from pool, each ended by '\n', except that one
// document in four loses its last '\n'.
func RandomLines(r *rand.Rand, pool []string, max int) string {
	var b strings.Builder
	for range 1 + r.IntN(max) {
		b.WriteString(pool[r.IntN(len(pool))])
		b.WriteByte('\n')
	}
	doc := b.String()
	if r.IntN(4) == 0 {
		doc = strings.TrimSuffix(doc, "\n")
	}
	return doc
}
