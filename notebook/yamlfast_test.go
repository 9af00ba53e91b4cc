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

	"cleave/notebook/mdsrc"

	"go.yaml.in/yaml/v3"
)

// sameAsYAML decodes s with the fast path and with yaml v3 and reports how they differ ("" when
// the fast path accepts s and builds the very tree yaml.Unmarshal builds, within the slabs
// splitLines sized).
func sameAsYAML(s string) string {
	var fast, slow yaml.Node
	if !decodePlainYAML([]byte(s), &fast) {
		_, why := parsePlainYAML([]byte(s))
		return "fast path refuses it: " + why
	}
	p := plainParser{src: s}
	if _, why := p.parse(); why != "" || p.overflow != 0 {
		return fmt.Sprintf("parse refuses it (%q) or needs %d nodes or lists beyond its slabs", why, p.overflow)
	}
	if err := yaml.Unmarshal([]byte(s), &slow); err != nil {
		return "fast path accepts it, yaml v3 fails: " + err.Error()
	}
	if !reflect.DeepEqual(fast, slow) {
		return fmt.Sprintf("trees differ:\nfast:\n%syaml v3:\n%s", dumpNode(&fast, ""), dumpNode(&slow, ""))
	}
	return ""
}

// dumpNode prints a tree one node a line, every field the comparison looks at.
func dumpNode(n *yaml.Node, indent string) string {
	s := fmt.Sprintf("%skind=%d style=%d tag=%q value=%q at %d:%d anchor=%q comments=%q/%q/%q alias=%v\n",
		indent, n.Kind, n.Style, n.Tag, n.Value, n.Line, n.Column, n.Anchor, n.HeadComment, n.LineComment, n.FootComment, n.Alias != nil)
	for _, c := range n.Content {
		s += dumpNode(c, indent+"  ")
	}
	return s
}

// plainYAMLCases are documents the fast path reads ("accept/...") and documents it refuses
// ("refuse/REASON: ..."); FuzzFrontMatterFast starts from them too.
var plainYAMLCases = []struct{ name, in string }{
	{"accept/empty", ""},
	{"accept/blank lines", "\n\n"},
	{"accept/lines of spaces", "  \n \n"},
	{"accept/one key", "id: W1"},
	{"accept/typical", "id: W00012-A-HB1\nkind: device\nfrom: W00012-A\nmask: M1\ndevices: [W00012-A-HB1, W00012-B-HB1]\nbase_temperature: 0.3 K\ndesign_density: 2.3e11 cm^-2\nchannel: GaAs\ngrown: 2024-03-01\ntags:\n  - calibration\n  - Al0.3Ga0.7As\n"},
	{"accept/typical of the benchmark", typicalFrontMatter},
	{"accept/long plain scalars", "a: " + strings.Repeat("x", 2000) + "\nb:\n  - " + strings.Repeat("y ", 1000) + "\nc: [" + strings.Repeat("w", 1500) + "]\n"},
	{"accept/longest key", strings.Repeat("k", 256) + ": v\n"},
	{"accept/blank lines around and between", "\n\nid: W1\n\n  \nkind: wafer\n\n"},
	{"accept/resolved tags", "a: 12\nb: 1.5\nc: true\nd: null\ne: ~\nf: 2024-03-01\ng: 0x1F\nh: .inf\ni: 1_000\nj: 2001-12-14 21:59:43.10\nk: <<\nl: 0o17\nm: -0b101\nn: +12\no: 1e3\np: 12:30\n"},
	{"accept/keys that resolve", "1: a\ntrue: b\nnull: c\n2024-01-01: d\n1.5: e\n"},
	{"accept/empty values", "a:\nb:   \nc:\n"},
	{"accept/empty value at the end", "a: 1\nb:"},
	{"accept/trailing spaces", "a: 1 K   \nb: [x]  \nc: \"q\"  \n"},
	{"accept/inner spaces kept", "a: 0.3    K\nb: [x   y , z]\n"},
	{"accept/leading dash", "a: -15 mm\nb: [-1, -2.5]\nc: --x\n"},
	{"accept/indicators inside plain", "a: long edge, [1-10] {x} it's \"q\" 50% a@b `c` a|b a>b a&b a*b a!b a-b a?b a:b\n"},
	{"accept/non-ASCII", "a: 50 °C\nb: [µm, Ω, x]\nc: {d: 2 Å, e: 𝜇}\nd: \"é\"\n"},
	{"accept/quoted", "a: \"[1-10]\"\nb: 'x: y'\nc: \"\"\nd: ''\ne: \"  spaced  \"\nf: \"1\"\ng: 'a \"b\"'\nh: \"it's\"\n"},
	{"accept/flow sequences", "a: []\nb: [ ]\nc: [1,2,3]\nd: [ a , b ]\ne: [[1, 2], [], [x]]\nf: [\"a\", 'b', c]\n"},
	{"accept/flow mappings", "a: {}\nb: {x: 0 mm, y: 2 mm}\nc: {pin1: \"1\", pin2: \"2\"}\nd: {gaps: [5 um, 10 um], e: {f: g}}\n"},
	{"accept/block sequence", "tags:\n  - a\n  - b\n\n  - c\nnext: 1\n"},
	{"accept/indentless sequence", "tags:\n- a\n- [b, c]\n- {d: e}\nnext: 1\n"},
	{"accept/sequence at the end", "tags:\n    -   a\n    - \"b\"\n"},
	{"accept/nested mappings", "magnet:\n  max_field: 12 T\n  offset: 1.8 mT\nsteps:\n  clean:\n    kind: clean\n    time: 5 min\n  etch:\n    kind: etch\n    list:\n    - a\n    - b\n    after:\nend: x\n"},
	{"accept/nested empty value then dedent", "a:\n  b:\nc: 1\n"},
	{"accept/list of flow mappings", "probes:\n  - {name: \"1\", position: 0 um, arm_width: 10 um, side: top}\n  - {name: \"2\", position: 250 um}\n"},
	{"accept/quoted keys", "\"1\": S\n'2': T\n\"a: b\": c\n\"\": x\n\"#k\": y\nbonding:\n  \"3\": V1\nf: {\"b\": c, 'd': e}\n"},
	{"accept/mappings as sequence items", "probes:\n  - name: V1\n    position: 300 um\n  -   name: V2\n      side: top\n  - {name: V3}\n  - \"q\": 1\n  - a:\n      b: 1\n    c:\n    - x\n    d:\nlockins:\n- channel: A\n  phase: 0 deg\n- channel: B\nnext: 1\n"},

	// Trailing comments: the value's line comment, or the key's when no value is on its line.
	{"accept/trailing comment: plain", "a: b # c\nb: 1e6 cm^2/(V*s)  # what the growth aimed for\n"},
	{"accept/trailing comment: quoted and flow", "a: \"q\"  # c\nb: 'q' #\nc: []   # d\nd: {x: y} # e\ne: [1, [2]]  # f\n"},
	{"accept/trailing comment: key with no value", "a:    # c\nb: 1\nc: # d\n"},
	{"accept/trailing comment: key of a block", "a:  # k\n  b: 1  # c1\n  c:  # c2\n    d: e  # c3\nl:  # k2\n  - 1  # i1\n  - [2]  # i2\nm: # k3\n- x # i3\n- {y: z} # i4\n"},
	{"accept/trailing comment: in sequence items' mappings", "l:  # k\n  - name: V1  # c\n    pos:  # d\n      x: 1\n"},
	{"accept/trailing comment: keeps its spaces and marks", "a: 1  # c  \nb: x # a: b # [c\nc: 2 ##\n"},
	{"accept/hash inside a plain scalar", "a: sample#3\nb: a#\nc: [x#1, y#]\nd: {k#: v#}\ne: a#b #c\n"},
	{"accept/trailing comment after a long gap", "a: \"b\"" + strings.Repeat(" ", 250) + "# c\nb:" + strings.Repeat(" ", 250) + "# d\n"},
	{"accept/document comment before a long gap", "# c\n" + strings.Repeat(" ", 250) + "\na: 1\n"},
	{"accept/hash inside quotes", "a: \"#1\"\nb: 'x #y'\nc: [\"a #b\"]\nd: \"a #b\" # c\n"},

	// Whole-line comments right above a key or item, in its column: its head comment.
	{"accept/comment above a key", "a: 1\n# h1\n# h2\nb: 2\n"},
	{"accept/comment above a key after blank lines", "a: 1\n\n  \n# h\nb: 2\n"},
	{"accept/comment above a key after a trailing comment", "a: 1 # l\n# h\nb: 2\nc:  # k\n# h2\nd: 3\n"},
	{"accept/comment above a nested key", "a:\n  # h\n  x: 1\n  # h2\n  y: 2\nb:  # k\n    # h3\n    z: 3\n"},
	{"accept/comment above a key after a block", "a:\n  x: 1\n# h\nb:\n  - x\n# h2\nc:\n- y\n# h3\nd:\n  e:\n    f: 1\n  # h4\n  g: 2\n"},
	{"accept/comment above items", "a:\n  # h\n  - x\n  # h2\n  - [y]\nb:\n# h3\n- x\n\n# h4\n- {y: z}\n"},
	{"accept/comment above a mapping item", "l:\n  # h\n  - a: 1\n    # h2\n    b: 2\n  # h3\n  - c: 3\n"},

	// The start of the document: the run right above the first key is its head comment, the
	// runs above it the document's.
	{"accept/comment at the start", "# h\na: 1\n"},
	{"accept/comment at the start after blank lines", "\n\n# h1\n  # h2\na: 1\n"},
	{"accept/document comment", "# d\n\na: 1\n"},
	{"accept/document comment and key comment", "# d\n\n# h\na: 1\n"},
	{"accept/document comments", "\n# d1\n\n\n  # d2\n\n# h\na: 1\n"},

	// The end: a run right after the last line is the foot of its key, item or of the last
	// top-level key (yaml's rules in endComments); the other runs are the document's.
	{"accept/comment at the end", "a: 1\nb: 2\n# f1\n# f2\n"},
	{"accept/comment at the end after a trailing comment", "x: 0\na: 1 # l\n# f\n"},
	{"accept/comment at the end after a quoted value", "x: 0\na: 'q'\n# f\n"},
	{"accept/comment at the end after a flow value", "x: 0\ndata: []  # edit\n#  - file: a.csv  # path\n#    note: up\n"},
	{"accept/comment at the end of an indentless sequence", "a:\n- b\n- [c]\n# f\n"},
	{"accept/comment at the end of a nested block", "a:\n  b:\n    c: [1]  # l\n# f\n"},
	{"accept/comment at the end of an empty nested value", "x: 1\na:\n  b:\n# f\n"},
	{"accept/comment at the end of an indented sequence", "a:\n  - b\n# f\n"},
	{"accept/comment at the end of a mapping item", "l:\n- a: 1\n  b: x # l\n# f\n"},
	{"accept/comment at the end after an empty value", "x: 1\na:  # l\n# f\n"},
	{"accept/comment at the end of a one-line document", "a: 1 # l\n# f\n"},
	{"accept/comment at the end of a quoted one-line document", "a: 'q'\n# f\n"},
	{"accept/comment at the end of a plain one-line document", "a: 1\n# f\n"},
	{"accept/comment at the end after a blank line", "a: 1\n\n# f\n"},
	{"accept/comments at the end", "a: 1\n# f1\n\n# f2\n\n\n# f3\n\n"},
	{"accept/comments at the end of a nested block", "a:\n  b: 1 # l\n# f1\n\n# f2\n"},
	{"accept/comments at the end after a blank line", "a: 1 # l\n\n# f1\n\n# f2\n  \n"},
	{"accept/comments only", "# a\n\n  # b\n"},

	{"refuse/comment before a blank line: between keys", "a: 1\n# c\n\nb: 2\n"},
	{"refuse/comment before a blank line: two runs", "a: 1\n# c\n\n# d\nb: 2\n"},
	{"refuse/comment before a blank line: before an item", "a:\n  - 1\n  # c\n\n  - 2\n"},
	{"refuse/comment indentation: deeper than the key", "a: 1\n  # c\nb: 2\n"},
	{"refuse/comment indentation: in the column of the block above", "a:\n  x: 1\n  # c\nb: 2\n"},
	{"refuse/comment indentation: shallower than the key", "a:\n  x: 1\n# c\n  y: 2\n"},
	{"refuse/comment indentation: at the end", "a:\n  b: 1\n  # c\n"},
	{"refuse/comment indentation: mixed at the end", "a: 1\n# c\n # d\n"},
	{"refuse/no final line break", "a:\n  b: 1\n# c"},
	{"refuse/long gap: before a trailing comment", "a: \"b\"" + strings.Repeat(" ", 300) + "# c\n"},
	{"refuse/long gap: after a comment line", "# c\n" + strings.Repeat(" ", 300) + "\na: 1\n"},
	{"refuse/text after value: comment glued to quotes", "a: \"b\"#c\n"},
	{"refuse/text after value: comment glued to a flow", "a: [b]#c\n"},
	{"refuse/comment in flow: after an item", "a: [b #c\n  ]\n"},
	{"refuse/comment in flow: for an item", "a: {b: c, #d\n  }\n"},
	{"refuse/indicator: comment glued to an opening bracket", "a: [#b]\n"},
	{"refuse/empty item: comment only", "a:\n  - # c\n    - b\n"},
	{"refuse/tab: after the colon", "a:\tb\n"},
	{"refuse/tab: indentation", "a:\n\t- b\n"},
	{"refuse/carriage return: CRLF", "a: b\r\nc: d\r\n"},
	{"refuse/control character: NUL", "a: b\x00\n"},
	{"refuse/control character: DEL", "a: b\x7f\n"},
	{"refuse/control character: C1", "a: b\u0090\n"},
	{"refuse/control character: U+FFFE", "a: b\ufffe\n"},
	{"refuse/line break character: NEL", "a: b\u0085c\n"},
	{"refuse/line break character: LS", "a: b\u2028c\n"},
	{"refuse/line break character: PS", "a: b\u2029c\n"},
	{"refuse/byte order mark: in a value", "a: b\ufeffc\n"},
	{"refuse/byte order mark: at the start", "\ufeffa: b\n"},
	{"refuse/not UTF-8", "a: \xb5m\n"},
	{"refuse/document indented", "  a: b\n  c: d\n"},
	{"refuse/key: a scalar document", "hello\n"},
	{"refuse/key: a sequence document", "- a\n- b\n"},
	{"refuse/key: space after a quoted key", "\"a\" : b\n"},
	{"refuse/key: text after a quoted key", "\"a\"b: c\n"},
	{"refuse/multi-line: quoted key", "\"a: b\n"},
	{"refuse/escape: quoted key", "\"a\\\"\": b\n"},
	{"refuse/key: no space after the colon", "a:b\n"},
	{"refuse/key: space before the colon", "a : b\n"},
	{"refuse/key: key with spaces", "a b: c\n"},
	{"refuse/key: document marker", "a: 1\n---\nb: 2\n"},
	{"refuse/key: directive", "%YAML 1.2\na: 1\n"},
	{"refuse/key: explicit key", "? a\n: b\n"},
	{"refuse/key: a dash alone", "a:\n-\n"},
	{"refuse/key: item after an inline value", "a: 1\n- b\n"},
	{"refuse/key: value on the next line", "a:\n  b\n"},
	{"refuse/colon: mapping in a sequence item's value", "a:\n  - b: c: d\n"},
	{"refuse/indentation: key of an item's mapping out of line", "a:\n  - b: 1\n     c: 2\n"},
	{"refuse/key: item after a sequence item's mapping", "a:\n- b: 1\n  - c\n"},
	{"refuse/long key", strings.Repeat("k", 300) + ": v\n"},
	{"refuse/indentation: multi-line plain scalar", "a: b\n  c\n"},
	{"refuse/indentation: continuation of a sequence item", "a:\n- b\n  c\n"},
	{"refuse/indentation: dedent to no block", "a:\n    b: 1\n  c: 2\n"},
	{"refuse/indentation: sequence items out of line", "a:\n  - b\n    - c\n"},
	{"refuse/indentation: key under a sequence", "a:\n  - b\n c: 1\n"},
	{"refuse/indentation: deeper key after a value", "a: 1\n  b: 2\n"},
	{"refuse/empty item", "a:\n  - \n"},
	{"refuse/indicator: anchor", "a: &x b\n"},
	{"refuse/indicator: alias", "a: *x\n"},
	{"refuse/indicator: tag", "a: !!str 1\n"},
	{"refuse/indicator: literal block", "a: |\n  b\n"},
	{"refuse/indicator: folded block", "a: >\n  b\n"},
	{"refuse/indicator: nested block sequence", "a:\n  - - b\n"},
	{"refuse/indicator: dash alone", "a: -\n"},
	{"refuse/indicator: dash and space", "a: - b\n"},
	{"refuse/indicator: at sign", "a: @b\n"},
	{"refuse/indicator: backquote", "a: `b`\n"},
	{"refuse/indicator: percent", "a: %b\n"},
	{"refuse/indicator: closing bracket", "a: ]\n"},
	{"refuse/indicator: question mark", "a: ?b\n"},
	{"refuse/indicator: colon first", "a: :b\n"},
	{"refuse/indicator: anchor in a flow sequence", "a: [&x b]\n"},
	{"refuse/colon: mapping in a value", "a: b: c\n"},
	{"refuse/colon: at the end", "a: b:\n"},
	{"refuse/colon: at the end before spaces", "a: b:  \n"},
	{"refuse/escape: backslash", "a: \"b\\n\"\n"},
	{"refuse/escape: doubled single quote", "a: 'it''s'\n"},
	{"refuse/multi-line: double quotes", "a: \"b\n  c\"\n"},
	{"refuse/multi-line: single quotes", "a: 'b\n  c'\n"},
	{"refuse/multi-line: flow sequence", "a: [b,\n  c]\n"},
	{"refuse/multi-line: flow mapping", "a: {b: c,\n  d: e}\n"},
	{"refuse/multi-line: unclosed flow", "a: [b\n"},
	{"refuse/text after value: quoted", "a: \"b\" c\n"},
	{"refuse/text after value: flow", "a: [b] c\n"},
	{"refuse/text after value: quoted key", "a: \"b\": c\n"},
	{"refuse/trailing comma", "a: [b, c, ]\n"},
	{"refuse/flow syntax: pair in a sequence", "a: [b: c]\n"},
	{"refuse/flow syntax: colon in a flow scalar", "a: [12:30]\n"},
	{"refuse/flow syntax: bracket in a flow scalar", "a: [b[1]]\n"},
	{"refuse/flow syntax: mismatched closer", "a: [b}\n"},
	{"refuse/flow key: no value", "a: {b, c: d}\n"},
	{"refuse/flow key: quoted and adjacent", "a: {\"b\":c}\n"},
	{"refuse/flow key: adjacent value", "a: {b:c}\n"},
	{"refuse/flow key: nested key", "a: {[b]: c}\n"},
	{"refuse/empty value: in a flow mapping", "a: {b: , c: d}\n"},
	{"refuse/empty value: leading comma", "a: [, b]\n"},
	{"refuse/empty value: two commas", "a: [b,, c]\n"},
	{"refuse/question mark: in a flow scalar", "a: [b?]\n"},
	{"refuse/depth", "a: " + strings.Repeat("[", 20) + strings.Repeat("]", 20) + "\n"},
}

// TestPlainYAML compares the fast path with yaml v3 on documents it reads, and checks that it
// refuses the others for the reason the case's name gives (after "refuse/", up to ':').
func TestPlainYAML(t *testing.T) {
	for _, tc := range plainYAMLCases {
		t.Run(tc.name, func(t *testing.T) {
			if want, ok := strings.CutPrefix(tc.name, "refuse/"); ok {
				want, _, _ = strings.Cut(want, ":")
				var n yaml.Node
				if decodePlainYAML([]byte(tc.in), &n) {
					t.Fatalf("fast path accepts %q", tc.in)
				}
				if !reflect.DeepEqual(n, yaml.Node{}) {
					t.Fatalf("refusing %q left a node behind", tc.in)
				}
				if _, why := parsePlainYAML([]byte(tc.in)); why != want {
					t.Fatalf("refuses %q because of %q, want %q", tc.in, why, want)
				}
				return
			}
			if d := sameAsYAML(tc.in); d != "" {
				t.Fatalf("%q: %s", tc.in, d)
			}
		})
	}
}

// repoFrontMatter returns the front matter of every Markdown and golden file in the repository
// (outside hidden folders), keyed by slash path from the repository root.
func repoFrontMatter(tb testing.TB) map[string]string {
	tb.Helper()
	root := ".."
	out := map[string]string{}
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && p != root && strings.HasPrefix(d.Name(), ".") {
			return filepath.SkipDir
		}
		// Rendered entries: the Markdown files, and the golden files of the templates and
		// the CLI.
		if d.IsDir() || !strings.HasSuffix(p, ".md") && !strings.HasSuffix(p, ".golden") {
			return nil
		}
		raw, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		if y, ok, err := mdsrc.SplitFrontMatter(raw); ok && err == nil {
			rel, _ := filepath.Rel(root, p)
			out[filepath.ToSlash(rel)] = string(y)
		}
		return nil
	})
	if err != nil {
		tb.Fatal(err)
	}
	if len(out) < 50 {
		tb.Fatalf("only %d front matters found in the repository", len(out))
	}
	return out
}

// TestPlainYAMLRepo runs every front matter of the repository through both paths: where the fast
// path accepts one, the trees must be equal. The demo notebook (whose cooldowns and devices
// explain values in trailing comments), the good test notebook, the tiny notebook and the
// rendered templates (templates/testdata: fields explained in trailing and whole-line comments,
// commented-out fields at the end, lists of mappings, quoted keys) must take the fast path,
// except the files listed here with the reason.
func TestPlainYAMLRepo(t *testing.T) {
	refused := map[string]string{
		// A notebook's own template: `{{.ID}}` is no YAML until rendered.
		"notebook/testdata/good/templates/wafer.md": "flow key",
	}
	fast, checked := 0, 0
	for p, y := range repoFrontMatter(t) {
		_, why := parsePlainYAML([]byte(y))
		if why == "" {
			fast++
			if d := sameAsYAML(y); d != "" {
				t.Errorf("%s: %s", p, d)
			}
		}
		if !strings.HasPrefix(p, "demo/scenario/") && !strings.HasPrefix(p, "notebook/testdata/good/") && !strings.HasPrefix(p, "testdata/tiny/") && !strings.HasPrefix(p, "templates/testdata/") {
			continue
		}
		checked++
		if want := refused[p]; why != want {
			t.Errorf("%s: fast path refuses it because of %q, want %q", p, why, want)
		}
	}
	t.Logf("%d front matters take the fast path; %d of the demo and test notebooks checked", fast, checked)
}

// genPlainYAML writes a random document near the fast path's subset: block mappings nested at
// random indentations, block sequences indented or not whose items may be block mappings,
// flow collections with random spacing, plain and quoted keys, scalars that resolve to every
// tag, comments at the end of lines and on lines of their own in and out of the placements the
// fast path reads (at the key's column or not, before and after blank lines, at the start and
// the end), and pieces that are just outside the subset (colons, indicators, continuation
// lines) so that both sides of each rule are met.
func genPlainYAML(r *rand.Rand) string {
	keys := []string{"id", "kind", "a", "b.c", "x-y", "_z", "1", "true", "null", "2024-03-01", "0x1F", "K9", "a-", "y",
		`"1"`, `'k'`, `"a: b"`, `"#k"`, `""`, `'x y'`}
	scalars := []string{"W1", "0.3 K", "12", "-15 mm", "1.5", "true", "False", "~", "null", "2024-03-01",
		"2001-12-14 21:59:43.10", "1e3", ".inf", "-.INF", ".nan", "0o17", "0b101", "+12", "1_000", "12:30",
		"<<", "a, b", "a [b] {c}", "it's", "50 °C", "µm", "𝜇", "a:b", "a-b", "--x", "x?", "a  b", "a\u00a0",
		"a: b", "a:", "-", "- a", "&x", "*x", "!t", "|", ">", "%x", "@x", "`x`", "?x", ":x", "...", "---", "a #b",
		"sample#3", "#x", "a#", "a # b: c"}
	notes := []string{"#", "# c", "#c  ", "# a: b", "#  - file: x.csv  # path", "# [x", "## x", "# é"}
	var b strings.Builder
	blank := func() {
		for r.IntN(4) == 0 {
			b.WriteString(strings.Repeat(" ", r.IntN(3)))
			b.WriteByte('\n')
		}
	}
	// comments writes a few runs of comment lines, mostly at column indent, with blank lines
	// around them.
	comments := func(indent int) {
		if r.IntN(3) != 0 {
			blank()
			return
		}
		for range 1 + r.IntN(2) {
			blank()
			for range 1 + r.IntN(3) {
				in := indent
				if r.IntN(6) == 0 {
					in = r.IntN(indent + 3)
				}
				b.WriteString(strings.Repeat(" ", in) + notes[r.IntN(len(notes))] + "\n")
			}
		}
		if r.IntN(3) == 0 {
			blank()
		}
	}
	// trail ends a line: nothing, spaces, or a comment (now and then without the blank
	// before it that makes it one).
	trail := func() string {
		sp := strings.Repeat(" ", r.IntN(3))
		if r.IntN(3) == 0 {
			return sp + notes[r.IntN(len(notes))] + "\n"
		}
		return sp + "\n"
	}
	sp := func(max int) string { return strings.Repeat(" ", r.IntN(max+1)) }
	var flow func(depth int) string
	scalar := func(inFlow bool) string {
		s := scalars[r.IntN(len(scalars))]
		switch r.IntN(8) {
		case 0:
			return `"` + s + `"`
		case 1:
			return "'" + s + "'"
		case 2:
			if !inFlow {
				return s
			}
			return flow(1)
		}
		return s
	}
	flow = func(depth int) string {
		n := r.IntN(4)
		var items []string
		isMap := r.IntN(2) == 0
		for range n {
			v := scalar(true)
			if depth < 3 && r.IntN(4) == 0 {
				v = flow(depth + 1)
			}
			if isMap {
				v = keys[r.IntN(len(keys))] + ": " + v
			}
			items = append(items, sp(1)+v+sp(1))
		}
		if isMap {
			return "{" + strings.Join(items, ",") + "}"
		}
		return "[" + strings.Join(items, ",") + "]"
	}
	// mapping writes the entries of a block mapping at column indent; the first starts after
	// the text already on the line when first is true (a sequence item's mapping).
	var mapping func(indent, depth int, first bool)
	mapping = func(indent, depth int, first bool) {
		for i := range 1 + r.IntN(4) {
			if i > 0 || !first {
				comments(indent)
				b.WriteString(strings.Repeat(" ", indent))
			}
			b.WriteString(keys[r.IntN(len(keys))] + ":")
			switch k := r.IntN(6); {
			case k == 0:
				b.WriteString(sp(2) + trail()) // empty value
			case k == 1 && depth < 3:
				b.WriteString(sp(1) + trail())
				mapping(indent+1+r.IntN(3), depth+1, false)
			case k == 2:
				b.WriteString(sp(1) + trail())
				in := indent + r.IntN(3)
				for range 1 + r.IntN(3) {
					comments(in)
					pad := sp(1)
					b.WriteString(strings.Repeat(" ", in) + "- " + pad)
					switch k := r.IntN(4); {
					case k == 0:
						b.WriteString(flow(1) + trail())
					case k == 1 && depth < 3:
						// The item's mapping: its keys in the column of the first.
						mapping(in+2+len(pad), depth+1, true)
					default:
						b.WriteString(scalar(false) + trail())
					}
				}
			case k == 3:
				b.WriteString(" " + sp(1) + flow(0) + trail())
			default:
				b.WriteString(" " + sp(1) + scalar(false) + trail())
			}
			if r.IntN(30) == 0 {
				b.WriteString(strings.Repeat(" ", indent+1+r.IntN(2)) + "more\n") // a continuation line
			}
		}
	}
	comments(0)
	mapping(0, 0, false)
	comments(0)
	s := b.String()
	if r.IntN(5) == 0 {
		s = strings.TrimSuffix(s, "\n")
	}
	return s
}

// TestPlainYAMLGenerated compares the fast path with yaml v3 on random documents of
// genPlainYAML: every one the fast path takes must come out the same. It also makes sure the
// generator keeps both paths busy (the fast path takes some and refuses some) and that the
// documents taken hold comments of every kind where yaml v3 files them.
func TestPlainYAMLGenerated(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 11))
	n := 20000
	if testing.Short() {
		n = 2000
	}
	taken := 0
	var kinds [5]int // documents taken with a head, line, foot comment on a node, a document head and foot comment
	for range n {
		s := genPlainYAML(r)
		var fast yaml.Node
		if !decodePlainYAML([]byte(s), &fast) {
			continue
		}
		taken++
		if d := sameAsYAML(s); d != "" {
			t.Fatalf("%q: %s", s, d)
		}
		var has [5]bool
		if len(fast.Content) > 0 {
			commentKinds(fast.Content[0], &has)
		}
		has[3], has[4] = fast.HeadComment != "", fast.FootComment != ""
		for i, h := range has {
			if h {
				kinds[i]++
			}
		}
	}
	t.Logf("fast path took %d of %d documents; with head, line, foot, document head, document foot comments: %v", taken, n, kinds)
	if taken < n/10 || taken > n*9/10 {
		t.Fatalf("fast path took %d of %d generated documents: the generator misses one side", taken, n)
	}
	for i, k := range kinds {
		if k < taken/100 {
			t.Fatalf("only %d of the %d documents taken have comments of kind %d: the generator misses a placement", k, taken, i)
		}
	}
}

// commentKinds notes which of head, line and foot comments the nodes under n hold.
func commentKinds(n *yaml.Node, has *[5]bool) {
	has[0] = has[0] || n.HeadComment != ""
	has[1] = has[1] || n.LineComment != ""
	has[2] = has[2] || n.FootComment != ""
	for _, c := range n.Content {
		commentKinds(c, has)
	}
}

// TestPlainTag checks plainTag's shortcuts against yaml's resolver (Node.ShortTag): every
// first byte and character class with endings that make numbers, booleans, nulls, timestamps
// and strings, and every scalar of the generator and the repository's front matter.
func TestPlainTag(t *testing.T) {
	var values []string
	ends := []string{"", "0", "1", "x", " ", " x", " 1", ".5", "e3", "-01-02", "-1-2 3:4:5", "rue", "RUE", "alse", "ull", "ULL",
		"inf", ".inf", "nan", "<", "_1", "x1", "b101", "o17", "x1F", "23-03-01", "024-03-01", "024-03-01 10:00:00", "1:2", ":", "~"}
	for c := 0x20; c < 0x7F; c++ {
		for _, e := range ends {
			values = append(values, string(rune(c))+e)
		}
	}
	for _, c := range []string{"é", "µ", "\u00a0", "𝜇"} {
		for _, e := range ends {
			values = append(values, c+e)
		}
	}
	values = append(values, "", "2024-03-01", "2024-03-01 12:00:00", "2001-12-14 21:59:43.10", "1 2", "1_000", "+.inf", "-.INF", "<<", "0 x")
	for _, y := range repoFrontMatter(t) {
		var doc yaml.Node
		if yaml.Unmarshal([]byte(y), &doc) == nil {
			values = appendScalars(values, &doc)
		}
	}
	r := rand.New(rand.NewPCG(3, 5))
	for range 500 {
		var doc yaml.Node
		if yaml.Unmarshal([]byte(genPlainYAML(r)), &doc) == nil {
			values = appendScalars(values, &doc)
		}
	}
	for _, v := range values {
		n := yaml.Node{Kind: yaml.ScalarNode, Value: v}
		if got, want := plainTag(v), n.ShortTag(); got != want {
			t.Errorf("plainTag(%q) = %s, yaml's resolver says %s", v, got, want)
		}
	}
}

func appendScalars(vs []string, n *yaml.Node) []string {
	if n.Kind == yaml.ScalarNode {
		vs = append(vs, n.Value)
	}
	for _, c := range n.Content {
		vs = appendScalars(vs, c)
	}
	return vs
}
