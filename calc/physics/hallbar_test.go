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

// lBar is an invented L-shaped bar: section A (50 um wide, 600 um to the bend) then
// section B (20 um wide, 400 um from the bend to the drain), probes on both.
func lBar() HallBar {
	sp := func(name, sec string, pos float64, side string) Probe {
		return Probe{Name: name, Section: sec, Position: q(pos, "um"), ArmWidth: q(4, "um"), Side: side}
	}
	return HallBar{Source: "S", Drain: "D",
		Sections: []Section{{Name: "A", Width: q(50, "um"), Length: q(600, "um"), Direction: "[110]"},
			{Name: "B", Width: q(20, "um"), Length: q(400, "um"), Direction: "[1-10]"}},
		Probes: []Probe{sp("A1", "A", 150, "top"), sp("A2", "A", 450, "top"), sp("A3", "A", 450, "bottom"),
			sp("B1", "B", 100, "top"), sp("B2", "B", 300, "top"), sp("B3", "B", 300, "bottom")}}
}

// TestSquaresSections: squares along the current's path, each section's length over its own
// width (worked by hand from the geometry of lBar).
func TestSquaresSections(t *testing.T) {
	h := lBar()
	for _, tc := range []struct {
		a, b string
		want float64
	}{
		{"A1", "A2", 300.0 / 50},                // one section
		{"B1", "B2", 200.0 / 20},                // the narrow section
		{"A2", "B2", 150.0/50 + 300.0/20},       // across the bend: 3 + 15
		{"B2", "A2", 150.0/50 + 300.0/20},       // either order
		{"A1", "B1", 450.0/50 + 100.0/20},       // 9 + 5
		{"A3", "B3", (600-450)/50.0 + 300/20.0}, // bottom probes
	} {
		got, err := h.Squares(tc.a, tc.b)
		if err != nil || math.Abs(got.Value()-tc.want) > 1e-12 {
			t.Errorf("Squares(%s, %s) = %v, %v; want %v", tc.a, tc.b, got.Value(), err, tc.want)
		}
	}
	// A section's width uncertainty weighs only on its own part: 2 % on W_B over the 15
	// squares in B of the 18 gives 2 % × 15/18.
	h.Sections[1].Width = qu(20, 0.4, "um")
	got, err := h.Squares("A2", "B2")
	if err != nil {
		t.Fatal(err)
	}
	if want := 0.02 * 15 / 18; math.Abs(relUnc(got)-want) > 1e-12 {
		t.Errorf("relative uncertainty %v, want %v", relUnc(got), want)
	}
	if pairs := lBar().HallPairs(); len(pairs) != 2 || pairs[0] != [2]string{"A2", "A3"} || pairs[1] != [2]string{"B2", "B3"} {
		t.Errorf("Hall pairs %v, want A2/A3 and B2/B3", pairs)
	}
	ws := lBar().Warnings()
	if len(ws) == 0 || !strings.Contains(ws[len(ws)-1], "bend between sections A and B") || !strings.Contains(ws[len(ws)-1], "1.45 squares") {
		t.Errorf("warnings %q: want the bend's note (20/(2·50) + 50/(2·20) = 1.45 squares)", ws)
	}
	bad := lBar()
	bad.Probes[0].Section = "C"
	if _, err := bad.Squares("A1", "A2"); err == nil || !strings.Contains(err.Error(), `section "C" is not one of the bar's sections [A B]`) {
		t.Errorf("unknown section: %v", err)
	}
}

// TestHallOrientation: which sign of R_xy = (V+ − V−)/I is ρ_xy. Worked by hand: for
// electrons, current along +x means electrons moving along −x; with B along +z the Lorentz
// force (−e)(−v x̂) × (B ẑ) = −evB ŷ pushes them to the bottom edge (−y), so the top edge is
// at the higher potential and V_top − V_bottom > 0, while ρ_xy = −B/(ne) < 0 [src:IHN2010]:
// plus on top gives R_xy = −ρ_xy (o = −1).
func TestHallOrientation(t *testing.T) {
	h := sixProbe()
	h.Source, h.Drain = "S", "D"
	for _, tc := range []struct {
		src, drn, plus, minus string
		want                  int
	}{
		{"S", "D", "V2", "V5", -1}, // plus on top, current from the source end
		{"S", "D", "V5", "V2", 1},  // plus at the bottom
		{"D", "S", "V2", "V5", 1},  // current reversed
		{"D", "S", "V5", "V2", -1}, // both reversed
		{"V1", "V3", "V2", "V5", -1},
		{"V3", "V4", "V2", "V5", 1}, // current between probes, flowing towards the source end
	} {
		o, desc, err := h.HallOrientation(tc.src, tc.drn, tc.plus, tc.minus)
		if err != nil || o != tc.want || desc == "" {
			t.Errorf("HallOrientation(%s → %s, %s − %s) = %d %q, %v; want %d", tc.src, tc.drn, tc.plus, tc.minus, o, desc, err, tc.want)
		}
	}
	for _, tc := range []struct{ src, drn, plus, minus, want string }{
		{"S", "D", "V1", "V2", "do not face each other"},
		{"X", "Y", "V2", "V5", "cannot tell which way"},
		{"S", "D", "V2", "V9", `unknown probe "V9"`},
	} {
		if _, _, err := h.HallOrientation(tc.src, tc.drn, tc.plus, tc.minus); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("HallOrientation(%s → %s, %s − %s): %v, want %q", tc.src, tc.drn, tc.plus, tc.minus, err, tc.want)
		}
	}
	// On an L-shaped bar the path bends but x stays along it: the same rule per section.
	if o, _, err := lBar().HallOrientation("S", "D", "B3", "B2"); err != nil || o != 1 {
		t.Errorf("L bar, plus at the bottom of B: %d, %v; want +1", o, err)
	}
}

// TestCorbino: the factor ln(r_out/r_in)/(2π) against the resistance of the annulus summed
// ring by ring (∫ dr/(2πr), midpoint rule over 10^5 rings), for several radius ratios; the
// conductance and the conductivity invert each other; bad radii are errors.
func TestCorbino(t *testing.T) {
	for _, r := range [][2]float64{{100, 500}, {10, 11}, {1, 1000}} {
		sq, err := CorbinoSquares(q(r[0], "um"), q(r[1], "um"))
		if err != nil {
			t.Fatal(err)
		}
		const n = 100000
		h := (r[1] - r[0]) / n
		sum := 0.0
		for i := 0; i < n; i++ {
			sum += h / (2 * math.Pi * (r[0] + (float64(i)+0.5)*h))
		}
		testutil.CheckRel(t, "Corbino squares", sq.Value(), sum, 1e-6)
		sigma := q(2e-4, "S")
		G, err := CorbinoConductance(sigma, q(r[0], "um"), q(r[1], "um"))
		if err != nil {
			t.Fatal(err)
		}
		back, err := CorbinoSigma(G, q(r[0], "um"), q(r[1], "um"))
		if err != nil {
			t.Fatal(err)
		}
		testutil.CheckRel(t, "sigma round trip", back.Value(), 2e-4, 1e-12)
	}
	// A 1 % uncertainty on the outer radius of a 100/500 um disc: ∂/∂r_out = 1/(2π r_out),
	// so σ(squares) = 0.01/(2π) over ln 5/(2π): 0.01/ln 5 relative.
	sq, _ := CorbinoSquares(q(100, "um"), qu(500, 5, "um"))
	testutil.CheckRel(t, "relative uncertainty", relUnc(sq), 0.01/math.Log(5), 1e-9)
	for _, r := range [][2]float64{{500, 100}, {0, 100}, {100, 100}} {
		if _, err := CorbinoSquares(q(r[0], "um"), q(r[1], "um")); err == nil {
			t.Errorf("radii %v: no error", r)
		}
	}
	if _, err := CorbinoSquares(q(1, "T"), q(2, "um")); err == nil {
		t.Error("a field as a radius: no error")
	}
}
