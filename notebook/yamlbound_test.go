package notebook

import (
	"errors"
	"fmt"
	"strings"
	"testing"
	"testing/fstest"

	"go.yaml.in/yaml/v3"
)

// bomb is front matter whose aliases expand to 9^levels values in a few hundred bytes.
func bomb(levels int) string {
	var b strings.Builder
	b.WriteString(`l0: &l0 ["x", "x", "x", "x", "x", "x", "x", "x", "x"]` + "\n")
	for i := 1; i <= levels; i++ {
		refs := strings.TrimSuffix(strings.Repeat(fmt.Sprintf("*l%d, ", i-1), 9), ", ")
		fmt.Fprintf(&b, "l%d: &l%d [%s]\n", i, i, refs)
	}
	return b.String()
}

// TestFrontMatterBounds: front matter within the bounds decodes, whatever its aliases; beyond
// them it is an error with the position of the alias or value that crossed the bound.
func TestFrontMatterBounds(t *testing.T) {
	tests := []struct {
		name      string
		yaml      string
		line, col int    // 0: no error
		msg       string // part of the message
	}{
		{"plain", "id: W1\nkind: wafer\nwidth: 10 um\n", 0, 0, ""},
		{"shared defaults", "d: &d {width: 10 um, length: 20 um}\na: *d\nb: {<<: *d, width: 5 um}\nc: [*d, *d, *d]\n", 0, 0, ""},
		{"alias of a scalar", "x: &x 5 T\ny: *x\nz: [*x, *x]\n", 0, 0, ""},
		// l3 stands for 8200 nodes (9^4 values, the lists and the aliases); l4 crosses the
		// bound at its 7th alias (1 + 7·8201 > 50,000), column 10 + 6·5.
		{"bomb of 9^4 values is fine", bomb(3), 0, 0, ""},
		{"bomb of 9^5 values", bomb(4), 5, 40, "more than 50000 values"},
		{"bomb of 9^10 values", bomb(9), 5, 40, "more than 50000 values"},
		{"alias loop in a list", "a: &x [1, *x]\n", 1, 11, "refers to a node that contains it"},
		{"alias loop in a map", "a: &n\n  b:\n    c: *n\n", 3, 8, "refers to a node that contains it"},
		{"64 levels", "a: " + strings.Repeat("[", 62) + "1" + strings.Repeat("]", 62) + "\n", 0, 0, ""},
		{"65 levels", "a: " + strings.Repeat("[", 64) + "1" + strings.Repeat("]", 64) + "\n", 1, 67, "nested more than 64 levels"},
		{"deep through aliases", "a: &a " + strings.Repeat("[", 40) + "1" + strings.Repeat("]", 40) + "\nb: " + strings.Repeat("[", 30) + "*a" + strings.Repeat("]", 30) + "\n", 2, 34, "nested more than 64 levels"},
		// The document, the map, the key and the list come first: value 49,997 crosses the bound.
		{"many plain values", "a: [" + strings.TrimSuffix(strings.Repeat("1, ", 60_000), ", ") + "]\n", 1, 5 + 3*49_996, "more than 50000 values"},
		{"Latin-1 micro sign", "id: W1\nwidth: 10 \xb5m\n", 2, 11, "byte 0xB5 is not UTF-8"},
		{"cut multibyte at the end", "id: W1\nnote: µ\xce", 2, 8, "byte 0xCE is not UTF-8"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var n yaml.Node
			err := decodeYAML([]byte(tc.yaml), &n)
			if tc.line == 0 {
				if err != nil {
					t.Fatalf("unexpected error: %v", err)
				}
				return
			}
			var fe *frontMatterError
			if !errors.As(err, &fe) {
				t.Fatalf("err = %v, want a *frontMatterError", err)
			}
			if fe.Line != tc.line || fe.Col != tc.col || !strings.Contains(fe.Msg, tc.msg) {
				t.Errorf("got %d:%d %s, want %d:%d …%s…", fe.Line, fe.Col, fe.Msg, tc.line, tc.col, tc.msg)
			}
		})
	}
}

// TestAliasBombIsAnEntryProblem: the case end to end. Validation names the entry and
// the line (it said "no problems" while a check grew without bound), and the entry is not
// loaded, so nothing that follows aliases ever sees it.
func TestAliasBombIsAnEntryProblem(t *testing.T) {
	fsys := genNotebook(1, 1)
	fsys["wafers/W-bomb.md"] = &fstest.MapFile{Data: []byte("---\nid: W-bomb\nkind: wafer\n" + bomb(9) + "---\n")}
	nb, err := Load(fsys)
	if err != nil {
		t.Fatal(err)
	}
	var found bool
	for _, p := range nb.Validate() {
		if p.Path == "wafers/W-bomb.md" && p.Line == 8 && strings.Contains(p.Msg, "aliases are expanded") {
			found = true
		}
	}
	if !found {
		t.Errorf("no problem at wafers/W-bomb.md:9: %v", nb.Validate())
	}
	if _, ok := nb.Entry("W-bomb"); ok {
		t.Error("the entry was loaded")
	}
}

// TestDecodeFrontMatter: the exported decoder keeps the loader's bounds.
func TestDecodeFrontMatter(t *testing.T) {
	n, err := DecodeFrontMatter([]byte("id: X\nwidth: 100 um\n"))
	if err != nil || n == nil || n.Kind != yaml.MappingNode || len(n.Content) != 4 || n.Content[3].Value != "100 um" {
		t.Errorf("plain front matter: %v, %v", n, err)
	}
	if n, err := DecodeFrontMatter([]byte("# only a comment\n")); n != nil || err != nil {
		t.Errorf("no content: %v, %v; want nil, nil", n, err)
	}
	for name, text := range map[string]string{
		"alias loop": "x: &a [1, *a]\n",
		"not UTF-8":  "x: \xff\n",
		"syntax":     "x: [unclosed\n",
	} {
		if n, err := DecodeFrontMatter([]byte(text)); err == nil {
			t.Errorf("%s: decoded to %v, want an error", name, n)
		}
	}
}
