package calc

import (
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
		r := v.(*Result)
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
			if s, ok := av.(String); !ok || !strings.Contains(string(s), tc.analytic) {
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
	r := v.(*Result)
	dark, lit := fieldValue(t, r, "n_dark"), fieldValue(t, r, "n_illuminated")
	if !(dark < lit) || fieldValue(t, r, "n") != dark {
		t.Errorf("n = %g, dark %g, illuminated %g: want n = dark < illuminated", fieldValue(t, r, "n"), dark, lit)
	}
	wv, _ := r.Field("wells")
	wl, ok := wv.(List)
	if !ok || len(wl) == 0 {
		t.Fatalf("wells = %v", wv)
	}
	kind, _ := wl[0].(Fielder).Field("kind")
	if textOf(kind) != "channel" {
		t.Errorf("first well %v, want the channel", Display(wl[0]))
	}
	v, err = e.Eval(`expected_density(layers, bottom = "zero-field")`)
	if err != nil {
		t.Fatal(err)
	}
	if w := v.(*Result).Warnings; len(w) == 0 || !strings.Contains(strings.Join(w, ";"), "parasitic") {
		t.Errorf("zero-field bottom: warnings %q, want a parasitic channel", w)
	}
	if _, err := e.Eval(`expected_density(layers, bottom = "metallic")`); err == nil {
		t.Error("an unknown bottom was accepted")
	}
}
