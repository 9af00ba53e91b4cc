package calc

import (
	"strings"
	"testing"
)

// TestAnalyticBeyondDonors: with 1e17 cm^-3 in 40 nm (4e11 cm^-2 of donors) under a 10 nm cap
// pinned 0.7 eV below the conduction band, the surface takes every donor electron (depletion
// charge ε·0.7 V/50 nm ≈ 9e11 cm^-2 > 4e11 cm^-2, a parallel-plate estimate) and the
// self-consistent density is 0, while the analytic heterojunction model, which has no surface
// and an unlimited doped layer, asks for more electrons than there are donors: the result warns.
// The stack of TestExpectedDensityDonorDepth (2.5e12 cm^-2 of donors) gets no such warning.
func TestAnalyticBeyondDonors(t *testing.T) {
	tests := []struct {
		name   string
		rows   [][4]string
		warned bool
	}{
		{"thin bulk doping, surface-depleted", [][4]string{
			{"cap", "GaAs", "10 nm", ""},
			{"donors", "Al0.3Ga0.7As", "40 nm", "Si 1e17 cm^-3"},
			{"channel", "GaAs", "500 nm", ""},
		}, true},
		{"delta doping with donors to spare", [][4]string{
			{"cap", "GaAs", "10 nm", ""},
			{"barrier", "Al0.3Ga0.7As", "50 nm", ""},
			{"delta", "Al0.3Ga0.7As", "1 nm", "Si delta 2.5e12 cm^-2"},
			{"spacer", "Al0.3Ga0.7As", "30 nm", ""},
			{"channel", "GaAs", "400 nm", "C 1e14 cm^-3"},
		}, false},
	}
	for _, tc := range tests {
		e := NewEnv()
		e.Set("layers", layerTable(tc.rows))
		v, err := e.Eval("expected_density(layers)")
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		r := v.(*Result)
		warned := false
		for _, w := range r.Warnings {
			if strings.Contains(w, "exceeds") && strings.Contains(w, "donors") {
				warned = true
			}
		}
		if warned != tc.warned {
			t.Errorf("%s: warned %v, want %v (n = %g, analytic %g, warnings %q)", tc.name, warned, tc.warned,
				fieldValue(t, r, "n"), fieldValue(t, r, "analytic"), r.Warnings)
		}
	}
}
