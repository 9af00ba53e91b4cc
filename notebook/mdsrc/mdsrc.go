// Package mdsrc reads a Markdown notebook file into a form that can be
// rewritten byte-exactly.
//
// A [Source] keeps the file exactly as read ([Source.Raw]) and records where a
// UTF-8 byte-order mark and a YAML front-matter block sit in it. Before the
// body is handed to goldmark (with the GitHub-flavoured extensions), the BOM
// and the whole front matter, including its `---` delimiter lines, are masked
// with spaces; line feeds and carriage returns are kept. The masked text has
// the same length as Raw, so every offset goldmark reports (node positions,
// line segments) is an offset into Raw as well. That is what lets other
// packages replace a few bytes of a file and leave every other byte alone.
//
// # Front matter
//
// Front matter is recognised only when the first line of the file (after an
// optional BOM) is `---`, optionally followed by spaces or tabs, and ended by
// LF or CRLF. It is closed by the first later line that is `---` or `...`
// (trailing spaces or tabs allowed). Anything else, such as a fence inside a
// YAML block string, is part of the YAML text and never reaches goldmark. The
// YAML itself is not decoded here; [Source.FrontMatter] says where it is.
//
// An opening `---` that is never closed yields a [*PosError] together with a
// usable Source in which the whole file is treated as Markdown body (goldmark
// then sees a thematic break, as most Markdown viewers show it).
//
// # Known limitation
//
// A BOM in a file without front matter is masked as three spaces at the start
// of line 1. goldmark therefore sees line 1 indented by three more columns
// than a BOM-aware viewer would. A heading, paragraph, table or fence on line 1
// is unaffected (up to three spaces of indentation are allowed); a first line
// that already starts with a space becomes an indented code block, and the
// content lines of a fence that opens on line 1 lose up to three spaces of
// indentation to the fence's own indent.
//
// What the package leaves out: decoding YAML, and any knowledge of calc
// blocks or entries (see the calcblock and notebook packages).
package mdsrc

import (
	"bytes"
	"fmt"
	"sort"
	"sync"
	"unicode/utf8"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/extension"
	"github.com/yuin/goldmark/parser"
	"github.com/yuin/goldmark/text"
)

// Span is a half-open range [Start, End) of byte offsets into [Source.Raw].
type Span struct{ Start, End int }

// Len returns the number of bytes in the span.
func (s Span) Len() int { return s.End - s.Start }

// Source is one Markdown file, parsed, with its raw bytes kept unchanged.
type Source struct {
	Raw             []byte // the file as read, never modified
	BOM             int    // 3 if Raw starts with a UTF-8 BOM, else 0
	HasFrontMatter  bool   // true if a closed front-matter block was found
	FrontMatter     Span   // the YAML text between the delimiter lines (without them)
	FrontMatterLine int    // 1-based line number of the first YAML line (0 without front matter)
	Body            int    // offset where the Markdown body starts (after the closing delimiter line)

	masked     []byte
	lineStarts []int // offset of the first byte of each line; lineStarts[0] == 0
	docOnce    sync.Once
	doc        ast.Node
	skipped    bool // Parse refused the body: Doc is an empty document
}

// Doc is the goldmark (GFM) parse of Masked(); all offsets are offsets into Raw. It is made
// on the first call (a file whose blocks and tables nobody asks for is never parsed), and
// safe to call from several goroutines.
func (s *Source) Doc() ast.Node {
	s.docOnce.Do(func() { s.doc = markdownParser().Parse(text.NewReader(s.masked)) })
	return s.doc
}

// PosError reports a problem at a position in the file.
// Line is 1-based; Col is 1-based and counted in characters (runes).
type PosError struct {
	Line, Col int
	Msg       string
}

func (e *PosError) Error() string {
	return fmt.Sprintf("line %d, column %d: %s", e.Line, e.Col, e.Msg)
}

var bom = []byte{0xEF, 0xBB, 0xBF}

var (
	mdOnce sync.Once
	md     goldmark.Markdown
)

func markdownParser() parser.Parser {
	mdOnce.Do(func() {
		md = goldmark.New(goldmark.WithExtensions(extension.GFM))
	})
	return md.Parser()
}

// Parse splits raw into BOM, front matter and body; [Source.Doc] parses the
// body with goldmark when first asked. raw is kept as Source.Raw and never modified; callers must not
// modify it either while the Source is in use.
//
// The only errors are *PosError values: for front matter that is opened but
// never closed (the returned Source is then still complete, with the front
// matter treated as Markdown body), and for a file larger than [MaxFileBytes]
// or with lists or block quotes nested deeper than [MaxNesting] (the Source's
// Doc is then an empty document: nothing of the body is read). The nesting is
// checked here, with one pass over the starts of the lines, so that the error
// comes with the file even though Doc parses later.
func Parse(raw []byte) (*Source, error) {
	s := &Source{Raw: raw}
	if bytes.HasPrefix(raw, bom) {
		s.BOM = len(bom)
	}
	s.lineStarts = make([]int, 1, bytes.Count(raw, []byte{'\n'})+1)
	for off := 0; ; {
		i := bytes.IndexByte(raw[off:], '\n')
		if i < 0 {
			break
		}
		off += i + 1
		s.lineStarts = append(s.lineStarts, off)
	}

	var perr error
	s.Body = s.BOM
	if fm, body, opened, closed := frontMatter(raw, s.BOM); closed {
		s.HasFrontMatter = true
		s.FrontMatter = fm
		s.FrontMatterLine = 2
		s.Body = body
	} else if opened {
		perr = unclosedError()
	}

	s.masked = make([]byte, len(raw))
	copy(s.masked, raw)
	maskEnd := s.BOM
	if s.HasFrontMatter {
		maskEnd = s.Body
	}
	for i := 0; i < maskEnd; i++ {
		if c := s.masked[i]; c != '\n' && c != '\r' {
			s.masked[i] = ' '
		}
	}
	if len(raw) > MaxFileBytes {
		s.noBody()
		return s, &PosError{Line: 1, Col: 1, Msg: fmt.Sprintf(
			"file of %.1f MiB: the Markdown of files larger than %d MiB is not read (its calc blocks are not evaluated); keep large tables in data files", float64(len(raw))/(1<<20), MaxFileBytes>>20)}
	}
	if line, col, ok := tooDeep(s.masked); ok {
		// goldmark's time grows with the square of the nesting (a list nested 50,000 deep
		// took 15 s): such a body is not parsed at all.
		s.noBody()
		return s, &PosError{Line: line, Col: col, Msg: fmt.Sprintf(
			"lists and block quotes nested more than %d deep: the Markdown of this file is not read (its calc blocks are not evaluated); nest less", MaxNesting)}
	}
	return s, perr
}

// noBody makes Doc an empty document: the body is never parsed.
func (s *Source) noBody() {
	s.skipped = true
	s.docOnce.Do(func() { s.doc = ast.NewDocument() })
}

// Skipped reports whether Parse refused to read the Markdown body (a file larger than
// [MaxFileBytes], or lists and block quotes nested deeper than [MaxNesting]): Doc is then an
// empty document whatever the text says. A reader that looks at the text without Doc (such as
// calcblock's fast path) must treat the body as empty too.
func (s *Source) Skipped() bool { return s.skipped }

// MaxFileBytes is the largest file whose Markdown [Parse] reads: goldmark parses between 0.5
// and 4 MB/s on a slow machine and keeps a tree many times the size of its input, and a note
// written by hand is a few kilobytes.
const MaxFileBytes = 4 << 20

// MaxNesting is the deepest nesting of lists and block quotes [Parse] reads. Real notes nest
// a few levels; the bound keeps the parse of a hostile file linear in its size.
const MaxNesting = 32

// tooDeep finds the first line that may open more than MaxNesting containers: it counts the
// block-quote markers and list markers at the start of the line, and half the columns of
// space before the last of them besides the one blank that ends each marker (a nested list
// item is indented by at least two columns per level). The count is an upper bound of the nesting goldmark would build, so a file it
// passes is never deeper than the bound; lines without a marker (code, text) never count.
// It reports the 1-based line and the column of the marker that crosses the bound.
func tooDeep(text []byte) (line, col int, found bool) {
	line = 1
	for start := 0; start < len(text); line++ {
		end := bytes.IndexByte(text[start:], '\n')
		if end < 0 {
			end = len(text)
		} else {
			end += start
		}
		l := text[start:end]
		markers, space, c := 0, 0, 0 // c: visual column (tabs to multiples of 4)
		for i := 0; i < len(l); {
			m := i // where a marker starts
			switch b := l[i]; {
			case b == ' ':
				space, c, i = space+1, c+1, i+1
				continue
			case b == '\t':
				w := 4 - c%4
				space, c, i = space+w, c+w, i+1
				continue
			case b == '>':
				i++
			case (b == '-' || b == '*') && thematicBreak(l[i:]):
				i = len(l) // "- - - -" is a rule, not lists
				continue
			case (b == '-' || b == '*' || b == '+') && blankAfter(l, i+1):
				i++
			case b >= '0' && b <= '9':
				j := i
				for j < len(l) && j-i < 9 && l[j] >= '0' && l[j] <= '9' {
					j++
				}
				if j == len(l) || (l[j] != '.' && l[j] != ')') || !blankAfter(l, j+1) {
					i = len(l)
					continue
				}
				i = j + 1
			default:
				i = len(l)
				continue
			}
			markers++
			if markers+space/2 > MaxNesting {
				return line, utf8.RuneCount(l[:m]) + 1, true
			}
			c = utf8.RuneCount(l[:i])
			if i < len(l) && l[i] == ' ' {
				i, c = i+1, c+1 // the blank that ends the marker is no indentation
			}
		}
		start = end + 1
	}
	return 0, 0, false
}

// thematicBreak reports whether l is a thematic break: three or more of the same '-', '*'
// or '_', with spaces or tabs between them and nothing else.
func thematicBreak(l []byte) bool {
	var mark byte
	n := 0
	for _, b := range l {
		switch {
		case b == ' ' || b == '\t' || b == '\r':
		case (b == '-' || b == '*' || b == '_') && (mark == 0 || b == mark):
			mark = b
			n++
		default:
			return false
		}
	}
	return n >= 3
}

// blankAfter reports whether l ends at i or has a space or tab there.
func blankAfter(l []byte, i int) bool { return i >= len(l) || l[i] == ' ' || l[i] == '\t' }

// SplitFrontMatter returns the YAML text of raw's front matter by the rules
// [Parse] applies (see the package documentation), without parsing the
// Markdown body. ok reports whether raw opens with a `---` line; err is the
// *PosError Parse returns when that block is never closed (yaml is then nil).
func SplitFrontMatter(raw []byte) (yaml []byte, ok bool, err error) {
	from := 0
	if bytes.HasPrefix(raw, bom) {
		from = len(bom)
	}
	fm, _, opened, closed := frontMatter(raw, from)
	switch {
	case closed:
		return raw[fm.Start:fm.End], true, nil
	case opened:
		return nil, true, unclosedError()
	}
	return nil, false, nil
}

// frontMatter looks for a front-matter block whose opening line starts at
// offset from: opened reports an opening `---` line there, closed a later
// closing line. fm is the YAML text between the two lines and body the
// offset just after the closing line.
func frontMatter(raw []byte, from int) (fm Span, body int, opened, closed bool) {
	start, ok := delimiterLine(raw, from, "---")
	if !ok {
		return Span{}, from, false, false
	}
	for line := start; line < len(raw); {
		e, ok := delimiterLine(raw, line, "---")
		if !ok {
			e, ok = delimiterLine(raw, line, "...")
		}
		if ok {
			return Span{start, line}, e, true, true
		}
		i := bytes.IndexByte(raw[line:], '\n')
		if i < 0 {
			break
		}
		line += i + 1
	}
	return Span{}, from, true, false
}

func unclosedError() *PosError {
	return &PosError{Line: 1, Col: 1,
		Msg: "front matter opened with --- is never closed (expected a line --- or ... after the YAML); treating the file as Markdown"}
}

// delimiterLine reports whether the line starting at off consists of delim
// followed only by spaces or tabs, and returns the offset just after the
// line's end of line (or len(raw) at end of file). The opening delimiter
// must be followed by an end of line; that is checked by the caller through
// the scan for a closing line.
func delimiterLine(raw []byte, off int, delim string) (int, bool) {
	if off > len(raw) || !bytes.HasPrefix(raw[off:], []byte(delim)) {
		return 0, false
	}
	i := off + len(delim)
	for i < len(raw) && (raw[i] == ' ' || raw[i] == '\t') {
		i++
	}
	switch {
	case i == len(raw):
		return i, true
	case raw[i] == '\n':
		return i + 1, true
	case raw[i] == '\r' && i+1 < len(raw) && raw[i+1] == '\n':
		return i + 2, true
	case raw[i] == '\r' && i+1 == len(raw):
		return i + 1, true
	}
	return 0, false
}

// Masked returns the text goldmark parsed: Raw with the BOM and the front
// matter replaced by spaces (line feeds and carriage returns kept). It has
// the same length as Raw. Use it with goldmark's Segment.Value; for
// byte-exact work slice Raw instead. The returned slice must not be modified.
func (s *Source) Masked() []byte { return s.masked }

// Pos converts a byte offset into Raw to a 1-based line and a 1-based column
// counted in characters (runes) from the start of the line; a BOM is not
// counted. Offsets outside [0, len(Raw)] are clamped to that range. An offset
// in the middle of a multibyte character gives that character's column; a
// byte that is not part of valid UTF-8 counts as one column, as in
// [utf8.RuneCount], so no column is past the end of its line.
func (s *Source) Pos(off int) (line, col int) {
	if off < 0 {
		off = 0
	}
	if off > len(s.Raw) {
		off = len(s.Raw)
	}
	li := sort.Search(len(s.lineStarts), func(i int) bool { return s.lineStarts[i] > off }) - 1
	start := s.lineStarts[li]
	if li == 0 && s.BOM > 0 {
		start = min(s.BOM, off)
	}
	col = 1
	for i := start; i < off; col++ {
		_, n := utf8.DecodeRune(s.Raw[i:])
		if i+n > off {
			break // off is inside this character
		}
		i += n
	}
	return li + 1, col
}

// LineStart returns the offset of the first byte of the 1-based line n, or -1
// if the file has fewer lines. Line 1 starts at 0 even when the file has a BOM.
func (s *Source) LineStart(n int) int {
	if n < 1 || n > len(s.lineStarts) {
		return -1
	}
	return s.lineStarts[n-1]
}

// ClosesFence reports whether l, a line inside a fenced code block of fenceLen characters
// fence opened at column 1, closes it, as goldmark's fencedCodeBlockParser.Continue decides:
// indented less than four columns (a tab to the next multiple of four), at least fenceLen
// fence characters, then only spaces and tabs. The fast readers of calc blocks and layer
// tables share it.
func ClosesFence(l []byte, fence byte, fenceLen int) bool {
	w, p := 0, 0 // goldmark's util.IndentWidth, at column 0
	for ; p < len(l) && (l[p] == ' ' || l[p] == '\t'); p++ {
		if l[p] == ' ' {
			w++
		} else {
			w += 4 - w%4
		}
	}
	if w >= 4 {
		return false
	}
	n := 0
	for p < len(l) && l[p] == fence {
		p, n = p+1, n+1
	}
	if n < fenceLen {
		return false
	}
	for ; p < len(l); p++ {
		if l[p] != ' ' && l[p] != '\t' {
			return false
		}
	}
	return true
}
