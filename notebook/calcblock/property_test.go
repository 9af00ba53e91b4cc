package calcblock

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"
)

// container describes how a calc block sits in the document: the prefix of
// its opening line and the prefix of every following line.
type container struct{ open, cont string }

var containers = []container{
	{"", ""}, {"- ", "  "}, {"> ", "> "}, {"1. ", "   "}, {"> - ", ">   "},
	{"-\t", "\t"}, {">\t", ">\t"}, {"  ", "  "}, {"> > ", "> > "},
}

var calcLines = []string{
	"a = 1", "b = a + 2", "c = b + @width", "# a comment", "", "   ",
	"s = \"text ``` with fence\"", "m = \"two\\nlines\"", "y = a + 1 #~ 3", "  z = 1   ",
	"\tt = 2\t#~\t5 ", "#~ orphan", "bad = nope + 1", "e = a + 1 #~ error: old (was: 9)",
	"w = a #~", "~~~", "µ = 3 #~ 3", "q = a + b + c",
}

var prose = []string{
	"Cooldown by AK; piece W0311-C2 mounted with GE varnish.", "# Heading", "", "- a list item",
	"> a quote", "1. first", "Some *emphasis* and `code`.", "    indented code", "---",
	"| a | b |", "|---|---|", "text with #~ marker", "```python\nx = 1 #~ 2\n```",
}

// randomDoc builds a random Markdown file with calc blocks in assorted
// containers, line endings, a BOM and front matter.
func randomDoc(r *rand.Rand) string {
	eol := "\n"
	if r.IntN(3) == 0 {
		eol = "\r\n"
	}
	var b strings.Builder
	if r.IntN(5) == 0 {
		b.WriteString("\uFEFF")
	}
	if r.IntN(3) == 0 {
		b.WriteString("---" + eol + "id: D-" + fmt.Sprint(r.IntN(100)) + eol)
		if r.IntN(2) == 0 {
			b.WriteString("notes: |" + eol + "  ```cleave" + eol + "  a = 5" + eol + "  ```" + eol)
		}
		b.WriteString("---" + eol)
	}
	for range 1 + r.IntN(6) {
		for range r.IntN(4) {
			b.WriteString(strings.ReplaceAll(prose[r.IntN(len(prose))], "\n", eol) + eol)
		}
		b.WriteString(eol)
		c := containers[r.IntN(len(containers))]
		fence := []string{"```", "~~~", "````"}[r.IntN(3)]
		b.WriteString(c.open + fence + "cleave" + eol)
		for range r.IntN(7) {
			b.WriteString(c.cont + calcLines[r.IntN(len(calcLines))] + eol)
		}
		if r.IntN(8) != 0 {
			b.WriteString(c.cont + fence + eol)
		}
		b.WriteString(eol)
	}
	s := b.String()
	if r.IntN(4) == 0 {
		s = strings.TrimSuffix(s, eol)
	}
	return s
}

// TestRecomputeProperty: on random documents, recomputing changes no byte
// outside result regions, keeps the block structure, and a second recompute
// changes nothing.
func TestRecomputeProperty(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 2026))
	n := 2000
	if testing.Short() {
		n = 200
	}
	for i := range n {
		raw := []byte(randomDoc(r))
		rep, err := Recompute("random.md", raw, newSumEval(demoFields).ev())
		if err != nil {
			t.Fatalf("doc %d: %v\n%q", i, err, raw)
		}
		t.Run(fmt.Sprint(i), func(t *testing.T) {
			assertOnlyRegionsChanged(t, raw, rep.NewBytes)
			rep2, err := Recompute("random.md", rep.NewBytes, newSumEval(demoFields).ev())
			if err != nil {
				t.Fatal(err)
			}
			assertSettled(t, rep.NewBytes, rep2)
		})
		if t.Failed() {
			t.Fatalf("doc %d:\n%q", i, raw)
		}
	}
}

// constEval shows the same text on every line, and fails with it as the
// message on lines containing '!'.
type constEval struct{ text string }

func (e constEval) eval(code string, _ int) (string, error) {
	if strings.Contains(code, "!") {
		return "", fmt.Errorf("%s", e.text)
	}
	return e.text, nil
}

func FuzzRewrite(f *testing.F) {
	r := rand.New(rand.NewPCG(1, 2))
	for i := range 20 {
		f.Add([]byte(randomDoc(r)), []string{"3.1e11 cm^-2", "a ``` b\nc", "", "(was: x)", "~~~~"}[i%5])
	}
	f.Add([]byte(">\t```cleave\n>\tx!\n>\t```\n"), "e")
	f.Fuzz(func(t *testing.T, raw []byte, text string) {
		ev := EvalFunc(constEval{text}.eval)
		rep, err := Recompute("f.md", raw, ev)
		if err != nil {
			t.Skipf("parse inconsistency reported: %v", err)
		}
		assertOnlyRegionsChanged(t, raw, rep.NewBytes)
		rep2, err := Recompute("f.md", rep.NewBytes, ev)
		if err != nil {
			t.Fatalf("second pass: %v", err)
		}
		assertSettled(t, rep.NewBytes, rep2)
	})
}
