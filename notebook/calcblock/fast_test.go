package calcblock

import (
	"fmt"
	"io/fs"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"cleave/internal/testutil"
	"cleave/notebook/mdsrc"
)

// compareFast runs the fast path on raw and, when it accepts, goldmark's path
// on a separate parse, and fails unless both give the same blocks. It returns
// the fast path's reason for refusing, with its line ("" when it accepted).
func compareFast(t testing.TB, raw []byte) (why string) {
	t.Helper()
	s, _ := mdsrc.Parse(raw)
	fast, why, line := findFast(s)
	if why != "" {
		if fast != nil {
			t.Fatalf("refused (%s) but returned %d blocks", why, len(fast))
		}
		return fmt.Sprintf("line %d: %s", line, why)
	}
	s2, _ := mdsrc.Parse(raw)
	slow, err := findGoldmark(s2)
	if err != nil {
		t.Fatalf("fast path accepted a file goldmark's path fails on (%v):\n%q", err, raw)
	}
	if !reflect.DeepEqual(fast, slow) {
		t.Fatalf("fast path differs from goldmark's on\n%q\nfast:     %+v\ngoldmark: %+v", raw, fast, slow)
	}
	return ""
}

// Documents the fast path must accept (why == "") or refuse (why names the
// reason); every accepted one is also compared with goldmark's path.
var fastCases = []struct {
	name, doc string
	why       string // substring of the refusal; "" for accepted
	blocks    int    // calc blocks found, when accepted
	readOnly  int    // of which read-only
}{
	{"typical cooldown", "---\nid: CD1\nkind: cooldown\n---\n# CD1\n\nText.\n\n```cleave\nn = wafer.design_density\nB = 1.5 T\nnu = filling_factor(n, B)   #~ 5.56\n```\n", "", 1, 0},
	{"no blocks", "# Title\n\nJust prose.\n", "", 0, 0},
	{"empty file", "", "", 0, 0},
	{"empty block", "```cleave\n```\n", "", 1, 0},
	{"fence after a paragraph", "Some text\n```cleave\nx = 1\n```\nmore text\n", "", 1, 0},
	{"fence after a heading", "# H\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"two blocks", "```cleave\na = 1\n```\n\n~~~cleave\nb = a\n~~~\n", "", 2, 0},
	{"results", "```cleave\ny = 2  #~ 2\nz = y #~\n#~ orphan\n```\n", "", 1, 0},
	{"unclosed at end of file", "```cleave\nx = 1\n", "", 1, 1},
	{"unclosed, no final newline", "```cleave\nx = 1", "", 1, 1},
	{"unclosed with trailing blank lines", "```cleave\nx = 1\n\n\n", "", 1, 1},
	{"opening fence is the last line", "text\n```cleave", "", 1, 1},
	{"longer closing fence", "```cleave\nx = 1\n`````\n", "", 1, 0},
	{"shorter fence inside a longer one", "````cleave\nx = 1\n```\ny = 2\n````\n", "", 1, 0},
	{"closing fence indented three spaces", "```cleave\nx = 1\n   ```\n", "", 1, 0},
	{"four spaces: content, not closing", "```cleave\nx = 1\n    ```\n", "", 1, 1},
	{"tab before the closing run: content", "```cleave\nx = 1\n\t```\n  \t```\n", "", 1, 1},
	{"closing fence with trailing blanks", "```cleave\nx = 1\n```  \t\n", "", 1, 0},
	{"closing fence with text: content", "```cleave\nx = 1\n``` x\n", "", 1, 1},
	{"other fence character: content", "```cleave\nx = 1\n~~~\n", "", 1, 1},
	{"tilde fence, backtick in info", "~~~cleave `x`\nx = 1\n~~~\n", "", 1, 0},
	{"info cleave extra", "```cleave extra\nx = 1\n```\n", "", 1, 0},
	{"info cleavex", "```cleavex\nx = 1\n```\n", "", 0, 0},
	{"info after blanks", "```  cleave  \nx = 1\n```\n", "", 1, 0},
	{"info after a tab", "```\tcleave\tx\nx = 1\n```\n", "", 1, 0},
	{"info in braces", "```{cleave}\nx = 1\n```\n", "", 0, 0},
	{"fence in another fence", "```python\n```cleave\nx = 1\n```\n", "", 0, 0},
	{"longer other fence hides a calc block", "````md\n```cleave\nx\n```\n````\n", "", 0, 0},
	{"tabs in content", "```cleave\n\tx = 1\t#~ 1\n  \ty = 2\n```\n", "", 1, 0},
	{"content line that looks like HTML", "```cleave\n<div>\n> q\n- item\n```\n", "", 1, 0},
	{"list before the fence", "- item\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"empty list item before the fence", "-\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"block quote before the fence", "> quote\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"lazy continuation then fence", "> quote\nlazy\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"indented code before the fence", "    code\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"nested list before the fence", "1. a\n   - b\n\n     c\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"table and setext heading", "| a | b |\n|---|---|\n| 1 | 2 |\n```cleave\nx = 1\n```\nTitle\n=====\n", "", 1, 0},
	{"link reference definition", "[ref]: /url\n\"title\"\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"front matter with a fence in it", "---\nnotes: |\n  ```cleave\n  a = 5\n  ```\n---\n```cleave\nb = 1\n```\n", "", 1, 0},
	{"BOM and front matter", "\uFEFF---\nid: X\n---\n```cleave\nx = 1\n```\n", "", 1, 0},
	{"unclosed front matter", "---\nid: X\n```cleave\nx = 1\n```\n", "", 1, 0},

	{"fence in a list", "- ```cleave\n  x = 1\n  ```\n", "not at column 1", 0, 0},
	{"fence in a block quote", "> ```cleave\n> x = 1\n> ```\n", "not at column 1", 0, 0},
	{"fence indented one space", " ```cleave\nx = 1\n```\n", "not at column 1", 0, 0},
	{"fence indented three spaces", "   ```cleave\nx = 1\n```\n", "not at column 1", 0, 0},
	{"fence indented four spaces", "    ```cleave\nx = 1\n```\n", "not at column 1", 0, 0},
	{"fence indented by a tab", "\t```cleave\nx = 1\n```\n", "not at column 1", 0, 0},
	{"inline code with three backticks", "Write ```x``` here.\n```cleave\nx = 1\n```\n", "not at column 1", 0, 0},
	{"backtick in a backtick info string", "```cleave `x`\nx = 1\n```\n", "backtick", 0, 0},
	{"HTML block", "<div>\n```cleave\nx = 1\n```\n</div>\n", "HTML", 0, 0},
	{"HTML comment", "<!--\n```cleave\nx = 1\n```\n-->\n", "HTML", 0, 0},
	{"CRLF", "```cleave\r\nx = 1\r\n```\r\n", "control character", 0, 0},
	{"lone CR", "# a\r```cleave\nx = 1\n```\n", "control character", 0, 0},
	{"NUL", "```cleave\nx = \x00\n```\n", "control character", 0, 0},
	{"not UTF-8", "```cleave\nx = \xff\n```\n", "UTF-8", 0, 0},
	{"BOM, fence on line 1", "\uFEFF```cleave\nx = 1\n```\n", "not at column 1", 0, 0},
	// Parse leaves the body of a file nested too deep unread: goldmark's path finds
	// nothing, whatever the text says, even inside a fence.
	{"nested too deep", "```cleave\n" + strings.Repeat("> ", mdsrc.MaxNesting+1) + "x\n```\n", "not read", 0, 0},
	{"too large", "```cleave\nx = 1\n```\n" + strings.Repeat("a\n", mdsrc.MaxFileBytes/2), "not read", 0, 0},
}

func TestFindFast(t *testing.T) {
	for _, c := range fastCases {
		t.Run(c.name, func(t *testing.T) {
			why := compareFast(t, []byte(c.doc))
			switch {
			case c.why == "" && why != "":
				t.Fatalf("refused (%s), want accepted", why)
			case c.why != "" && !strings.Contains(why, c.why):
				t.Fatalf("refusal %q, want one naming %q", why, c.why)
			case c.why != "":
				return
			}
			s, _ := mdsrc.Parse([]byte(c.doc))
			blocks, err := Find(s)
			if err != nil {
				t.Fatal(err)
			}
			ro := 0
			for _, b := range blocks {
				if b.ReadOnly {
					ro++
				}
			}
			if len(blocks) != c.blocks || ro != c.readOnly {
				t.Errorf("%d blocks, %d read-only; want %d, %d", len(blocks), ro, c.blocks, c.readOnly)
			}
		})
	}
}

// TestFindFastRandom compares the two paths on the random documents of the
// property test (calc blocks in every kind of container, CRLF, BOM, front
// matter), as written and with LF line endings.
func TestFindFastRandom(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 2026))
	n := 3000
	if testing.Short() {
		n = 300
	}
	accepted := 0
	for range n {
		doc := randomDoc(r)
		compareFast(t, []byte(doc))
		if compareFast(t, []byte(strings.ReplaceAll(doc, "\r\n", "\n"))) == "" {
			accepted++
		}
	}
	// About one document in forty has every calc block at the top level (the
	// others are refused as they should be); a change that refused those too
	// would leave this test comparing nothing.
	if accepted < n/100 {
		t.Errorf("fast path accepted %d of %d random documents", accepted, n)
	}
}

// fastLines are lines that decide block structure around fences: containers
// and their continuations, leaf blocks, fence lines of every shape.
var fastLines = []string{
	"", "   ", "\t", "text", "  text", "    indented", "\tindented", "x = 1", "y = x #~ 2", "#~ r",
	"- item", "-", "* item", "+ item", "1. item", "2) item", "  - nested", "     deep", "-\titem",
	"> quote", ">", "> > q", ">\tq", "> - q", "- > q", "> <div>", "- <!--", "-->",
	"# H", "#", "Title", "===", "---", "***", "- - -", "| a | b |", "|---|---|", "[ref]: /u", "\"t\"",
	"```cleave", "~~~cleave", "````cleave", "```cleave x", "``` cleave", "```cleave\t", "~~~cleave `q`",
	"```", "~~~", "````", "`````", "```python", "```  ", "   ```", "  ~~~", "``` x", "```\t", "``x", "~~",
}

// TestFindFastLines compares the two paths on random documents made of
// fastLines, most of which the fast path accepts.
func TestFindFastLines(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 2026))
	n := 20000
	if testing.Short() {
		n = 2000
	}
	accepted := 0
	for range n {
		if compareFast(t, []byte(testutil.RandomLines(r, fastLines, 20))) == "" {
			accepted++
		}
	}
	if accepted < n/4 {
		t.Errorf("fast path accepted %d of %d documents", accepted, n)
	}
	t.Logf("accepted %d of %d", accepted, n)
}

// markdownFiles returns the Markdown files of the repository: every .md file
// and the rendered templates (templates/testdata/*.golden).
func markdownFiles(t testing.TB) []string {
	root := filepath.Join("..", "..")
	var files []string
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		rel, _ := filepath.Rel(root, p)
		if !d.IsDir() && (strings.HasSuffix(p, ".md") || strings.HasPrefix(rel, filepath.Join("templates", "testdata")) && strings.HasSuffix(p, ".golden")) {
			files = append(files, p)
		}
		return nil
	})
	if err != nil || len(files) < 50 {
		t.Fatalf("%d Markdown files found: %v", len(files), err)
	}
	return files
}

// TestFindFastRepository compares the two paths on every Markdown file of the
// repository, and checks that the demo notebook and the rendered templates (what
// a notebook's files start from) take the fast path. The files that fall
// back are listed with their reason.
func TestFindFastRepository(t *testing.T) {
	// Files that fall back, by path relative to the repository, with the reason.
	fallBack := map[string]string{
		"notebook/calcblock/testdata/bom_fence_first.md":     "not at column 1", // the BOM is masked as three spaces
		"notebook/calcblock/testdata/crlf.md":                "control character",
		"notebook/calcblock/testdata/list.md":                "not at column 1",
		"notebook/calcblock/testdata/quote.md":               "not at column 1",
		"notebook/calcblock/testdata/tabs.md":                "not at column 1",
		"notebook/calcblock/testdata/unclosed.md":            "not at column 1", // blocks in a quote and a list
		"notebook/compute/testdata/nb/devices/D1.md":         "not at column 1", // a block in a quote
		"notebook/testdata/broken/bom-crlf/pieces/P1.md":     "control character",
		"notebook/calcblock/testdata/bom_fence_first.golden": "not at column 1",
	}
	root := filepath.Join("..", "..")
	mustTakeFast := 0
	for _, p := range markdownFiles(t) {
		raw, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		rel, _ := filepath.Rel(root, p)
		rel = filepath.ToSlash(rel)
		why := compareFast(t, raw)
		want, listed := fallBack[rel]
		switch {
		case listed && !strings.Contains(why, want):
			t.Errorf("%s: fast path says %q, want a fallback naming %q", rel, why, want)
		case !listed && why != "":
			t.Errorf("%s falls back: %s", rel, why)
		}
		if strings.HasPrefix(rel, "demo/scenario/") || strings.HasPrefix(rel, "templates/testdata/") {
			mustTakeFast++
		}
	}
	if mustTakeFast < 20 {
		t.Errorf("only %d files of the demo and the templates found", mustTakeFast)
	}
}

func FuzzFindFast(f *testing.F) {
	for _, p := range markdownFiles(f) {
		raw, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(raw)
	}
	for _, c := range fastCases {
		if len(c.doc) < 1<<16 {
			f.Add([]byte(c.doc))
		}
	}
	for _, l := range fastLines {
		f.Add([]byte("- a\n" + l + "\n```cleave\nx\n" + l + "\n```\n"))
	}
	r := rand.New(rand.NewPCG(5, 2026))
	for range 30 {
		f.Add([]byte(strings.ReplaceAll(randomDoc(r), "\r\n", "\n")))
	}
	f.Fuzz(func(t *testing.T, raw []byte) {
		compareFast(t, raw)
	})
}

func ExampleFind_fast() {
	s, _ := mdsrc.Parse([]byte("# Run 3\n\n```cleave\nB = 1.5 T #~ 1.5 T\n```\n"))
	blocks, _ := Find(s) // a simple file: found without goldmark's parse
	for _, b := range blocks {
		fmt.Println(b.Line, len(b.Lines), b.Lines[0].Old)
	}
	// Output: 3 1 1.5 T
}
