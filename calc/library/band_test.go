package library

import (
	"cleave/calc"
	"math"
	"strings"
	"testing"
)

// TestExpectedDensitySurface: with 1e17 cm^-3 in 40 nm (4e11 cm^-2 of donors) under a 10 nm
// cap pinned 0.7 eV below the conduction band, the surface takes every donor electron (a
// parallel-plate estimate: ε·0.7 V/50 nm ≈ 9e11 cm^-2 > 4e11 cm^-2), so the self-consistent
// density is 0, and the analytic estimate, which now includes the pinned surface, agrees
// instead of asking for more electrons than the stack has donors. A well-doped delta stack
// gets a number for both and no warning; a quantum well gets no analytic number.
func TestExpectedDensitySurface(t *testing.T) {
	tests := []struct {
		name     string
		rows     [][4]string
		zero     bool // self-consistent n = 0
		analytic string
	}{
		{"thin bulk doping, surface-depleted", [][4]string{
			{"cap", "GaAs", "10 nm", ""},
			{"donors", "Al0.3Ga0.7As", "40 nm", "Si 1e17 cm^-3"},
			{"channel", "GaAs", "1 um", ""},
		}, true, "number"},
		{"delta doping with donors to spare", [][4]string{
			{"cap", "GaAs", "10 nm", ""},
			{"barrier", "Al0.3Ga0.7As", "50 nm", ""},
			{"delta", "Al0.3Ga0.7As", "1 nm", "Si delta 2.5e12 cm^-2"},
			{"spacer", "Al0.3Ga0.7As", "30 nm", ""},
			{"channel", "GaAs", "1 um", "C 1e14 cm^-3"},
		}, false, "number"},
		{"quantum well", [][4]string{
			{"cap", "GaAs", "10 nm", ""},
			{"barrier", "Al0.3Ga0.7As", "50 nm", ""},
			{"delta", "Al0.3Ga0.7As", "1 nm", "Si delta 2.5e12 cm^-2"},
			{"spacer", "Al0.3Ga0.7As", "30 nm", ""},
			{"QW", "GaAs", "20 nm", ""},
			{"barrier", "Al0.3Ga0.7As", "100 nm", ""},
			{"buffer", "GaAs", "1 um", ""},
		}, false, "not applicable"},
	}
	for _, tc := range tests {
		e := NewEnv()
		e.Set("layers", layerTable(tc.rows))
		v, err := e.Eval("expected_density(layers)")
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		r := v.(*calc.AnalysisResult)
		for _, w := range r.Warnings {
			// Shallow donors after illumination leave the excess of a generous delta
			// layer on un-ionised donors: a warning of that state only.
			if !strings.HasPrefix(w, "after illumination: parallel conduction") {
				t.Errorf("%s: warning %q, want none in the dark", tc.name, w)
			}
		}
		n := fieldValue(t, r, "n")
		if (n < 1e12) != tc.zero {
			t.Errorf("%s: n = %g m^-2, want zero: %v", tc.name, n, tc.zero)
		}
		av, _ := r.Field("analytic")
		switch tc.analytic {
		case "number":
			an := fieldValue(t, r, "analytic")
			if tc.zero && an > 1e13 {
				t.Errorf("%s: analytic %g m^-2, want ≈ 0 like the self-consistent solution", tc.name, an)
			}
			if !tc.zero && (an < 0.85*n || an > 1.15*n) {
				t.Errorf("%s: analytic %g vs self-consistent %g m^-2", tc.name, an, n)
			}
		default:
			if s, ok := av.(calc.String); !ok || !strings.Contains(string(s), tc.analytic) {
				t.Errorf("%s: analytic = %v, want %q", tc.name, av, tc.analytic)
			}
		}
	}
}

// TestExpectedDensityRecord: the fields a later line reads. A Si-doped Al0.3Ga0.7As barrier
// has DX centres: the dark density is below the illuminated one (persistent
// photoconductivity); the wells list names the channel; a stack whose buffer ends with zero
// field instead of a semi-insulating substrate warns of a parasitic channel.
func TestExpectedDensityRecord(t *testing.T) {
	e := NewEnv()
	e.Set("layers", layerTable([][4]string{
		{"cap", "GaAs", "10 nm", ""},
		{"donors", "Al0.3Ga0.7As", "40 nm", "Si 1e18 cm^-3"},
		{"spacer", "Al0.3Ga0.7As", "20 nm", ""},
		{"channel", "GaAs", "600 nm", ""},
	}))
	v, err := e.Eval("expected_density(layers)")
	if err != nil {
		t.Fatal(err)
	}
	r := v.(*calc.AnalysisResult)
	dark, lit := fieldValue(t, r, "n_dark"), fieldValue(t, r, "n_illuminated")
	if !(dark < lit) || fieldValue(t, r, "n") != dark {
		t.Errorf("n = %g, dark %g, illuminated %g: want n = dark < illuminated", fieldValue(t, r, "n"), dark, lit)
	}
	wv, _ := r.Field("wells")
	wl, ok := wv.(calc.List)
	if !ok || len(wl) == 0 {
		t.Fatalf("wells = %v", wv)
	}
	kind, _ := wl[0].(calc.Fielder).Field("kind")
	if textOf(kind) != "channel" {
		t.Errorf("first well %v, want the channel", calc.Display(wl[0]))
	}
	v, err = e.Eval(`expected_density(layers, bottom = "zero-field")`)
	if err != nil {
		t.Fatal(err)
	}
	if w := v.(*calc.AnalysisResult).Warnings; len(w) == 0 || !strings.Contains(strings.Join(w, ";"), "parasitic") {
		t.Errorf("zero-field bottom: warnings %q, want a parasitic channel", w)
	}
	if _, err := e.Eval(`expected_density(layers, bottom = "metallic")`); err == nil {
		t.Error("an unknown bottom was accepted")
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
		{"channel", "GaAs", "1 um", "C 1e14 cm^-3"},
	})
	e.Set("layers", stack)
	prev := math.Inf(1)
	for _, d := range []string{"0.03 eV", "0.06 eV", "0.1 eV", "0.15 eV"} {
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
