package notebook

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"reflect"
	"testing"
	"testing/fstest"
	"time"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"
)

// FuzzLoad loads a two-file notebook whose second file has fuzzed front
// matter and body. Load and Validate must not panic, and every problem must
// point inside its file: 1 ≤ line ≤ number of lines and 1 ≤ col ≤ the
// characters on that line + 1 (one past the end marks a missing value).
func FuzzLoad(f *testing.F) {
	f.Add("id: W1\nkind: wafer", "## Layers\n\n| material | thickness |\n|---|---|\n| GaAs | 10 nm |\n")
	f.Add("id: P1\nkind: piece\nfrom: W0\nwidth: 20", "body")
	f.Add("id: D1\nkind: device\nfrom: [W0, W0]\nmask: W0", "")
	f.Add("substrate: [GaAs\n", "")
	f.Add("- a\n- b", "---\n")
	f.Add("a: &x [*x]\nid: *x\nkind: *x", "")
	f.Add("id: P2\nkind: piece\nfrom: P2", "")
	f.Add("id: W2\nkind: wafer", "## Layers\n\n|\tmaterial | thickness |\n|--|--|\n|\t| 5 K |\n> | a |\n")
	f.Add("id: W3\r\nkind: wafer\r\nprobes:\n  - 1\n  x: 2", "\xef\xbb\xbf")
	f.Add("id: W4\nkind: wafer\na: &a [1, 1, 1, 1, 1, 1, 1, 1]\nb: &b [*a, *a, *a, *a, *a, *a, *a, *a]\nc: &c [*b, *b, *b, *b, *b, *b, *b, *b]\nd: &d [*c, *c, *c, *c, *c, *c, *c, *c]\ne: [*d, *d, *d, *d, *d, *d, *d, *d]", "")
	f.Add("id: W5\nkind: wafer\nnotes: spacer 20 \xb5m", "")
	f.Add("id: W6\nkind: wafer\nn: [[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[1]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]]", "")
	f.Add("id: P3\nkind: process\nsteps:\n  a: {kind: etch, time: 4}\n  b: {kind: metal, stack: Ni/Au 5 nm}\n  c: 1", "")
	f.Add("id: W7\nkind: wafer\ncalibration: [{cell: Si, cell_temperature: 1150 C}]", "## Layers\n\n| material | time | rate | cells |\n|-|-|-|-|\n| GaAs | 5 s | 1 ML/s | Ga 900 °C, Si |\n")
	f.Fuzz(func(t *testing.T, front, body string) {
		watchdog := time.AfterFunc(30*time.Second, func() {
			panic(fmt.Sprintf("FuzzLoad: no answer after 30 s for front=%q body=%q", front, body))
		})
		defer watchdog.Stop()
		fsys := fstest.MapFS{
			"wafers/W0.md": {Data: []byte("---\nid: W0\nkind: wafer\n---\n")},
			"x/fuzz.md":    {Data: []byte("---\n" + front + "\n---\n" + body)},
			"x/raw.md":     {Data: []byte(front + body)},
		}
		nb, err := Load(fsys)
		if err != nil {
			t.Fatal(err)
		}
		ps := nb.Validate()
		for _, p := range ps {
			fl, ok := nb.File(p.Path)
			if !ok {
				t.Fatalf("problem in unknown file: %v", p)
			}
			lines := bytes.Split(fl.Source().Raw, []byte("\n"))
			if p.Line < 1 || p.Line > len(lines) || p.Col < 1 {
				t.Fatalf("position outside the file (%d lines): %v", len(lines), p)
			}
			if n := utf8.RuneCount(lines[p.Line-1]); p.Col > n+1 {
				t.Fatalf("column past the end of line %d (%d characters): %v", p.Line, n, p)
			}
		}
		for _, e := range nb.Entries {
			_ = nb.Context(e)
			_ = e.Links()
		}
		var b bytes.Buffer
		if err := nb.Tree(&b, ""); err != nil {
			t.Fatal(err)
		}
	})
}

// FuzzFrontMatterFast holds the fast path for plain front matter (yamlfast.go) equal to yaml v3:
// whenever it accepts a text, yaml.Unmarshal must accept it too and build the very same tree,
// comments included; when it refuses one, it must leave the node alone. Seeded with every front
// matter in the repository (the rendered templates explain their fields in comments), the cases
// of TestPlainYAML (comments in every placement the fast path reads, and just outside them) and
// documents of genPlainYAML.
func FuzzFrontMatterFast(f *testing.F) {
	for _, y := range repoFrontMatter(f) {
		f.Add(y)
	}
	for _, tc := range plainYAMLCases {
		f.Add(tc.in)
	}
	r := rand.New(rand.NewPCG(1, 2))
	for range 100 {
		f.Add(genPlainYAML(r))
	}
	f.Fuzz(func(t *testing.T, s string) {
		var fast yaml.Node
		if !decodePlainYAML([]byte(s), &fast) {
			if !reflect.DeepEqual(fast, yaml.Node{}) {
				t.Fatalf("refusing %q left a node behind", s)
			}
			return
		}
		if d := sameAsYAML(s); d != "" {
			t.Fatalf("%q: %s", s, d)
		}
	})
}
