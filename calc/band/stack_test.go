package band

import (
	"cleave/internal/testutil"
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParseDoping(t *testing.T) {
	tests := []struct {
		in   string
		want Doping
	}{
		{"Si 1e18 cm^-3", Doping{Species: "Si", Density: 1e24}},
		{"Si delta 2.5e12 cm^-2", Doping{Species: "Si", Sheet: true, Density: 2.5e16}},
		{"Si δ 1e12 cm-2", Doping{Species: "Si", Sheet: true, Density: 1e16}},
		{"  Be 5e17 /cm3 ", Doping{Species: "Be", Density: 5e23}},
		{"C 1e20 m^-3", Doping{Species: "C", Density: 1e20}},
		{"Si 3e15 m^-2", Doping{Species: "Si", Sheet: true, Density: 3e15}},
		{"", Doping{}},
		{"-", Doping{}},
		{"none", Doping{}},
		{"Undoped", Doping{}},
	}
	for _, tc := range tests {
		got, err := ParseDoping(tc.in)
		if err != nil {
			t.Errorf("ParseDoping(%q): %v", tc.in, err)
			continue
		}
		if got.Species != tc.want.Species || got.Sheet != tc.want.Sheet || testutil.RelDiff(got.Density, tc.want.Density) > 1e-12 {
			t.Errorf("ParseDoping(%q) = %+v, want %+v", tc.in, got, tc.want)
		}
	}
}

func TestParseDopingErrors(t *testing.T) {
	tests := []struct {
		in      string
		col     int
		mention string
	}{
		{"Xx 1e18 cm^-3", 1, "dopant species"},
		{"Si lots cm^-3", 4, "number"},
		{"Si 1e18", 8, "unit"},
		{"Si 1e18 cm^-1", 9, "unit"},
		{"Si delta 1e18 cm^-3", 15, "sheet density unit"},
		{"Si -1e18 cm^-3", 4, "negative"},
		{"Si 1e18 cm^-3 extra", 15, "unexpected text"},
	}
	for _, tc := range tests {
		_, err := ParseDoping(tc.in)
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, ErrBadDoping) {
			t.Errorf("ParseDoping(%q) = %v, want a *ParseError wrapping ErrBadDoping", tc.in, err)
			continue
		}
		if pe.Col != tc.col || !strings.Contains(pe.Msg, tc.mention) {
			t.Errorf("ParseDoping(%q): column %d %q, want column %d mentioning %q", tc.in, pe.Col, pe.Msg, tc.col, tc.mention)
		}
	}
}

func TestParseThickness(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"10 nm", 10e-9}, {"0.5 um", 0.5e-6}, {"0.5µm", 0.5e-6}, {"250 Å", 25e-9}, {"1e-6 m", 1e-6},
		{" 3 nm ", 3e-9}, {"0 nm", 0},
	}
	for _, tc := range tests {
		got, err := ParseThickness(tc.in)
		if err != nil || testutil.RelDiff(got, tc.want) > 1e-12 {
			t.Errorf("ParseThickness(%q) = %g, %v; want %g", tc.in, got, err, tc.want)
		}
	}
	bad := []struct {
		in  string
		col int
	}{{"", 1}, {"ten nm", 1}, {"10", 3}, {"10 furlongs", 4}, {"-5 nm", 1}}
	for _, tc := range bad {
		_, err := ParseThickness(tc.in)
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, ErrBadThickness) || pe.Col != tc.col {
			t.Errorf("ParseThickness(%q) = %v, want ErrBadThickness at column %d", tc.in, err, tc.col)
		}
	}
}

// FuzzParseDoping: no panic; a success is finite, non-negative and of a known species.
func FuzzParseDoping(f *testing.F) {
	for _, s := range []string{"Si 1e18 cm^-3", "Si delta 2.5e12 cm^-2", "", "none", "Be 1 m^-3", "Si δ 1e12 cm⁻²", "Si NaN cm^-3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := ParseDoping(s)
		if err != nil {
			if !errors.Is(err, ErrBadDoping) {
				t.Fatalf("error %v does not wrap ErrBadDoping", err)
			}
			return
		}
		if math.IsNaN(d.Density) || math.IsInf(d.Density, 0) || d.Density < 0 {
			t.Fatalf("ParseDoping(%q) density %g", s, d.Density)
		}
		if d.Species != "" && !d.Donor() && !d.Acceptor() {
			t.Fatalf("ParseDoping(%q) species %q", s, d.Species)
		}
	})
}

// FuzzParseThickness: no panic; a success is finite and non-negative.
func FuzzParseThickness(f *testing.F) {
	for _, s := range []string{"10 nm", "0.5 um", "250 Å", "1e-6 m", "-1 nm", "1e999 nm", "e nm"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := ParseThickness(s)
		if err != nil {
			if !errors.Is(err, ErrBadThickness) {
				t.Fatalf("error %v does not wrap ErrBadThickness", err)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			t.Fatalf("ParseThickness(%q) = %g", s, v)
		}
	})
}

// FuzzStack builds stacks from fuzzed layer choices: Validate and AnalyticInputFor must not
// panic, and a successful AnalyticInputFor has a positive band offset and a spacer ≥ 0.
func FuzzStack(f *testing.F) {
	f.Add([]byte{1, 30, 0, 2, 0, 2, 1, 20, 0, 0, 200, 0})
	f.Add([]byte{0, 10, 0, 1, 50, 1, 1, 20, 0, 0, 255, 3})
	f.Fuzz(func(t *testing.T, b []byte) {
		var s Stack
		mats := []string{"GaAs", "Al0.3Ga0.7As", "AlAs", "Al0.1Ga0.9As", "InP"}
		for i := 0; i+2 < len(b) && len(s.Layers) < 12; i += 3 {
			l := Layer{Material: mats[int(b[i])%len(mats)], ThicknessM: float64(int(b[i+1])-20) * 1e-9}
			switch b[i+2] % 4 {
			case 1:
				l.Doping = Doping{Species: "Si", Density: 1e24}
			case 2:
				l.Doping = Doping{Species: "Si", Sheet: true, Density: 2e16}
			case 3:
				l.Doping = Doping{Species: "Be", Density: 1e21}
			}
			s.Layers = append(s.Layers, l)
		}
		verr := s.Validate()
		in, err := AnalyticInputFor(s, 0)
		if err == nil {
			if verr != nil {
				t.Fatalf("AnalyticInputFor accepted a stack Validate rejects: %v", verr)
			}
			if !(in.DeltaEcEV > 0) || in.SpacerM < 0 {
				t.Fatalf("AnalyticInputFor = %+v", in)
			}
			if _, err := Analytic(in); err != nil {
				t.Fatalf("Analytic(%+v): %v", in, err)
			}
		}
	})
}
