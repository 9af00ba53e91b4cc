package hooks

import (
	"strings"
	"testing"
)

// TestDiffFilesFields: the fields of an entry, old → new, named by their path.
func TestDiffFilesFields(t *testing.T) {
	old := []byte("---\nid: M1\nkind: mask\nprobes:\n  - {name: \"4\", position: 700 um}\n---\n# M1\n")
	new := []byte("---\nid: M1\nkind: mask\nprobes:\n  - {name: \"4\", position: 750 um}\n---\n# M1\n")
	d := diffFiles("masks/M1.md", old, new)
	if len(d.Fields) != 1 || d.Fields[0] != (FieldChange{Field: "probes[4].position", Old: "700 um", New: "750 um"}) || d.Text {
		t.Errorf("diff %+v", d)
	}
}

// TestDiffFilesHostileFrontMatter: front matter whose aliases refer to themselves or expand
// to billions of nodes (text anyone can commit) is compared as text, within the loader's
// bounds: no endless walk, no run-away memory. Before, the walk followed every alias.
func TestDiffFilesHostileFrontMatter(t *testing.T) {
	laughs := "---\nid: X\nkind: note\na: &a [x,x,x,x,x,x,x,x,x,x]\n"
	prev := "a"
	for _, n := range []string{"b", "c", "d", "e", "f", "g", "h", "i"} {
		laughs += n + ": &" + n + " [" + strings.Repeat("*"+prev+",", 9) + "*" + prev + "]\n"
		prev = n
	}
	laughs += "---\n# X\n"
	for name, fm := range map[string]string{
		"loop":    "---\nid: X\nkind: note\nx: &a [1, *a]\n---\n# X\n",
		"laughs":  laughs,
		"no id":   "---\ntitle: &t [1, *t]\n---\n# X\n",
		"invalid": "---\nid: [unclosed\n---\n# X\n",
	} {
		for _, pair := range [][2][]byte{{nil, []byte(fm)}, {[]byte(fm), []byte(fm + "more\n")}} {
			d := diffFiles("notes/x.md", pair[0], pair[1])
			if n := len(d.Fields); n > 100 {
				t.Errorf("%s: %d field changes: the aliases were expanded", name, n)
			}
		}
	}
	// A change inside front matter that does not decode still shows, as text.
	a := []byte("---\nid: X\nkind: note\nx: &a [1, *a]\n---\n# X\n")
	b := []byte("---\nid: X\nkind: note\nx: &a [2, *a]\n---\n# X\n")
	if d := diffFiles("notes/x.md", a, b); !d.Text {
		t.Errorf("a changed front matter that does not decode: %+v, want a text change", d)
	}
}
