package notebook

import (
	"strings"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"
)

// Front matter in practice is a short, plain block mapping: `key: value` lines, lists in
// brackets or as `- item` lines, a few nested maps, comments that explain the fields. yaml v3
// spends most of its time on such a document in setting up its parser (large buffers per call)
// and its token machinery, so decodeYAML first tries decodePlainYAML, which reads exactly this
// subset and builds the very tree yaml.Unmarshal builds (kind, style, tag, value, line, column,
// and the comments where yaml v3 puts them; no anchors or aliases). Whatever it is not sure
// about it refuses, and decodeYAML hands the text to yaml v3, so errors and their positions
// come from the library as before. FuzzFrontMatterFast holds the two paths equal.
//
// The subset, with yaml v3's reading of it (scannerc.go, parserc.go, decode.go):
//   - the text is UTF-8 without control characters, tabs, carriage returns, U+0085, U+2028,
//     U+2029 (line breaks to YAML), U+FEFF, U+FFFE, U+FFFF;
//   - the document is a block mapping whose keys start at column 1, or blank and comment
//     lines only;
//   - a key is [A-Za-z0-9_][A-Za-z0-9_.-]*, or a one-line quoted scalar without escapes,
//     right before ':', followed by a space or the line end;
//   - a value on the key's line is a plain scalar, a one-line quoted scalar without escapes,
//     or a one-line flow sequence or mapping of those;
//   - a key alone on its line has an empty value (null), a block mapping indented deeper, or a
//     block sequence (`- item`, indented deeper or at the key's own indentation) whose items
//     are values as above or block mappings that start on the item's line (`- name: V1`);
//   - nothing continues onto a further line (no multi-line scalars or flow collections);
//   - comments only where plainComments says (trailing comments, whole-line comments right
//     above a key or item, and at the start and the end of the document).

const (
	plainMaxDepth  = 16  // nesting of maps and lists the fast path reads (yaml's bound is 64)
	plainMaxKeyLen = 256 // yaml refuses implicit keys longer than 1024 characters
	// yaml's comment scanner looks at most 512 characters ahead of a value for its line
	// comment, and from the end of a comment line for the next comment or token; past that it
	// files comments differently, so longer runs of spaces around comments are refused.
	plainMaxGap = 256
)

// Comments. yaml v3 files each comment as the head, line or foot comment of a node by rules of
// its scanner (yaml_parser_scan_line_comment, yaml_parser_scan_comments,
// yaml_parser_unroll_indent), its parser (comments unfolded at the first token at or after
// their mark, heads kept past block ends, a head before a sequence item holding a block mapping
// moved to that mapping as its stem) and its decoder (a value's foot moved to its key, a block
// mapping's foot to its last key). The fast path accepts only these placements, whose outcome
// TestPlainYAML and FuzzFrontMatterFast pin down:
//   - a trailing comment: ` #` (a blank before '#') after a value ends the line as the
//     value's LineComment; after a key with nothing on its line it is the key's (the empty
//     value's null, or the block that follows, has none). A '#' without a blank before it
//     belongs to a plain scalar (`sample#3`); inside a flow collection a comment is refused;
//   - a run of whole-line comments with no blank line inside it or after it, each '#' in
//     the column of the key or `- ` item on the next line: that key's HeadComment, or the
//     item's (for an item holding a block mapping, the mapping's); blank lines before the
//     run are fine;
//   - at the start of the document, runs separated by blank lines: the run right above the
//     first key (no blank line between) is its HeadComment, the others are the document's
//     HeadComment, joined by an empty line;
//   - at the end, runs in column 1 after the last content line: see endComments.
// A document of blank and comment lines only has no content: yaml.Unmarshal sets nothing.

// decodePlainYAML decodes b into *out when b is in the plain subset described above, and
// reports whether it did; out is untouched when it reports false. The empty document (only
// blank and comment lines) leaves out untouched, as yaml.Unmarshal does.
func decodePlainYAML(b []byte, out *yaml.Node) bool {
	p := plainParser{src: string(b)}
	m, why := p.parse()
	if why != "" {
		return false
	}
	if m != nil {
		// yaml's document node sits where its content starts.
		*out = yaml.Node{Kind: yaml.DocumentNode, Line: m.Line, Column: m.Column, Content: []*yaml.Node{m},
			HeadComment: p.docHead, FootComment: p.docFoot}
	}
	return true
}

// parsePlainYAML is decodePlainYAML's parser: the top mapping (nil for the empty document), or
// why b is outside the subset (the tests check the reasons).
func parsePlainYAML(b []byte) (m *yaml.Node, why string) {
	p := plainParser{src: string(b)}
	return p.parse()
}

func (p *plainParser) parse() (m *yaml.Node, why string) {
	if !p.splitLines() {
		return nil, p.why
	}
	if p.comments && !p.plainComments() {
		return nil, p.why
	}
	li := p.next()
	if li == len(p.lines) {
		return nil, "" // yaml.Unmarshal finds no document and sets nothing
	}
	if p.lines[li].indent != 0 {
		return nil, "document indented"
	}
	m, ok := p.mapping(0, -1, 0)
	if !ok {
		return nil, p.why
	}
	if p.next() != len(p.lines) {
		return nil, "indentation" // a line indented less than its block but more than column 1
	}
	if p.comments {
		p.endComments()
	}
	return m, ""
}

type plainLine struct {
	start, end int  // the line in src, without its '\n'
	indent     int  // leading spaces
	ascii      bool // columns are byte offsets
	comment    bool // the line holds a comment only
}

// blank reports whether the line holds spaces only.
func (l plainLine) blank() bool { return l.start+l.indent == l.end }

type plainParser struct {
	src   string
	lines []plainLine
	li    int // the first line not yet read
	depth int
	why   string // the first reason for refusing
	// Nodes and child lists are carved from two slabs sized by splitLines for the most
	// nodes the text can hold, so a document costs a few allocations, not one per node.
	nodes    []yaml.Node
	children []*yaml.Node
	kids     []*yaml.Node // the children of the open collections, innermost last
	overflow int          // nodes and lists made outside the slabs (the tests check it stays 0)

	// Comments, read only when the text holds a '#'.
	comments bool
	heads    []string // by line: the head comment of the key or item the line opens
	docHead  string
	docFoot  string
	// The runs of comment lines after the last content line (see endComments).
	endRuns                   []plainRun
	endBlankBefore, endBlanks bool
	// What the last content line held, for endComments.
	last struct {
		li       int
		node     *yaml.Node // its value; the key when it has none (yaml's last token is then ':')
		empty    bool       // the key has no value
		plain    bool       // the value is a plain scalar
		trailing bool       // the line ends in a comment
		indent   int        // the indentation of the block the line belongs to
	}
	lastTopKey *yaml.Node // the last key of the top mapping
}

// plainRun is a run of consecutive comment lines [from, to).
type plainRun struct{ from, to int }

// refuse records why the text is refused and returns false.
func (p *plainParser) refuse(why string) bool {
	if p.why == "" {
		p.why = why
	}
	return false
}

// splitLines records the lines of src and refuses characters outside the subset.
func (p *plainParser) splitLines() bool {
	s := p.src
	p.lines = make([]plainLine, 0, strings.Count(s, "\n")+1)
	start, ascii := 0, true
	// The most nodes the text can hold, besides the top mapping: see addLine; on a line that
	// is not a comment, a '[' opens at most one item, a '{' one pair, and a ',' adds at most a
	// pair (flow counts them on the line).
	most, flow := 1, 0
	for i := 0; i < len(s); {
		c := s[i]
		switch {
		case c == '\n':
			most += p.addLine(start, i, ascii, flow)
			start, ascii, flow = i+1, true, 0
			i++
		case c >= 0x20 && c < 0x7F:
			switch c {
			case '#':
				p.comments = true
			case '[':
				flow++
			case ',', '{':
				flow += 2
			}
			i++
		case c == '\t':
			return p.refuse("tab")
		case c == '\r':
			return p.refuse("carriage return")
		case c < 0x80:
			return p.refuse("control character")
		default:
			r, n := utf8.DecodeRuneInString(s[i:])
			if why := plainRune(r, n); why != "" {
				return p.refuse(why)
			}
			ascii = false
			i += n
		}
	}
	if start < len(s) {
		most += p.addLine(start, len(s), ascii, flow)
	}
	p.nodes = make([]yaml.Node, most)
	p.children = make([]*yaml.Node, most)
	return true
}

// addLine records a line and returns the most nodes it can start: none on a blank or comment
// line; on a `-` line an item, or, when it holds a ':', a mapping with a key and its value (or
// the collection that follows); a key and its value (or collection) on the others; and the
// flow nodes counted on it.
func (p *plainParser) addLine(start, end int, ascii bool, flow int) int {
	ind := 0
	for start+ind < end && p.src[start+ind] == ' ' {
		ind++
	}
	l := plainLine{start: start, end: end, indent: ind, ascii: ascii}
	l.comment = start+ind < end && p.src[start+ind] == '#'
	p.lines = append(p.lines, l)
	switch {
	case l.blank() || l.comment:
		return 0
	case p.src[start+ind] == '-' && strings.IndexByte(p.src[start+ind:end], ':') >= 0:
		return 3 + flow // perhaps `- key: value`
	case p.src[start+ind] == '-':
		return 1 + flow
	}
	return 2 + flow
}

// plainRune says why a non-ASCII character (n bytes of UTF-8) is refused, or "" when it is
// printable to yaml v3 (readerc.go) and neither a line break (NEL, LS, PS) nor a byte order
// mark to its scanner.
func plainRune(r rune, n int) string {
	switch {
	case r == utf8.RuneError && n <= 1:
		return "not UTF-8"
	case r == 0x85 || r == 0x2028 || r == 0x2029:
		return "line break character"
	case r == 0xFEFF:
		return "byte order mark"
	case r >= 0xA0 && r <= 0xD7FF, r >= 0xE000 && r <= 0xFFFD, r >= 0x10000 && r <= utf8.MaxRune:
		return ""
	}
	return "control character"
}

// plainComments reads the comment lines between the content lines, in one pass before the
// parse: it records the head comments of the content lines, the document's head comment and
// the runs at the end, and refuses comment lines anywhere else (see the list above).
func (p *plainParser) plainComments() bool {
	var runs []plainRun
	prev := -1 // the last content line
	blankAfter := false
	for li := 0; li <= len(p.lines); li++ {
		if li < len(p.lines) {
			l := p.lines[li]
			switch {
			case l.comment:
				if n := len(runs); n > 0 && runs[n-1].to == li {
					runs[n-1].to++
				} else {
					runs = append(runs, plainRun{li, li + 1})
				}
				// yaml reads on from the end of a comment line for the next comment or
				// token at most 512 characters.
				if !p.shortGap(l.end) {
					return false
				}
				blankAfter = false
				continue
			case l.blank():
				blankAfter = len(runs) > 0
				continue
			}
		}
		switch n := len(runs); {
		case n == 0:
		case li == len(p.lines) && prev < 0:
			// Comments only: there is no document.
		case li == len(p.lines):
			if !strings.HasSuffix(p.src, "\n") {
				// yaml closes the blocks indented less than the last line's end only at
				// the end of the text, where they take the comments above.
				return p.refuse("no final line break")
			}
			for _, r := range runs {
				for k := r.from; k < r.to; k++ {
					if p.lines[k].indent != 0 {
						return p.refuse("comment indentation")
					}
				}
			}
			p.endRuns = runs
			p.endBlankBefore = runs[0].from > prev+1
			p.endBlanks = blankAfter
		case prev < 0:
			// The start: with no blank line after the last run, that run is the first key's
			// head comment; the runs above it (or all, otherwise) are the document's, which
			// yaml splits off at the last blank line.
			if !blankAfter {
				p.setHead(li, p.runText(runs[n-1]))
				runs = runs[:n-1]
			}
			p.docHead = p.runsText(runs, false)
		default:
			if n > 1 || blankAfter {
				// Blank lines after a comment make yaml file the runs as foot comments of
				// the content above by rules of indentation and position not read here.
				return p.refuse("comment before a blank line")
			}
			r := runs[0]
			for k := r.from; k < r.to; k++ {
				if p.lines[k].indent != p.lines[li].indent {
					return p.refuse("comment indentation")
				}
			}
			p.setHead(li, p.runText(r))
		}
		runs, prev, blankAfter = runs[:0], li, false
	}
	return true
}

// shortGap reports whether the next character other than a space or line break after byte
// off is fewer than plainMaxGap bytes away, and refuses the text otherwise.
func (p *plainParser) shortGap(off int) bool {
	for i := off; i < len(p.src) && i-off <= plainMaxGap; i++ {
		if c := p.src[i]; c != ' ' && c != '\n' {
			return true
		}
	}
	if len(p.src)-off <= plainMaxGap {
		return true
	}
	return p.refuse("long gap")
}

func (p *plainParser) setHead(li int, text string) {
	if p.heads == nil {
		p.heads = make([]string, len(p.lines))
	}
	p.heads[li] = text
}

// head is the head comment of the key or item that content line li opens.
func (p *plainParser) head(li int) string {
	if p.heads == nil {
		return ""
	}
	return p.heads[li]
}

// runText is yaml's text of a run of comment lines: each from its '#' to the line end
// (trailing spaces included), joined by line breaks.
func (p *plainParser) runText(r plainRun) string {
	indented := false
	for k := r.from; k < r.to; k++ {
		indented = indented || p.lines[k].indent > 0
	}
	if !indented {
		return p.src[p.lines[r.from].start:p.lines[r.to-1].end] // the very text
	}
	var b strings.Builder
	for k := r.from; k < r.to; k++ {
		if k > r.from {
			b.WriteByte('\n')
		}
		l := p.lines[k]
		b.WriteString(p.src[l.start+l.indent : l.end])
	}
	return b.String()
}

// runsText joins runs as yaml's comment scanner does across blank lines: one empty line
// between runs, and a line break at the end when blank lines follow the last run
// (trailing).
func (p *plainParser) runsText(runs []plainRun, trailing bool) string {
	if len(runs) == 0 {
		return ""
	}
	var b strings.Builder
	for i, r := range runs {
		if i > 0 {
			b.WriteString("\n\n")
		}
		b.WriteString(p.runText(r))
	}
	if trailing {
		b.WriteByte('\n')
	}
	return b.String()
}

// endComments files the runs of comment lines after the last content line, all in column 1.
// yaml's scanner makes the first run a foot comment when no blank line comes before it and
// either the last content line belongs to an indented block (the run is dedented) or yaml's
// foot_line rule holds: the last token is not the ':' of an empty value, and the scan that
// met the comment started past the first line of the text (it starts on the line after a
// plain scalar without a trailing comment, else on the last content line). A dedented foot
// is unfolded at the end of the top mapping, whose foot goes to its last key; otherwise at
// the last token, the value of a top-level key (whose foot goes to its key) or an item of a
// sequence at column 1, which keeps it. The other runs, or all, are the document's foot
// comment (yaml's head comment at the document end, which it turns into a foot).
func (p *plainParser) endComments() {
	runs := p.endRuns
	if len(runs) == 0 {
		return
	}
	t := &p.last
	dedented := t.indent > 0
	if !p.endBlankBefore && (dedented || !t.empty && (t.li > 0 || t.plain && !t.trailing)) {
		foot := p.runText(runs[0])
		switch {
		case dedented:
			p.lastTopKey.FootComment = foot
		case p.lines[t.li].indent == 0 && !p.isItem(t.li):
			p.lastTopKey.FootComment = foot // the value's foot, moved to its key
		default:
			t.node.FootComment = foot
		}
		runs = runs[1:]
	}
	p.docFoot = p.runsText(runs, p.endBlanks)
}

// next returns the index of the first line from p.li that is neither blank nor a comment
// (len(p.lines) at the end).
func (p *plainParser) next() int {
	li := p.li
	for li < len(p.lines) && (p.lines[li].comment || p.lines[li].blank()) {
		li++
	}
	return li
}

// node makes a node at 0-based line li and column col with the given tag.
func (p *plainParser) node(kind yaml.Kind, tag string, li, col int) *yaml.Node {
	var n *yaml.Node
	if len(p.nodes) > 0 {
		n, p.nodes = &p.nodes[0], p.nodes[1:]
	} else {
		n = new(yaml.Node) // not reached: splitLines counts enough
		p.overflow++
	}
	n.Kind, n.Tag, n.Line, n.Column = kind, tag, li+1, col+1
	return n
}

// content returns the children gathered in p.kids since index from as a list of their own,
// and drops them from p.kids. yaml leaves the list of an empty collection nil.
func (p *plainParser) content(from int) []*yaml.Node {
	k := len(p.kids) - from
	if k == 0 {
		return nil
	}
	if len(p.children) < k {
		p.children = make([]*yaml.Node, k) // not reached: splitLines counts enough
		p.overflow++
	}
	c := p.children[:k:k]
	p.children = p.children[k:]
	copy(c, p.kids[from:])
	p.kids = p.kids[:from]
	return c
}

// scalar makes a plain scalar node with yaml's tag for it.
func (p *plainParser) scalar(v string, li, col int) *yaml.Node {
	n := p.node(yaml.ScalarNode, plainTag(v), li, col)
	n.Value = v
	return n
}

// plainTag is the tag yaml's resolver gives an untagged plain scalar v (Node.ShortTag of such
// a node calls it). Two shortcuts skip the resolver where it answers !!str whatever follows
// (resolve.go): a first byte that is no hint to it (a sign, a digit, '.', the first letters of
// the booleans, null, '~' and '<<'), and a space in a value that does not start like a
// timestamp (four digits): no other form it resolves to holds a space. TestPlainTag checks them
// against the resolver.
func plainTag(v string) string {
	if v != "" && (!resolveHint(v[0]) || strings.IndexByte(v, ' ') >= 0 && !startsWith4Digits(v)) {
		return "!!str"
	}
	n := yaml.Node{Kind: yaml.ScalarNode, Value: v}
	return n.ShortTag()
}

func resolveHint(c byte) bool {
	return c >= '0' && c <= '9' || strings.IndexByte("+-.yYnNtTfFoO~<", c) >= 0
}

func startsWith4Digits(v string) bool {
	if len(v) < 4 {
		return false
	}
	for i := range 4 {
		if v[i] < '0' || v[i] > '9' {
			return false
		}
	}
	return true
}

// col is the 0-based column (in characters, as yaml counts) of byte offset off on line li.
func (p *plainParser) col(li, off int) int {
	l := p.lines[li]
	if l.ascii {
		return off - l.start
	}
	return utf8.RuneCountInString(p.src[l.start:off])
}

// isItem reports whether line li holds `- ` at its indentation.
func (p *plainParser) isItem(li int) bool {
	l := p.lines[li]
	return strings.HasPrefix(p.src[l.start+l.indent:l.end], "- ")
}

// mapping reads a block mapping whose keys are at indentation indent. Its first key is at
// byte off of line li when li >= 0 (a mapping that starts on a `- ` item's line), else at the
// next content line (which is at that indentation). It stops before the first line indented
// less.
func (p *plainParser) mapping(indent, li, off int) (*yaml.Node, bool) {
	if p.depth++; p.depth > plainMaxDepth {
		return nil, p.refuse("depth")
	}
	defer func() { p.depth-- }()
	var m *yaml.Node
	from := len(p.kids)
	for {
		if li < 0 {
			li = p.next()
			if li == len(p.lines) || p.lines[li].indent < indent {
				break
			}
			l := p.lines[li]
			if l.indent > indent {
				return nil, p.refuse("indentation") // a continuation line, or a block out of place
			}
			off = l.start + indent
		}
		if m == nil {
			m = p.node(yaml.MappingNode, "!!map", li, indent)
		}
		if !p.entry(li, off, indent) {
			return nil, false
		}
		li = -1
	}
	m.Content = p.content(from)
	return m, true
}

// key reads the key that starts at byte off of line li (block context) and returns it with
// the byte after it, which must be a ':' followed by a space or the line end.
func (p *plainParser) key(li, off int) (*yaml.Node, int, bool) {
	l := p.lines[li]
	var key *yaml.Node
	var k int
	if c := p.src[off]; c == '"' || c == '\'' {
		var ok bool
		if key, k, ok = p.quoted(li, off, l.end); !ok {
			return nil, 0, false
		}
	} else {
		k = off + keyLen(p.src[off:l.end])
		if k == off {
			return nil, 0, p.refuse("key")
		}
	}
	switch {
	case k == l.end || p.src[k] != ':' || k+1 < l.end && p.src[k+1] != ' ':
		return nil, 0, p.refuse("key")
	case k-off > plainMaxKeyLen:
		return nil, 0, p.refuse("long key")
	}
	if key == nil {
		key = p.scalar(p.src[off:k], li, p.col(li, off))
	}
	return key, k, true
}

// isKey reports whether the text at byte off of line li reads as a key followed by ':' and a
// space or the line end (the test a `- ` item's text passes to hold a mapping).
func (p *plainParser) isKey(li, off int) bool {
	end := p.lines[li].end
	k := off
	if c := p.src[off]; c == '"' || c == '\'' {
		j := strings.IndexByte(p.src[off+1:end], c)
		if j < 0 {
			return false
		}
		k = off + 1 + j + 1
	} else {
		k += keyLen(p.src[off:end])
		if k == off {
			return false
		}
	}
	return k < end && p.src[k] == ':' && (k+1 == end || p.src[k+1] == ' ')
}

// entry reads a key and its value, the key at byte off of line li, in a mapping at
// indentation indent.
func (p *plainParser) entry(li, off, indent int) bool {
	l := p.lines[li]
	key, colon, ok := p.key(li, off)
	if !ok {
		return false
	}
	if off == l.start+l.indent {
		key.HeadComment = p.head(li) // an item's mapping has its line's head comment
	}
	if indent == 0 {
		p.lastTopKey = key
	}
	p.kids = append(p.kids, key)
	p.li = li + 1
	j := colon + 1
	for j < l.end && p.src[j] == ' ' {
		j++
	}
	var val *yaml.Node
	if j < l.end && p.src[j] != '#' {
		if val, ok = p.inline(li, j, l.end); !ok {
			return false
		}
		p.kids = append(p.kids, val)
		p.setLast(li, val, indent)
		return true
	}
	if j < l.end {
		// A comment after the ':' of a key with no value on its line (yaml ties it to the
		// token before the ':').
		if !p.comment(colon+1, j, l.end) {
			return false
		}
		key.LineComment = p.src[j:l.end]
	}
	nj := p.next()
	switch {
	case nj < len(p.lines) && p.lines[nj].indent >= indent && p.isItem(nj):
		val, ok = p.sequence(p.lines[nj].indent)
	case nj < len(p.lines) && p.lines[nj].indent > indent:
		val, ok = p.mapping(p.lines[nj].indent, -1, 0)
	default:
		// An empty value: yaml places its null at the end of the ':'.
		val, ok = p.node(yaml.ScalarNode, "!!null", li, p.col(li, colon)+1), true
		p.setLast(li, key, indent)
		p.last.empty = true
	}
	if !ok {
		return false
	}
	p.kids = append(p.kids, val)
	return true
}

// setLast records what content line li ends with, for endComments.
func (p *plainParser) setLast(li int, n *yaml.Node, indent int) {
	if !p.comments {
		return
	}
	p.last.li, p.last.node, p.last.indent, p.last.empty = li, n, indent, false
	p.last.plain = n.Kind == yaml.ScalarNode && n.Style == 0
	p.last.trailing = n.LineComment != ""
}

// comment checks the trailing comment whose '#' is at byte j, after the token that ends at
// byte from: a blank before it (else yaml reads it as part of the token or a comment glued
// to it) and not too many.
func (p *plainParser) comment(from, j, end int) bool {
	switch {
	case j == from:
		return p.refuse("text after value")
	case j-from > plainMaxGap:
		return p.refuse("long gap")
	}
	return true
}

// sequence reads a block sequence whose `- ` items are at indentation indent, starting at the
// next content line (the first item). It stops before the first line that is indented less or
// is not an item; a line of that kind at the same indentation is the next key of the mapping
// around an indentless sequence, and the caller judges it.
func (p *plainParser) sequence(indent int) (*yaml.Node, bool) {
	if p.depth++; p.depth > plainMaxDepth {
		return nil, p.refuse("depth")
	}
	defer func() { p.depth-- }()
	var seq *yaml.Node
	from := len(p.kids)
	for {
		li := p.next()
		if li == len(p.lines) || p.lines[li].indent < indent {
			break
		}
		l := p.lines[li]
		if l.indent > indent {
			return nil, p.refuse("indentation")
		}
		if !p.isItem(li) {
			break
		}
		if seq == nil {
			seq = p.node(yaml.SequenceNode, "!!seq", li, indent)
		}
		j := l.start + indent + 1
		for j < l.end && p.src[j] == ' ' {
			j++
		}
		if j == l.end || p.src[j] == '#' {
			return nil, p.refuse("empty item")
		}
		var val *yaml.Node
		var ok bool
		if p.isKey(li, j) {
			// A block mapping that starts on the item's line, its keys in the column of
			// the first (yaml's stem comment: the head comment above the item is the
			// mapping's).
			if val, ok = p.mapping(p.col(li, j), li, j); ok {
				val.HeadComment = p.head(li)
			}
		} else {
			if val, ok = p.inline(li, j, l.end); ok {
				val.HeadComment = p.head(li)
				p.li = li + 1
				p.setLast(li, val, indent)
			}
		}
		if !ok {
			return nil, false
		}
		p.kids = append(p.kids, val)
	}
	seq.Content = p.content(from)
	return seq, true
}

// inline reads the value that starts at byte j of line li (block context) and runs to the
// line's end at byte end, or to a trailing comment, which becomes its line comment.
func (p *plainParser) inline(li, j, end int) (*yaml.Node, bool) {
	switch p.src[j] {
	case '[', '{', '"', '\'':
		n, k, ok := p.flowValue(li, j, end)
		if !ok {
			return nil, false
		}
		h := k
		for h < end && p.src[h] == ' ' {
			h++
		}
		if h < end {
			if p.src[h] != '#' {
				return nil, p.refuse("text after value")
			}
			if !p.comment(k, h, end) {
				return nil, false
			}
			n.LineComment = p.src[h:end]
		}
		return n, true
	}
	// In block context a plain scalar ends at " #", which starts a comment, or ": ", which is
	// refused, or with its line (a next line is refused by the callers unless it is indented
	// less, which ends the scalar).
	v, lc := p.src[j:end], ""
	if p.comments { // a text without '#' needs no search
		if h := strings.Index(v, " #"); h >= 0 {
			v, lc = v[:h], v[h+1:]
		}
	}
	v = strings.TrimRight(v, " ")
	if why := plainStart(v); why != "" {
		return nil, p.refuse(why)
	}
	if strings.Contains(v, ": ") || v[len(v)-1] == ':' {
		return nil, p.refuse("colon")
	}
	n := p.scalar(v, li, p.col(li, j))
	if lc != "" {
		if !p.comment(j+len(v), end-len(lc), end) {
			return nil, false
		}
		n.LineComment = lc
	}
	return n, true
}

// plainStart says why v cannot open a plain scalar, or "" when it can: not empty, not
// starting with an indicator, except '-' before a character that is not a space ("-15 mm").
func plainStart(v string) string {
	if v == "" {
		return "empty value"
	}
	switch v[0] {
	case '-':
		if len(v) > 1 && v[1] != ' ' {
			return ""
		}
	case '?', ':', ',', '[', ']', '{', '}', '#', '&', '*', '!', '|', '>', '\'', '"', '%', '@', '`':
	default:
		return ""
	}
	return "indicator"
}

// quoted reads a one-line quoted scalar without escapes whose opening quote is at byte j of
// line li, which ends at byte end; it returns the byte after the closing quote.
func (p *plainParser) quoted(li, j, end int) (*yaml.Node, int, bool) {
	q := p.src[j]
	k := strings.IndexByte(p.src[j+1:end], q)
	if k < 0 {
		return nil, 0, p.refuse("multi-line") // not closed on this line
	}
	v := p.src[j+1 : j+1+k]
	close := j + 1 + k
	// No escapes: a backslash in double quotes, a doubled quote in single quotes.
	if q == '"' && strings.IndexByte(v, '\\') >= 0 || q == '\'' && close+1 < end && p.src[close+1] == '\'' {
		return nil, 0, p.refuse("escape")
	}
	n := p.node(yaml.ScalarNode, "!!str", li, p.col(li, j))
	n.Value = v
	n.Style = yaml.DoubleQuotedStyle
	if q == '\'' {
		n.Style = yaml.SingleQuotedStyle
	}
	return n, close + 1, true
}

// flowValue reads a scalar or flow collection in flow context (or a quoted scalar or
// collection that opens a block value) starting at byte j of line li, which ends at byte
// end; it returns the byte after it.
func (p *plainParser) flowValue(li, j, end int) (*yaml.Node, int, bool) {
	switch p.src[j] {
	case '[':
		return p.flowCollection(li, j, end, false)
	case '{':
		return p.flowCollection(li, j, end, true)
	case '"', '\'':
		return p.quoted(li, j, end)
	}
	// A plain scalar in flow context ends at ",[]{}" or ": "; ':' and '?' anywhere else
	// have rules of their own there, so they are refused (the callers see the ':'). A " #"
	// starts a comment, which leaves the collection open at the line end.
	k := j
	for k < end {
		c := p.src[k]
		if c == ',' || c == '[' || c == ']' || c == '{' || c == '}' || c == ':' {
			break
		}
		if c == '?' {
			return nil, 0, p.refuse("question mark")
		}
		if c == '#' && p.src[k-1] == ' ' {
			return nil, 0, p.refuse("comment in flow")
		}
		k++
	}
	if k == end {
		return nil, 0, p.refuse("multi-line") // a flow collection open at the end of its line
	}
	v := strings.TrimRight(p.src[j:k], " ")
	if why := plainStart(v); why != "" {
		return nil, 0, p.refuse(why)
	}
	return p.scalar(v, li, p.col(li, j)), j + len(v), true
}

// flowCollection reads a one-line flow sequence `[a, b]` or mapping `{k: v, k2: v2}` whose
// opening bracket is at byte j of line li.
func (p *plainParser) flowCollection(li, j, end int, isMap bool) (*yaml.Node, int, bool) {
	if p.depth++; p.depth > plainMaxDepth {
		return nil, 0, p.refuse("depth")
	}
	defer func() { p.depth-- }()
	kind, tag, closer := yaml.SequenceNode, "!!seq", byte(']')
	if isMap {
		kind, tag, closer = yaml.MappingNode, "!!map", '}'
	}
	n := p.node(kind, tag, li, p.col(li, j))
	n.Style = yaml.FlowStyle
	skip := func(i int) int {
		for i < end && p.src[i] == ' ' {
			i++
		}
		return i
	}
	i := skip(j + 1)
	if i < end && p.src[i] == closer {
		return n, i + 1, true
	}
	from := len(p.kids)
	for {
		if i >= end {
			return nil, 0, p.refuse("multi-line")
		}
		if isMap {
			// A key is a plain or quoted scalar right before ": ".
			if p.src[i] == '[' || p.src[i] == '{' {
				return nil, 0, p.refuse("flow key")
			}
			key, k, ok := p.flowValue(li, i, end)
			switch {
			case !ok:
				return nil, 0, false
			case k+1 >= end || p.src[k] != ':' || p.src[k+1] != ' ':
				return nil, 0, p.refuse("flow key")
			case k-i > plainMaxKeyLen:
				return nil, 0, p.refuse("long key")
			}
			p.kids = append(p.kids, key)
			if i = skip(k + 1); i >= end {
				return nil, 0, p.refuse("multi-line")
			}
		}
		val, k, ok := p.flowValue(li, i, end)
		if !ok {
			return nil, 0, false
		}
		p.kids = append(p.kids, val)
		i = skip(k)
		switch {
		case i < end && p.src[i] == closer:
			n.Content = p.content(from)
			return n, i + 1, true
		case i < end && p.src[i] == ',':
			if i = skip(i + 1); i < end && p.src[i] == closer {
				return nil, 0, p.refuse("trailing comma")
			}
		case i == end:
			return nil, 0, p.refuse("multi-line")
		default:
			return nil, 0, p.refuse("flow syntax") // a ':' after an item, or a stray bracket
		}
	}
}

// keyLen is the length of the key at the start of s: [A-Za-z0-9_][A-Za-z0-9_.-]*.
func keyLen(s string) int {
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9', c == '_':
		case (c == '.' || c == '-') && i > 0:
		default:
			return i
		}
	}
	return len(s)
}
