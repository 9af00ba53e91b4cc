package calcblock

import (
	"bytes"
	"cleave/internal/testutil"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cleave/notebook/mdsrc"
)

var demoFields = map[string]string{"width": "20 um"}

func reportText(r *FileReport) string {
	var b strings.Builder
	fmt.Fprintf(&b, "changed: %v\nevaluated: %d\n", r.Changed, r.Code)
	for _, c := range r.Stale {
		fmt.Fprintf(&b, "stale %s\n", c)
	}
	for _, c := range r.Errors {
		fmt.Fprintf(&b, "error %s\n", c)
	}
	return b.String()
}

func TestGolden(t *testing.T) {
	inputs, err := filepath.Glob("testdata/*.md")
	if err != nil || len(inputs) == 0 {
		t.Fatalf("no test inputs: %v", err)
	}
	for _, in := range inputs {
		name := strings.TrimSuffix(filepath.Base(in), ".md")
		t.Run(name, func(t *testing.T) {
			raw, err := os.ReadFile(in)
			if err != nil {
				t.Fatal(err)
			}
			rep, err := Recompute(name+".md", raw, newSumEval(demoFields).ev())
			if err != nil {
				t.Fatal(err)
			}
			checkGolden(t, "testdata/"+name+".golden", rep.NewBytes)
			checkGolden(t, "testdata/"+name+".report.golden", []byte(reportText(rep)))

			// A second pass over the output changes nothing.
			rep2, err := Recompute(name+".md", rep.NewBytes, newSumEval(demoFields).ev())
			if err != nil {
				t.Fatal(err)
			}
			assertSettled(t, rep.NewBytes, rep2)
			if len(rep2.Errors) != len(rep.Errors) {
				t.Errorf("second pass: %d errors, first pass %d", len(rep2.Errors), len(rep.Errors))
			}
			assertOnlyRegionsChanged(t, raw, rep.NewBytes)
		})
	}
}

// assertSettled checks that a second recompute over out changed nothing and
// found nothing stale except in read-only blocks, which are never written.
func assertSettled(t *testing.T, out []byte, rep2 *FileReport) {
	t.Helper()
	if rep2.Changed || !bytes.Equal(rep2.NewBytes, out) {
		t.Fatalf("second pass changed the file:\n%s", reportText(rep2))
	}
	s, _ := mdsrc.Parse(out)
	blocks, err := Find(s)
	if err != nil {
		t.Fatal(err)
	}
	readOnly := map[int]bool{}
	for _, b := range blocks {
		for _, l := range b.Lines {
			readOnly[l.LineNo] = b.ReadOnly
		}
	}
	for _, c := range rep2.Stale {
		if !readOnly[c.Line] {
			t.Fatalf("second pass found a stale line outside read-only blocks: %s", c)
		}
	}
}

func checkGolden(t *testing.T, path string, got []byte) {
	t.Helper()
	testutil.Golden(t, path, got)
}

// skeleton returns the bytes of raw outside every result region, with the
// calc lines' result regions cut out; lines listed in added also lose the
// two spaces that Rewrite puts before a new region. It also returns the
// blocks, so callers can compare their shape.
func skeleton(t *testing.T, raw []byte, added map[int]bool) ([]byte, []Block, map[int]bool) {
	t.Helper()
	s, _ := mdsrc.Parse(raw)
	blocks, err := Find(s)
	if err != nil {
		t.Fatalf("Find: %v", err)
	}
	var out []byte
	pos := 0
	hadRegion := map[int]bool{}
	idx := 0
	for _, b := range blocks {
		for _, l := range b.Lines {
			if l.HasResult() {
				hadRegion[idx] = true
				cut := l.Result.Start
				if added[idx] {
					if cut-2 < l.Span.Start || string(raw[cut-2:cut]) != "  " {
						t.Fatalf("line %d: new region not preceded by two spaces: %q", l.LineNo, raw[l.Span.Start:l.Span.End])
					}
					cut -= 2
				}
				out = append(out, raw[pos:cut]...)
				pos = l.Result.End
			}
			idx++
		}
	}
	return append(out, raw[pos:]...), blocks, hadRegion
}

// assertOnlyRegionsChanged checks that after differs from before only inside
// result regions (and the two spaces before a newly added region), and that
// the block structure is the same.
func assertOnlyRegionsChanged(t *testing.T, before, after []byte) {
	t.Helper()
	skBefore, bb, had := skeleton(t, before, nil)
	added := map[int]bool{}
	_, ba, hasNow := skeleton(t, after, nil)
	for i := range hasNow {
		if !had[i] {
			added[i] = true
		}
	}
	for i := range had {
		if !hasNow[i] {
			t.Fatalf("calc line %d lost its result region", i)
		}
	}
	skAfter, _, _ := skeleton(t, after, added)
	if len(bb) != len(ba) {
		t.Fatalf("block count changed: %d → %d", len(bb), len(ba))
	}
	for i := range bb {
		if len(bb[i].Lines) != len(ba[i].Lines) || bb[i].ReadOnly != ba[i].ReadOnly {
			t.Fatalf("block %d changed shape", i)
		}
	}
	if !bytes.Equal(skBefore, skAfter) {
		t.Fatalf("bytes outside result regions changed:\nbefore %q\nafter  %q", skBefore, skAfter)
	}
}

func TestFind(t *testing.T) {
	tests := []struct {
		name     string
		raw      string
		blocks   int
		readOnly []bool
		lines    [][]string // Code of each line
		olds     [][]string
		fences   []string
	}{
		{
			name: "plain", raw: "```cleave\na = 1 #~ 1\n# note\n\n```\n",
			blocks: 1, readOnly: []bool{false},
			lines: [][]string{{"a = 1 ", "# note", ""}}, olds: [][]string{{"1", "", ""}}, fences: []string{"```"},
		},
		{
			name: "info with attributes and tildes", raw: "~~~~ cleave  x\nb\n~~~~\n",
			blocks: 1, readOnly: []bool{false}, lines: [][]string{{"b"}}, olds: [][]string{{""}}, fences: []string{"~~~~"},
		},
		{
			name: "other languages ignored (the old info string calc included)", raw: "```calculator\na\n```\n```go\nb\n```\n```calc\nx = 1  #~ 1\n```\n", blocks: 0,
		},
		{
			name: "empty block", raw: "```cleave\n```\n", blocks: 1, readOnly: []bool{false},
			lines: [][]string{nil}, olds: [][]string{nil}, fences: []string{"```"},
		},
		{
			name: "unclosed at EOF", raw: "```cleave\na #~ 2", blocks: 1, readOnly: []bool{true},
			lines: [][]string{{"a "}}, olds: [][]string{{"2"}}, fences: []string{"```"},
		},
		{
			name: "closed by end of quote, next fence opens a block", raw: "> ```cleave\n> a\n```\nb\n```\n",
			blocks: 1, readOnly: []bool{true}, lines: [][]string{{"a"}}, olds: [][]string{{""}}, fences: []string{"```"},
		},
		{
			name: "shorter fence does not close", raw: "````cleave\n```\n````\n",
			blocks: 1, readOnly: []bool{false}, lines: [][]string{{"```"}}, olds: [][]string{{""}}, fences: []string{"````"},
		},
		{
			name: "tab after quote marker", raw: ">\t```cleave\n>\tx = 1\n>\t```\n",
			blocks: 1, readOnly: []bool{false}, lines: [][]string{{"x = 1"}}, olds: [][]string{{""}}, fences: []string{"```"},
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, _ := mdsrc.Parse([]byte(tc.raw))
			blocks, err := Find(s)
			if err != nil {
				t.Fatal(err)
			}
			if len(blocks) != tc.blocks {
				t.Fatalf("got %d blocks, want %d", len(blocks), tc.blocks)
			}
			for i, b := range blocks {
				if b.ReadOnly != tc.readOnly[i] {
					t.Errorf("block %d ReadOnly = %v, want %v", i, b.ReadOnly, tc.readOnly[i])
				}
				if got := strings.Repeat(string(b.Fence), b.FenceLen); got != tc.fences[i] || s.Raw[b.Start] != b.Fence {
					t.Errorf("block %d fence %q at %d, want %q", i, got, b.Start, tc.fences[i])
				}
				var codes, olds []string
				for _, l := range b.Lines {
					codes = append(codes, l.Code)
					olds = append(olds, l.Old)
					content := string(s.Raw[l.Span.Start:l.Span.End])
					if strings.ContainsAny(content, "\n") {
						t.Errorf("line %d span includes a line ending: %q", l.LineNo, content)
					}
				}
				if fmt.Sprint(codes) != fmt.Sprint(tc.lines[i]) || fmt.Sprint(olds) != fmt.Sprint(tc.olds[i]) {
					t.Errorf("block %d: codes %q olds %q, want %q %q", i, codes, olds, tc.lines[i], tc.olds[i])
				}
			}
		})
	}
}

func TestSanitize(t *testing.T) {
	tests := []struct {
		name, in string
		fence    byte
		n        int
		want     string
	}{
		{"newlines", "a\nb\r\nc\rd", '`', 3, "a b c d"},
		{"trim", "  5 T \n", '`', 3, "5 T"},
		{"short run kept", "a `` b", '`', 3, "a `` b"},
		{"run as long as fence", "a ``` b", '`', 3, "a \\`\\`\\` b"},
		{"longer fence tolerates", "a ``` b", '`', 4, "a ``` b"},
		{"tilde fence ignores backticks", "a ``` b", '~', 3, "a ``` b"},
		{"tilde run", "~~~~", '~', 3, "\\~\\~\\~\\~"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := Sanitize(tc.in, tc.fence, tc.n)
			if got != tc.want {
				t.Errorf("Sanitize(%q) = %q, want %q", tc.in, got, tc.want)
			}
			if again := Sanitize(got, tc.fence, tc.n); again != got {
				t.Errorf("Sanitize not idempotent: %q → %q", got, again)
			}
		})
	}
}

func TestErrorText(t *testing.T) {
	tests := []struct{ msg, old, want string }{
		{"undefined: x", "", "error: undefined: x"},
		{"undefined: x", "3.1e11 cm^-2", "error: undefined: x (was: 3.1e11 cm^-2)"},
		{"undefined: y", "error: undefined: x (was: 5)", "error: undefined: y (was: 5)"},
		{"undefined: y", "error: undefined: x", "error: undefined: y"},
		{"odd (was: 3)", "", "error: odd (was : 3)"},
		{"odd (was: 3)", "7 (was: 8)", "error: odd (was : 3) (was: 7 (was: 8))"},
	}
	for _, tc := range tests {
		got := ErrorText(tc.msg, tc.old)
		if got != tc.want {
			t.Errorf("ErrorText(%q, %q) = %q, want %q", tc.msg, tc.old, got, tc.want)
		}
		if !IsError(got) {
			t.Errorf("IsError(%q) = false", got)
		}
		// Failing again the same way gives the same text.
		if again := ErrorText(tc.msg, got); again != got {
			t.Errorf("not stable: %q → %q", got, again)
		}
	}
}

func TestChangeString(t *testing.T) {
	c := Change{Path: "devices/D-07.md", Line: 14, Old: "", New: "81"}
	if got, want := c.String(), "devices/D-07.md:14: (none) → 81"; got != want {
		t.Errorf("got %q, want %q", got, want)
	}
	c.Old = "80"
	if got, want := c.String(), "devices/D-07.md:14: 80 → 81"; got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}

func TestRecomputeUnclosedFrontMatter(t *testing.T) {
	raw := []byte("---\nid: x\n```cleave\na = 1\n```\n")
	rep, err := Recompute("x.md", raw, newSumEval(nil).ev())
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Errors) != 1 || rep.Errors[0].Line != 1 || !strings.Contains(rep.Errors[0].New, "never closed") {
		t.Fatalf("errors = %v, want one front-matter error on line 1", rep.Errors)
	}
	if want := "---\nid: x\n```cleave\na = 1  #~ 1\n```\n"; string(rep.NewBytes) != want {
		t.Errorf("NewBytes = %q, want %q", rep.NewBytes, want)
	}
}

func TestWriteAtomic(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "entry.md")
	orig := []byte("```cleave\na = 1\n```\n")
	if err := os.WriteFile(p, orig, 0o640); err != nil {
		t.Fatal(err)
	}
	next := []byte("```cleave\na = 1  #~ 1\n```\n")

	t.Run("refuses a file changed on disk", func(t *testing.T) {
		edited := []byte("```cleave\na = 2\n```\n")
		if err := os.WriteFile(p, edited, 0o640); err != nil {
			t.Fatal(err)
		}
		err := WriteAtomic(p, next, orig)
		if !errors.Is(err, ErrChangedOnDisk) {
			t.Fatalf("err = %v, want ErrChangedOnDisk", err)
		}
		got, _ := os.ReadFile(p)
		if !bytes.Equal(got, edited) {
			t.Errorf("file was modified: %q", got)
		}
		if err := os.WriteFile(p, orig, 0o640); err != nil {
			t.Fatal(err)
		}
	})
	t.Run("replaces an unchanged file and keeps its mode", func(t *testing.T) {
		if err := os.Chmod(p, 0o640); err != nil {
			t.Fatal(err)
		}
		if err := WriteAtomic(p, next, orig); err != nil {
			t.Fatal(err)
		}
		got, _ := os.ReadFile(p)
		if !bytes.Equal(got, next) {
			t.Errorf("content = %q, want %q", got, next)
		}
		fi, _ := os.Stat(p)
		if fi.Mode().Perm() != 0o640 {
			t.Errorf("mode = %v, want 0640", fi.Mode().Perm())
		}
		ents, _ := os.ReadDir(dir)
		if len(ents) != 1 {
			t.Errorf("temporary files left behind: %v", ents)
		}
	})
	t.Run("refuses a removed file", func(t *testing.T) {
		q := filepath.Join(dir, "gone.md")
		if err := WriteAtomic(q, next, orig); !errors.Is(err, ErrChangedOnDisk) {
			t.Fatalf("err = %v, want ErrChangedOnDisk", err)
		}
	})
	t.Run("creates a new file when original is nil", func(t *testing.T) {
		q := filepath.Join(dir, "new.md")
		if err := WriteAtomic(q, next, nil); err != nil {
			t.Fatal(err)
		}
		if err := WriteAtomic(q, next, nil); !errors.Is(err, ErrChangedOnDisk) {
			t.Fatalf("second create: err = %v, want ErrChangedOnDisk", err)
		}
	})
	t.Run("refuses a symlink", func(t *testing.T) {
		q := filepath.Join(dir, "link.md")
		if err := os.Symlink(p, q); err != nil {
			t.Skip("symlinks unavailable:", err)
		}
		cur, _ := os.ReadFile(q)
		if err := WriteAtomic(q, next, cur); !errors.Is(err, ErrNotRegular) {
			t.Fatalf("err = %v, want ErrNotRegular", err)
		}
	})
}
