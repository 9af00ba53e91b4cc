package library

import (
	"cleave/calc"
	"math"
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
		r := v.(*calc.AnalysisResult)
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

// expected_density on a delta-doped stack like the example of [src:W25] (Al0.3Ga0.7As, a Si
// sheet 30 nm above the interface, here under a 60 nm barrier and cap with a pinned
// surface): deeper donors leave fewer electrons in the well (n falls as E_D' rises in the
// energy balance of [src:STERN1983]), and the self-consistent and analytic densities stay
// within 10 % of each other.
func TestExpectedDensityDonorDepth(t *testing.T) {
	e := NewEnv()
	stack := layerTable([][4]string{
		{"cap", "GaAs", "10 nm", ""},
		{"barrier", "Al0.3Ga0.7As", "50 nm", ""},
		{"delta", "Al0.3Ga0.7As", "1 nm", "Si delta 2.5e12 cm^-2"},
		{"spacer", "Al0.3Ga0.7As", "30 nm", ""},
		{"channel", "GaAs", "400 nm", "C 1e14 cm^-3"},
	})
	e.Set("layers", stack)
	prev := math.Inf(1)
	for _, d := range []string{"0 eV", "0.05 eV", "0.1 eV", "0.15 eV"} {
		v, err := e.Eval("expected_density(layers, donor_depth = " + d + ")")
		if err != nil {
			t.Fatalf("donor_depth %s: %v", d, err)
		}
		r := v.(*calc.AnalysisResult)
		n := fieldValue(t, r, "n")
		an := fieldValue(t, r, "analytic")
		if !(n < prev) {
			t.Errorf("donor_depth %s: n = %g, not below %g", d, n, prev)
		}
		if math.Abs(an/n-1) > 0.1 {
			t.Errorf("donor_depth %s: analytic %g vs self-consistent %g", d, an, n)
		}
		prev = n
	}
	if _, err := e.Eval("expected_density(layers, donor_depth = -0.1 eV)"); err == nil {
		t.Error("a negative donor depth was accepted")
	}
}

// layerTable builds a layer table as the notebook gives it: rows with layer, material,
// thickness and doping.
func layerTable(rows [][4]string) calc.List {
	var l calc.List
	for _, r := range rows {
		l = append(l, calc.NewRecord("", "layer", calc.String(r[0]), "material", calc.String(r[1]), "thickness", calc.String(r[2]), "doping", calc.String(r[3])))
	}
	return l
}

func fieldValue(t *testing.T, r *calc.AnalysisResult, name string) float64 {
	t.Helper()
	v, ok := r.Field(name)
	if !ok {
		t.Fatalf("no field %s in %s", name, r.Display())
	}
	return v.(calc.Quantity).Q.Value()
}
