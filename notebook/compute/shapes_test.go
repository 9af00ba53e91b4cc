package compute

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/calc/transport"
)

// shapesNotebook writes a notebook with a device of each shape: an L-shaped bar, a van der
// Pauw square and a Corbino disc, and a cooldown of the L-shaped bar whose lock-in export
// is read through a layout with the cooldown's excitation current.
func shapesNotebook(t *testing.T) string {
	t.Helper()
	root := filepath.Join(t.TempDir(), "nb")
	files := map[string]string{
		"wafers/W1.md": "---\nid: W1\nkind: wafer\ncarrier: electrons\n---\n",
		"pieces/P1.md": "---\nid: P1\nkind: piece\nfrom: W1\n---\n",
		"masks/L1.md": `---
id: L1
kind: mask
shape: L
sections:
  - {name: A, width: 50 um, length: 600 um, direction: "[110]"}
  - {name: B, width: 20 um, length: 400 um, direction: "[1-10]"}
probes:
  - {name: A1, section: A, position: 150 um, side: top}
  - {name: A2, section: A, position: 450 um, side: top}
  - {name: A3, section: A, position: 450 um, side: bottom}
  - {name: B1, section: B, position: 100 um, side: top}
  - {name: B2, section: B, position: 300 um, side: top}
contacts: {source: S, drain: D}
---
`,
		"masks/VDP.md":  "---\nid: VDP\nkind: mask\nshape: cloverleaf\nsize: 5 mm\ncontacts: {corners: [a, b, c, d]}\n---\n",
		"masks/CB.md":   "---\nid: CB\nkind: mask\nshape: corbino\ninner_radius: 100 um\nouter_radius: 500 um\ncontacts: {inner: I, outer: O}\n---\n",
		"devices/DL.md": "---\nid: DL\nkind: device\nfrom: P1\nmask: L1\ngood_contacts: [S, D, A1, A2, A3, B1, B2]\n---\n",
		"devices/DV.md": "---\nid: DV\nkind: device\nfrom: P1\nmask: VDP\n---\n",
		"devices/DC.md": "---\nid: DC\nkind: device\nfrom: P1\nmask: CB\nas_built: {outer_radius: 480 um}\n---\n",
		"cooldowns/C1.md": `---
id: C1
kind: cooldown
devices: [DL]
excitation: {current: 10 nA}
wiring: {current: "S -> D", Rxx: "A1 - A2", Rxy: "A2 - A3"}
data:
  - {file: data/run.tsv, layout: lockin}
---
` + "```cleave\nd = data(\"data/run.tsv\")\nhall = hall_density(d, 0.05 T .. 0.4 T)\n```\n",
		"layouts/lockin.yaml": "comments: [\"%\"]\ncolumns:\n  field_T: B\nderive:\n  Rxy: {x: X2_V, current: excitation}\n",
	}
	for p, s := range files {
		full := filepath.Join(root, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(full, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Mkdir(filepath.Join(root, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	// The export holds the Hall voltage V(A2) − V(A3) at 10 nA. A2 is on the top side and
	// the current flows from the source end, so it reads −ρ_xy·I (physics.TestHallOrientation);
	// ρ_xy is the model's (electrons: a negative slope, [src:IHN2010]).
	d, err := transport.Sweep(transport.SweepParams{Density: 2.5e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 0.5e-12,
		Temperature: 0.3, BStart: -1, BEnd: 1, Points: 501, Noise: 0.02, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	b.WriteString("% lock-in export\nfield_T\tX2_V\n")
	for i, B := range d.Columns[0].Values {
		b.WriteString(strings.Join([]string{ftoa(B), ftoa(-d.Columns[2].Values[i] * 10e-9)}, "\t") + "\n")
	}
	if err := os.MkdirAll(filepath.Join(root, "cooldowns", "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(root, "cooldowns", "data", "run.tsv"), b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return root
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }

// TestShapes evaluates the geometry functions in entries of each shape through the engine's
// resolver: squares along an L-shaped bar's path (each section's length over its width,
// worked by hand), the Corbino factor ln(r_out/r_in)/(2π) with the as-built radius, the van der
// Pauw configurations in the mask's contact names, and the Hall sign read from the wiring.
func TestShapes(t *testing.T) {
	root := shapesNotebook(t)
	num := func(in, expr string) float64 {
		t.Helper()
		v, err := Eval(root, filepath.Join(root, in), expr)
		if err != nil {
			t.Fatalf("%s: %s: %v", in, expr, err)
		}
		q, ok := v.(calc.Quantity)
		if !ok {
			t.Fatalf("%s: %s = %s, not a quantity", in, expr, calc.Display(v))
		}
		return q.Q.Value()
	}
	text := func(in, expr string) string {
		t.Helper()
		v, err := Eval(root, filepath.Join(root, in), expr)
		if err != nil {
			t.Fatalf("%s: %s: %v", in, expr, err)
		}
		return calc.Display(v)
	}
	for _, tc := range []struct {
		in, expr string
		want     float64
	}{
		{"devices/DL.md", `squares("A1", "A2")`, 300.0 / 50},
		{"devices/DL.md", `squares("A2", "B2")`, 150.0/50 + 300.0/20},
		{"devices/DL.md", `squares("B1", "B2")`, 200.0 / 20},
		{"devices/DC.md", `squares()`, math.Log(480.0/100) / (2 * math.Pi)},
		{"devices/DC.md", `corbino_sigma(1 mS, geometry.inner_radius, geometry.outer_radius)`, 1e-3 * math.Log(4.8) / (2 * math.Pi)},
	} {
		if got := num(tc.in, tc.expr); math.Abs(got/tc.want-1) > 1e-12 {
			t.Errorf("%s: %s = %v, want %v", tc.in, tc.expr, got, tc.want)
		}
	}
	if got := text("devices/DL.md", "hall_pairs()"); got != `[["A2", "A3"]]` {
		t.Errorf("hall_pairs() = %s", got)
	}
	if got := text("devices/DV.md", "vdp_contacts().R_A"); got != `"I a → b, V d − c"` {
		t.Errorf("vdp_contacts().R_A = %s", got)
	}
	if got := text("devices/DV.md", "vdp_contacts().hall"); got != `"I a → c, V b − d"` {
		t.Errorf("vdp_contacts().hall = %s", got)
	}
	// The cooldown reads its export through the layout and the excitation current; with
	// A2 (top) as the plus input the column is −ρ_xy, which the wiring accounts for.
	if got := num("cooldowns/C1.md", "hall.n"); math.Abs(got/2.5e15-1) > 2e-3 {
		t.Errorf("hall.n = %g, want 2.5e15", got)
	}
	if got := text("cooldowns/C1.md", "hall"); strings.Contains(got, "warning") || !strings.Contains(got, "electrons") {
		t.Errorf("hall = %s: want electrons without a warning", got)
	}
	if got := text("cooldowns/C1.md", "hall.convention"); !strings.Contains(got, "R_xy = VA2 − VA3 with A2 on the top side") {
		t.Errorf("hall.convention = %s", got)
	}
	if _, err := Eval(root, filepath.Join(root, "devices/DV.md"), `squares("a", "b")`); err == nil || !strings.Contains(err.Error(), "not a Hall bar") {
		t.Errorf("squares on a van der Pauw square: %v", err)
	}
}
