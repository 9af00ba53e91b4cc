package notebook

import (
	"bytes"
	"cleave/internal/testutil"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"testing/fstest"
)

// golden compares got with the file at path, or rewrites it with -update (testutil's flag).
func golden(t *testing.T, path string, got []byte) {
	t.Helper()
	testutil.Golden(t, path, got)
}

func loadGood(t testing.TB) *Notebook {
	t.Helper()
	nb, err := LoadDir("testdata/good")
	if err != nil {
		t.Fatal(err)
	}
	return nb
}

func TestGoodNotebookHasNoProblems(t *testing.T) {
	nb := loadGood(t)
	if ps := nb.Validate(); len(ps) != 0 {
		t.Fatalf("want no problems, got %q", ps)
	}
	var paths []string
	for _, f := range nb.Files {
		paths = append(paths, f.Path)
	}
	// hidden directories and the top-level templates/ folder are skipped;
	// README.md is a note (a file without an entry).
	want := []string{"README.md", "cooldowns/C-2023-06-10.md", "devices/D-17a-1.md", "masks/HB-6.md",
		"pieces/W23-017-a.md", "pieces/W23-017-a1.md", "processes/F-031.md", "wafers/W23-017.md"}
	if !slices.Equal(paths, want) {
		t.Errorf("files: got %q, want %q", paths, want)
	}
	if len(nb.Entries) != 7 {
		t.Errorf("entries: got %d, want 7", len(nb.Entries))
	}
	if f, ok := nb.File("README.md"); !ok || f.Entry != nil {
		t.Errorf("README.md should be a note without an entry")
	}
}

// TestBroken loads each notebook under testdata/broken/<case>/ and compares
// the problems with <case>/problems.golden.
func TestBroken(t *testing.T) {
	dirs, err := os.ReadDir("testdata/broken")
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range dirs {
		if !d.IsDir() {
			continue
		}
		t.Run(d.Name(), func(t *testing.T) {
			dir := filepath.Join("testdata/broken", d.Name())
			nb, err := LoadDir(dir)
			if err != nil {
				t.Fatal(err)
			}
			ps := nb.Validate()
			if len(ps) == 0 {
				t.Fatal("a broken notebook gave no problems")
			}
			var b strings.Builder
			for _, p := range ps {
				b.WriteString(p.Error() + "\n")
			}
			golden(t, filepath.Join(dir, "problems.golden"), []byte(b.String()))
			// Validate is repeatable and sorted.
			if again := nb.Validate(); !slices.Equal(ps, again) {
				t.Errorf("second Validate differs")
			}
			checkPositions(t, nb, ps)
		})
	}
}

// checkPositions asserts that every problem points inside its file.
func checkPositions(t *testing.T, nb *Notebook, ps []Problem) {
	t.Helper()
	for _, p := range ps {
		f, ok := nb.File(p.Path)
		if !ok {
			t.Errorf("problem names unknown file: %v", p)
			continue
		}
		lines := bytes.Count(f.Source().Raw, []byte("\n")) + 1
		if p.Line < 1 || p.Line > lines || p.Col < 1 {
			t.Errorf("position outside the file (%d lines): %v", lines, p)
		}
	}
}

func TestTreeGolden(t *testing.T) {
	nb := loadGood(t)
	for _, tc := range []struct{ id, file string }{
		{"", "tree-all.golden"},
		{"D-17a-1", "tree-device.golden"},
		{"W23-017-a1", "tree-subpiece.golden"},
		{"HB-6", "tree-mask.golden"},
	} {
		var b bytes.Buffer
		if err := nb.Tree(&b, tc.id); err != nil {
			t.Fatal(err)
		}
		golden(t, filepath.Join("testdata", tc.file), b.Bytes())
	}
	if err := nb.Tree(&bytes.Buffer{}, "nope"); err == nil || !strings.Contains(err.Error(), `"nope"`) {
		t.Errorf("Tree of a missing id: got %v", err)
	}
}

func ids(es []*Entry) []string {
	out := []string{}
	for _, e := range es {
		out = append(out, e.ID)
	}
	return out
}

func TestLineage(t *testing.T) {
	nb := loadGood(t)
	tests := []struct {
		id                 string
		ancestors, descend []string
		context            []string
	}{
		{"W23-017", []string{}, []string{"W23-017-a", "W23-017-a1", "D-17a-1", "F-031", "C-2023-06-10"}, []string{"W23-017"}},
		{"W23-017-a", []string{"W23-017"}, []string{"W23-017-a1", "D-17a-1", "F-031", "C-2023-06-10"}, []string{"W23-017-a", "W23-017"}},
		{"HB-6", []string{}, []string{"D-17a-1", "C-2023-06-10"}, []string{"HB-6"}},
		{"F-031", []string{"W23-017-a", "W23-017"}, []string{"D-17a-1", "C-2023-06-10"}, []string{"F-031", "W23-017-a", "W23-017"}},
		{"D-17a-1", []string{"W23-017-a", "HB-6", "F-031", "W23-017"}, []string{"C-2023-06-10"}, []string{"D-17a-1", "W23-017-a", "HB-6", "F-031", "W23-017"}},
		{"C-2023-06-10", []string{"D-17a-1", "W23-017-a", "HB-6", "F-031", "W23-017"}, []string{}, []string{"C-2023-06-10", "D-17a-1", "W23-017-a", "HB-6", "F-031", "W23-017"}},
	}
	for _, tc := range tests {
		t.Run(tc.id, func(t *testing.T) {
			if got := ids(nb.Ancestors(tc.id)); !slices.Equal(got, tc.ancestors) {
				t.Errorf("Ancestors: got %q, want %q", got, tc.ancestors)
			}
			if got := ids(nb.Descendants(tc.id)); !slices.Equal(got, tc.descend) {
				t.Errorf("Descendants: got %q, want %q", got, tc.descend)
			}
			e, _ := nb.Entry(tc.id)
			if got := ids(nb.Context(e)); !slices.Equal(got, tc.context) {
				t.Errorf("Context: got %q, want %q", got, tc.context)
			}
		})
	}
	if nb.Ancestors("missing") != nil || nb.Descendants("missing") != nil {
		t.Error("lineage of a missing id should be nil")
	}
	d, _ := nb.Entry("C-2023-06-10")
	if m, ok := nb.Nearest(d, KindMask); !ok || m.ID != "HB-6" {
		t.Errorf("Nearest mask of the cooldown: got %v", m)
	}
}

// TestLineageProperties checks invariants on the demo and on a generated
// notebook: x is an ancestor of y exactly when y is a descendant of x, and
// no entry is its own ancestor in an acyclic notebook.
func TestLineageProperties(t *testing.T) {
	for _, nb := range []*Notebook{loadGood(t), mustLoad(t, genNotebook(60, 7))} {
		if ps := nb.Validate(); len(ps) != 0 {
			t.Fatalf("generated notebook has problems: %v", ps[0])
		}
		for _, x := range nb.Entries {
			anc := ids(nb.Ancestors(x.ID))
			if slices.Contains(anc, x.ID) {
				t.Errorf("%s is its own ancestor", x.ID)
			}
			for _, a := range anc {
				if !slices.Contains(ids(nb.Descendants(a)), x.ID) {
					t.Errorf("%s is an ancestor of %s but %s is not its descendant", a, x.ID, x.ID)
				}
			}
			for _, p := range nb.Parents(x) {
				if !slices.Contains(nb.Children(p), x) {
					t.Errorf("%s is a parent of %s but not the reverse", p.ID, x.ID)
				}
			}
		}
	}
}

func mustLoad(t testing.TB, fsys fstest.MapFS) *Notebook {
	t.Helper()
	nb, err := Load(fsys)
	if err != nil {
		t.Fatal(err)
	}
	return nb
}

func TestCycleDoesNotHang(t *testing.T) {
	nb, err := LoadDir("testdata/broken/cycle")
	if err != nil {
		t.Fatal(err)
	}
	if got := ids(nb.Ancestors("A")); !slices.Equal(got, []string{"B", "C"}) {
		t.Errorf("Ancestors(A) in a cycle: got %q", got)
	}
	var b bytes.Buffer
	if err := nb.Tree(&b, ""); err != nil {
		t.Fatal(err)
	}
	for _, id := range []string{"piece A ", "piece B ", "piece C ", "piece S "} {
		if !strings.Contains(b.String(), id) {
			t.Errorf("tree of a cyclic notebook misses %q:\n%s", id, b.String())
		}
	}
}

func TestEntryAccessors(t *testing.T) {
	nb := loadGood(t)
	m, _ := nb.Entry("HB-6")
	tests := []struct {
		path []string
		want string
		ok   bool
	}{
		{[]string{"width"}, "20 um", true},
		{[]string{"probes", "1", "name"}, "P2", true},
		{[]string{"probes", "7", "name"}, "", false},
		{[]string{"probes", "x"}, "", false},
		{[]string{"contacts", "P3"}, "5", true},
		{[]string{"version"}, "2", true},
		{[]string{"nothing"}, "", false},
		{[]string{"probes"}, "", false}, // not a scalar
	}
	for _, tc := range tests {
		got, ok := m.Text(tc.path...)
		if got != tc.want || ok != tc.ok {
			t.Errorf("Text(%q) = %q, %v; want %q, %v", tc.path, got, ok, tc.want, tc.ok)
		}
	}
	n, _ := m.Field("width")
	if l, c := m.Pos(n); l != 5 || c != 8 {
		t.Errorf("Pos(width) = %d:%d, want 5:8", l, c)
	}
	w, err := m.Quantity("probes", "1", "position")
	// 450 um = 4.5e-4 m (SI prefix micro = 1e-6, BIPM SI Brochure 9th ed.)
	if err != nil || w.Value() != 450e-6 {
		t.Errorf("Quantity(probes.1.position) = %v, %v; want 4.5e-4 m", w, err)
	}
	if _, err := m.Quantity("nothing"); err == nil {
		t.Error("Quantity of a missing field should fail")
	}
	d, _ := nb.Entry("D-17a-1")
	got := d.Links()
	want := []Link{{"from", "W23-017-a", 4, 7}, {"mask", "HB-6", 5, 7}, {"process", "F-031", 6, 11}}
	if !slices.Equal(got, want) {
		t.Errorf("Links: got %v, want %v", got, want)
	}
}

func TestLayers(t *testing.T) {
	nb := loadGood(t)
	w, _ := nb.Entry("W23-017")
	type row struct {
		layer, material, doping string
		line                    int
		thicknessM              float64
	}
	want := []row{
		{"cap", "GaAs", "", 23, 10e-9},
		{"barrier", "Al0.33Ga0.67As", "", 24, 40e-9},
		{"doping", "Al0.33Ga0.67As", "Si delta 2.5e12 cm^-2", 25, 1e-9},
		{"spacer", "Al0.33Ga0.67As", "", 26, 60e-9},
		{"channel", "GaAs", "", 27, 1e-6},
	}
	if len(w.LayerRows()) != len(want) {
		t.Fatalf("got %d layers, want %d", len(w.LayerRows()), len(want))
	}
	for i, r := range w.LayerRows() {
		got := row{r.Layer, r.Material, r.Doping, r.Line, r.ThicknessQ.Value()}
		// nm = 1e-9 m, um = 1e-6 m (SI prefixes, BIPM SI Brochure 9th ed.); compare relatively
		if got.layer != want[i].layer || got.material != want[i].material || got.doping != want[i].doping || got.line != want[i].line ||
			!close(got.thicknessM, want[i].thicknessM) {
			t.Errorf("layer %d: got %+v, want %+v", i, got, want[i])
		}
	}
	if w.LayerTableLine != 21 {
		t.Errorf("LayerTableLine = %d, want 21", w.LayerTableLine)
	}
}

func close(a, b float64) bool {
	d := a - b
	if d < 0 {
		d = -d
	}
	return d <= 1e-12*max(a, b, -a, -b)
}

func TestCheckNewAndDefaultPath(t *testing.T) {
	nb := loadGood(t)
	tests := []struct {
		kind    Kind
		id      string
		parents []string
		want    error // nil, or a sentinel the error must wrap
		text    string
	}{
		{KindPiece, "W23-017-b", []string{"W23-017"}, nil, ""},
		{KindPiece, "W23-017-a2", []string{"W23-017-a"}, nil, ""},
		{KindDevice, "D-17a-2", []string{"W23-017-a"}, nil, ""},
		// --from fills the primary link field only: a device's mask is named by hand.
		{KindDevice, "D-17a-3", []string{"W23-017-a", "HB-6"}, ErrWrongKind, "is a mask"},
		{KindCooldown, "C-2", []string{"D-17a-1"}, nil, ""},
		{KindWafer, "W24-001", nil, nil, ""},
		{KindPiece, "W23-017-a", []string{"W23-017"}, ErrExists, "pieces/W23-017-a.md"},
		{KindPiece, "P9", []string{"W99"}, ErrNotFound, `"W99"`},
		{KindDevice, "D9", []string{"W23-017"}, ErrWrongKind, "is a wafer"},
		{KindCooldown, "C9", []string{"W23-017-a"}, ErrWrongKind, "expected a device"},
		{KindWafer, "W9", []string{"W23-017"}, ErrWrongKind, "has no parents"},
		{KindPiece, "bad id", []string{"W23-017"}, ErrBadID, "bad id"},
		// Issue 13: these made hidden files (wafers/..md) the loader never reads.
		{KindWafer, ".", nil, ErrBadID, "do not start with '.'"},
		{KindWafer, "..", nil, ErrBadID, "do not start with '.'"},
		{KindWafer, ".hidden", nil, ErrBadID, "do not start with '.'"},
		{KindWafer, "", nil, ErrBadID, "invalid id"},
		{KindWafer, "W24.1", nil, nil, ""},
		// a piece and a device cannot exist without the sample they were cut from
		{KindPiece, "P10", nil, ErrNoParent, "needs --from with the id of a wafer or piece"},
		{KindDevice, "D10", nil, ErrNoParent, "needs --from with the id of a piece"},
		{KindProcess, "F-2", nil, nil, ""},
		{KindCooldown, "C-3", nil, nil, ""},
		{Kind("sample"), "S1", nil, nil, "unknown kind"},
	}
	for _, tc := range tests {
		err := nb.CheckNew(tc.kind, tc.id, tc.parents)
		switch {
		case tc.want == nil && tc.text == "":
			if err != nil {
				t.Errorf("CheckNew(%s %s): unexpected %v", tc.kind, tc.id, err)
			}
		case err == nil:
			t.Errorf("CheckNew(%s %s): want an error", tc.kind, tc.id)
		case tc.want != nil && !errors.Is(err, tc.want):
			t.Errorf("CheckNew(%s %s) = %v, want it to wrap %v", tc.kind, tc.id, err, tc.want)
		case !strings.Contains(err.Error(), tc.text):
			t.Errorf("CheckNew(%s %s) = %v, want it to mention %s", tc.kind, tc.id, err, tc.text)
		}
	}
	paths := map[Kind]string{KindWafer: "wafers/X.md", KindPiece: "pieces/X.md", KindMask: "masks/X.md",
		KindProcess: "processes/X.md", KindDevice: "devices/X.md", KindCooldown: "cooldowns/X.md", Kind("other"): "X.md"}
	for k, want := range paths {
		if got := DefaultPath(k, "X"); got != want {
			t.Errorf("DefaultPath(%s) = %q, want %q", k, got, want)
		}
	}
}

func TestFindRoot(t *testing.T) {
	top := t.TempDir()
	deep := filepath.Join(top, "wafers", "2023")
	if err := os.MkdirAll(deep, 0o755); err != nil {
		t.Fatal(err)
	}
	// a .git file, as in a linked worktree
	if err := os.WriteFile(filepath.Join(top, ".git"), []byte("gitdir: elsewhere\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	got, err := FindRoot(deep)
	if err != nil || got != top {
		t.Errorf("FindRoot = %q, %v; want %q", got, err, top)
	}
	if err := os.Remove(filepath.Join(top, ".git")); err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(top, "wafers", ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	if got, err := FindRoot(deep); err != nil || got != filepath.Join(top, "wafers") {
		t.Errorf("FindRoot with .git dir = %q, %v", got, err)
	}
}

func TestSchema(t *testing.T) {
	for _, k := range Kinds() {
		fs, ok := Schema(k)
		if !ok || len(fs) <= len(common) {
			t.Errorf("Schema(%s) has no own fields", k)
		}
		for _, f := range fs {
			if f.Type == TypeQuantity && (len(f.Dims) == 0 || f.Example == "") {
				t.Errorf("%s.%s: a quantity field needs a dimension and an example", k, f.Name)
			}
			if (f.Type == TypeLink || f.Type == TypeLinks) && len(f.Kinds) == 0 {
				t.Errorf("%s.%s: a link field needs kinds", k, f.Name)
			}
		}
	}
	if _, ok := Schema("sample"); ok {
		t.Error("Schema of an unknown kind")
	}
	// Every example value parses to the field's first dimension.
	var check func(k Kind, fs []FieldSpec)
	check = func(k Kind, fs []FieldSpec) {
		for _, f := range fs {
			if f.Type == TypeQuantity {
				if ps := checkQuantity(&Entry{Path: "x"}, scalarNode(f.Example), f, f.Name); len(ps) != 0 {
					t.Errorf("%s.%s: example %q fails its own check: %v", k, f.Name, f.Example, ps)
				}
			}
			check(k, f.Fields)
		}
	}
	for _, k := range Kinds() {
		fs, _ := Schema(k)
		check(k, fs)
	}
}

// TestUnknownUnitInLayerTable checks the position and the start of the
// message; the rest comes from the quantity parser and is not ours to pin.
func TestUnknownUnitInLayerTable(t *testing.T) {
	fsys := fstest.MapFS{"w.md": {Data: []byte("---\nid: W1\nkind: wafer\n---\n## Layers\n\n| material | thickness |\n|---|---|\n| InAs | 3 parsecs |\n")}}
	ps := mustLoad(t, fsys).Validate()
	if len(ps) != 1 || ps[0].Line != 9 || ps[0].Col != 10 || !strings.HasPrefix(ps[0].Msg, `layer table: thickness "3 parsecs": `) {
		t.Errorf("got %v", ps)
	}
}

// TestSharedProcessRun: one process run treats pieces of two wafers. The run is
// a side branch: a device of wafer W2 is not a descendant of W1, W1 is not its
// ancestor, and the tree of W1 does not list W2's devices or cooldowns.
func TestSharedProcessRun(t *testing.T) {
	entry := func(s string) *fstest.MapFile { return &fstest.MapFile{Data: []byte("---\n" + s + "---\n")} }
	nb := mustLoad(t, fstest.MapFS{
		"wafers/W1.md":    entry("id: W1\nkind: wafer\n"),
		"wafers/W2.md":    entry("id: W2\nkind: wafer\n"),
		"pieces/W1-a.md":  entry("id: W1-a\nkind: piece\nfrom: W1\n"),
		"pieces/W2-a.md":  entry("id: W2-a\nkind: piece\nfrom: W2\n"),
		"processes/R.md":  entry("id: R\nkind: process\npieces: [W1-a, W2-a]\n"),
		"devices/D1.md":   entry("id: D1\nkind: device\nfrom: W1-a\nprocess: [R]\n"),
		"devices/D2.md":   entry("id: D2\nkind: device\nfrom: W2-a\nprocess: [R]\n"),
		"cooldowns/C2.md": entry("id: C2\nkind: cooldown\ndevices: [D2]\n"),
	})
	if ps := nb.Validate(); len(ps) != 0 {
		t.Fatalf("unexpected problems: %v", ps)
	}
	for _, tc := range []struct {
		id                 string
		ancestors, descend []string
	}{
		{"W1", []string{}, []string{"W1-a", "D1", "R"}},
		{"W2-a", []string{"W2"}, []string{"D2", "R", "C2"}},
		{"D2", []string{"W2-a", "R", "W2"}, []string{"C2"}},
		{"C2", []string{"D2", "W2-a", "R", "W2"}, []string{}},
		// the run itself still knows every piece it treated and every device it made
		{"R", []string{"W1-a", "W2-a", "W1", "W2"}, []string{"D1", "D2", "C2"}},
	} {
		if got := ids(nb.Ancestors(tc.id)); !slices.Equal(got, tc.ancestors) {
			t.Errorf("Ancestors(%s): got %q, want %q", tc.id, got, tc.ancestors)
		}
		if got := ids(nb.Descendants(tc.id)); !slices.Equal(got, tc.descend) {
			t.Errorf("Descendants(%s): got %q, want %q", tc.id, got, tc.descend)
		}
	}
	var b bytes.Buffer
	if err := nb.Tree(&b, "W1"); err != nil {
		t.Fatal(err)
	}
	want := "wafer W1  (wafers/W1.md) *\n  piece W1-a  (pieces/W1-a.md)\n    device D1  (devices/D1.md)\n    process R  (processes/R.md)\n"
	if b.String() != want {
		t.Errorf("Tree(W1):\n%s\nwant:\n%s", b.String(), want)
	}
	b.Reset()
	if err := nb.Tree(&b, "D2"); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(b.String(), "W1") {
		t.Errorf("Tree(D2) lists wafer W1's entries:\n%s", b.String())
	}
}

// TestKindTable: every kind has a folder of its own and a description; Parents follows the
// first link field (what `cleave new --from` fills).
func TestKindTable(t *testing.T) {
	want := map[Kind]int{KindWafer: 0, KindMask: 0, KindPiece: 1, KindDevice: 1, KindProcess: -1, KindCooldown: -1}
	folders := map[string]bool{}
	for _, ki := range KindTable() {
		if ki.Folder == "" || ki.Doc == "" || folders[ki.Folder] {
			t.Errorf("%s: folder %q, doc %q (folders must be distinct)", ki.Kind, ki.Folder, ki.Doc)
		}
		folders[ki.Folder] = true
		if got := ki.Parents(); got != want[ki.Kind] {
			t.Errorf("%s.Parents() = %d, want %d", ki.Kind, got, want[ki.Kind])
		}
		if DefaultPath(ki.Kind, "X1") != ki.Folder+"/X1.md" {
			t.Errorf("DefaultPath(%s) = %s", ki.Kind, DefaultPath(ki.Kind, "X1"))
		}
	}
	if len(folders) != len(want) {
		t.Errorf("%d kinds in the table, want %d", len(folders), len(want))
	}
}
