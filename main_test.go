package main

import (
	"bytes"
	"cleave/internal/testutil"
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// cleave runs the command line in-process and returns its exit code and output.
func cleave(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

// demo writes the demo notebook once per test binary run, into a folder TestMain removes.
var (
	demoDir, scratch string
	demoMu           sync.Mutex
)

func TestMain(m *testing.M) {
	// The test binary doubles as the cleave binary: for tests that need a process of their own
	// (to kill it, see cleaveProcess), and because git runs hooks and merge drivers as programs
	// (the `cleave` on the PATH of the tests is a script that runs this test binary).
	if os.Getenv(asCLI) == "1" {
		os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
	}
	flag.Parse()
	// git reads no configuration of the machine or the user in these tests.
	os.Setenv("GIT_CONFIG_NOSYSTEM", "1")
	os.Setenv("GIT_CONFIG_GLOBAL", os.DevNull)
	var err error
	scratch, err = os.MkdirTemp("", "cleave-test-")
	if err != nil {
		panic(err)
	}
	if err := cliOnPath(scratch); err != nil {
		panic(err)
	}
	code := m.Run()
	os.RemoveAll(scratch)
	os.Exit(code)
}

// cliOnPath puts a `cleave` script that runs this test binary first on the PATH.
func cliOnPath(dir string) error {
	self, err := os.Executable()
	if err != nil {
		return err
	}
	bin := filepath.Join(dir, "bin")
	if err := os.MkdirAll(bin, 0o755); err != nil {
		return err
	}
	script := fmt.Sprintf("#!/bin/sh\nCLEAVE_TEST_AS_CLI=1 exec '%s' \"$@\"\n", self)
	if err := os.WriteFile(filepath.Join(bin, "cleave"), []byte(script), 0o755); err != nil {
		return err
	}
	return os.Setenv("PATH", bin+string(os.PathListSeparator)+os.Getenv("PATH"))
}

func demoNotebook(t *testing.T) string {
	t.Helper()
	demoMu.Lock()
	defer demoMu.Unlock()
	if demoDir != "" {
		return demoDir
	}
	dir := filepath.Join(scratch, "nb")
	code, out, errs := cleave(t, "demo", dir)
	if code != 0 {
		t.Fatalf("cleave demo: exit %d\n%s\n%s", code, out, errs)
	}
	golden(t, "demo.golden", strings.ReplaceAll(out, dir, "$DIR"))
	demoDir = dir
	return dir
}

func golden(t *testing.T, name, got string) {
	t.Helper()
	testutil.GoldenString(t, filepath.Join("testdata", name), got)
}

// TestDemoEndToEnd runs the demo, then the commands a new user runs on it: the notebook is
// valid, every result current, and the git history is what the story tells.
func TestDemoEndToEnd(t *testing.T) {
	dir := demoNotebook(t)
	if code, out, errs := cleave(t, "-C", dir, "validate"); code != 0 {
		t.Fatalf("validate: exit %d\n%s%s", code, out, errs)
	}
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("check: exit %d\n%s%s", code, out, errs)
	}
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git binary not on PATH")
	}
	log := gitOut(t, dir, "log", "--format=%an|%s")
	if n := strings.Count(log, "\n"); n != 7 {
		t.Errorf("demo history has %d commits, want 7:\n%s", n, log)
	}
	// Every commit of the story passes the CI gate, as a colleague's pull request would.
	revs := strings.Fields(gitOut(t, dir, "rev-list", "HEAD"))
	for i, rev := range revs {
		wt := filepath.Join(scratch, fmt.Sprintf("wt%d", i))
		gitOut(t, dir, "worktree", "add", "--detach", wt, rev)
		if code, out, errs := cleave(t, "-C", wt, "check"); code != 0 {
			t.Errorf("commit %s of the demo fails check (exit %d):\n%s%s", rev[:8], code, out, errs)
		}
		gitOut(t, dir, "worktree", "remove", "--force", wt)
	}
	if !strings.Contains(log, "HB100: probe 4 sits at 750 um") {
		t.Errorf("the mask correction commit is missing:\n%s", log)
	}
	if st := gitOut(t, dir, "status", "--porcelain"); st != "" {
		t.Errorf("the demo left uncommitted changes:\n%s", st)
	}
	// The mask correction changed the mobility line of CD24-001 and nothing else in that file.
	diff := gitOut(t, dir, "show", "--format=", "-U0", "HEAD~3", "--", "cooldowns/CD24-001.md")
	for _, l := range strings.Split(diff, "\n") {
		if (strings.HasPrefix(l, "+") || strings.HasPrefix(l, "-")) && !strings.HasPrefix(l, "+++") && !strings.HasPrefix(l, "---") && !strings.Contains(l, "#~") {
			t.Errorf("the correction changed a line outside the result regions: %q", l)
		}
	}
	if !strings.Contains(diff, "mu = mobility(rho_xx, n_H)") {
		t.Errorf("the mobility result did not change with the probe spacing:\n%s", diff)
	}
}

// TestCheckAfterEdit edits a geometry the way a colleague would: check fails and lists
// old → new, calc brings the results up to date, check passes again.
func TestCheckAfterEdit(t *testing.T) {
	src := demoNotebook(t)
	dir := filepath.Join(t.TempDir(), "copy")
	if err := os.CopyFS(dir, os.DirFS(src)); err != nil {
		t.Fatal(err)
	}
	mask := filepath.Join(dir, "masks", "HB100.md")
	b, err := os.ReadFile(mask)
	if err != nil {
		t.Fatal(err)
	}
	edited := strings.Replace(string(b), "width: 100 um", "width: 50 um", 1)
	if err := os.WriteFile(mask, []byte(edited), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := cleave(t, "-C", dir, "check")
	if code != 1 {
		t.Fatalf("check after editing the mask width: exit %d, want 1\n%s", code, out)
	}
	// Drawn 100 um → 50 um halves... only where the as-built width does not override it.
	if !strings.Contains(out, "masks/HB100.md:") || !strings.Contains(out, "5.0000 → 10.000") {
		t.Errorf("check does not list the mask's squares old → new:\n%s", out)
	}
	if strings.Contains(out, "devices/W24-031-A-HB1.md") {
		t.Errorf("the device with an as-built width must not depend on the drawn width:\n%s", out)
	}
	if code, out, errs := cleave(t, "-C", dir, "calc"); code != 0 {
		t.Fatalf("calc: exit %d\n%s%s", code, out, errs)
	}
	if code, out, _ := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("check after calc: exit %d\n%s", code, out)
	}
	after, _ := os.ReadFile(mask)
	if stripResults(string(after)) != stripResults(edited) {
		t.Errorf("calc changed bytes outside result regions of %s", mask)
	}
}

// stripResults removes every result region (from #~ to the end of the line).
func stripResults(s string) string {
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		if j := strings.Index(l, "#~"); j >= 0 {
			lines[i] = l[:j]
		}
	}
	return strings.Join(lines, "\n")
}

func TestEvalJSON(t *testing.T) {
	tests := []struct {
		name, expr string
		value, tol float64
		unit       string
		unc        bool
	}{
		// l_B(1 T) = 25.6556 nm from CODATA 2018 hbar and e ([src:W1] in calc/SOURCES.md).
		{"magnetic length", "magnetic_length(1 T)", 25.6556e-9, 1e-4, "m", false},
		// Row 3: hbar omega_c at 1 T for m* = 0.067 m_e is 1.72788 meV.
		{"cyclotron energy", "cyclotron_energy(1 T, 0.067 m_e)", 1.72788e-3 * 1.602176634e-19, 1e-4, "kg m^2 s^-2", false},
		// Row 19: R_K/2 = 12906.403730 Ohm (exact in SI 2019).
		{"hall resistance", "hall_resistance(2)", 12906.403730, 1e-9, "kg m^2 s^-3 A^-2", false},
		// An uncertain input propagates: l_B ∝ B^-1/2.
		{"uncertain", "magnetic_length(1 T ± 0.01 T)", 25.6556e-9, 1e-4, "m", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := cleave(t, "eval", "--json", tc.expr)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			var r struct {
				Value       *float64 `json:"value"`
				Unit        string   `json:"unit"`
				Display     string   `json:"display"`
				Uncertainty *float64 `json:"uncertainty"`
			}
			if err := json.Unmarshal([]byte(out), &r); err != nil {
				t.Fatalf("not JSON: %q: %v", out, err)
			}
			if r.Value == nil || abs(*r.Value/tc.value-1) > tc.tol {
				t.Errorf("value = %v, want %g", r.Value, tc.value)
			}
			if r.Unit != tc.unit {
				t.Errorf("unit = %q, want %q", r.Unit, tc.unit)
			}
			if (r.Uncertainty != nil) != tc.unc {
				t.Errorf("uncertainty = %v, want present=%v", r.Uncertainty, tc.unc)
			}
			if r.Display == "" {
				t.Error("no display text")
			}
		})
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

func TestUsageErrors(t *testing.T) {
	for _, args := range [][]string{
		{},
		{"frobnicate"},
		{"new", "wafer"},
		{"new", "wafer", "W1", "extra"},
		{"new", "gizmo", "X1"},
		{"eval"},
		{"tree", "a", "b"},
		{"validate", "extra"},
		{"version", "extra"},
		{"init", "a", "b"},
		{"demo", "a", "b"},
		{"calc", "--bogus"},
		{"check", "--bogus"},
		{"eval", "--in"},
		{"new", "piece", "P1", "--from"},
		{"tree", "--bogus"},
	} {
		code, _, errs := cleave(t, args...)
		if code != 2 {
			t.Errorf("cleave %v: exit %d, want 2", args, code)
		}
		if !strings.Contains(errs, "usage: cleave") {
			t.Errorf("cleave %v: no usage line on stderr: %q", args, errs)
		}
	}
	if code, _, errs := cleave(t, "eval", "3 T + 2 m"); code != 1 || !strings.Contains(errs, "1:") {
		t.Errorf("a dimension error: exit %d, stderr %q; want 1 and a position", code, errs)
	}
}

// TestInitNewValidate creates a notebook from nothing with the commands a new user types.
func TestInitNewValidate(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "lab")
	if code, out, errs := cleave(t, "init", dir); code != 0 {
		t.Fatalf("init: %d %s %s", code, out, errs)
	}
	steps := [][]string{
		{"new", "wafer", "W1"},
		{"new", "piece", "W1-a", "--from", "W1"},
		{"new", "mask", "M1"},
		{"new", "process", "P1", "--from", "W1-a"},
		{"new", "device", "W1-a-1", "--from", "W1-a"},
		{"new", "cooldown", "C1", "--from", "W1-a-1"},
	}
	for _, s := range steps {
		if code, out, errs := cleave(t, append([]string{"-C", dir}, s...)...); code != 0 {
			t.Fatalf("%v: exit %d\n%s%s", s, code, out, errs)
		}
	}
	// A device needs its mask: fill the link the template leaves empty.
	dev := filepath.Join(dir, "devices", "W1-a-1.md")
	b, _ := os.ReadFile(dev)
	if err := os.WriteFile(dev, []byte(strings.Replace(string(b), "mask:", "mask: M1", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, out, errs := cleave(t, "-C", dir, "validate"); code != 0 {
		t.Fatalf("validate of a fresh notebook: exit %d\n%s%s", code, out, errs)
	}
	// The templates' live calc lines (expected density of the example stack, squares of the
	// mask) evaluate on fresh entries: calc writes them, check then passes.
	if code, out, errs := cleave(t, "-C", dir, "calc"); code != 0 {
		t.Fatalf("calc of a fresh notebook: exit %d\n%s%s", code, out, errs)
	}
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("check of a fresh notebook: exit %d\n%s%s", code, out, errs)
	}
	w, _ := os.ReadFile(filepath.Join(dir, "wafers", "W1.md"))
	if !strings.Contains(string(w), "n_expected = sp.n  #~ ") {
		t.Errorf("the wafer template's expected density was not computed:\n%s", w)
	}
	// Refusals: an existing id, a missing parent, a parent of the wrong kind.
	for _, s := range [][]string{
		{"new", "wafer", "W1"},
		{"new", "piece", "W9-a", "--from", "W9"},
		{"new", "device", "D2", "--from", "M1"},
	} {
		if code, _, errs := cleave(t, append([]string{"-C", dir}, s...)...); code != 1 || errs == "" {
			t.Errorf("%v: exit %d (%q), want 1 with a reason", s, code, errs)
		}
	}
	if code, out, _ := cleave(t, "-C", dir, "tree", "W1"); code != 0 || !strings.Contains(out, "C1") {
		t.Errorf("tree W1: exit %d, missing the cooldown:\n%s", code, out)
	}
	if code, _, errs := cleave(t, "-C", dir, "tree", "W9"); code != 1 || strings.Count(errs, "tree") != 1 || !strings.Contains(errs, `"W9"`) {
		t.Errorf("tree of an unknown id: exit %d, stderr %q; want 1 and one mention of the command", code, errs)
	}
	// A piece or a device without --from would fail validation at once: new refuses it.
	if code, _, errs := cleave(t, "-C", dir, "new", "device", "D3"); code != 1 || !strings.Contains(errs, "--from") {
		t.Errorf("new device without --from: exit %d (%q), want 1 and a hint", code, errs)
	}
	// One failing line is one problem: it is stale and an error, listed once and counted once.
	m := filepath.Join(dir, "masks", "M1.md")
	mb, _ := os.ReadFile(m)
	broken := strings.Replace(string(mb), "```cleave\n", "```cleave\nbad = 1 T + 1 K\n", 1)
	if broken == string(mb) {
		t.Fatal("the mask template has no calc block to break")
	}
	if err := os.WriteFile(m, []byte(broken), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, cmd := range []string{"check", "calc"} {
		code, out, errs := cleave(t, "-C", dir, cmd)
		if code != 1 || strings.Count(out, "error:") != 1 || !strings.Contains(out, "masks/M1.md:") || !strings.Contains(errs, " 1 problem(s)") {
			t.Errorf("%s with one failing line: exit %d, want 1, one line and a count of 1:\n%s%s", cmd, code, out, errs)
		}
	}
}

func gitOut(t *testing.T, dir string, args ...string) string {
	t.Helper()
	cmd := exec.Command("git", args...)
	cmd.Dir = dir
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("git %v: %v\n%s", args, err, out)
	}
	return string(out)
}

// TestEvalCSV exports data sets: the band profile of a demo wafer (depth, band edge, density,
// |psi|^2 per subband) and a symmetrised sweep, in the format data("...") reads back.
func TestEvalCSV(t *testing.T) {
	dir := demoNotebook(t)
	code, out, errs := cleave(t, "-C", dir, "eval", "--in", filepath.Join(dir, "wafers", "W24-032.md"), "--csv", "sp.profile")
	if code != 0 {
		t.Fatalf("eval --csv sp.profile: exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if !strings.HasPrefix(lines[0], "z (nm),Ec (eV),n (cm^-3),psi2_0 (nm^-1)") || len(lines) < 500 {
		t.Errorf("profile CSV: header %q, %d lines", lines[0], len(lines))
	}
	// The surface node sits at the pinning barrier, 0.7 eV above E_F (the solver's default).
	if !strings.HasPrefix(lines[1], "0,0.7,") {
		t.Errorf("first profile row %q, want z = 0 at E_c = 0.7 eV", lines[1])
	}
	code, out, _ = cleave(t, "-C", dir, "eval", "--in", filepath.Join(dir, "cooldowns", "CD24-001.md"), "--csv", "d")
	if code != 0 || !strings.Contains(out, "B (T),Rxx (Ohm),Rxy (Ohm)") {
		t.Errorf("eval --csv d: exit %d, output starts %q", code, out[:min(len(out), 120)])
	}
	if code, _, errs := cleave(t, "eval", "--csv", "3 T"); code != 1 || !strings.Contains(errs, "needs a data set") {
		t.Errorf("eval --csv of a quantity: exit %d, %q", code, errs)
	}
}

// TestNewCooldownStalesScorecard: a cooldown added below a wafer makes the wafer's scorecard
// stale, even though no byte of the wafer changed (the cache keys on which cooldowns count).
func TestNewCooldownStalesScorecard(t *testing.T) {
	src := demoNotebook(t)
	dir := filepath.Join(t.TempDir(), "copy")
	if err := os.CopyFS(dir, os.DirFS(src)); err != nil {
		t.Fatal(err)
	}
	if code, out, _ := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("check of the copied demo: exit %d\n%s", code, out)
	}
	b, err := os.ReadFile(filepath.Join(dir, "cooldowns", "CD24-004.md"))
	if err != nil {
		t.Fatal(err)
	}
	nc := strings.Replace(string(b), "id: CD24-004", "id: CD24-005", 1)
	nc = strings.Replace(nc, "illumination: none", "illumination: {source: red LED, current: 10 uA, duration: 60 s, temperature: 4.2 K, gate_bias: 0 V}", 1)
	if err := os.WriteFile(filepath.Join(dir, "cooldowns", "CD24-005.md"), []byte(nc), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := cleave(t, "-C", dir, "check")
	if code != 1 || !strings.Contains(out, "wafers/W24-032.md:") || !strings.Contains(out, "illuminated (CD24-005") {
		t.Errorf("check after adding CD24-005: exit %d, want the W24-032 scorecard stale:\n%s", code, out)
	}
	if strings.Contains(out, "wafers/W24-031.md:") {
		t.Errorf("W24-031's scorecard changed, but CD24-005 measured a W24-032 device:\n%s", out)
	}
}
