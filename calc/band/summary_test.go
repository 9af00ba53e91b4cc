package band

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/")

func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("%s differs from the golden file:\n--- got\n%s--- want\n%s", name, got, want)
	}
}

// TestSummaryGolden renders an invented delta-doped wafer (the stack of
// TestSolveAgainstAnalytic) and a uniformly doped one.
func TestSummaryGolden(t *testing.T) {
	tests := []struct {
		name  string
		stack Stack
		opt   Options
	}{
		{"delta", deltaStack(30e-9, 3e16), Options{DonorDepthEV: 0.10}},
		{"uniform", Stack{Layers: []Layer{
			{Name: "cap", Material: "GaAs", ThicknessM: 10e-9},
			{Name: "doped", Material: "Al0.33Ga0.67As", ThicknessM: 40e-9, Doping: Doping{Species: "Si", Density: 1e24}},
			{Name: "spacer", Material: "Al0.33Ga0.67As", ThicknessM: 20e-9},
			{Name: "buffer", Material: "GaAs", ThicknessM: 300e-9, Doping: Doping{Species: "C", Density: bufferAcceptors}},
		}}, Options{}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := Solve(tc.stack, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			golden(t, "summary_"+tc.name+".golden", r.Summary())
			var buf bytes.Buffer
			if err := r.WriteProfile(&buf, 20); err != nil {
				t.Fatal(err)
			}
			lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
			if lines[0] != "z_nm,Ec_meV,n_cm3" || len(lines) != 1+(len(r.Z)+19)/20 {
				t.Errorf("profile: header %q, %d lines for %d nodes", lines[0], len(lines), len(r.Z))
			}
			if !strings.HasPrefix(lines[1], "0.000,700.0000,") {
				t.Errorf("profile first row %q, want the pinned surface at 700 meV", lines[1])
			}
		})
	}
}
