package mdsrc

import (
	"bytes"
	"errors"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/yuin/goldmark/ast"
)

// fences collects the info strings and first content lines of every fenced
// code block in the parse, as seen through Raw.
func fences(t *testing.T, s *Source) []string {
	t.Helper()
	var out []string
	ast.Walk(s.Doc(), func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if fc, ok := n.(*ast.FencedCodeBlock); ok && entering {
			info := ""
			if fc.Info != nil {
				info = string(fc.Info.Segment.Value(s.Raw))
			}
			out = append(out, info)
		}
		return ast.WalkContinue, nil
	})
	return out
}

func TestParse(t *testing.T) {
	tests := []struct {
		name        string
		raw         string
		bom         int
		hasFM       bool
		yaml        string
		fmLine      int
		body        string // Raw[Body:]
		wantErr     bool
		errLine     int
		wantFences  []string
		wantHeading bool // a level-1 heading must be found in the body
	}{
		{
			name: "no front matter", raw: "# Title\n\n```cleave\nx = 1\n```\n",
			body: "# Title\n\n```cleave\nx = 1\n```\n", wantFences: []string{"cleave"}, wantHeading: true,
		},
		{
			name: "front matter LF", raw: "---\nid: W1\nkind: wafer\n---\n# W1\n",
			hasFM: true, yaml: "id: W1\nkind: wafer\n", fmLine: 2, body: "# W1\n", wantHeading: true,
		},
		{
			name: "front matter CRLF", raw: "---\r\nid: W1\r\n---\r\n# W1\r\n",
			hasFM: true, yaml: "id: W1\r\n", fmLine: 2, body: "# W1\r\n", wantHeading: true,
		},
		{
			name: "closed by dots", raw: "---\nid: W1\n...\ntext\n",
			hasFM: true, yaml: "id: W1\n", fmLine: 2, body: "text\n",
		},
		{
			name: "empty front matter", raw: "---\n---\nbody\n",
			hasFM: true, yaml: "", fmLine: 2, body: "body\n",
		},
		{
			name: "closing delimiter at EOF", raw: "---\nid: W1\n---",
			hasFM: true, yaml: "id: W1\n", fmLine: 2, body: "",
		},
		{
			name: "BOM and front matter", raw: "\uFEFF---\nid: W1\n---\n# W1\n",
			bom: 3, hasFM: true, yaml: "id: W1\n", fmLine: 2, body: "# W1\n", wantHeading: true,
		},
		{
			name: "BOM without front matter", raw: "\uFEFF# Title\n```cleave\n```\n",
			bom: 3, body: "# Title\n```cleave\n```\n", wantFences: []string{"cleave"}, wantHeading: true,
		},
		{
			name:  "fence inside YAML block string is not a code block",
			raw:   "---\nnotes: |\n  ```cleave\n  x = 1\n  ```\n---\n```text\nhello\n```\n",
			hasFM: true, yaml: "notes: |\n  ```cleave\n  x = 1\n  ```\n", fmLine: 2,
			body: "```text\nhello\n```\n", wantFences: []string{"text"},
		},
		{
			name: "dashes with trailing text do not close", raw: "---\na: 1\n--- x\n---\nb\n",
			hasFM: true, yaml: "a: 1\n--- x\n", fmLine: 2, body: "b\n",
		},
		{
			name: "four dashes do not open", raw: "----\ntext\n",
			body: "----\ntext\n",
		},
		{
			name: "unclosed front matter", raw: "---\nid: W1\n```cleave\nx = 1\n```\n",
			body: "---\nid: W1\n```cleave\nx = 1\n```\n", wantErr: true, errLine: 1, wantFences: []string{"cleave"},
		},
		{
			name: "lone dashes at EOF", raw: "---", body: "---", wantErr: true, errLine: 1,
		},
		{name: "empty file", raw: "", body: ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			raw := []byte(tc.raw)
			orig := bytes.Clone(raw)
			s, err := Parse(raw)
			if s == nil {
				t.Fatalf("Parse returned a nil Source (err %v)", err)
			}
			if tc.wantErr {
				var pe *PosError
				if !errors.As(err, &pe) {
					t.Fatalf("err = %v, want *PosError", err)
				}
				if pe.Line != tc.errLine {
					t.Errorf("error line = %d, want %d", pe.Line, tc.errLine)
				}
			} else if err != nil {
				t.Fatalf("unexpected error: %v", err)
			}
			if !bytes.Equal(s.Raw, orig) {
				t.Errorf("Raw was modified")
			}
			if s.BOM != tc.bom {
				t.Errorf("BOM = %d, want %d", s.BOM, tc.bom)
			}
			if s.HasFrontMatter != tc.hasFM {
				t.Fatalf("HasFrontMatter = %v, want %v", s.HasFrontMatter, tc.hasFM)
			}
			if tc.hasFM {
				if got := string(raw[s.FrontMatter.Start:s.FrontMatter.End]); got != tc.yaml {
					t.Errorf("front matter = %q, want %q", got, tc.yaml)
				}
				if s.FrontMatterLine != tc.fmLine {
					t.Errorf("FrontMatterLine = %d, want %d", s.FrontMatterLine, tc.fmLine)
				}
			}
			if got := string(raw[s.Body:]); got != tc.body {
				t.Errorf("body = %q, want %q", got, tc.body)
			}
			m := s.Masked()
			if len(m) != len(raw) {
				t.Fatalf("len(Masked) = %d, want %d", len(m), len(raw))
			}
			maskEnd := s.BOM
			if s.HasFrontMatter {
				maskEnd = s.Body
			}
			for i := range raw {
				switch {
				case i >= maskEnd && m[i] != raw[i]:
					t.Fatalf("Masked()[%d] = %q, want raw byte %q", i, m[i], raw[i])
				case i < maskEnd && (raw[i] == '\n' || raw[i] == '\r') && m[i] != raw[i]:
					t.Fatalf("Masked()[%d]: line ending not kept", i)
				case i < maskEnd && raw[i] != '\n' && raw[i] != '\r' && m[i] != ' ':
					t.Fatalf("Masked()[%d] = %q, want a space", i, m[i])
				}
			}
			if got := fences(t, s); !equalStrings(got, tc.wantFences) {
				t.Errorf("fenced blocks = %q, want %q", got, tc.wantFences)
			}
			if tc.wantHeading {
				h, ok := s.Doc().FirstChild().(*ast.Heading)
				if !ok || h.Level != 1 {
					t.Errorf("first body node is %T, want a level-1 heading", s.Doc().FirstChild())
				}
			}
		})
	}
}

func equalStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// TestFencePosition checks that goldmark's node position of a fence points at
// the fence character in Raw, with BOM and front matter in front of it.
func TestFencePosition(t *testing.T) {
	raw := []byte("\uFEFF---\r\ntitle: \"n ≈ 3e11\"\r\n---\r\n\r\n~~~cleave\r\nx = 1\r\n~~~\r\n")
	s, err := Parse(raw)
	if err != nil {
		t.Fatal(err)
	}
	var pos = -1
	ast.Walk(s.Doc(), func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if fc, ok := n.(*ast.FencedCodeBlock); ok && entering {
			pos = fc.Pos()
			seg := fc.Lines().At(0)
			if got := string(raw[seg.Start:seg.Stop]); got != "x = 1\r\n" {
				t.Errorf("content line = %q, want %q", got, "x = 1\r\n")
			}
		}
		return ast.WalkContinue, nil
	})
	want := bytes.Index(raw, []byte("~~~cleave"))
	if pos != want {
		t.Fatalf("fence Pos() = %d, want %d", pos, want)
	}
	if line, col := s.Pos(pos); line != 5 || col != 1 {
		t.Errorf("Pos(fence) = %d:%d, want 5:1", line, col)
	}
}

func TestPos(t *testing.T) {
	// Line 2 holds multibyte characters: "µ" is 2 bytes, "≈" is 3 bytes.
	raw := []byte("\uFEFFab\nµ≈x\r\n\nlast")
	s, _ := Parse(raw)
	tests := []struct {
		name      string
		off       int
		line, col int
	}{
		{"start of file (inside BOM)", 0, 1, 1},
		{"first character after BOM", 3, 1, 1},
		{"b", 4, 1, 2},
		{"newline of line 1", 5, 1, 3},
		{"µ", 6, 2, 1},
		{"≈", 8, 2, 2},
		{"inside µ", 7, 2, 1},
		{"inside ≈", 10, 2, 2},
		{"x", 11, 2, 3},
		{"CR", 12, 2, 4},
		{"empty line", 14, 3, 1},
		{"l of last", 15, 4, 1},
		{"end of file", len(raw), 4, 5},
		{"negative clamps", -7, 1, 1},
		{"past end clamps", len(raw) + 10, 4, 5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			line, col := s.Pos(tc.off)
			if line != tc.line || col != tc.col {
				t.Errorf("Pos(%d) = %d:%d, want %d:%d", tc.off, line, col, tc.line, tc.col)
			}
		})
	}
	if got := s.LineStart(2); got != 6 {
		t.Errorf("LineStart(2) = %d, want 6", got)
	}
	if got := s.LineStart(5); got != -1 {
		t.Errorf("LineStart(5) = %d, want -1", got)
	}
}

func TestPosErrorMessage(t *testing.T) {
	_, err := Parse([]byte("---\nid: x\n"))
	if err == nil {
		t.Fatal("want an error for unclosed front matter")
	}
	const want = "line 1, column 1: front matter opened with --- is never closed (expected a line --- or ... after the YAML); treating the file as Markdown"
	if err.Error() != want {
		t.Errorf("error = %q, want %q", err.Error(), want)
	}
}

func FuzzParse(f *testing.F) {
	for _, seed := range []string{
		"", "---", "---\n---\n", "\uFEFF---\r\nid: a\r\n...\r\n```cleave\r\nx\r\n```\r\n",
		"> ```cleave\n> x = 1 #~ 1\n> ```\n", "- a\n\t```cleave\n\tx\n\t```\n", "\uFEFF ```\n",
		"---\nnotes: |\n  ```\n---\n", "\t>\t```\n", "µ≈\n\r\n\r",
	} {
		f.Add([]byte(seed))
	}
	f.Fuzz(func(t *testing.T, raw []byte) {
		orig := bytes.Clone(raw)
		s, err := Parse(raw)
		if s == nil {
			t.Fatal("nil Source")
		}
		if err != nil {
			var pe *PosError
			if !errors.As(err, &pe) {
				t.Fatalf("error of type %T, want *PosError", err)
			}
		}
		if !bytes.Equal(raw, orig) {
			t.Fatal("Raw modified")
		}
		if len(s.Masked()) != len(raw) {
			t.Fatal("Masked length differs from Raw")
		}
		if s.Body < 0 || s.Body > len(raw) || s.FrontMatter.Start > s.FrontMatter.End {
			t.Fatalf("bad offsets: body %d, front matter %v", s.Body, s.FrontMatter)
		}
		nLines := bytes.Count(raw, []byte("\n")) + 1
		for _, off := range []int{0, s.Body, len(raw) / 2, len(raw)} {
			line, col := s.Pos(off)
			if line < 1 || line > nLines || col < 1 || col > utf8.RuneCount(raw)+1 {
				t.Fatalf("Pos(%d) = %d:%d out of bounds (%d lines)", off, line, col, nLines)
			}
		}
		// Every content segment goldmark reports lies inside Raw.
		ast.Walk(s.Doc(), func(n ast.Node, entering bool) (ast.WalkStatus, error) {
			if entering && n.Type() == ast.TypeBlock {
				lines := n.Lines()
				for i := 0; i < lines.Len(); i++ {
					seg := lines.At(i)
					if seg.Start < 0 || seg.Stop > len(raw) || seg.Start > seg.Stop {
						t.Fatalf("segment %v outside Raw (len %d)", seg, len(raw))
					}
				}
			}
			return ast.WalkContinue, nil
		})
	})
}

// TestNestingBound (issue 13: a list nested 50,000 deep took 15 s to parse): lines that may
// nest lists and quotes deeper than MaxNesting make Parse refuse the body with the position of
// the marker that crosses the bound; everything shallower, rules of dashes and indented text
// without markers, parses as before.
func TestNestingBound(t *testing.T) {
	indented := func(levels int) string {
		var b strings.Builder
		for i := range levels {
			b.WriteString(strings.Repeat("  ", i) + "- item\n")
		}
		return b.String()
	}
	tests := []struct {
		name      string
		body      string
		line, col int // 0: parsed
	}{
		{"32 quotes", strings.Repeat(">", 32) + " x\n", 0, 0},
		{"33 quotes", "text\n\n" + strings.Repeat(">", 50000) + " x\n", 3, 33},
		{"33 quotes with spaces", strings.Repeat("> ", 33) + "x\n", 1, 65},
		{"list markers", strings.Repeat("- ", 50000) + "x\n", 1, 65},
		{"ordered markers", strings.Repeat("1. ", 40) + "x\n", 1, 97},
		{"quotes and lists", strings.Repeat("> - ", 20) + "x\n", 1, 65},
		{"32 levels by indentation", indented(32), 0, 0},
		{"deeper by indentation", indented(300), 33, 65},
		{"a long rule of dashes", strings.Repeat("- ", 200) + "\n\n" + strings.Repeat("* ", 100) + "\n", 0, 0},
		{"deeply indented code", "```\n" + strings.Repeat(" ", 400) + "x = 1\n```\n", 0, 0},
		{"a number that is no marker", strings.Repeat("1.5 ", 100) + "\n", 0, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			src := []byte("---\nid: x\n---\n" + tc.body)
			s, err := Parse(src)
			if s == nil || !bytes.Equal(s.Raw, src) {
				t.Fatal("no source, or Raw changed")
			}
			if tc.line == 0 {
				if err != nil {
					t.Fatalf("unexpected error %v", err)
				}
				if s.Doc().ChildCount() == 0 || s.Skipped() {
					t.Errorf("the body was not parsed (Skipped: %v)", s.Skipped())
				}
				return
			}
			var pe *PosError
			if !errors.As(err, &pe) {
				t.Fatalf("err = %v, want a *PosError", err)
			}
			if pe.Line != tc.line+3 || pe.Col != tc.col || !strings.Contains(pe.Msg, "nested more than 32") {
				t.Errorf("got %d:%d %s, want %d:%d", pe.Line, pe.Col, pe.Msg, tc.line+3, tc.col)
			}
			if s.Doc().ChildCount() != 0 || !s.Skipped() {
				t.Errorf("the body was parsed (Skipped: %v)", s.Skipped())
			}
			if !s.HasFrontMatter {
				t.Error("the front matter was lost")
			}
		})
	}
}

// TestSizeBound: a file beyond MaxFileBytes keeps its front matter and bytes, and its body is
// not parsed.
func TestSizeBound(t *testing.T) {
	src := []byte("---\nid: x\n---\n" + strings.Repeat("- item\n", MaxFileBytes/7+1))
	s, err := Parse(src)
	var pe *PosError
	if !errors.As(err, &pe) || pe.Line != 1 || !strings.Contains(pe.Msg, "larger than 4 MiB") {
		t.Fatalf("err = %v", err)
	}
	if !s.HasFrontMatter || s.Doc().ChildCount() != 0 || !s.Skipped() || !bytes.Equal(s.Raw, src) {
		t.Error("want the front matter, the raw bytes and no body (Skipped)")
	}
}

// BenchmarkParseDeep parses 1 MB of lists nested as deep as the bound allows: about as fast
// as 1 MB of a flat list (0.5 MB/s on the 2-core machine; ordinary prose parses at 4 MB/s).
func BenchmarkParseDeep(b *testing.B) {
	line := strings.Repeat("- ", MaxNesting) + "x\n"
	src := []byte(strings.Repeat(line, (1<<20)/len(line)))
	b.SetBytes(int64(len(src)))
	for b.Loop() {
		s, err := Parse(src)
		if err != nil {
			b.Fatal(err)
		}
		s.Doc()
	}
}
