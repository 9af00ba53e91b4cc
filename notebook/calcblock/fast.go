package calcblock

import (
	"bytes"
	"unicode/utf8"

	"cleave/notebook/mdsrc"
)

// findFast finds the calc blocks of a file with one scan of its lines,
// without goldmark, when it can tell that the answer is exactly what
// findGoldmark gives. why is "" when it could; otherwise it names what made it
// give up (at line, 0 for the whole file), and the caller parses the file.
//
// It reads the file as a sequence of top-level fences and other lines, and
// accepts the file when every calc block is a top-level fence opened at
// column 1. That needs (from CommonMark and goldmark's parser.go, list.go,
// list_item.go, blockquote.go and fcode_block.go):
//
//   - Outside a fence, a line that starts at column 1 with a run of three or
//     more '`' or '~' opens a fence at the top level, whatever is open
//     before it: a fence may interrupt a paragraph; a line indented less
//     than four columns ends an indented code block; a list needs its
//     items' indentation (at least two columns) and a block quote its '>' on
//     every line but a paragraph's lazy continuation, which a fence line
//     never is. goldmark asks the outermost open block first, and a list
//     or block quote answers Close for such a line before anything inside
//     it is asked. Link reference definitions, tables and setext headings
//     are read from a paragraph's lines after the blocks are known, so they
//     never move a fence.
//   - Only a top-level fence or a top-level HTML block can hide such a line.
//     Fences are followed here; a line whose first non-blank character is
//     '<' (an HTML block may start there) is refused.
//   - Calc blocks elsewhere (in a list or a block quote, indented) need a run
//     of three fence characters that is not at column 1: any such run outside
//     a fence is refused, inline code included.
//   - Inside a fence every line is content until the closing fence: indented
//     less than four columns (a tab counts to the next multiple of four), a
//     run of the fence character at least as long as the opening one, then
//     only spaces or tabs. A fence never closed runs to the end of the file.
//     Content lines of a fence at column 1 are taken whole.
//   - The info string is the opening line after the run, without the spaces
//     and tabs around it, read only when the line has more than one byte
//     after the run counting its line feed. A backtick fence whose info
//     string holds a backtick is no fence: refused, as rare and odd.
//
// The whole file is refused when Parse did not read its body (Skipped), when
// it is not UTF-8, and when it has a control character other than tab and
// line feed (CR line endings, NUL, ...).
//
// Block fields are then what findGoldmark derives from goldmark's nodes:
// Start is the line's start, Line its number, FenceLen the run; each content
// line is its whole line; ReadOnly is true only for a block the end of the
// file closes, since after a closed block the line that closedAfter looks at
// is its closing fence, which no block claims (the blocks before it end on
// or before the opening fence, the blocks after it start after it).
func findFast(s *mdsrc.Source) (blocks []Block, why string, line int) {
	if s.Skipped() {
		return nil, "the body is not read (too large or nested too deep)", 0
	}
	m, raw := s.Masked(), s.Raw // the same bytes wherever a fence can be
	if !utf8.Valid(m) {
		return nil, "not UTF-8", 0
	}
	inFence := false
	var fch byte // the open fence's character
	var flen int // and length
	cur := -1    // index in blocks of the open calc block; -1 in any other fence
	lineNo := 0  // of the line at start
	for start, end := 0, 0; start < len(m); start = end + 1 {
		lineNo++
		run, triple := 0, false // run of '`' or '~' ending at end; a run of three or more seen
	scan:
		for end = start; end < len(m); end++ {
			switch c := m[end]; {
			case c == '`' || c == '~':
				if end > start && m[end-1] == c {
					run++
				} else {
					run = 1
				}
				triple = triple || run == 3
			case c == '\n':
				break scan
			case c < 0x20 && c != '\t':
				return nil, "a control character (CR, NUL, form feed, ...)", lineNo
			}
		}
		l := m[start:end]
		if inFence {
			if mdsrc.ClosesFence(l, fch, flen) {
				if cur >= 0 {
					blocks[cur].ReadOnly = false
				}
				inFence, cur = false, -1
			} else if cur >= 0 {
				blocks[cur].Lines = append(blocks[cur].Lines, makeLine(raw, start, end, lineNo))
			}
			continue
		}
		if len(l) < 3 || l[0] != '`' && l[0] != '~' || l[1] != l[0] || l[2] != l[0] {
			switch {
			case triple:
				return nil, "three backticks or tildes not at column 1 (a fence in a list, a block quote or indented, or inline code)", lineNo
			case firstNonBlank(l) == '<':
				return nil, "a line that may open an HTML block", lineNo
			}
			continue
		}
		c, r := l[0], 3
		for r < len(l) && l[r] == c {
			r++
		}
		// goldmark reads an info string only when the line has more than one
		// byte after the run, counting its line feed.
		lineLen := len(l)
		if end < len(m) {
			lineLen++
		}
		calc := false
		if r < lineLen-1 {
			lo, hi := r, len(l)
			for lo < hi && (l[lo] == ' ' || l[lo] == '\t') {
				lo++
			}
			for hi > lo && (l[hi-1] == ' ' || l[hi-1] == '\t') {
				hi--
			}
			if c == '`' && bytes.IndexByte(l[lo:hi], '`') >= 0 {
				return nil, "a backtick in a backtick fence's info string", lineNo
			}
			calc = lo < hi && isCalcInfo(raw[start+lo:start+hi])
		}
		inFence, fch, flen, cur = true, c, r, -1
		if calc {
			// ReadOnly until the closing fence is seen.
			blocks = append(blocks, Block{Start: start, Fence: c, FenceLen: r, Line: lineNo, ReadOnly: true})
			cur = len(blocks) - 1
		}
	}
	return blocks, "", 0
}

// firstNonBlank returns the first byte of l that is not a space or a tab, or 0.
func firstNonBlank(l []byte) byte {
	for _, c := range l {
		if c != ' ' && c != '\t' {
			return c
		}
	}
	return 0
}
