package notebook

import (
	"strings"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"
)

// Front matter in practice is a short, plain block mapping: `key: value` lines, lists in
// brackets or as `- item` lines, a few nested maps. yaml v3 spends most of its time on such a
// document in setting up its parser (large buffers per call) and its token machinery, so
// decodeYAML first tries decodePlainYAML, which reads exactly this subset and builds the very
// tree yaml.Unmarshal builds (kind, style, tag, value, line, column; no comments, anchors or
// aliases). Whatever it is not sure about it refuses, and decodeYAML hands the text to yaml v3,
// so errors and their positions come from the library as before. FuzzFrontMatterFast holds the
// two paths equal.
//
// The subset, with yaml v3's reading of it (scannerc.go, parserc.go, decode.go):
//   - the text is UTF-8 without control characters, tabs, carriage returns, '#' (no comments),
//     U+0085, U+2028, U+2029 (line breaks to YAML), U+FEFF, U+FFFE, U+FFFF;
//   - the document is a block mapping whose keys start at column 1, or blank lines only;
//   - a key is [A-Za-z0-9_][A-Za-z0-9_.-]* right before ':', followed by a space or the line end;
//   - a value on the key's line is a plain scalar, a one-line quoted scalar without escapes,
//     or a one-line flow sequence or mapping of those;
//   - a key alone on its line has an empty value (null), a block mapping indented deeper, or a
//     block sequence (`- item`, indented deeper or at the key's own indentation) whose items
//     are values as above;
//   - nothing continues onto a further line (no multi-line scalars or flow collections).

const (
	plainMaxDepth  = 16  // nesting of maps and lists the fast path reads (yaml's bound is 64)
	plainMaxKeyLen = 256 // yaml refuses implicit keys longer than 1024 characters
)

// decodePlainYAML decodes b into *out when b is in the plain subset described above, and
// reports whether it did; out is untouched when it reports false. The empty document (only
// blank lines) leaves out untouched, as yaml.Unmarshal does.
func decodePlainYAML(b []byte, out *yaml.Node) bool {
	m, why := parsePlainYAML(b)
	if why != "" {
		return false
	}
	if m != nil {
		// yaml's document node sits where its content starts.
		*out = yaml.Node{Kind: yaml.DocumentNode, Line: m.Line, Column: m.Column, Content: []*yaml.Node{m}}
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
	li := p.next()
	if li == len(p.lines) {
		return nil, "" // yaml.Unmarshal finds no document and sets nothing
	}
	if p.lines[li].indent != 0 {
		return nil, "document indented"
	}
	m, ok := p.mapping(0)
	if !ok {
		return nil, p.why
	}
	if p.next() != len(p.lines) {
		return nil, "indentation" // a line indented less than its block but more than column 1
	}
	return m, ""
}

type plainLine struct {
	start, end int  // the line in src, without its '\n'
	indent     int  // leading spaces
	ascii      bool // columns are byte offsets
}

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
}

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
	// The most nodes the text can hold, besides the top mapping: see addLine; a '[' opens at
	// most one item, a '{' one pair, and a ',' adds at most a pair.
	most := 1
	for i := 0; i < len(s); {
		c := s[i]
		switch {
		case c == '\n':
			most += p.addLine(start, i, ascii)
			start, ascii = i+1, true
			i++
		case c >= 0x20 && c < 0x7F:
			switch c {
			case '#':
				return p.refuse("comment")
			case '[':
				most++
			case ',', '{':
				most += 2
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
		most += p.addLine(start, len(s), ascii)
	}
	p.nodes = make([]yaml.Node, most)
	p.children = make([]*yaml.Node, most)
	return true
}

// addLine records a line and returns the most nodes it can start: none on a blank line, an
// item on a `-` line, a key and its value (or the collection that follows) on the others.
func (p *plainParser) addLine(start, end int, ascii bool) int {
	ind := 0
	for start+ind < end && p.src[start+ind] == ' ' {
		ind++
	}
	p.lines = append(p.lines, plainLine{start: start, end: end, indent: ind, ascii: ascii})
	switch {
	case start+ind == end:
		return 0
	case p.src[start+ind] == '-':
		return 1
	}
	return 2
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

// next returns the index of the first line from p.li that is not blank (len(p.lines) at the
// end). Blank lines hold spaces only.
func (p *plainParser) next() int {
	li := p.li
	for li < len(p.lines) && p.lines[li].start+p.lines[li].indent == p.lines[li].end {
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

// mapping reads a block mapping whose keys are at indentation indent, starting at the next
// non-blank line (which is at that indentation). It stops before the first line indented
// less.
func (p *plainParser) mapping(indent int) (*yaml.Node, bool) {
	if p.depth++; p.depth > plainMaxDepth {
		return nil, p.refuse("depth")
	}
	defer func() { p.depth-- }()
	var m *yaml.Node
	from := len(p.kids)
	for {
		li := p.next()
		if li == len(p.lines) || p.lines[li].indent < indent {
			break
		}
		l := p.lines[li]
		if l.indent > indent {
			return nil, p.refuse("indentation") // a continuation line, or a block out of place
		}
		s := p.src[l.start+indent : l.end]
		k := keyLen(s)
		switch {
		case k == 0 || k == len(s) || s[k] != ':' || k+1 < len(s) && s[k+1] != ' ':
			return nil, p.refuse("key")
		case k > plainMaxKeyLen:
			return nil, p.refuse("long key")
		}
		if m == nil {
			m = p.node(yaml.MappingNode, "!!map", li, indent)
		}
		p.kids = append(p.kids, p.scalar(s[:k], li, indent))
		p.li = li + 1
		colon := l.start + indent + k // byte offset of ':'
		j := colon + 1
		for j < l.end && p.src[j] == ' ' {
			j++
		}
		var val *yaml.Node
		var ok bool
		if j < l.end {
			val, ok = p.inline(li, j, l.end)
		} else {
			nj := p.next()
			switch {
			case nj < len(p.lines) && p.lines[nj].indent >= indent && p.isItem(nj):
				val, ok = p.sequence(p.lines[nj].indent)
			case nj < len(p.lines) && p.lines[nj].indent > indent:
				val, ok = p.mapping(p.lines[nj].indent)
			default:
				// An empty value: yaml places its null at the end of the ':'.
				val, ok = p.node(yaml.ScalarNode, "!!null", li, colon-l.start+1), true
			}
		}
		if !ok {
			return nil, false
		}
		p.kids = append(p.kids, val)
	}
	m.Content = p.content(from)
	return m, true
}

// sequence reads a block sequence whose `- ` items are at indentation indent, starting at the
// next non-blank line (the first item). It stops before the first line that is indented less
// or is not an item; a line of that kind at the same indentation is the next key of the
// mapping around an indentless sequence, and the caller judges it.
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
		if j == l.end {
			return nil, p.refuse("empty item")
		}
		val, ok := p.inline(li, j, l.end)
		if !ok {
			return nil, false
		}
		p.li = li + 1
		p.kids = append(p.kids, val)
	}
	seq.Content = p.content(from)
	return seq, true
}

// inline reads the value that starts at byte j of line li (block context) and runs to the
// line's end at byte end.
func (p *plainParser) inline(li, j, end int) (*yaml.Node, bool) {
	switch p.src[j] {
	case '[', '{', '"', '\'':
		n, k, ok := p.flowValue(li, j, end)
		if !ok {
			return nil, false
		}
		for k < end && p.src[k] == ' ' {
			k++
		}
		if k < end {
			return nil, p.refuse("text after value")
		}
		return n, true
	}
	v := strings.TrimRight(p.src[j:end], " ")
	// In block context a plain scalar ends only at ": " or " #" (comments are refused
	// already), or with its line (a next line is refused by the callers unless it is
	// indented less, which ends the scalar).
	if why := plainStart(v); why != "" {
		return nil, p.refuse(why)
	}
	if strings.Contains(v, ": ") || v[len(v)-1] == ':' {
		return nil, p.refuse("colon")
	}
	return p.scalar(v, li, p.col(li, j)), true
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
	// A plain scalar in flow context ends at ",[]{}" or ": "; ':' and '?' anywhere else
	// have rules of their own there, so they are refused (the callers see the ':').
	k := j
	for k < end {
		c := p.src[k]
		if c == ',' || c == '[' || c == ']' || c == '{' || c == '}' || c == ':' {
			break
		}
		if c == '?' {
			return nil, 0, p.refuse("question mark")
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
			// A key is a plain scalar right before ": ".
			if strings.IndexByte("[{\"'", p.src[i]) >= 0 {
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
