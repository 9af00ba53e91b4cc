package notebook

import (
	"fmt"
	"io/fs"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"cleave/calc/quantity"
	"cleave/internal/testutil"
	"cleave/notebook/mdsrc"
)

// layersResult is everything readLayers leaves: its problems, the rows and the
// table's line.
type layersResult struct {
	Probs     []Problem
	Layers    []LayerRow
	TableLine int
	Q         []string // see comparable
}

func layersFrom(raw []byte, blocks []mdBlock) layersResult {
	s, _ := mdsrc.Parse(raw)
	e := &Entry{Path: "wafers/W1.md", src: s}
	probs := e.layersOf(blocks)
	return layersResult{Probs: probs, Layers: e.layers, TableLine: e.LayerTableLine}
}

// compareLayers runs the fast path on raw and, when it accepts, goldmark's on a
// separate parse, and fails unless both read the same headings and tables and
// readLayers gives the same answer from them (and from readLayers itself). It
// returns the fast path's reason for refusing, with its line ("" when it
// accepted).
func compareLayers(t testing.TB, raw []byte) (why string) {
	t.Helper()
	s, _ := mdsrc.Parse(raw)
	fast, why, line := fastOutline(s)
	if why != "" {
		if fast != nil {
			t.Fatalf("refused (%s) but returned %d blocks", why, len(fast))
		}
		return fmt.Sprintf("line %d: %s", line, why)
	}
	s2, _ := mdsrc.Parse(raw)
	slow := goldmarkOutline(s2)
	if !reflect.DeepEqual(fast, slow) {
		t.Fatalf("fast path differs from goldmark's on\n%q\nfast:     %+v\ngoldmark: %+v", raw, fast, slow)
	}
	rf, rs := layersFrom(raw, fast).comparable(), layersFrom(raw, slow).comparable()
	s3, _ := mdsrc.Parse(raw)
	e := &Entry{Path: "wafers/W1.md", src: s3}
	probs := e.readLayers()
	rr := layersResult{Probs: probs, Layers: e.layers, TableLine: e.LayerTableLine}.comparable()
	if !reflect.DeepEqual(rf, rs) || !reflect.DeepEqual(rr, rs) {
		t.Fatalf("readLayers differs on\n%q\nfast:       %+v\ngoldmark:   %+v\nreadLayers: %+v", raw, rf, rs, rr)
	}
	return ""
}

// comparable returns r with every quantity replaced by its value, dimension and
// display in Q (in the order of the rows and their fields), so that
// reflect.DeepEqual compares two readings: a NaN is not equal to itself, and
// each reading of "10 ± 1 nm" makes a new independent input.
func (r layersResult) comparable() layersResult {
	qs := func(q quantity.Quantity) string {
		return fmt.Sprintf("%v %v %v %v", q.Value(), q.Dim(), q.Uncertainty(), q)
	}
	out := layersResult{Probs: r.Probs, TableLine: r.TableLine}
	if r.Layers != nil {
		out.Layers = make([]LayerRow, len(r.Layers))
	}
	for i, lr := range r.Layers {
		out.Q = append(out.Q, qs(lr.ThicknessQ))
		lr.ThicknessQ = quantity.Quantity{}
		if g := lr.Growth; g != nil {
			c := *g
			out.Q = append(out.Q, qs(c.TimeQ), qs(c.RateQ), qs(c.TSubQ), qs(c.Grown))
			c.TimeQ, c.RateQ, c.TSubQ, c.Grown = quantity.Quantity{}, quantity.Quantity{}, quantity.Quantity{}, quantity.Quantity{}
			if c.CellTemps != nil {
				c.CellTemps = append([]CellTemp{}, c.CellTemps...)
				for j := range c.CellTemps {
					out.Q = append(out.Q, qs(c.CellTemps[j].T))
					c.CellTemps[j].T = quantity.Quantity{}
				}
			}
			lr.Growth = &c
		}
		out.Layers[i] = lr
	}
	return out
}

const fm = "---\nid: W1\nkind: wafer\n---\n"

// Documents the fast path must accept (why == "") or refuse (why names the
// reason); every accepted one is also compared with goldmark's path.
var layerCases = []struct {
	name, doc string
	why       string // substring of the refusal; "" for accepted
	blocks    int    // top-level headings and tables, when accepted
}{
	{"typical wafer", fm + "# W00012\n\n## Layers\n\n| layer | material | thickness | doping |\n| --- | --- | --- | --- |\n| cap | GaAs | 10 nm | - |\n| barrier | Al0.3Ga0.7As | 50 nm | Si 1e18 cm^-3 |\n", "", 3},
	{"empty body", fm, "", 0},
	{"empty file", "", "", 0},
	{"no front matter", "## Layers\n\n| material | thickness |\n|-|-|\n| GaAs | 1 nm |\n", "", 2},
	{"table right after the heading", fm + "## Layers\n| material | thickness |\n|---|---|\n| GaAs | 1 nm |\n", "", 2},
	{"table at the end without a line feed", fm + "## Layers\n\n| material | thickness |\n|---|---|\n| GaAs | 1 nm |", "", 2},
	{"delimiter row with colons", fm + "| material | thickness |\n|:--|--:|\n| GaAs | 1 nm |\n", "", 1},
	{"centred, blanks around", fm + "| material | thickness |\n| :-: |   :---:   |\n| GaAs | 1 nm |\n", "", 1},
	{"no trailing pipes", fm + "| material | thickness\n| --- | ---\n| GaAs | 1 nm\n", "", 1},
	{"escaped pipe", fm + "| material | thickness | notes |\n|---|---|---|\n| GaAs | 1 nm | a \\| b |\n", "", 1},
	{"backslash before the last pipe", fm + "| material | thickness |\n|---|---|\n| GaAs | 1 nm \\|\n", "", 1},
	{"inline code with a pipe", fm + "| material | thickness | notes |\n|---|---|---|\n| GaAs | 1 nm | `a|b` |\n", "", 1},
	{"emphasis and links in cells", fm + "| material | thickness | notes |\n|---|---|---|\n| *GaAs* | **1 nm** | [x](y) <b> &amp; ~~z~~ ![i](j) |\n", "", 1},
	{"short and long rows", fm + "| material | thickness |\n|---|---|\n| GaAs |\n| AlAs | 2 nm | extra | more |\n|\n||\n| |\n", "", 1},
	{"short header", fm + "| material |\n|---|---|\n| GaAs | 1 nm |\n", "", 1},
	{"empty cells", fm + "| material | thickness |\n|---|---|\n|  |   |\n", "", 1},
	{"table interrupted by a heading", fm + "| material | thickness |\n|---|---|\n| GaAs | 1 nm |\n## Notes\n", "", 2},
	{"table interrupted by a fence", fm + "| material | thickness |\n|---|---|\n| GaAs | 1 nm |\n```cleave\nx = 1\n```\n| a | b |\n|---|---|\n", "", 2},
	{"heading closing sequence", fm + "## Layers ##\n\n| material | thickness |\n|---|---|\n", "", 2},
	{"heading with emphasis", fm + "## *Layers*\n\n| material | depth |\n|---|---|\n", "", 2},
	{"empty headings", fm + "#\n## \n### ###\n#### #\n##### Layers#\n###### a ##  \n##", "", 7},
	{"heading text with trailing blanks", fm + "##   Layers   \n", "", 1},
	{"Layers section without a table", fm + "## Layers\n\nTo be filled in.\n\n## Notes\n\n| a | b |\n|---|---|\n| 1 | 2 |\n", "", 3},
	{"list", fm + "## Growth run\n\n- Campaign: ____ (days)\n- Lot: ____ ; at ____ °C\nlazy line\n  continued\n\n  second paragraph\n\n| material | thickness |\n|---|---|\n", "", 2},
	{"list then heading", fm + "- a\n## Layers\n| material | thickness |\n|---|---|\n", "", 2},
	{"list then fence", fm + "* a\n```\n| x |\n```\n+ b\n", "", 0},
	{"thematic breaks", fm + "____\n\n***\n- - -\n\n---\n## H\n___\n| a |\n|---|\n", "", 2},
	{"plain text", fm + "Text with `code`, *emphasis*, <b>, [link](x), a | b.\n`Si` first\n~~gone~~\n*note* here\n_x_\n+5 V\n2024 growth\n1.5 K\n\\# not a heading\n", "", 0},
	{"indented code", fm + "text\n\n    code\n\nmore\n", "", 0},
	{"fences hide lines", fm + "```\n## Layers\n| material | thickness |\n|---|---|\n```\n~~~~\n~~~\n# x\n~~~~\n", "", 0},
	{"unclosed fence", fm + "## Layers\n```cleave\n| material | thickness |\n|---|---|\n", "", 1},
	{"tabs in a fence", fm + "```\n\tx\n  \t```\n\t```\n```\n", "", 0},
	{"BOM and front matter", "\uFEFF" + fm + "## Layers\n\n| material | thickness |\n|---|---|\n| GaAs | 1 nm |\n", "", 2},
	{"uncertain and NaN quantities", fm + "| material | thickness | time | rate | t_sub | cells |\n|---|---|---|---|---|---|\n| GaAs | (10 ± 1) nm | NaN s | 1 ML/s | 600 ± 5 °C | Ga 905 ± 2 °C |\n| AlAs | NaN nm | | | | |\n", "", 1},
	{"non-ASCII cells", fm + "| material | thickness | notes |\n|---|---|---|\n| GaAs | 1 nm | 580 °C, x ≈ 0.3 — ok |\n", "", 1},

	{"paragraph line above a table", fm + "Text\n| material | thickness |\n|---|---|\n", "after a paragraph", 0},
	{"table row in a list", fm + "- a\n| material | thickness |\n|---|---|\n", "in a list", 0},
	{"no delimiter row", fm + "| material | thickness |\n| GaAs | 1 nm |\n", "delimiter row", 0},
	{"lone row", fm + "| material |\n", "delimiter row", 0},
	{"delimiter without a leading pipe", fm + "| material | thickness |\n--- | ---\n", "delimiter row", 0},
	{"header longer than the delimiter", fm + "| a | b | c |\n|---|---|\n", "more cells", 0},
	{"paragraph line in a table", fm + "| a | b |\n|---|---|\nplain\n", "does not start with '|'", 0},
	{"indented row", fm + "| a | b |\n|---|---|\n  | 1 | 2 |\n", "does not start with '|'", 0},
	{"list item after a table", fm + "| a | b |\n|---|---|\n- x\n", "after a table", 0},
	{"setext underline", fm + "Layers\n======\n", "may start a block", 0},
	{"setext dashes", fm + "Layers\n---\n", "setext", 0},
	{"two dashes", fm + "Layers\n--\n", "may start a block", 0},
	{"thematic break after a table", fm + "| a | b |\n|---|---|\n***\n", "after a paragraph or a table", 0},
	{"block quote", fm + "> ## Layers\n", "may start a block", 0},
	{"HTML", fm + "<div>\n\n## Layers\n</div>\n", "may start a block", 0},
	{"link reference definition", fm + "[x]: /y\n", "may start a block", 0},
	{"ordered list", fm + "1. a\n", "may start a block", 0},
	{"empty list item", fm + "-\n", "may start a block", 0},
	{"empty star item", fm + "*\n", "may start a block", 0},
	{"nested list", fm + "- a\n  - b\n", "indented line", 0},
	{"fence in a list item", fm + "- ```\n", "list item that is not plain", 0},
	{"task list", fm + "- [ ] a\n", "list item that is not plain", 0},
	{"indented heading", fm + " ## Layers\n", "indented line", 0},
	{"indented fence", fm + "   ```\n## Layers\n", "indented line", 0},
	{"hash without a blank", fm + "#Layers\n", "no heading", 0},
	{"seven hashes", fm + "####### x\n", "no heading", 0},
	{"colon delimiter in a paragraph", fm + "material\n:-\n", "may start a block", 0},
	{"one space after a list", fm + "- a\n\n b\n", "one space", 0},
	{"backtick in a backtick info string", fm + "```a`b\n## Layers\n", "backtick", 0},
	{"tab", fm + "## Layers\n\n|\tmaterial | thickness |\n|---|---|\n", "tab", 0},
	{"CRLF", fm + "## Layers\r\n", "control character", 0},
	{"NUL", fm + "a\x00\n", "control character", 0},
	{"not UTF-8", fm + "| material | thickness |\n|---|---|\n| \xff | 1 nm |\n", "UTF-8", 0},
	{"BOM without front matter", "\uFEFF## Layers\n", "indented line", 0},
	{"nested too deep", fm + strings.Repeat("> ", mdsrc.MaxNesting+1) + "x\n", "not read", 0},
}

func TestFastOutline(t *testing.T) {
	for _, c := range layerCases {
		t.Run(c.name, func(t *testing.T) {
			why := compareLayers(t, []byte(c.doc))
			switch {
			case c.why == "" && why != "":
				t.Fatalf("refused (%s), want accepted", why)
			case c.why != "" && !strings.Contains(why, c.why):
				t.Fatalf("refusal %q, want one naming %q", why, c.why)
			case c.why != "":
				return
			}
			s, _ := mdsrc.Parse([]byte(c.doc))
			blocks, _, _ := fastOutline(s)
			if len(blocks) != c.blocks {
				t.Errorf("%d headings and tables, want %d: %+v", len(blocks), c.blocks, blocks)
			}
		})
	}
}

// layerLines are lines that decide where tables and headings are: table rows
// of every shape, delimiter rows, headings, fences, list items, breaks.
var layerLines = []string{
	"", " ", "text", "  text", "    code", "a | b", "| material | thickness |", "| Material | Thickness | doping |",
	"| GaAs | 10 nm |", "| AlAs | 5 nm | Si |", "|---|---|", "| --- | --- | --- |", "|:-|-:|", "|---|", "--- | ---",
	"| a \\| b | c |", "| `x|y` | 2 |", "| *a* | _b_ |", "|", "||", "| |", "| x", "## Layers", "# Layers #", "### Notes",
	"#", "##", "```", "~~~", "````", "```cleave", "- item", "* item", "+ item", "- ", "  more", "   x", " y", "---",
	"***", "___", "===", "> q", "<div>", "1. one", "[r]: /u", ":-", "-:", "#x", "| material | time | rate |",
	"| GaAs | 5 s | 1 ML/s |",
}

// TestFastOutlineLines compares the two paths on random documents made of
// layerLines, after a front matter.
func TestFastOutlineLines(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 2026))
	n := 20000
	if testing.Short() {
		n = 2000
	}
	accepted := 0
	for range n {
		if compareLayers(t, []byte(fm+testutil.RandomLines(r, layerLines, 16))) == "" {
			accepted++
		}
	}
	if accepted < n/20 {
		t.Errorf("fast path accepted %d of %d documents", accepted, n)
	}
	t.Logf("accepted %d of %d", accepted, n)
}

// repoMarkdown returns the Markdown files of the repository: every .md file
// and the rendered templates (templates/testdata/*.golden), by path relative
// to the repository.
func repoMarkdown(t testing.TB) map[string][]byte {
	root := ".."
	files := map[string][]byte{}
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		rel, _ := filepath.Rel(root, p)
		rel = filepath.ToSlash(rel)
		if !d.IsDir() && (strings.HasSuffix(p, ".md") || strings.HasPrefix(rel, "templates/testdata/") && strings.HasSuffix(p, ".golden")) {
			raw, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			files[rel] = raw
		}
		return nil
	})
	if err != nil || len(files) < 50 {
		t.Fatalf("%d Markdown files found: %v", len(files), err)
	}
	return files
}

// TestFastOutlineRepository compares the two paths on every Markdown file of
// the repository, and checks that the demo's wafers and the rendered wafer
// template take the fast path (and have a layer table).
func TestFastOutlineRepository(t *testing.T) {
	mustTakeFast, accepted, refused := 0, 0, map[string]string{}
	for rel, raw := range repoMarkdown(t) {
		why := compareLayers(t, raw)
		if why == "" {
			accepted++
		} else {
			refused[rel] = why
		}
		if strings.HasPrefix(rel, "demo/scenario/wafers/") || rel == "templates/testdata/wafer.golden" {
			mustTakeFast++
			if why != "" {
				t.Errorf("%s falls back: %s", rel, why)
				continue
			}
			s, _ := mdsrc.Parse(raw)
			e := &Entry{Path: rel, src: s}
			if probs := e.readLayers(); len(e.layers) == 0 {
				t.Errorf("%s: no layer table read (%v)", rel, probs)
			}
		}
	}
	if mustTakeFast < 6 {
		t.Errorf("only %d wafers of the demo and the template found", mustTakeFast)
	}
	// and the wafers of the notebook BenchmarkLoadValidate10k loads
	for p, f := range genNotebook(3, 1) {
		if strings.HasPrefix(p, "wafers/") {
			if why := compareLayers(t, f.Data); why != "" {
				t.Errorf("generated %s falls back: %s", p, why)
			}
		}
	}
	t.Logf("%d files take the fast path; %d fall back: %v", accepted, len(refused), refused)
}

func FuzzFastOutline(f *testing.F) {
	for _, raw := range repoMarkdown(f) {
		f.Add(raw)
	}
	for _, c := range layerCases {
		if len(c.doc) < 1<<16 {
			f.Add([]byte(c.doc))
		}
	}
	r := rand.New(rand.NewPCG(9, 2026))
	for range 30 {
		var b strings.Builder
		b.WriteString(fm)
		for range 1 + r.IntN(12) {
			b.WriteString(layerLines[r.IntN(len(layerLines))])
			b.WriteByte('\n')
		}
		f.Add([]byte(b.String()))
	}
	f.Fuzz(func(t *testing.T, raw []byte) {
		compareLayers(t, raw)
	})
}

// typicalWafer is a wafer file as the notebooks hold them: front matter, a
// title, a line of notes and a five-row layer table.
const typicalWafer = "---\nid: W00012\nkind: wafer\ngrown: 2024-03-01\nby: KT\nchannel: GaAs\ncarrier: electrons\ndesign_density: 2.5e11 cm^-2\n---\n\n# W00012\n\nGrowth notes for an invented wafer, grown after the spring bake-out.\n\n## Layers\n\n| layer | material | thickness | doping |\n| --- | --- | --- | --- |\n| cap | GaAs | 10 nm | - |\n| barrier | Al0.3Ga0.7As | 50 nm | Si 1e18 cm^-3 |\n| doping | Al0.3Ga0.7As | 1 nm | Si delta 2e12 cm^-2 |\n| spacer | Al0.3Ga0.7As | 40 nm | - |\n| channel | GaAs | 1 um | - |\n"

// BenchmarkReadLayers reads the layer table of typicalWafer, parsing the file
// each time as a load does: readLayers takes the fast path on it; goldmark is
// the parse it replaces.
func BenchmarkReadLayers(b *testing.B) {
	raw := []byte(typicalWafer)
	for _, c := range []struct {
		name string
		read func(e *Entry) []Problem
	}{
		{"readLayers", (*Entry).readLayers},
		{"goldmark", func(e *Entry) []Problem { return e.layersOf(goldmarkOutline(e.src)) }},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				s, _ := mdsrc.Parse(raw)
				e := &Entry{Path: "wafers/W00012.md", src: s}
				if ps := c.read(e); len(ps) != 0 || len(e.layers) != 5 {
					b.Fatal(ps, len(e.layers))
				}
			}
		})
	}
}
