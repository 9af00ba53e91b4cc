package band

import (
	"bytes"
	"cleave/internal/testutil"
	"path/filepath"
	"strings"
	"testing"
)

func golden(t *testing.T, name, got string) {
	t.Helper()
	testutil.GoldenString(t, filepath.Join("testdata", name), got)
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
