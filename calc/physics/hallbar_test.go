package physics

import (
	"errors"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

func probe(name string, pos, arm float64, side string) Probe {
	return Probe{Name: name, Position: q(pos, "um"), ArmWidth: q(arm, "um"), Side: side}
}

// sixProbe is an invented 100 um bar with probes every 500 um, as in [src:W9]
// (W = 100 um, L = 500 um).
func sixProbe() HallBar {
	return HallBar{Width: q(100, "um"), Probes: []Probe{
		probe("V1", 300, 10, "top"), probe("V2", 800, 10, "top"), probe("V3", 1300, 10, "top"),
		probe("V4", 300, 10, "bottom"), probe("V5", 800, 10, "bottom"), probe("V6", 1300, 10, "bottom"),
	}}
}

func TestSquares(t *testing.T) {
	h := sixProbe()
	tests := []struct {
		a, b string
		want float64
	}{
		{"V1", "V2", 5}, {"V2", "V1", 5}, {"V1", "V3", 10}, {"V4", "V6", 10}, {"V1", "V5", 5},
	}
	for _, tc := range tests {
		got, err := h.Squares(tc.a, tc.b)
		if err != nil || !got.Dim().IsDimensionless() || math.Abs(got.Value()-tc.want) > 1e-12 {
			t.Errorf("Squares(%s, %s) = %v (%v), %v; want %v", tc.a, tc.b, got.Value(), got.Dim(), err, tc.want)
		}
	}
	// [src:W9] end to end: R_xx = 50 Ohm over 5 squares is 10 Ohm/sq, and at
	// n = 3e11 cm^-2 the mobility is 2.0805e6 cm^2/(V s).
	sq, _ := h.Squares("V1", "V2")
	rho := must(SheetResistance(q(50, "Ohm"), sq))
	mu := must(Mobility(rho, n3e11))
	if got := in(t, mu, "cm^2/(V s)"); math.Abs(got-2.0805e6)/2.0805e6 > 1e-4 {
		t.Errorf("W9 mobility %v, want 2.0805e6", got)
	}
	// Uncertain geometry propagates: a spacing of 500 ± 5 um (1 %, one probe position
	// uncertain) over W = 100 ± 2 um (2 %) gives sqrt(1^2 + 2^2) % on the number of squares.
	h2 := HallBar{Width: qu(100, 2, "um"), Probes: []Probe{
		{Name: "A", Position: qu(300, 5, "um"), Side: "top"},
		{Name: "B", Position: q(800, "um"), Side: "top"},
	}}
	s2, err := h2.Squares("A", "B")
	if err != nil {
		t.Fatal(err)
	}
	if want := math.Hypot(0.01, 0.02); math.Abs(relUnc(s2)-want) > 1e-9 {
		t.Errorf("relative uncertainty of squares %v, want %v", relUnc(s2), want)
	}
}

func TestSquaresErrors(t *testing.T) {
	h := sixProbe()
	if _, err := h.Squares("V1", "V9"); !errors.Is(err, ErrUnknownProbe) || !strings.Contains(err.Error(), `"V9"`) {
		t.Errorf("unknown probe: %v", err)
	}
	if _, err := h.Squares("V1", "V4"); !errors.Is(err, quantity.ErrDomain) {
		t.Errorf("Hall pair as longitudinal pair: %v", err)
	}
	bad := sixProbe()
	bad.Width = q(100, "Ohm")
	if _, err := bad.Squares("V1", "V2"); !errors.Is(err, quantity.ErrDimMismatch) || !strings.Contains(err.Error(), "argument width") {
		t.Errorf("width in Ohm: %v", err)
	}
	bad = sixProbe()
	bad.Probes[1].Position = q(3, "s")
	bad.Probes[2].Side = "left"
	bad.Probes[3].Name = "V1"
	err := bad.Validate()
	for _, want := range []string{"probes[1].position", "probes[2].side", `duplicate probe name "V1"`} {
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("Validate() = %v; want it to mention %s", err, want)
		}
	}
	if w := bad.Warnings(); len(w) != 1 || !strings.Contains(w[0], "cannot be checked") {
		t.Errorf("Warnings on invalid geometry = %q", w)
	}
	if p := bad.HallPairs(); p != nil {
		t.Errorf("HallPairs on invalid geometry = %v, want nil", p)
	}
}

func TestHallPairs(t *testing.T) {
	tests := []struct {
		name string
		bar  HallBar
		want string
	}{
		{"six probes", sixProbe(), "V1/V4 V2/V5 V3/V6"},
		// Offset within the mean arm width still faces; beyond it does not.
		{"offset", HallBar{Width: q(50, "um"), Probes: []Probe{
			probe("a", 100, 10, "top"), probe("b", 104, 6, "bottom"), probe("c", 300, 10, "top"), probe("d", 309, 6, "bottom"),
		}}, "a/b"},
		// Each probe pairs once, with its nearest facing probe.
		{"nearest", HallBar{Width: q(50, "um"), Probes: []Probe{
			probe("t", 100, 20, "top"), probe("b1", 108, 20, "bottom"), probe("b2", 101, 20, "bottom"),
		}}, "t/b2"},
		// Unknown arm widths: only coincident centres pair.
		{"no arms", HallBar{Width: q(50, "um"), Probes: []Probe{
			{Name: "x", Position: q(10, "um"), Side: "top"}, {Name: "y", Position: q(10, "um"), Side: "bottom"},
			{Name: "z", Position: q(20, "um"), Side: "bottom"},
		}}, "x/y"},
		{"one side only", HallBar{Width: q(50, "um"), Probes: []Probe{probe("a", 0, 5, "top"), probe("b", 0, 5, "top")}}, ""},
	}
	for _, tc := range tests {
		var parts []string
		for _, p := range tc.bar.HallPairs() {
			parts = append(parts, p[0]+"/"+p[1])
		}
		if got := strings.Join(parts, " "); got != tc.want {
			t.Errorf("%s: HallPairs = %q, want %q", tc.name, got, tc.want)
		}
	}
}

// TestWarningsGolden compares the warnings for a set of invented geometries with
// testdata/warnings.golden; run with -update to rewrite it.
func TestWarningsGolden(t *testing.T) {
	cases := []struct {
		name string
		bar  HallBar
	}{
		{"good bar (L/W = 5, narrow arms)", sixProbe()},
		{"short spacing (L/W = 2.5)", HallBar{Width: q(100, "um"), Probes: []Probe{
			probe("V1", 300, 10, "top"), probe("V2", 550, 10, "top"), probe("V3", 800, 10, "top"),
			probe("V4", 300, 10, "bottom"), probe("V5", 550, 10, "bottom"), probe("V6", 800, 10, "bottom"),
		}}},
		{"wide arms", HallBar{Width: q(20, "um"), Probes: []Probe{
			probe("A", 0, 8, "top"), probe("B", 30, 8, "top"), probe("C", 1, 8, "bottom"),
		}}},
		{"coincident probes", HallBar{Width: q(20, "um"), Probes: []Probe{probe("A", 0, 2, "top"), probe("B", 0, 2, "top")}}},
		{"invalid", HallBar{Width: q(-1, "um")}},
	}
	var b strings.Builder
	for _, c := range cases {
		b.WriteString("## " + c.name + "\n")
		for _, w := range c.bar.Warnings() {
			b.WriteString("- " + w + "\n")
		}
		b.WriteString("\n")
	}
	testutil.GoldenString(t, filepath.Join("testdata", "warnings.golden"), b.String())
}
