package compute

import (
	"bytes"
	"cleave/internal/testutil"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/calc/transport"
)

// Truth of the synthetic sweep written into the test notebook.
const (
	trueN  = 3e15  // m^-2
	trueMu = 100.0 // m^2/(V s) = 1e6 cm^2/(V s)
)

// testNotebook copies testdata/nb into a temp dir with a .git folder and a synthetic sweep of
// device D1 (as-built width 48 um, probes A–B 250 um apart).
func testNotebook(t *testing.T) string {
	t.Helper()
	root := filepath.Join(t.TempDir(), "nb")
	if err := os.CopyFS(root, os.DirFS("testdata/nb")); err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(root, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	d, err := transport.Sweep(transport.SweepParams{Density: trueN, Mobility: trueMu, MassRatio: 0.067, QuantumLifetime: 1e-12,
		Temperature: 1.5, Squares: 250.0 / 48.0, BStart: -1, BEnd: 1, Points: 2001, Noise: 0.05, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := transport.WriteCSV(&b, d); err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Join(root, "cooldowns", "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(root, "cooldowns", "data", "sweep.csv"), b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return root
}

func mdFiles(t *testing.T, root string) map[string]string {
	t.Helper()
	out := map[string]string{}
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err == nil && strings.HasSuffix(p, ".md") {
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			rel, _ := filepath.Rel(root, p)
			out[filepath.ToSlash(rel)] = string(b)
		}
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// stripResults removes each result region and trailing blanks (the rewrite's own exact
// byte guarantees are tested in calcblock; here the point is the real engine's output).
func stripResults(s string) string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		if j := strings.Index(l, "#~"); j >= 0 {
			l = l[:j]
		}
		lines[i] = strings.TrimRight(l, " \t")
	}
	return strings.Join(lines, "\n")
}

// TestCalcGolden recomputes a small notebook with the real engine: the files after `calc` are
// the golden file; nothing outside result regions changes; a second run changes nothing; the
// failing lines (a dimension error, a path leaving the notebook) are reported and shown.
func TestCalcGolden(t *testing.T) {
	root := testNotebook(t)
	before := mdFiles(t, root)
	rep, err := runTree(root, CheckOptions{Write: true, NoCache: true})
	if err != nil {
		t.Fatal(err)
	}
	after := mdFiles(t, root)
	var names []string
	for n := range after {
		names = append(names, n)
	}
	sort.Strings(names)
	var g strings.Builder
	for _, n := range names {
		fmt.Fprintf(&g, "==> %s <==\n%s\n", n, after[n])
		if stripResults(after[n]) != stripResults(before[n]) {
			t.Errorf("%s: calc changed bytes outside result regions", n)
		}
	}
	testutil.GoldenString(t, filepath.Join("testdata", "calc.golden"), g.String())
	var errs []string
	for _, f := range rep.Files {
		for _, c := range f.Errors {
			errs = append(errs, fmt.Sprintf("%s:%d", c.Path, c.Line))
		}
	}
	want := []string{"cooldowns/C1.md:13", "cooldowns/C1.md:14"}
	if strings.Join(errs, " ") != strings.Join(want, " ") {
		t.Errorf("failing lines = %v, want %v", errs, want)
	}
	if !strings.Contains(after["cooldowns/C1.md"], "leaves the notebook") && !strings.Contains(after["cooldowns/C1.md"], "outside") {
		t.Errorf("the escaping data path is not refused:\n%s", after["cooldowns/C1.md"])
	}
	rep2, err := runTree(root, CheckOptions{Write: true, NoCache: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep2.Written) != 0 {
		t.Errorf("a second calc rewrote %v", rep2.Written)
	}
}

// TestRecoversSynthetic reads the results back through Eval: the Hall density and mobility
// of the synthetic sweep match the model's truth, and the device uses its as-built width.
func TestRecoversSynthetic(t *testing.T) {
	root := testNotebook(t)
	in := filepath.Join(root, "cooldowns", "C1.md")
	check := func(expr string, want, tol float64) {
		t.Helper()
		v, err := Eval(root, in, expr)
		if err != nil {
			t.Fatalf("%s: %v", expr, err)
		}
		q, ok := v.(calc.Quantity)
		if !ok {
			t.Fatalf("%s: not a quantity: %s", expr, calc.Display(v))
		}
		if got := q.Q.Value(); math.Abs(got/want-1) > tol {
			t.Errorf("%s = %g, want %g within %g", expr, got, want, tol)
		}
	}
	// Noise 0.05 Ohm over ~900 points: the Hall slope is good to ~1e-4; 0.5 % is generous.
	check("n", trueN, 5e-3)
	check("mu", trueMu, 5e-3)
	check("geometry.width", 48e-6, 1e-12) // as-built, not the drawn 50 um
	check("squares(\"A\", \"B\")", 250.0/48.0, 1e-12)
}

// TestCacheMissOnAncestorEdit: a warm run answers from the cache; editing the mask's probe
// position makes exactly the files that read the geometry stale.
func TestCacheMissOnAncestorEdit(t *testing.T) {
	root := testNotebook(t)
	if _, err := runTree(root, CheckOptions{Write: true}); err != nil {
		t.Fatal(err)
	}
	rep, err := runTree(root, CheckOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Evaluated != 0 {
		t.Errorf("warm run evaluated %d lines", rep.Evaluated)
	}
	mask := filepath.Join(root, "masks", "M1.md")
	b, _ := os.ReadFile(mask)
	if err := os.WriteFile(mask, bytes.Replace(b, []byte("position: 350 um"), []byte("position: 400 um"), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	rep, err = runTree(root, CheckOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var stale []string
	for _, f := range rep.Files {
		if len(f.Stale) > 0 {
			stale = append(stale, f.Path)
		}
	}
	want := "cooldowns/C1.md devices/D1.md masks/M1.md"
	if strings.Join(stale, " ") != want {
		t.Errorf("stale after the mask edit: %v, want %s", stale, want)
	}
}

// TestCacheFollowsIdentity: an entry that loses its id (becoming a note whose names resolve
// to nothing) and gets it back must not keep the errors cached in between.
func TestCacheFollowsIdentity(t *testing.T) {
	root := testNotebook(t)
	if _, err := runTree(root, CheckOptions{Write: true}); err != nil {
		t.Fatal(err)
	}
	first, err := runTree(root, CheckOptions{NoCache: true})
	if err != nil {
		t.Fatal(err)
	}
	mask := filepath.Join(root, "masks", "M1.md")
	good, _ := os.ReadFile(mask)
	if err := os.WriteFile(mask, bytes.Replace(good, []byte("id: M1"), []byte("idx: M1"), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	if rep, err := runTree(root, CheckOptions{}); err != nil || rep.OK() {
		t.Fatalf("check without the mask's id: err %v, ok %v; want failures", err, rep != nil && rep.OK())
	}
	if err := os.WriteFile(mask, good, 0o644); err != nil {
		t.Fatal(err)
	}
	rep, err := runTree(root, CheckOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// The test notebook has two lines that fail on purpose; exactly those remain.
	if got, want := strings.Join(rep.Lines(), "\n"), strings.Join(first.Lines(), "\n"); got != want {
		t.Errorf("check after restoring the id:\n%s\nwant what a cold check says:\n%s", got, want)
	}
}
