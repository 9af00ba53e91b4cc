package calcblock

import (
	"bytes"
	"strings"

	"github.com/yuin/goldmark/ast"

	"cleave/notebook/mdsrc"
)

// Block is one calc block.
type Block struct {
	Start    int    // offset in Raw of the first character of the opening fence
	Lines    []Line // content lines, in order
	ReadOnly bool   // true if the block is not closed by a matching fence
	Fence    byte   // '`' or '~'
	FenceLen int    // length of the opening fence
	Line     int    // 1-based line number of the opening fence
}

// Line is one content line of a calc block.
type Line struct {
	Span   mdsrc.Span // content of the line without container prefix and line ending
	Code   string     // content with the result region removed
	Result mdsrc.Span // the result region, from "#~" to the end of the content; Start==End==-1 if none
	Old    string     // current result text: what follows "#~", with surrounding blanks trimmed
	LineNo int        // 1-based line number in the file
}

// LineKind classifies a line's code.
type LineKind int

// Kinds of calc lines.
const (
	Blank   LineKind = iota // nothing but blanks (possibly followed by a result region)
	Comment                 // first non-blank character is '#'
	Code                    // anything else: evaluated
)

// Kind reports whether the line is blank, a comment or code.
func (l Line) Kind() LineKind {
	c := strings.TrimSpace(l.Code)
	switch {
	case c == "":
		return Blank
	case c[0] == '#':
		return Comment
	}
	return Code
}

// Input is the code the line gives the evaluator: its code without the
// blanks at its end.
func (l Line) Input() string { return strings.TrimRight(l.Code, " \t") }

// HasResult reports whether the line has a result region.
func (l Line) HasResult() bool { return l.Result.Start >= 0 }

// InfoString is the first word of the info string of a calc block's fence.
const InfoString = "cleave"

// Marker is the text that opens a result region.
const Marker = "#~"

// Find returns the calc blocks of s in document order. It does not fail on
// any input goldmark accepts; the error is reserved for an inconsistent
// parse (a fence that cannot be located in Raw), reported with its position.
//
// In most notebook files every fence opens at column 1, outside any list or
// block quote; their blocks are found with one scan of the lines, without
// goldmark (findFast, which decides that and gives the same answer). Any
// other file goes through goldmark's parse (findGoldmark).
func Find(s *mdsrc.Source) ([]Block, error) {
	if blocks, why, _ := findFast(s); why == "" {
		return blocks, nil
	}
	return findGoldmark(s)
}

// findGoldmark finds the calc blocks of s in goldmark's parse of the file.
func findGoldmark(s *mdsrc.Source) ([]Block, error) {
	var blocks []Block
	var err error
	var claimed map[int]bool
	ast.Walk(s.Doc(), func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		fc, ok := n.(*ast.FencedCodeBlock)
		if !ok || fc.Info == nil {
			return ast.WalkContinue, nil
		}
		info := fc.Info.Segment
		if info.Start < 0 || info.Stop > len(s.Raw) || info.Start >= info.Stop {
			return ast.WalkContinue, nil
		}
		if !isCalcInfo(s.Raw[info.Start:info.Stop]) {
			return ast.WalkContinue, nil
		}
		if claimed == nil {
			claimed = claimedLines(s)
		}
		b, ferr := buildBlock(s, fc, claimed)
		if ferr != nil {
			err = ferr
			return ast.WalkStop, nil
		}
		blocks = append(blocks, b)
		return ast.WalkSkipChildren, nil
	})
	return blocks, err
}

func isCalcInfo(info []byte) bool {
	f := bytes.Fields(info)
	return len(f) > 0 && string(f[0]) == InfoString
}

// lineBounds returns the start of the line containing off and the end of
// its content (before "\n" or "\r\n").
func lineBounds(raw []byte, off int) (start, end int) {
	start = bytes.LastIndexByte(raw[:off], '\n') + 1
	end = len(raw)
	if i := bytes.IndexByte(raw[off:], '\n'); i >= 0 {
		end = off + i
	}
	if end > start && raw[end-1] == '\r' {
		end--
	}
	return start, end
}

func buildBlock(s *mdsrc.Source, fc *ast.FencedCodeBlock, claimed map[int]bool) (Block, error) {
	raw := s.Raw
	// Locate the opening fence. goldmark's Pos() can point past the fence
	// after a tab in a container prefix (yuin/goldmark#604), even past the
	// end of the source, and the info segment's start is computed with the
	// same padding. The info segment's end is exact (it is the line's end
	// less trailing blanks), and on that line the fence is the first '`' or
	// '~', since container prefixes consist of '>', list markers, digits and
	// blanks only. Pos() is used when it agrees with that; otherwise the scan
	// wins.
	infoEnd := fc.Info.Segment.Stop - 1
	ls, le := lineBounds(raw, infoEnd)
	first := -1
	for i := ls; i < le; i++ {
		if raw[i] == '`' || raw[i] == '~' {
			first = i
			break
		}
	}
	start := fc.Pos()
	if start < ls || start >= le || start != first {
		// Pos() is not the fence: fall back to the scan.
		start = first
	}
	if start < 0 {
		line, col := s.Pos(ls)
		return Block{}, &mdsrc.PosError{Line: line, Col: col, Msg: "cannot locate the opening fence of a calc block"}
	}
	fence := raw[start]
	n := 0
	for start+n < le && raw[start+n] == fence {
		n++
	}
	line, _ := s.Pos(start)
	b := Block{Start: start, Fence: fence, FenceLen: n, Line: line}

	lines := fc.Lines()
	lastLine := line // the last line of the block seen so far
	for i := 0; i < lines.Len(); i++ {
		seg := lines.At(i)
		segStart := max(0, min(seg.Start, len(raw)))
		l0, l1 := lineBounds(raw, segStart)
		if segStart > l1 {
			segStart = l1
		}
		if segStart < l0 {
			segStart = l0
		}
		ln, _ := s.Pos(l0)
		b.Lines = append(b.Lines, makeLine(raw, segStart, l1, ln))
		lastLine = ln
	}
	b.ReadOnly = !closedAfter(raw, lastLine, fence, n, s, claimed)
	return b, nil
}

func makeLine(raw []byte, start, end, lineNo int) Line {
	l := Line{Span: mdsrc.Span{Start: start, End: end}, Result: mdsrc.Span{Start: -1, End: -1}, LineNo: lineNo}
	content := raw[start:end]
	if i := bytes.Index(content, []byte(Marker)); i >= 0 {
		l.Result = mdsrc.Span{Start: start + i, End: end}
		l.Code = string(content[:i])
		l.Old = strings.TrimSpace(string(content[i+len(Marker):]))
	} else {
		l.Code = string(content)
	}
	return l
}

// closedAfter reports whether the line after lineNo closes the block: after
// an opaque prefix of blanks and '>' markers, at least fenceLen fence
// characters followed by blanks only, on a line that no other block claims.
// A block closed by the end of its container can be followed by a fence-like
// line that opens another block instead; claimed holds the line numbers of
// every opening fence and every content line of the document, which a closing
// fence never is.
func closedAfter(raw []byte, lineNo int, fence byte, fenceLen int, s *mdsrc.Source, claimed map[int]bool) bool {
	next := s.LineStart(lineNo + 1)
	if next < 0 || next >= len(raw) || claimed[lineNo+1] {
		return false
	}
	_, end := lineBounds(raw, next)
	i := next
	for i < end && raw[i] != fence {
		switch raw[i] {
		case ' ', '\t', '>':
			i++
		default:
			return false
		}
	}
	n := 0
	for i < end && raw[i] == fence {
		i++
		n++
	}
	if n < fenceLen {
		return false
	}
	for ; i < end; i++ {
		if raw[i] != ' ' && raw[i] != '\t' {
			return false
		}
	}
	return true
}

// claimedLines returns the line numbers that belong to some block node of
// the parse: content lines of any block and the opening lines of fenced
// code blocks.
func claimedLines(s *mdsrc.Source) map[int]bool {
	claimed := map[int]bool{}
	mark := func(off int) {
		if off >= 0 && off <= len(s.Raw) {
			ln, _ := s.Pos(off)
			claimed[ln] = true
		}
	}
	ast.Walk(s.Doc(), func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering || n.Type() != ast.TypeBlock {
			return ast.WalkContinue, nil
		}
		if fc, ok := n.(*ast.FencedCodeBlock); ok {
			if fc.Info != nil {
				mark(fc.Info.Segment.Stop - 1)
			} else {
				mark(fc.Pos())
			}
		}
		lines := n.Lines()
		for i := 0; i < lines.Len(); i++ {
			mark(lines.At(i).Start)
		}
		return ast.WalkContinue, nil
	})
	return claimed
}
