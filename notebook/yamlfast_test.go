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

	{"refuse/comment: line comment", "a: b # c\n"},
	{"refuse/comment: whole line", "# c\na: b\n"},
	{"refuse/comment: inside a word", "a: b#c\n"},
	{"refuse/comment: inside quotes", "a: \"#1\"\n"},
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
	{"refuse/key: quoted key", "\"a\": b\n"},
	{"refuse/key: no space after the colon", "a:b\n"},
	{"refuse/key: space before the colon", "a : b\n"},
	{"refuse/key: key with spaces", "a b: c\n"},
	{"refuse/key: document marker", "a: 1\n---\nb: 2\n"},
	{"refuse/key: directive", "%YAML 1.2\na: 1\n"},
	{"refuse/key: explicit key", "? a\n: b\n"},
	{"refuse/key: a dash alone", "a:\n-\n"},
	{"refuse/key: item after an inline value", "a: 1\n- b\n"},
	{"refuse/key: value on the next line", "a:\n  b\n"},
	{"refuse/colon: mapping as a sequence item", "a:\n  - b: c\n"},
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
	{"refuse/flow key: quoted", "a: {\"b\": c}\n"},
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
// path accepts one, the trees must be equal. The demo notebook, the good test notebook, the
// tiny notebook and the rendered templates (templates/testdata) must take the fast path,
// except the files listed here with the reason.
func TestPlainYAMLRepo(t *testing.T) {
	refused := map[string]string{
		// Trailing comments on some lines: yaml v3 keeps them in the tree.
		"demo/scenario/cooldowns/CD24-001.md":    "comment",
		"demo/scenario/cooldowns/CD24-002.md":    "comment",
		"demo/scenario/cooldowns/CD24-003.md":    "comment",
		"demo/scenario/cooldowns/CD24-004.md":    "comment",
		"demo/scenario/devices/W24-031-A-HB1.md": "comment",
		// The built-in templates explain their fields in comments.
		"templates/testdata/cooldown.golden": "comment",
		"templates/testdata/device.golden":   "comment",
		"templates/testdata/mask.golden":     "comment",
		"templates/testdata/piece.golden":    "comment",
		"templates/testdata/process.golden":  "comment",
		"templates/testdata/wafer.golden":    "comment",
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
// random indentations, block sequences indented or not, flow collections with random spacing,
// scalars that resolve to every tag, and pieces that are just outside the subset (colons,
// indicators, continuation lines) so that both sides of each rule are met.
func genPlainYAML(r *rand.Rand) string {
	keys := []string{"id", "kind", "a", "b.c", "x-y", "_z", "1", "true", "null", "2024-03-01", "0x1F", "K9", "a-", "y"}
	scalars := []string{"W1", "0.3 K", "12", "-15 mm", "1.5", "true", "False", "~", "null", "2024-03-01",
		"2001-12-14 21:59:43.10", "1e3", ".inf", "-.INF", ".nan", "0o17", "0b101", "+12", "1_000", "12:30",
		"<<", "a, b", "a [b] {c}", "it's", "50 °C", "µm", "𝜇", "a:b", "a-b", "--x", "x?", "a  b", "a\u00a0",
		"a: b", "a:", "-", "- a", "&x", "*x", "!t", "|", ">", "%x", "@x", "`x`", "?x", ":x", "...", "---", "a #b"}
	var b strings.Builder
	blank := func() {
		for r.IntN(4) == 0 {
			b.WriteString(strings.Repeat(" ", r.IntN(3)))
			b.WriteByte('\n')
		}
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
	var mapping func(indent, depth int)
	mapping = func(indent, depth int) {
		for range 1 + r.IntN(4) {
			blank()
			b.WriteString(strings.Repeat(" ", indent) + keys[r.IntN(len(keys))] + ":")
			switch k := r.IntN(6); {
			case k == 0:
				b.WriteString(sp(2) + "\n") // empty value
			case k == 1 && depth < 3:
				b.WriteString(sp(1) + "\n")
				mapping(indent+1+r.IntN(3), depth+1)
			case k == 2:
				b.WriteString(sp(1) + "\n")
				in := indent + r.IntN(3)
				for range 1 + r.IntN(3) {
					blank()
					b.WriteString(strings.Repeat(" ", in) + "-" + " " + sp(1))
					if r.IntN(3) == 0 {
						b.WriteString(flow(1))
					} else {
						b.WriteString(scalar(false))
					}
					b.WriteString(sp(1) + "\n")
				}
			case k == 3:
				b.WriteString(" " + sp(1) + flow(0) + sp(1) + "\n")
			default:
				b.WriteString(" " + sp(1) + scalar(false) + sp(1) + "\n")
			}
			if r.IntN(30) == 0 {
				b.WriteString(strings.Repeat(" ", indent+1+r.IntN(2)) + "more\n") // a continuation line
			}
		}
	}
	mapping(0, 0)
	blank()
	s := b.String()
	if r.IntN(5) == 0 {
		s = strings.TrimSuffix(s, "\n")
	}
	return s
}

// TestPlainYAMLGenerated compares the fast path with yaml v3 on random documents of
// genPlainYAML: every one the fast path takes must come out the same. It also makes sure the
// generator keeps both paths busy (the fast path takes some and refuses some).
func TestPlainYAMLGenerated(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 11))
	n := 20000
	if testing.Short() {
		n = 2000
	}
	taken := 0
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
	}
	t.Logf("fast path took %d of %d documents", taken, n)
	if taken < n/10 || taken > n*9/10 {
		t.Fatalf("fast path took %d of %d generated documents: the generator misses one side", taken, n)
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
