package templates

import (
	"cleave/notebook"

	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"math/rand/v2"
	"path"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"testing/fstest"
	"unicode/utf8"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/text"
	"go.yaml.in/yaml/v3"

	"cleave/calc/quantity"
	"cleave/internal/testutil"
)

// goldenData is the fixed input of the golden files: an invented lab's ids
// and initials.
func goldenData(name string) Data {
	d := Data{Kind: name, Date: "2025-03-14", By: "RV"}
	switch name {
	case "wafer":
		d.ID = "G2503-A"
	case "piece":
		d.ID, d.Parents = "G2503-A.p3", []string{"G2503-A"}
	case "mask":
		d.ID = "hb100-v1"
	case "process":
		d.ID, d.Parents = "run-2025-03-17", []string{"G2503-A.p3", "G2503-A.p4"}
	case "device":
		d.ID, d.Parents = "G2503-A.p3.d1", []string{"G2503-A.p3"}
	case "cooldown":
		d.ID, d.Parents = "cd-2025-03-20", []string{"G2503-A.p3.d1"}
	case "notebook-readme":
		d.Kind = ""
	}
	return d
}

// TestNames: there is a template for every kind of the notebook's kind table, and the
// notebook README's.
func TestNames(t *testing.T) {
	want := []string{"notebook-readme"}
	for _, k := range notebook.Kinds() {
		want = append(want, string(k))
	}
	slices.Sort(want)
	if got := Names(); !slices.Equal(got, want) {
		t.Errorf("Names() = %v, want %v (one template per kind of the kind table)", got, want)
	}
}

func TestGolden(t *testing.T) {
	for _, name := range Names() {
		t.Run(name, func(t *testing.T) {
			got, err := Render(nil, name, goldenData(name))
			if err != nil {
				t.Fatal(err)
			}
			testutil.Golden(t, filepath.Join("testdata", name+".golden"), got)
		})
	}
}

// A rendered template copied into a notebook's templates/ folder must render
// to itself: nothing in the output may look like template syntax.
func TestRenderIsIdempotent(t *testing.T) {
	for _, name := range Names() {
		d := goldenData(name)
		once, err := Render(nil, name, d)
		if err != nil {
			t.Fatal(err)
		}
		twice, err := Render(fstest.MapFS{name + ".md": {Data: once}}, name, d)
		if err != nil {
			t.Fatalf("%s: rendering the rendered output: %v", name, err)
		}
		if !bytes.Equal(once, twice) {
			t.Errorf("%s: second pass changed the output:\n%s", name, testutil.FirstDiff(twice, once))
		}
	}
}

// parentCases gives, per kind, the parent lists the CLI may pass.
var parentCases = map[string][][]string{
	"wafer":    {nil},
	"mask":     {nil},
	"piece":    {nil, {"G2503-A"}},
	"device":   {nil, {"G2503-A.p3"}},
	"process":  {nil, {"G2503-A.p3"}, {"G2503-A.p3", "G2503-A.p4", "G2503-B.p1"}},
	"cooldown": {nil, {"G2503-A.p3.d1"}, {"G2503-A.p3.d1", "G2503-A.p3.d2"}},
}

// linkField is where each kind puts its --from parents, and whether it is a list.
var linkField = map[string]struct {
	key  string
	list bool
}{
	"piece":    {"from", false},
	"device":   {"from", false},
	"process":  {"pieces", true},
	"cooldown": {"devices", true},
}

// quantityFields lists the fields of each kind that hold quantities, as paths
// into the front matter; "[]" walks every element of a list. The schema is the
// entry front-matter contract of the project.
var quantityFields = map[string][]string{
	"wafer": {"design_density"},
	"process": {"steps.solvent_clean.time", "steps.solvent_clean.temperature", "steps.mesa_litho.spin", "steps.mesa_litho.spin_time",
		"steps.mesa_litho.bake", "steps.mesa_litho.bake_time", "steps.mesa_litho.intensity", "steps.mesa_litho.exposure",
		"steps.mesa_litho.develop_time", "steps.mesa_etch.temperature", "steps.mesa_etch.time", "steps.mesa_etch.target",
		"steps.mesa_etch.depth", "steps.deoxidation.time", "steps.deoxidation.rinse", "steps.ohmic_metal.base_pressure",
		"steps.ohmic_liftoff.time", "steps.ohmic_anneal.temperature", "steps.ohmic_anneal.time", "steps.ohmic_anneal.flow",
		"steps.tlm_rt.gaps[]", "steps.tlm_rt.width", "steps.tlm_rt.resistances[]", "steps.tlm_rt.temperature"},
	"piece": {"width", "length", "position.x", "position.y"},
	"mask":  {"width", "length", "probes[].position", "probes[].arm_width"},
	"device": {"as_built.width", "as_built.probes[].position", "as_built.probes[].arm_width",
		"probes[].position"},
	"cooldown": {"base_temperature", "magnet.max_field", "magnet.offset",
		"illumination.current", "illumination.duration", "illumination.temperature", "illumination.gate_bias",
		"excitation.bias_resistor", "excitation.source_voltage", "excitation.current", "excitation.frequency",
		"lockins[].time_constant", "lockins[].phase", "lockins[].sensitivity",
		"data[].temperature", "data[].gate"},
}

// requiredQuantities must be present (with a unit) in the rendered template.
var requiredQuantities = map[string][]string{
	"wafer":   {"design_density"},
	"process": {"steps.mesa_litho.spin", "steps.mesa_litho.bake", "steps.mesa_etch.time", "steps.mesa_etch.depth", "steps.ohmic_anneal.temperature", "steps.tlm_rt.resistances[]"},
	"piece":   {"width", "length", "position.x", "position.y"},
	"mask":    {"width", "length", "probes[].position", "probes[].arm_width"},
	"cooldown": {"base_temperature", "magnet.max_field", "magnet.offset",
		"illumination.current", "illumination.duration", "illumination.temperature", "illumination.gate_bias",
		"excitation.bias_resistor", "excitation.source_voltage", "excitation.current", "excitation.frequency",
		"lockins[].time_constant", "lockins[].phase", "lockins[].sensitivity"},
}

func parseFront(t *testing.T, out []byte) *yaml.Node {
	t.Helper()
	y, ok, err := frontMatter(out)
	if err != nil || !ok {
		t.Fatalf("no front matter (ok=%v, err=%v)", ok, err)
	}
	var doc yaml.Node
	if err := yaml.Unmarshal(y, &doc); err != nil {
		t.Fatalf("front matter: %v", err)
	}
	if doc.Kind != yaml.DocumentNode || len(doc.Content) != 1 || doc.Content[0].Kind != yaml.MappingNode {
		t.Fatalf("front matter is not a mapping")
	}
	return doc.Content[0]
}

func get(m *yaml.Node, key string) *yaml.Node {
	if m == nil || m.Kind != yaml.MappingNode {
		return nil
	}
	for i := 0; i+1 < len(m.Content); i += 2 {
		if m.Content[i].Value == key {
			return m.Content[i+1]
		}
	}
	return nil
}

// lookup follows a path such as "probes[].position" and returns every node
// it reaches.
func lookup(n *yaml.Node, path string) []*yaml.Node {
	nodes := []*yaml.Node{n}
	for _, part := range strings.Split(path, ".") {
		key, each := strings.CutSuffix(part, "[]")
		var next []*yaml.Node
		for _, x := range nodes {
			v := get(x, key)
			if v == nil {
				continue
			}
			if each {
				if v.Kind == yaml.SequenceNode {
					next = append(next, v.Content...)
				}
				continue
			}
			next = append(next, v)
		}
		nodes = next
	}
	return nodes
}

var quantityRE = regexp.MustCompile(`^([-+]?[0-9]*\.?[0-9]+(?:[eE][-+]?[0-9]+)?) +(\S+)$`)

// checkQuantity says what is wrong with a front-matter scalar that should be
// a quantity: a bare number (with or without quotes), a value the project's
// quantity parser rejects, or one without a physical unit (an angle in deg is
// fine). allowText admits a non-numeric text (piece position may be "centre").
func checkQuantity(n *yaml.Node, allowText bool) error {
	if n.Kind != yaml.ScalarNode {
		return fmt.Errorf("line %d: want a quantity, got a %v node", n.Line, n.Kind)
	}
	if _, err := strconv.ParseFloat(strings.TrimSpace(n.Value), 64); err == nil {
		return fmt.Errorf("line %d: %q is a bare number, want a value with a unit", n.Line, n.Value)
	}
	if allowText && !strings.ContainsAny(n.Value, "0123456789") {
		return nil
	}
	q, err := quantity.ParseQuantity(n.Value)
	if err != nil {
		return fmt.Errorf("line %d: %q: %v", n.Line, n.Value, err)
	}
	if q.Dim().IsDimensionless() && !strings.HasSuffix(n.Value, " deg") {
		return fmt.Errorf("line %d: %q has no physical unit", n.Line, n.Value)
	}
	return nil
}

func TestCheckQuantityCatchesBareNumbers(t *testing.T) {
	tests := []struct {
		yaml string
		ok   bool
	}{
		{"v: 100 um", true},
		{"v: 2.5e11 cm^-2", true},
		{"v: -10 mm", true},
		{"v: 100", false},
		{"v: \"100\"", false},
		{"v: 1e3", false},
		{"v: um", false},
		{"v: 100 furlongs", false},
		{"v: 100 deg", true},
		{"v: 3 sq", false},
		{"v: [1, 2]", false},
	}
	for _, tc := range tests {
		var doc yaml.Node
		if err := yaml.Unmarshal([]byte(tc.yaml), &doc); err != nil {
			t.Fatal(err)
		}
		err := checkQuantity(get(doc.Content[0], "v"), false)
		if (err == nil) != tc.ok {
			t.Errorf("checkQuantity(%s) = %v, want ok=%v", tc.yaml, err, tc.ok)
		}
	}
}

func TestRenderedEntriesAreValid(t *testing.T) {
	for kind, cases := range parentCases {
		for _, parents := range cases {
			name := fmt.Sprintf("%s/%d-parents", kind, len(parents))
			t.Run(name, func(t *testing.T) {
				d := Data{Kind: kind, ID: "X-1", Parents: parents, Date: "2025-03-14", By: "RV"}
				out, err := Render(nil, kind, d)
				if err != nil {
					t.Fatal(err)
				}
				fm := parseFront(t, out)
				for key, want := range map[string]string{"id": d.ID, "kind": kind, "by": d.By} {
					if n := get(fm, key); n == nil || n.Value != want || n.Tag != "!!str" {
						t.Errorf("%s: got %+v, want string %q", key, n, want)
					}
				}
				if lf, ok := linkField[kind]; ok {
					n := get(fm, lf.key)
					if n == nil {
						t.Fatalf("link field %s missing", lf.key)
					}
					var got []string
					if lf.list {
						if n.Kind != yaml.SequenceNode {
							t.Fatalf("%s: want a list, got %v", lf.key, n.Kind)
						}
						for _, c := range n.Content {
							got = append(got, c.Value)
						}
					} else if n.Tag == "!!str" {
						got = []string{n.Value}
					} else if n.Tag != "!!null" {
						t.Errorf("%s: want an id or an empty placeholder (null), got tag %s", lf.key, n.Tag)
					}
					if !slices.Equal(got, parents) {
						t.Errorf("%s = %v, want %v", lf.key, got, parents)
					}
				}
				for _, path := range quantityFields[kind] {
					for _, n := range lookup(fm, path) {
						if err := checkQuantity(n, kind == "piece"); err != nil {
							t.Errorf("%s: %v", path, err)
						}
					}
				}
				for _, path := range requiredQuantities[kind] {
					if len(lookup(fm, path)) == 0 {
						t.Errorf("quantity field %s missing from the template", path)
					}
				}
			})
		}
	}
}

func TestDateAndInitialsStayStrings(t *testing.T) {
	// "NO" and "1.5" would read back as a boolean and a number if written plain.
	for _, by := range []string{"", "NO", "1.5", "y", "A.B."} {
		out, err := Render(nil, "wafer", Data{ID: "123", By: by})
		if err != nil {
			t.Fatalf("by %q: %v", by, err)
		}
		fm := parseFront(t, out)
		if n := get(fm, "by"); n.Value != by || n.Tag != "!!str" {
			t.Errorf("by %q came back as %q (%s)", by, n.Value, n.Tag)
		}
		if n := get(fm, "id"); n.Value != "123" || n.Tag != "!!str" {
			t.Errorf("id 123 came back as %q (%s)", n.Value, n.Tag)
		}
	}
}

func TestProcessCautions(t *testing.T) {
	out, err := Render(nil, "process", goldenData("process"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(out)
	// Wording from the cautions that labs require for these hazards: HF (trained
	// users, calcium gluconate, no lone work, medical attention after any
	// exposure), acid/peroxide etches (exothermic, never seal fresh waste),
	// solvents, hot plates, forming gas, arsenic waste, and deference to local
	// rules, SOPs and SDSs.
	for _, want := range []string{
		"HF", "buffered oxide etch", "trained, authorised users only", "Calcium gluconate", "Never work alone",
		"medical attention after any", "exothermic", "never seal fresh", "vented",
		"Caution — solvents:** flammable", "fume hood", "open flames", "Caution — hot plate",
		"forming gas (H₂)", "arsenic-bearing waste", "not a procedure", "not a safety authority",
		"local safety rules", "SOP", "SDS", "authorised user", "ESD",
	} {
		if !strings.Contains(s, want) {
			t.Errorf("process template lacks %q", want)
		}
	}
	// Each hazardous step carries its caution inside that step's section.
	for step, want := range map[string][]string{
		"## 1. Solvent clean":   {"solvents"},
		"## 2. Lithography":     {"hot plate"},
		"## 3. Mesa etch":       {"acid / peroxide", "arsenic"},
		"## 4. Deoxidation dip": {"HF"},
		"## 5. Ohmic contacts":  {"solvents", "forming gas"},
		"## 7. Mounting":        {"ESD"},
	} {
		sec := section(s, step)
		if sec == "" {
			t.Errorf("no section %q", step)
			continue
		}
		for _, w := range want {
			if !strings.Contains(sec, "**Caution — "+w) && !strings.Contains(sec, "**Care — "+w) {
				t.Errorf("section %q has no %q badge", step, w)
			}
		}
	}
}

// section returns the text from the heading that starts with prefix up to
// the next "## " heading.
func section(s, prefix string) string {
	i := strings.Index(s, "\n"+prefix)
	if i < 0 {
		return ""
	}
	rest := s[i+1:]
	if j := strings.Index(rest[1:], "\n## "); j >= 0 {
		return rest[:j+1]
	}
	return rest
}

func TestCooldownCautions(t *testing.T) {
	out, err := Render(nil, "cooldown", goldenData("cooldown"))
	if err != nil {
		t.Fatal(err)
	}
	s := string(out)
	for _, want := range []string{"cold burns", "asphyxiation", "quench", "evacuate", "Fringe fields",
		"medical", "non-magnetic", "local safety rules", "not a procedure"} {
		if !strings.Contains(s, want) {
			t.Errorf("cooldown template lacks %q", want)
		}
	}
}

func TestPieceCaution(t *testing.T) {
	out, err := Render(nil, "piece", goldenData("piece"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"GaAs debris", "arsenic", "local rules", "major flat", "[1-10]"} {
		if !strings.Contains(string(out), want) {
			t.Errorf("piece template lacks %q", want)
		}
	}
}

// qty parses a front-matter quantity with the project's parser and returns
// its value in SI base units.
func qty(t *testing.T, n *yaml.Node) float64 {
	t.Helper()
	if n == nil {
		t.Fatal("missing quantity")
	}
	q, err := quantity.ParseQuantity(n.Value)
	if err != nil {
		t.Fatalf("line %d: %v", n.Line, err)
	}
	return q.Value()
}

// The mask's pair table and warning must agree with its own front matter.
func TestMaskGeometry(t *testing.T) {
	out, err := Render(nil, "mask", goldenData("mask"))
	if err != nil {
		t.Fatal(err)
	}
	fm := parseFront(t, out)
	w := qty(t, get(fm, "width"))
	length := qty(t, get(fm, "length"))
	pos := map[string]float64{}
	side := map[string]string{}
	for _, p := range lookup(fm, "probes[]") {
		name := get(p, "name").Value
		pos[name] = qty(t, get(p, "position"))
		side[name] = get(p, "side").Value
		// Probe arms narrow, at most W/5 (common practice).
		if a := qty(t, get(p, "arm_width")); a > w/5 {
			t.Errorf("%s: arm %g m wider than W/5", name, a)
		}
		// Probes at least about 3 W from source and drain, so the current
		// contacts short little of the Hall voltage (Hall-plate analyses:
		// Chwang, Smith & Crowell, Solid-State Electron. 17, 1217 (1974)).
		if p := pos[name]; p < 3*w-1e-12 || length-p < 3*w-1e-12 {
			t.Errorf("%s at %g m is closer than 3 W to a current contact", name, p)
		}
	}
	warn := section(string(out), "## Probe pairs")
	warnLine := warn[strings.Index(warn, "Warning"):]
	rowRE := regexp.MustCompile(`(?m)^\| (V\d)-(V\d) +\| ([^|]+?) +\| ([^|]+?) +\| (.*?) +\|$`)
	rows := rowRE.FindAllStringSubmatch(string(out), -1)
	if len(rows) != 9 {
		t.Fatalf("found %d pair rows, want 9", len(rows))
	}
	for _, r := range rows {
		a, b := r[1], r[2]
		if side[a] != side[b] {
			// a Hall pair: same position, opposite sides
			if pos[a] != pos[b] || r[5] != "Hall" {
				t.Errorf("Hall pair %s-%s: positions %g, %g, use %q", a, b, pos[a], pos[b], r[5])
			}
			continue
		}
		l := math.Abs(pos[b] - pos[a])
		if got := qtyText(t, r[3]); math.Abs(got-l) > 1e-12 {
			t.Errorf("%s-%s: table L = %s, front matter gives %g m", a, b, r[3], l)
		}
		// rho_xx = R_xx W/L: the squares are L/W (Hall bar; calc/SOURCES.md [src:IHN2010]).
		sq, _ := strconv.ParseFloat(r[4], 64)
		if math.Abs(sq-l/w) > 1e-9 {
			t.Errorf("%s-%s: table L/W = %s, want %g", a, b, r[4], l/w)
		}
		short := l/w < 3 // common practice threshold
		if short != strings.Contains(r[5], "warning") {
			t.Errorf("%s-%s: L/W = %g, use %q: warning flag wrong", a, b, l/w, r[5])
		}
		if short != strings.Contains(warnLine, a+"-"+b) {
			t.Errorf("%s-%s: L/W = %g but the warning line lists it: %v", a, b, l/w, !short)
		}
	}
}

func qtyText(t *testing.T, s string) float64 {
	t.Helper()
	s = strings.TrimSpace(strings.TrimSuffix(s, "um"))
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("length %q: %v", s, err)
	}
	return v * 1e-6
}

// The cooldown's example excitation must be self-consistent and typical.
func TestCooldownExcitation(t *testing.T) {
	out, err := Render(nil, "cooldown", goldenData("cooldown"))
	if err != nil {
		t.Fatal(err)
	}
	fm := parseFront(t, out)
	ex := get(fm, "excitation")
	r, v, i, f := qty(t, get(ex, "bias_resistor")), qty(t, get(ex, "source_voltage")), qty(t, get(ex, "current")), qty(t, get(ex, "frequency"))
	// Ohm's law: a 1 V source through 100 MOhm drives 10 nA; the sample and
	// lines add a little, so the measured current is within 1 % below V/R.
	if ideal := v / r; i > ideal || i < 0.99*ideal {
		t.Errorf("measured current %g A, V/R = %g A", i, ideal)
	}
	// Common practice: 10-100 MOhm bias resistor, 1-100 nA
	// below 1 K, lock-in at 7-33 Hz away from 50/60 Hz harmonics.
	if r < 10e6 || r > 100e6 {
		t.Errorf("bias resistor %g Ohm outside 10-100 MOhm", r)
	}
	if base := qty(t, get(fm, "base_temperature")); base < 1 && (i < 1e-9 || i > 100e-9) {
		t.Errorf("current %g A outside 1-100 nA at %g K", i, base)
	}
	if f < 7 || f > 33 {
		t.Errorf("frequency %g Hz outside 7-33 Hz", f)
	}
	for _, mains := range []float64{50, 60} {
		for k := 1.0; k*mains < 200; k++ {
			if math.Abs(f-k*mains) < 2 || math.Abs(f-k*mains/2) < 2 {
				t.Errorf("frequency %g Hz within 2 Hz of %g Hz", f, k*mains)
			}
		}
	}
	for _, lk := range lookup(fm, "lockins[]") {
		if tc := qty(t, get(lk, "time_constant")); tc < 0.03 || tc > 3 {
			t.Errorf("time constant %g s outside 0.03-3 s", tc)
		}
	}
}

// The wafer's example layer table follows the notebook's table contract.
func TestWaferLayers(t *testing.T) {
	out, err := Render(nil, "wafer", goldenData("wafer"))
	if err != nil {
		t.Fatal(err)
	}
	sec := section(string(out), "## Layers")
	var rows [][]string
	for _, line := range strings.Split(sec, "\n") {
		if !strings.HasPrefix(line, "|") {
			continue
		}
		var cells []string
		for _, c := range strings.Split(strings.Trim(line, "|"), "|") {
			cells = append(cells, strings.TrimSpace(c))
		}
		rows = append(rows, cells)
	}
	if len(rows) < 3 {
		t.Fatalf("layer table has %d rows", len(rows))
	}
	head := rows[0]
	col := func(name string) int { return slices.Index(head, name) }
	if col("material") < 0 || col("thickness") < 0 {
		t.Fatalf("layer table header %v lacks material or thickness", head)
	}
	doping := regexp.MustCompile(`^(-|Si [0-9.]+e[0-9]+ cm\^-3|Si delta [0-9.]+e[0-9]+ cm\^-2)$`)
	fm := parseFront(t, out)
	var delta float64
	for _, r := range rows[2:] {
		if len(r) != len(head) {
			t.Errorf("row %v has %d cells, header %d", r, len(r), len(head))
			continue
		}
		if m := quantityRE.FindStringSubmatch(r[col("thickness")]); m == nil || m[2] != "nm" {
			t.Errorf("thickness %q is not NUMBER nm", r[col("thickness")])
		}
		dp := r[col("doping")]
		if !doping.MatchString(dp) {
			t.Errorf("doping %q is not in the contract's forms", dp)
		}
		if strings.Contains(dp, "delta") {
			delta, _ = strconv.ParseFloat(strings.Fields(dp)[2], 64)
		}
	}
	if get(fm, "doping_scheme").Value != "delta" || delta == 0 {
		t.Errorf("doping_scheme %q but delta sheet %g", get(fm, "doping_scheme").Value, delta)
	}
	// Modulation-doped GaAs wafers usually give 1-4e11 cm^-2 (common practice);
	// the design density must not exceed the donor sheet density.
	n := qty(t, get(fm, "design_density")) / 1e4
	if n < 1e11 || n > 4e11 || n > delta {
		t.Errorf("design density %g cm^-2 (donor sheet %g cm^-2)", n, delta)
	}
	// Al fraction above 0.22 with Si donors: the DX caution must be there
	// (Mooney, J. Appl. Phys. 67, R1 (1990)).
	if !strings.Contains(sec, "Al0.3Ga0.7As") || !strings.Contains(sec, "DX") {
		t.Error("Al0.3 with Si but no DX note")
	}
}

// calcBlocks returns the lines of every fenced block whose info string is
// calc, as goldmark parses the body (front matter removed).
func calcBlocks(doc []byte) [][]string {
	if y, ok, _ := frontMatter(doc); ok {
		doc = doc[bytes.Index(doc, y)+len(y):]
		_, doc, _ = bytes.Cut(doc, []byte("\n"))
	}
	root := goldmark.New().Parser().Parse(text.NewReader(doc))
	var blocks [][]string
	ast.Walk(root, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		fc, ok := n.(*ast.FencedCodeBlock)
		if !entering || !ok || string(fc.Language(doc)) != "cleave" {
			return ast.WalkContinue, nil
		}
		var lines []string
		for i := 0; i < fc.Lines().Len(); i++ {
			seg := fc.Lines().At(i)
			lines = append(lines, strings.TrimRight(string(seg.Value(doc)), "\n"))
		}
		blocks = append(blocks, lines)
		return ast.WalkSkipChildren, nil
	})
	return blocks
}

// Calc blocks in templates carry no result region of the tool's (the first
// `cleave calc` writes them), and their live lines are ones that evaluate on a
// fresh entry: main_test's TestInitNewValidate runs `cleave check` on a notebook
// made of rendered templates. Lines that need links a new entry cannot have yet
// (a device's mask, a cooldown's data files) stay comments.
func TestCalcBlocksInTemplates(t *testing.T) {
	want := map[string]int{"wafer": 2, "mask": 1, "device": 1, "cooldown": 1, "process": 1}
	live := map[string][]string{
		"wafer":   {"sp = expected_density(wafer.layers, T = 1.5 K)", "n_expected = sp.n", "chk = growth_check(wafer.layers)"},
		"mask":    {`sq_13 = squares("V1", "V3")`},
		"process": {"rate = etch_rate(steps.mesa_etch)", "tl = tlm(steps.tlm_rt)"},
	}
	for _, name := range Names() {
		out, err := Render(nil, name, goldenData(name))
		if err != nil {
			t.Fatal(err)
		}
		blocks := calcBlocks(out)
		if len(blocks) != want[name] {
			t.Errorf("%s: %d calc blocks, want %d", name, len(blocks), want[name])
		}
		var code []string
		for _, b := range blocks {
			for _, line := range b {
				if strings.Contains(line, "#~") {
					t.Errorf("%s: calc line %q holds a result region", name, line)
				}
				if !strings.HasPrefix(line, "#") && strings.TrimSpace(line) != "" {
					code = append(code, line)
				}
			}
		}
		for _, l := range live[name] {
			if !slices.Contains(code, l) {
				t.Errorf("%s: calc block lacks the line %q (has %q)", name, l, code)
			}
		}
		if len(live[name]) == 0 && len(code) > 0 {
			t.Errorf("%s: live calc lines %q would fail on a fresh entry", name, code)
		}
	}
}

func TestOverride(t *testing.T) {
	own := "---\nid: {{ yq .ID }}\nkind: wafer\nsystem: \"chamber C\"\n---\n\n# {{ .ID }} by {{ .By }}\n"
	fsys := fstest.MapFS{"wafer.md": {Data: []byte(own)}}
	got, err := Render(fsys, "wafer", Data{ID: "G1", By: "TS"})
	if err != nil {
		t.Fatal(err)
	}
	if want := "---\nid: G1\nkind: wafer\nsystem: \"chamber C\"\n---\n\n# G1 by TS\n"; string(got) != want {
		t.Errorf("override rendered %q, want %q", got, want)
	}
	// Names the override does not have fall back to the built-in template.
	piece, err := Render(fsys, "piece", Data{ID: "G1.p1", Parents: []string{"G1"}})
	if err != nil {
		t.Fatal(err)
	}
	builtin, _ := Render(nil, "piece", Data{ID: "G1.p1", Parents: []string{"G1"}})
	if !bytes.Equal(piece, builtin) {
		t.Error("piece with an override folder lacking piece.md differs from the built-in")
	}
	// An override may add a template the defaults do not have.
	extra, err := Render(fstest.MapFS{"vdp-note.md": {Data: []byte("van der Pauw {{ .ID }}\n")}}, "vdp-note", Data{ID: "n1"})
	if err != nil || string(extra) != "van der Pauw n1\n" {
		t.Errorf("extra template: %q, %v", extra, err)
	}
}

func TestOverrideErrors(t *testing.T) {
	tests := []struct {
		name, src  string
		line, col  int
		wantSubstr string
	}{
		{"syntax", "---\nid: {{ yq .ID }}\nkind: wafer\n---\n{{ if .By }}\n", 6, 0, "unexpected EOF"},
		{"bad action", "---\nid: x\n\nkind: {{ .Kind }\n---\n", 4, 0, "unexpected"},
		{"unknown field", "line one\nline two {{ .Wafer }}\n", 2, 12, "Wafer"},
		{"unknown function", "a\nb\nc {{ band .ID }}\n", 3, 0, "band"},
		{"bad yaml", "---\nid: {{ yq .ID }}\nkind: wafer\nx: [unclosed\n---\n", 0, 0, "not valid YAML"},
		{"wrong kind", "---\nid: {{ yq .ID }}\nkind: piece\n---\n", 0, 0, "kind piece"},
		{"wrong id", "---\nid: other\nkind: wafer\n---\n", 0, 0, "id other"},
		{"no front matter", "# just a heading\n", 0, 0, "no front matter"},
		{"unclosed front matter", "---\nid: {{ yq .ID }}\nkind: wafer\n", 0, 0, "never closed"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Render(fstest.MapFS{"wafer.md": {Data: []byte(tc.src)}}, "wafer", Data{ID: "G1"})
			var te *Error
			if !errors.As(err, &te) {
				t.Fatalf("err = %v (%T), want *Error", err, err)
			}
			if te.File != "wafer.md" || !te.Override || te.Line != tc.line || (tc.col != 0 && te.Col != tc.col) {
				t.Errorf("got file %q override %v line %d col %d, want wafer.md true %d %d (%v)", te.File, te.Override, te.Line, te.Col, tc.line, tc.col, err)
			}
			msg := err.Error()
			if !strings.Contains(msg, "notebook template wafer.md") || !strings.Contains(msg, tc.wantSubstr) {
				t.Errorf("message %q lacks the file or %q", msg, tc.wantSubstr)
			}
			if tc.line > 0 && !strings.Contains(msg, "wafer.md:"+strconv.Itoa(tc.line)) {
				t.Errorf("message %q lacks wafer.md:%d", msg, tc.line)
			}
		})
	}
}

// brokenFS fails every open with an error other than "does not exist".
type brokenFS struct{}

func (brokenFS) Open(string) (fs.File, error) { return nil, errors.New("disk on fire") }

func TestDataErrors(t *testing.T) {
	tests := []struct {
		name string
		tmpl string
		d    Data
		want error
	}{
		{"empty id", "wafer", Data{}, ErrBadID},
		{"space in id", "piece", Data{ID: "G1 p1"}, ErrBadID},
		{"slash in parent", "piece", Data{ID: "p", Parents: []string{"../G1"}}, ErrBadID},
		{"wafer with parent", "wafer", Data{ID: "G1", Parents: []string{"G0"}}, ErrParents},
		{"mask with parent", "mask", Data{ID: "m", Parents: []string{"G0"}}, ErrParents},
		{"piece with two parents", "piece", Data{ID: "p", Parents: []string{"G0", "G1"}}, ErrParents},
		{"device with two parents", "device", Data{ID: "d", Parents: []string{"p1", "p2"}}, ErrParents},
		{"date format", "wafer", Data{ID: "G1", Date: "14.03.2025"}, ErrBadDate},
		{"impossible date", "wafer", Data{ID: "G1", Date: "2025-02-30"}, ErrBadDate},
		{"unknown template", "sample", Data{ID: "s"}, ErrUnknownTemplate},
		{"path as name", "../wafer", Data{ID: "s"}, ErrUnknownTemplate},
		{"empty name", "", Data{ID: "s"}, ErrUnknownTemplate},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out, err := Render(nil, tc.tmpl, tc.d)
			if !errors.Is(err, tc.want) {
				t.Errorf("Render(%q, %+v) = %q, %v; want %v", tc.tmpl, tc.d, out, err, tc.want)
			}
		})
	}
}

func TestOverrideReadError(t *testing.T) {
	_, err := Render(brokenFS{}, "wafer", Data{ID: "G1"})
	var te *Error
	if !errors.As(err, &te) || !te.Override || !strings.Contains(err.Error(), "disk on fire") {
		t.Errorf("err = %v, want the read error from the override folder", err)
	}
}

func TestYAMLScalarRoundTrip(t *testing.T) {
	fixed := []string{"", "G1", "123", "1e3", "0x10", "true", "NO", "null", "~", "2025-03-14", "a: b",
		"# c", "- x", "[1]", "'q'", "\"dq\"", "line\nbreak", "tab\there", " lead", "trail ", "é", "*anchor"}
	rng := rand.New(rand.NewPCG(1, 2))
	alphabet := []rune("aZ09-_.:#'\"[]{}!&*|>%@` \t\nπ")
	for range 500 {
		r := make([]rune, rng.IntN(8))
		for i := range r {
			r[i] = alphabet[rng.IntN(len(alphabet))]
		}
		fixed = append(fixed, string(r))
	}
	for _, s := range fixed {
		roundTrip(t, s)
	}
}

func roundTrip(t *testing.T, s string) {
	t.Helper()
	q := yamlScalar(s)
	if strings.Contains(q, "\n") {
		t.Fatalf("yamlScalar(%q) = %q spans lines", s, q)
	}
	var m map[string]any
	if err := yaml.Unmarshal([]byte("k: "+q+"  # comment\n"), &m); err != nil {
		t.Fatalf("yamlScalar(%q) = %q: %v", s, q, err)
	}
	if got, ok := m["k"].(string); !ok || got != s {
		t.Fatalf("yamlScalar(%q) = %q reads back as %#v", s, q, m["k"])
	}
}

func TestOutputCap(t *testing.T) {
	src := "{{ range 2000000 }}x{{ end }}"
	_, err := Render(fstest.MapFS{"note.md": {Data: []byte(src)}}, "note", Data{})
	var te *Error
	if !errors.As(err, &te) || !strings.Contains(err.Error(), "exceeds") {
		t.Errorf("err = %v, want the output cap error", err)
	}
}

func TestFrontMatter(t *testing.T) {
	tests := []struct {
		name, doc, yaml string
		ok, err         bool
	}{
		{"none", "# title\n", "", false, false},
		{"plain", "---\nid: a\n---\nbody\n", "id: a\n", true, false},
		{"dots close", "---\nid: a\n...\n", "id: a\n", true, false},
		{"crlf", "---\r\nid: a\r\n---\r\n", "id: a\r\n", true, false},
		{"bom", "\ufeff---\nid: a\n---\n", "id: a\n", true, false},
		{"empty", "---\n---\n", "", true, false},
		{"unclosed", "---\nid: a\n", "", true, true},
		{"no newline", "---", "", true, true}, // an opening line with nothing after it never closes
		{"trailing blanks", "--- \nid: a\n---\t\n", "id: a\n", true, false},
		{"not a delimiter", "----\nid: a\n---\n", "", false, false},
	}
	for _, tc := range tests {
		y, ok, err := frontMatter([]byte(tc.doc))
		if string(y) != tc.yaml || ok != tc.ok || (err != nil) != tc.err {
			t.Errorf("%s: got %q, %v, %v", tc.name, y, ok, err)
		}
	}
}

// fuzzUnbounded matches template text that can loop over a huge integer or
// call templates recursively.
var fuzzUnbounded = regexp.MustCompile(`range[^}]*[0-9]|template|block|define`)

func FuzzRenderOverride(f *testing.F) {
	for _, name := range Names() {
		src, _ := defaults.ReadFile("defaults/" + name + ".md")
		f.Add(string(src))
	}
	f.Add("{{ if }}")
	f.Add("---\nid: {{ yq .ID }}\nkind: wafer\n---\n")
	f.Fuzz(func(t *testing.T, src string) {
		if fuzzUnbounded.MatchString(src) {
			// A loop over a huge integer or a self-calling template runs
			// as long as its author asked: the override is the user's own
			// file, and text/template cannot be cancelled.
			t.Skip("unbounded loops and recursion are out of scope")
		}
		d := Data{ID: "G1", Date: "2025-03-14", By: "RV"}
		out, err := Render(fstest.MapFS{"wafer.md": {Data: []byte(src)}}, "wafer", d)
		if err != nil {
			var te *Error
			if !errors.As(err, &te) {
				t.Fatalf("error %v is not an *Error", err)
			}
			if lines := strings.Count(src, "\n") + 1; te.Line < 0 || te.Line > lines {
				t.Fatalf("error line %d outside the template's %d lines: %v", te.Line, lines, err)
			}
			return
		}
		// What renders is an entry whose front matter has the right id and kind.
		y, ok, ferr := frontMatter(out)
		if ferr != nil || !ok {
			t.Fatalf("rendered without error but front matter ok=%v err=%v", ok, ferr)
		}
		var m map[string]any
		if yaml.Unmarshal(y, &m) != nil || m["id"] != "G1" || m["kind"] != "wafer" {
			t.Fatalf("rendered front matter %q", y)
		}
	})
}

func FuzzYAMLScalar(f *testing.F) {
	for _, s := range []string{"", "G1", "123", "true", "a: b", "line\nbreak", "2025-03-14"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if !utf8.ValidString(s) {
			t.Skip("YAML text is UTF-8")
		}
		roundTrip(t, s)
	})
}

func BenchmarkRenderBuiltin(b *testing.B) {
	d := goldenData("cooldown")
	for b.Loop() {
		if _, err := Render(nil, "cooldown", d); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkRenderOverride(b *testing.B) {
	src, _ := defaults.ReadFile("defaults/process.md")
	fsys := fstest.MapFS{"process.md": {Data: src}}
	d := goldenData("process")
	for b.Loop() {
		if _, err := Render(fsys, "process", d); err != nil {
			b.Fatal(err)
		}
	}
}

// The commented-out examples (device as_built, cooldown data) must become
// valid front matter, with units, once a user uncomments them.
func TestCommentedExamplesUncomment(t *testing.T) {
	tests := []struct {
		kind, replace, with string
		prefix              string // comment prefix to strip from the example's lines
		paths               []string
	}{
		{"device", "", "", "# ", []string{"as_built.width", "as_built.probes[].position", "as_built.probes[].arm_width"}},
		{"cooldown", "data: []", "data:", "#", []string{"data[].temperature", "data[].gate"}},
	}
	for _, tc := range tests {
		out, err := Render(nil, tc.kind, goldenData(tc.kind))
		if err != nil {
			t.Fatal(err)
		}
		y, _, _ := frontMatter(out)
		var lines []string
		for _, l := range strings.Split(string(y), "\n") {
			if tc.replace != "" && strings.HasPrefix(l, tc.replace) {
				l = tc.with
			}
			if strings.HasPrefix(l, "#") {
				l = strings.TrimPrefix(l, tc.prefix)
			}
			lines = append(lines, l)
		}
		doc := []byte("---\n" + strings.Join(lines, "\n") + "---\n")
		fm := parseFront(t, doc)
		for _, p := range tc.paths {
			nodes := lookup(fm, p)
			if len(nodes) == 0 {
				t.Errorf("%s: uncommented example has no %s", tc.kind, p)
			}
			for _, n := range nodes {
				if err := checkQuantity(n, false); err != nil {
					t.Errorf("%s: %s: %v", tc.kind, p, err)
				}
			}
		}
	}
}

// TestCooldownDataPaths: the data paths the cooldown template suggests, taken relative
// to the entry in cooldowns/ as data("…") takes them, land in the notebook's data/ folder
// that `cleave init` creates (a folder per cooldown), not in a cooldowns/data/ nobody made.
func TestCooldownDataPaths(t *testing.T) {
	b, err := Render(nil, "cooldown", Data{Kind: "cooldown", ID: "CD-7", Date: "2025-03-20"})
	if err != nil {
		t.Fatal(err)
	}
	re := regexp.MustCompile(`data\("([^"]+)"\)|file: (\S+)`)
	found := 0
	for _, m := range re.FindAllStringSubmatch(string(b), -1) {
		p := m[1] + m[2]
		found++
		if got := path.Join("cooldowns", p); !strings.HasPrefix(got, "data/CD-7/") {
			t.Errorf("template path %q resolves to %s from cooldowns/, want data/CD-7/…", p, got)
		}
	}
	if found < 2 {
		t.Errorf("found %d data paths in the cooldown template, want the data: example and the data(...) example", found)
	}
}
