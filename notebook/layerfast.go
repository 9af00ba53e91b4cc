package notebook

import (
	"bytes"
	"unicode/utf8"

	"github.com/yuin/goldmark/ast"
	east "github.com/yuin/goldmark/extension/ast"

	"cleave/notebook/mdsrc"
)

// mdBlock is what readLayers reads of one top-level heading or GFM table of a
// file's Markdown body. Offsets are into the file (mdsrc offsets).
type mdBlock struct {
	Table  bool
	Level  int    // a heading's level
	Text   string // a heading's text: its lines' source, as inlineText reads them
	Pos    int    // a heading: start of its first line (its node's position without lines); a table: its position
	Header []mdCell
	Rows   []mdRow // the body rows; nil without any
}

// mdRow is one body row of a table: its position and its cells in column order.
type mdRow struct {
	Pos   int
	Cells []mdCell
}

// mdCell is a table cell's line: Start and Stop bound its text, trimmed of the
// blanks around it. Line is false for the cells goldmark adds to fill a short
// row, which have no line.
type mdCell struct {
	Start, Stop int
	Line        bool
}

// goldmarkOutline reads the top-level headings and tables of goldmark's parse
// of s, in document order.
func goldmarkOutline(s *mdsrc.Source) []mdBlock {
	var out []mdBlock
	for n := s.Doc().FirstChild(); n != nil; n = n.NextSibling() {
		switch n := n.(type) {
		case *ast.Heading:
			b := mdBlock{Level: n.Level, Pos: n.Pos()}
			src := s.Masked()
			lines := n.Lines()
			if lines.Len() > 0 {
				b.Pos = lines.At(0).Start
			}
			var text []byte
			for i := 0; i < lines.Len(); i++ {
				if l := lines.At(i); l.Start >= 0 && l.Stop <= len(src) && l.Start <= l.Stop {
					text = append(text, src[l.Start:l.Stop]...)
				}
			}
			b.Text = string(text)
			out = append(out, b)
		case *east.Table:
			b := mdBlock{Table: true, Pos: n.Pos()}
			for r := n.FirstChild(); r != nil; r = r.NextSibling() {
				switch r := r.(type) {
				case *east.TableHeader:
					if b.Header == nil {
						b.Header = goldmarkCells(r)
					}
				case *east.TableRow:
					b.Rows = append(b.Rows, mdRow{Pos: r.Pos(), Cells: goldmarkCells(r)})
				}
			}
			out = append(out, b)
		}
	}
	return out
}

func goldmarkCells(row ast.Node) []mdCell {
	var cells []mdCell
	for c := row.FirstChild(); c != nil; c = c.NextSibling() {
		var cell mdCell
		if lines := c.Lines(); lines.Len() > 0 {
			seg := lines.At(0)
			cell = mdCell{Start: seg.Start, Stop: seg.Stop, Line: true}
		}
		cells = append(cells, cell)
	}
	return cells
}

// fastOutline reads what goldmarkOutline reads with one scan of the body's
// lines, without goldmark, when it can tell that the answer is the same. why
// is "" when it could; otherwise it names what made it give up (at line, 0 for
// the whole file), and the caller asks goldmark.
//
// Block structure (CommonMark as goldmark's parser.go and its block parsers
// apply it) decides which lines are top-level headings and tables; the text of
// a heading and of a cell is source text between two offsets, never the
// inline parse (emphasis, code spans, links, escapes other than `\|` change the
// inline nodes, not the lines readLayers reads). So the file is accepted when
// every line outside a top-level fence is one of:
//
//   - blank (spaces only);
//   - an ATX heading at column 1 ('#' to '######', then a space or the end of
//     the line); its text is found as atx_heading.go finds it (closing run of
//     '#' included);
//   - a fence at column 1 (three or more '`' or '~'): everything up to its
//     closing fence, or the end of the file, is hidden (fcode_block.go; a
//     backtick fence with a backtick in its info string is no fence: refused);
//   - a thematic break of '-', '*' or '_' where no paragraph, table or list
//     item's text can be open: at the start, after a blank line, a heading, a
//     fence or a break (after a paragraph "---" would be a setext underline);
//   - a bullet list item "- text", "* text" or "+ text" (one space: the item's
//     content is at column 3) where no table is open, whose text is plain;
//   - a plain text line: its first character (after any indentation) starts
//     no block ('#', '>', '<', '[', '|', '-', '*', '+', '=', '_', three '`' or
//     '~', an ordered list marker), and the line could not be a table's
//     delimiter row (isTableDelim); indented by one space only where that
//     cannot close a list;
//   - a table: a row starting with '|' where no paragraph and no list item's
//     paragraph can be open (at the start, after a blank line, a heading, a
//     fence or a thematic break), then a delimiter row starting with '|' that
//     extension/table.go's parseDelimiter accepts, with as many columns as the
//     header row gives cells, then rows starting with '|'; the table ends at a
//     blank line, a heading, a fence or the end of the file (any other line is
//     refused: goldmark would read it as a row).
//
// Inside a list (after an item, until a blank line is followed by a line at
// column 1 that is not an item) indented lines belong to the items and plain
// text at column 1 may be a lazy continuation: neither is a heading or a table
// whatever goldmark decides, and a table row is accepted only after a blank
// line, where a line at column 1 closes the list (list.go, list_item.go).
//
// Cells are split as table.go's parseRow splits them (a '|' after a backslash
// does not split), trimmed of the blanks around them; a short row is filled
// with cells without a line, a long one cut at the header's width.
//
// The whole file is refused when Parse did not read its body (Skipped), when
// its body is not UTF-8, and when it has a control character other than line
// feed (a tab is allowed on a fence's lines only).
func fastOutline(s *mdsrc.Source) (out []mdBlock, why string, line int) {
	if s.Skipped() {
		return nil, "the body is not read (too large or nested too deep)", 0
	}
	m := s.Masked()
	start := 0
	if s.HasFrontMatter {
		start = s.Body // the front matter is masked as blank lines
	}
	if !utf8.Valid(m[start:]) {
		return nil, "not UTF-8", 0
	}
	lineNo, _ := s.Pos(start)
	lineNo--

	const (
		stNone      = iota // nothing open: at the start, after a blank line, a heading, a fence or a thematic break
		stPara             // a top-level paragraph (or indented code) is open
		stTableHead        // a table's first row was read: its delimiter row must follow
		stTable            // a table is open
		stList             // in a list; the last line was not blank
		stListBlank        // in a list, after a blank line
	)
	state := stNone
	inFence := false
	var fch byte
	var flen int
	// the open table: its block, the offsets of its first row, its rows' positions and cells (ncol each, header first)
	var tbl mdBlock
	var headStart, headEnd, ncol int
	var rowPos []int
	var cells []mdCell
	closeTable := func() {
		if state != stTable {
			return
		}
		tbl.Header = cells[:ncol:ncol]
		if len(rowPos) > 0 {
			tbl.Rows = make([]mdRow, len(rowPos))
			for i, p := range rowPos {
				c := cells[(i+1)*ncol : (i+2)*ncol : (i+2)*ncol]
				tbl.Rows[i] = mdRow{Pos: p, Cells: c}
			}
		}
		out = append(out, tbl)
		tbl, rowPos, cells, state = mdBlock{}, nil, nil, stNone
	}

	for ls, le := start, start; ls < len(m); ls = le + 1 {
		lineNo++
		le = ls
		hasTab := false
		for ; le < len(m) && m[le] != '\n'; le++ {
			if c := m[le]; c < 0x20 {
				if c != '\t' {
					return nil, "a control character (CR, NUL, form feed, ...)", lineNo
				}
				hasTab = true
			}
		}
		l := m[ls:le]
		if inFence {
			if mdsrc.ClosesFence(l, fch, flen) {
				inFence, state = false, stNone
			}
			continue
		}
		if len(l) >= 3 && (l[0] == '`' || l[0] == '~') && l[1] == l[0] && l[2] == l[0] {
			// a fence at column 1 opens whatever is open (see calcblock's findFast)
			if state == stTableHead {
				return nil, "a table's first row without its delimiter row", lineNo
			}
			r := 3
			for r < len(l) && l[r] == l[0] {
				r++
			}
			if l[0] == '`' && bytes.IndexByte(l[r:], '`') >= 0 {
				return nil, "a backtick in a backtick fence's info string", lineNo
			}
			closeTable()
			inFence, fch, flen = true, l[0], r
			continue
		}
		if hasTab {
			return nil, "a tab outside a fence", lineNo
		}
		blank := true
		for _, c := range l {
			if c != ' ' {
				blank = false
				break
			}
		}
		if state == stTableHead {
			if blank || l[0] != '|' {
				return nil, "a table's first row without its delimiter row", lineNo
			}
			n := delimiterColumns(l)
			if n == 0 {
				return nil, "a table's first row without its delimiter row", lineNo
			}
			// room for the header and seven rows; a longer table grows
			rowPos = make([]int, 0, 7)
			cells = tableRow(m, headStart, headEnd, n, true, make([]mdCell, 0, 8*n))
			if len(cells) != n {
				return nil, "a table header with more cells than its delimiter row", lineNo
			}
			ncol, state = n, stTable
			continue
		}
		switch {
		case blank:
			closeTable()
			switch state {
			case stList, stListBlank:
				state = stListBlank
			default:
				state = stNone
			}
		case l[0] == '#':
			n := 0
			for n < len(l) && l[n] == '#' {
				n++
			}
			if n > 6 || n < len(l) && l[n] != ' ' {
				return nil, "a line starting with '#' that is no heading", lineNo
			}
			closeTable()
			out = append(out, atxHeading(m, ls, le, n))
			state = stNone
		case l[0] == '|':
			switch state {
			case stNone, stListBlank:
				tbl = mdBlock{Table: true, Pos: ls}
				headStart, headEnd, state = ls, le, stTableHead
			case stTable:
				rowPos = append(rowPos, ls)
				cells = tableRow(m, ls, le, ncol, false, cells)
			default:
				return nil, "a table row after a paragraph or in a list", lineNo
			}
		case (l[0] == '-' || l[0] == '*' || l[0] == '_') && isThematicBreak(l):
			if state != stNone && state != stListBlank {
				return nil, "a thematic break or setext underline after a paragraph or a table", lineNo
			}
			state = stNone
		case (l[0] == '-' || l[0] == '*' || l[0] == '+') && len(l) > 1 && l[1] == ' ':
			if state == stTable {
				return nil, "a list item after a table", lineNo
			}
			if !plainText(l[2:]) || isTableDelim(l) {
				return nil, "a list item that is not plain text", lineNo
			}
			state = stList
		case l[0] == ' ':
			if state == stTable {
				return nil, "a line in a table that does not start with '|'", lineNo
			}
			indent := 0
			for l[indent] == ' ' {
				indent++
			}
			if !plainText(l[indent:]) || isTableDelim(l) {
				return nil, "an indented line that is not plain text", lineNo
			}
			switch {
			case state == stListBlank && indent == 1:
				return nil, "a line indented by one space after a list", lineNo
			case state == stList || state == stListBlank:
				state = stList
			default:
				state = stPara
			}
		default:
			if state == stTable {
				return nil, "a line in a table that does not start with '|'", lineNo
			}
			// '_', and '*' or '+' followed by more than a blank, start no block
			// here: thematic breaks and list items are caught above.
			c := l[0]
			text := plainText(l) || c == '_' || (c == '*' || c == '+') && len(l) > 1
			if !text || isTableDelim(l) {
				return nil, "a line that may start a block or end a paragraph", lineNo
			}
			if state != stList {
				state = stPara
			}
		}
	}
	if state == stTableHead {
		return nil, "a table's first row without its delimiter row", lineNo
	}
	closeTable()
	return out, "", 0
}

// plainText reports whether l, the text of a line after its indentation, starts
// no block, list item or link reference definition: its first character is none
// of # > < [ | - * + = _, it does not start with three '`' or '~', nor with an
// ordered list marker (digits, then '.' or ')', then a space or the end).
func plainText(l []byte) bool {
	if len(l) == 0 {
		return false
	}
	switch l[0] {
	case '#', '>', '<', '[', '|', '-', '*', '+', '=', '_', ' ', '\t':
		return false
	case '`', '~':
		return len(l) < 3 || l[1] != l[0] || l[2] != l[0]
	}
	i := 0
	for i < len(l) && l[i] >= '0' && l[i] <= '9' {
		i++
	}
	if i > 0 && i < len(l) && (l[i] == '.' || l[i] == ')') && (i+1 == len(l) || l[i+1] == ' ') {
		return false
	}
	return true
}

// isTableDelim is extension/table.go's test for a line that may be a table's
// delimiter row: indented less than four columns, only blanks, '-', '|' and
// ':', not only '-'. (The line has no tab here.)
func isTableDelim(l []byte) bool {
	indent := 0
	for indent < len(l) && l[indent] == ' ' {
		indent++
	}
	if indent > 3 {
		return false
	}
	allDash := true
	for _, c := range l {
		if c != '-' {
			allDash = false
		}
		if c != ' ' && c != '-' && c != '|' && c != ':' {
			return false
		}
	}
	return !allDash
}

// delimiterColumns returns the number of columns of l as table.go's
// parseDelimiter reads a delimiter row, or 0 when l is none: split at every
// '|', without a blank first and last part, each part a run of '-' with an
// optional ':' on each side and blanks around.
func delimiterColumns(l []byte) int {
	if !isTableDelim(l) {
		return 0
	}
	cols := bytes.Split(l, []byte{'|'})
	if isBlankLine(cols[0]) {
		cols = cols[1:]
	}
	if len(cols) > 0 && isBlankLine(cols[len(cols)-1]) {
		cols = cols[:len(cols)-1]
	}
	for _, c := range cols {
		i, j := 0, len(c)
		for i < j && c[i] == ' ' {
			i++
		}
		for j > i && c[j-1] == ' ' {
			j--
		}
		if i < j && c[i] == ':' {
			i++
		}
		if j > i && c[j-1] == ':' {
			j--
		}
		if i == j {
			return 0
		}
		for _, b := range c[i:j] {
			if b != '-' {
				return 0
			}
		}
	}
	return len(cols)
}

func isBlankLine(l []byte) bool {
	for _, c := range l {
		if c != ' ' {
			return false
		}
	}
	return true
}

// tableRow appends the cells of the row m[start:end] as table.go's parseRow
// splits it: without the blanks around the row and one '|' at each end, at
// every '|' not after a backslash, each cell trimmed of the blanks around it (a
// blank cell is empty at its end). A body row stops after ncol cells; any row
// is filled up to ncol with cells without a line.
func tableRow(m []byte, start, end, ncol int, header bool, cells []mdCell) []mdCell {
	for start < end && m[start] == ' ' {
		start++
	}
	for end > start && m[end-1] == ' ' {
		end--
	}
	line := m[start:end]
	pos, limit := 0, len(line)
	if len(line) > 0 && line[0] == '|' {
		pos++
	}
	if len(line) > 0 && line[limit-1] == '|' {
		limit--
	}
	i := 0
	for ; pos < limit; i++ {
		if i >= ncol && !header {
			return cells
		}
		closure := pos
		for ; closure < limit; closure++ {
			if line[closure] == '|' && (closure == 0 || line[closure-1] != '\\') {
				break
			}
		}
		a, b := start+pos, start+closure
		for a < b && m[a] == ' ' {
			a++
		}
		for b > a && m[b-1] == ' ' {
			b--
		}
		cells = append(cells, mdCell{Start: a, Stop: b, Line: true})
		pos = closure + 1
	}
	for ; i < ncol; i++ {
		cells = append(cells, mdCell{})
	}
	return cells
}

// atxHeading reads the ATX heading of level n on the line m[start:end] (at
// column 1, no tab) as atx_heading.go's Open does: the text after the '#' run
// and the blanks after it, without trailing blanks, without a closing run of
// '#' that follows a blank; no text for an empty heading or one of '#' only.
func atxHeading(m []byte, start, end, n int) mdBlock {
	h := mdBlock{Level: n, Pos: start}
	if end == start+n {
		return h // "##" and the line's end
	}
	a := start + n
	for a < end && m[a] == ' ' {
		a++
	}
	b := end
	for b > a && m[b-1] == ' ' {
		b--
	}
	if a == b {
		return h
	}
	t := m[a:b]
	i := len(t) - 1
	for i > 0 && t[i] == '#' {
		i--
	}
	if i == 0 && t[0] == '#' {
		return h // "## ###"
	}
	if i != len(t)-1 && t[i] == ' ' {
		for i > 0 && t[i-1] == ' ' {
			i--
		}
		b = a + i
	}
	h.Text, h.Pos = string(m[a:b]), a
	return h
}

// isThematicBreak reports whether l (no tab) is a thematic break as
// parser/thematic_break.go reads one: indented less than four columns, then
// three or more of one of '-', '*', '_', with blanks anywhere.
func isThematicBreak(l []byte) bool {
	indent := 0
	for indent < len(l) && l[indent] == ' ' {
		indent++
	}
	if indent > 3 {
		return false
	}
	var mark byte
	n := 0
	for _, c := range l[indent:] {
		switch {
		case c == ' ':
		case mark == 0 && (c == '-' || c == '*' || c == '_'):
			mark, n = c, 1
		case c == mark:
			n++
		default:
			return false
		}
	}
	return n > 2
}
