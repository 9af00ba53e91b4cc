package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// appendBlock adds a calc block at the end of an entry.
func appendBlock(t *testing.T, file, block string) {
	t.Helper()
	b, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(file, append(b, []byte("\n```cleave\n"+block+"```\n")...), 0o644); err != nil {
		t.Fatal(err)
	}
}

// A plot(...) line: `calc` writes the SVG next to the entry and names it in the result;
// `check` passes; a plot file deleted or edited by hand fails `check` until `calc` draws it
// again; a plot line removed takes its file with it.
func TestPlotLines(t *testing.T) {
	dir := copyDemo(t)
	cd := filepath.Join(dir, "cooldowns", "CD24-001.md")
	appendBlock(t, cd, "p_rxx = plot(d, \"rxx\", n = n_SdH)\nplot(sdh, \"spec2\")\n")
	code, out, errs := cleave(t, "-C", dir, "calc")
	if code != 0 {
		t.Fatalf("calc: exit %d\n%s\n%s", code, out, errs)
	}
	for _, p := range []string{"cooldowns/plots/CD24-001/rxx.svg", "cooldowns/plots/CD24-001/spec2.svg"} {
		if !strings.Contains(out, "drew "+p) {
			t.Errorf("calc did not report drawing %s:\n%s", p, out)
		}
		b, err := os.ReadFile(filepath.Join(dir, filepath.FromSlash(p)))
		if err != nil || !strings.Contains(string(b), "</svg>") {
			t.Fatalf("%s: %v", p, err)
		}
	}
	text, _ := os.ReadFile(cd)
	if !strings.Contains(string(text), "#~ plot plots/CD24-001/rxx.svg sha256:") {
		t.Fatalf("result region does not name the plot:\n%s", text)
	}
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("check after calc: exit %d\n%s\n%s", code, out, errs)
	}
	svg := filepath.Join(dir, "cooldowns", "plots", "CD24-001", "rxx.svg")
	os.Remove(svg)
	code, out, _ = cleave(t, "-C", dir, "check")
	if code != 1 || !strings.Contains(out, "cooldowns/CD24-001.md:") || !strings.Contains(out, "plot cooldowns/plots/CD24-001/rxx.svg is missing") {
		t.Fatalf("check with a plot missing: exit %d\n%s", code, out)
	}
	if code, out, _ := cleave(t, "-C", dir, "calc"); code != 0 || !strings.Contains(out, "drew cooldowns/plots/CD24-001/rxx.svg") {
		t.Fatalf("calc did not draw the missing plot: %d\n%s", code, out)
	}
	if err := os.WriteFile(svg, []byte("<svg><script>alert(1)</script></svg>"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ = cleave(t, "-C", dir, "check")
	if code != 1 || !strings.Contains(out, "differs from its result") {
		t.Fatalf("check with an edited plot: exit %d\n%s", code, out)
	}
	if code, _, _ := cleave(t, "-C", dir, "calc"); code != 0 {
		t.Fatal("calc")
	}
	if b, _ := os.ReadFile(svg); strings.Contains(string(b), "<script") {
		t.Fatal("calc left the edited plot")
	}
	// Remove the spectrum line: its file goes.
	text, _ = os.ReadFile(cd)
	lines := strings.Split(string(text), "\n")
	var kept []string
	for _, l := range lines {
		if !strings.HasPrefix(l, "plot(sdh, \"spec2\")") {
			kept = append(kept, l)
		}
	}
	os.WriteFile(cd, []byte(strings.Join(kept, "\n")), 0o644)
	code, out, _ = cleave(t, "-C", dir, "calc")
	if code != 0 || !strings.Contains(out, "removed cooldowns/plots/CD24-001/spec2.svg") {
		t.Fatalf("calc after removing a plot line: %d\n%s", code, out)
	}
	if _, err := os.Stat(filepath.Join(dir, "cooldowns", "plots", "CD24-001", "spec2.svg")); err == nil {
		t.Error("the spectrum's file is still there")
	}
	// Two lines drawing one name are reported.
	appendBlock(t, cd, "plot(d, \"twice\")\nplot(d, \"twice\")\n")
	code, out, _ = cleave(t, "-C", dir, "calc")
	if code != 1 || !strings.Contains(out, "is also drawn on line") {
		t.Fatalf("two plots of one name: %d\n%s", code, out)
	}
}

func TestPlotCommand(t *testing.T) {
	dir := demoNotebook(t)
	out := filepath.Join(t.TempDir(), "fan.svg")
	code, stdout, errs := cleave(t, "-C", dir, "plot", "--in", filepath.Join(dir, "cooldowns", "CD24-001.md"), "tq", "-o", out)
	if code != 0 {
		t.Fatalf("plot tq: %d %s %s", code, stdout, errs)
	}
	if b, err := os.ReadFile(out); err != nil || !strings.Contains(string(b), "Dingle plot") {
		t.Errorf("plot tq wrote %v", err)
	}
	code, stdout, _ = cleave(t, "plot", "3e11 cm^-2", "-o", "-")
	if code != 0 || !strings.Contains(stdout, "Landau fan") {
		t.Errorf("plot of a density: %d %.100s", code, stdout)
	}
	code, stdout, _ = cleave(t, "-C", dir, "plot", "--in", filepath.Join(dir, "masks", "HB100.md"), `plot(mask, "bar")`, "-o", "-")
	if code != 0 || !strings.Contains(stdout, "Hall bar to scale") {
		t.Errorf("plot of a mask: %d %.100s", code, stdout)
	}
	if code, _, errs := cleave(t, "plot", "3 T", "-o", "-"); code != 1 || !strings.Contains(errs, "not plottable") {
		t.Errorf("plot of a field: %d %s", code, errs)
	}
	if code, _, _ := cleave(t, "plot", "3 T"); code != 2 {
		t.Errorf("plot without -o: exit %d, want 2", code)
	}
	// eval --csv exports a fit's points and fitted curve.
	code, stdout, errs = cleave(t, "-C", dir, "eval", "--in", filepath.Join(dir, "cooldowns", "CD24-001.md"), "--csv", "tq")
	if code != 0 || !strings.Contains(stdout, "# fit: quantum_lifetime") || !strings.Contains(stdout, "B (T),inv_B (1/T),dingle,sigma,dingle_fit") {
		t.Errorf("eval --csv tq: %d %s %.300s", code, errs, stdout)
	}
	code, stdout, _ = cleave(t, "-C", dir, "eval", "--in", filepath.Join(dir, "cooldowns", "CD24-001.md"), "--csv", "sdh")
	if code != 0 || !strings.Contains(stdout, "f (T),amplitude (Ohm)") {
		t.Errorf("eval --csv sdh: %d %.300s", code, stdout)
	}
}
