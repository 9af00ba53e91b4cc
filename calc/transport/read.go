package transport

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"

	"cleave/calc/quantity"
)

// maxLine bounds the length of one line so that a file without newlines cannot
// exhaust memory.
const maxLine = 16 << 20

// Read reads a delimited text data file as it comes, sniffing its shape: comment
// lines before the header ("#", "%", ";", "//" or "!"; "key: value" comments are kept as
// metadata), one header row, then one row of values per line. It is
// ReadLayout without a layout; the format is described in the package documentation.
func Read(name string, r io.Reader) (*Dataset, error) { return ReadLayout(name, r, nil) }

// colKind is how the reader treats one field of each row.
type colKind uint8

const (
	colNum       colKind = iota // a number (an error when it is not one)
	colUndecided                // a number so far, or nothing yet: turns into text at the first label
	colText                     // a label kept as text
	colSkip                     // ignored
)

// colPlan is what the reader does with one field of each row.
type colPlan struct {
	kind  colKind
	scale float64 // SI per unit of the file
	out   int     // index in Dataset.Columns; -1 for an ignored column
}

// ReadLayout reads a delimited text data file described by layout l (nil: sniffed,
// as Read does). name is used in error messages and as Dataset.Name.
//
// ReadLayout streams: it keeps one line in memory besides the growing columns, and
// it computes the SHA-256 of every byte read (Dataset.Hash). Errors concerning the
// content are *ParseError values with the line and column, in the data file or,
// for what the layout names, in the layout file.
func ReadLayout(name string, r io.Reader, l *Layout) (*Dataset, error) {
	if l == nil {
		l = &Layout{Decimal: '.'}
	}
	comments := l.Comments
	if comments == nil {
		comments = defaultComments
	}
	h := sha256.New()
	rd := &lineReader{br: bufio.NewReaderSize(io.TeeReader(r, h), 1<<20)}
	d := &Dataset{Name: name}
	if l.Source != "" {
		d.Layout = l.Name
	}

	// Metadata and header.
	var header, first []byte // first: the first data row of a file without a header
	for {
		line, err := rd.next()
		if err != nil {
			if err == io.EOF {
				if l.Header == HeaderNone {
					break
				}
				msg := "no header row: expected a line of column names such as \"B (T), Rxx (Ohm)\""
				if l.Header > 0 {
					msg = fmt.Sprintf("no line %d: layout %s puts the column names there", l.Header, l.Name)
				}
				return nil, &ParseError{File: name, Line: max(rd.n, 1), Col: 1, Msg: msg, Err: ErrNoHeader}
			}
			return nil, rd.wrap(name, err)
		}
		if rd.n == 1 {
			line = bytes.TrimPrefix(line, []byte("\xef\xbb\xbf"))
		}
		t := bytes.TrimSpace(line)
		if l.Header > 0 {
			if rd.n < l.Header {
				if len(t) > 0 {
					if p := commentPrefix(t, comments, 0); p > 0 {
						t = t[p:]
					}
					d.Meta = append(d.Meta, parseMeta(string(t)))
				}
				continue
			}
			header = line
			break
		}
		if len(t) == 0 {
			continue
		}
		if p := commentPrefix(t, comments, 0); p > 0 {
			d.Meta = append(d.Meta, parseMeta(string(t[p:])))
			continue
		}
		if l.Header == HeaderNone {
			first = append([]byte(nil), line...)
			break
		}
		header = line
		break
	}
	d.HeaderLine = rd.n
	delim := l.Delimiter
	if delim == 0 {
		if l.Header == HeaderNone {
			delim = sniff(first, l.Decimal)
		} else {
			delim = sniff(header, l.Decimal)
		}
	}
	var fields []headerField
	if l.Header == HeaderNone {
		d.HeaderLine = 0
		for _, n := range l.Names {
			fields = append(fields, headerField{text: n, col: 1})
		}
	} else {
		fields = splitHeader(header, delim)
	}
	plan, err := d.buildColumns(fields, l)
	if err != nil {
		return nil, err
	}
	ncol := len(plan)
	nout := len(d.Columns)
	vals := make([][]float64, nout)
	texts := make([][]string, nout)
	hint := sizeHint(r)
	sized := hint < 0 // whether the columns have been given their capacity
	rows := 0
	dataStart := rd.off
	var isComment [256]bool
	for _, c := range comments {
		if len(c) == 1 && c[0] == delim {
			continue // a ';' at the start of a ';'-separated row is an empty first field
		}
		isComment[c[0]] = true
	}
	var dec []byte // the line with decimal commas turned into points

	// Data rows.
	for {
		var line []byte
		if first != nil {
			line, first = first, nil
		} else {
			var err error
			line, err = rd.next()
			if err != nil {
				if err == io.EOF {
					break
				}
				return nil, rd.wrap(name, err)
			}
		}
		// Skip blank and comment lines.
		i := 0
		for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
			i++
		}
		if i == len(line) || isComment[line[i]] && commentPrefix(line[i:], comments, delim) > 0 {
			continue
		}
		if l.Decimal == ',' {
			dec = append(dec[:0], line...)
			for k, c := range dec {
				if c == ',' {
					dec[k] = '.'
				}
			}
			line = dec
		}
		if !sized && rows == sizeSample {
			// Give every column its final capacity at once, estimated from the
			// bytes per row so far and the bytes left (5 % spare); a wrong
			// estimate only costs the usual append growth.
			sized = true
			per := float64(rd.off-dataStart) / float64(rows)
			left := float64(hint - rd.off)
			if per > 0 && left > 0 {
				want := rows + int(1.05*left/per) + 16
				for c := range vals {
					vals[c] = slices.Grow(vals[c], want-len(vals[c]))
				}
			}
		}
		col := 0
		pos := 0
		if delim == ' ' {
			pos = i
		}
		for {
			if col >= ncol {
				return nil, &ParseError{File: name, Line: rd.n, Col: pos + 1,
					Msg: fmt.Sprintf("too many fields: expected %d (%s)", ncol, d.fieldList(fields)), Err: ErrColumnCount}
			}
			p := &plan[col]
			start := pos
			switch p.kind {
			case colNum, colUndecided:
				// Fast path: a plain decimal number that ends at the delimiter,
				// blanks or the end of the line.
				v, end, ok := scanFloat(line, pos, delim)
				if ok {
					pos = end
				} else {
					// General path: find the end of the field, then parse it.
					pos = fieldEnd(line, pos, delim)
					field := line[start:pos]
					var ferr string
					v, ferr = parseField(field, l.Decimal)
					if ferr != "" {
						if p.kind == colUndecided && textLike(field) {
							p.kind = colText
							texts[p.out] = make([]string, rows, max(rows, 16))
							texts[p.out] = append(texts[p.out], string(bytes.TrimSpace(field)))
							vals[p.out] = append(vals[p.out], math.NaN())
							break
						}
						fcol := start + 1 + leadingSpace(field)
						return nil, &ParseError{File: name, Line: rd.n, Col: fcol,
							Msg: fmt.Sprintf("bad number %q in column %q: %s", bytes.TrimSpace(field), d.Columns[p.out].Name, ferr), Err: ErrNumber}
					}
				}
				if p.kind == colUndecided && !math.IsNaN(v) {
					p.kind = colNum
				}
				if s := p.scale; s != 1 {
					v *= s
				}
				vals[p.out] = append(vals[p.out], v)
			case colText:
				pos = fieldEnd(line, pos, delim)
				texts[p.out] = append(texts[p.out], string(bytes.TrimSpace(line[start:pos])))
				vals[p.out] = append(vals[p.out], math.NaN())
			case colSkip:
				pos = fieldEnd(line, pos, delim)
			}
			col++
			if delim == ' ' {
				for pos < len(line) && (line[pos] == ' ' || line[pos] == '\t') {
					pos++
				}
				if pos == len(line) {
					break
				}
			} else {
				if pos == len(line) {
					break
				}
				pos++ // skip the delimiter
			}
		}
		if col < ncol {
			return nil, &ParseError{File: name, Line: rd.n, Col: len(line) + 1,
				Msg: fmt.Sprintf("too few fields: got %d, expected %d (%s)", col, ncol, d.fieldList(fields)), Err: ErrColumnCount}
		}
		rows++
	}
	for c := range vals {
		d.Columns[c].Values = slices.Clip(vals[c])
		if texts[c] != nil {
			d.Columns[c].Text = slices.Clip(texts[c])
		} else if d.Columns[c].Role == RoleDirection && d.Columns[c].Values == nil {
			d.Columns[c].Values = []float64{}
		}
	}
	if err := d.derive(l); err != nil {
		return nil, err
	}
	d.Hash = "sha256:" + hex.EncodeToString(h.Sum(nil))
	return d, nil
}

// fieldEnd returns the index where the field starting at pos ends: the next
// delimiter (or, blank-delimited, the next blank), or the end of the line.
func fieldEnd(line []byte, pos int, delim byte) int {
	if delim == ' ' {
		for pos < len(line) && line[pos] != ' ' && line[pos] != '\t' {
			pos++
		}
		return pos
	}
	if k := bytes.IndexByte(line[pos:], delim); k >= 0 {
		return pos + k
	}
	return len(line)
}

// commentPrefix returns the length of the comment prefix t starts with, or 0. A
// one-character prefix equal to delim does not count (after the header, ';' starts
// an empty field of a ';'-separated row).
func commentPrefix(t []byte, comments []string, delim byte) int {
	for _, c := range comments {
		if len(c) == 1 && c[0] == delim {
			continue
		}
		if bytes.HasPrefix(t, []byte(c)) {
			return len(c)
		}
	}
	return 0
}

// textLike reports whether a field that is not a number is a label (a text
// column such as a sweep direction, or a time stamp) rather than a mistyped
// number: it holds a letter, a ':' (a time of day) or a '/' or two '-' between
// digits (a date), and is not an infinity; a number with a decimal comma is no label.
func textLike(f []byte) bool {
	f = bytes.TrimSpace(f)
	letter := bytes.IndexByte(f, ':') > 0 || bytes.IndexByte(f, '/') > 0 || bytes.Count(f, []byte("-")) >= 2 && f[0] != '-'
	for _, c := range f {
		if c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= 0x80 {
			letter = true
			break
		}
	}
	if !letter {
		return false
	}
	if _, err := strconv.ParseFloat(string(f), 64); err == nil {
		return false // an infinity, or a number in a form the fast path skipped
	}
	return true
}

// sizeSample is the number of data rows read before the columns are given
// their capacity from the size hint.
const sizeSample = 256

// sizeHint returns the number of bytes left in r when r can tell (an in-memory
// reader with a Len method, or a regular file), else -1.
func sizeHint(r io.Reader) int64 {
	switch v := r.(type) {
	case interface{ Len() int }:
		return int64(v.Len())
	case *os.File:
		fi, err := v.Stat()
		if err != nil || !fi.Mode().IsRegular() {
			return -1
		}
		off, err := v.Seek(0, io.SeekCurrent)
		if err != nil || off > fi.Size() {
			return -1
		}
		return fi.Size() - off
	}
	return -1
}

// lineReader yields lines without their terminator ("\n" or "\r\n") and counts them.
type lineReader struct {
	br  *bufio.Reader
	buf []byte // used only for lines longer than the bufio buffer
	n   int    // number of lines returned so far (the 1-based number of the last one)
	off int64  // bytes consumed so far, terminators included
}

var errLongLine = errors.New("line too long")

func (lr *lineReader) next() ([]byte, error) {
	line, err := lr.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		lr.buf = append(lr.buf[:0], line...)
		for err == bufio.ErrBufferFull {
			line, err = lr.br.ReadSlice('\n')
			lr.buf = append(lr.buf, line...)
			if len(lr.buf) > maxLine {
				lr.n++
				return nil, errLongLine
			}
		}
		line = lr.buf
	}
	if err != nil && err != io.EOF {
		return nil, err
	}
	if err == io.EOF && len(line) == 0 {
		return nil, io.EOF
	}
	lr.n++
	lr.off += int64(len(line))
	if n := len(line); n > 0 && line[n-1] == '\n' {
		line = line[:n-1]
	}
	if n := len(line); n > 0 && line[n-1] == '\r' {
		line = line[:n-1]
	}
	return line, nil
}

func (lr *lineReader) wrap(name string, err error) error {
	if err == errLongLine {
		return &ParseError{File: name, Line: lr.n, Col: 1, Msg: fmt.Sprintf("line longer than %d bytes", maxLine), Err: ErrColumnCount}
	}
	return fmt.Errorf("%s: read: %w", name, err)
}

// parseField parses one number. An empty field or NaN is a missing value (NaN).
// It returns a non-empty reason when the field is not a number. decimal is the
// layout's decimal mark (commas have been turned into points already when it is
// ','), for the advice about decimal commas.
func parseField(f []byte, decimal byte) (float64, string) {
	// Trim spaces without allocating.
	for len(f) > 0 && (f[0] == ' ' || f[0] == '\t') {
		f = f[1:]
	}
	for len(f) > 0 && (f[len(f)-1] == ' ' || f[len(f)-1] == '\t') {
		f = f[:len(f)-1]
	}
	if len(f) == 0 {
		return math.NaN(), ""
	}
	v, err := strconv.ParseFloat(string(f), 64)
	if err != nil {
		if bytes.IndexByte(f, ',') >= 0 && decimal != ',' {
			return 0, "expected a number with a decimal point (a file with decimal commas needs a layout with `decimal: comma`)"
		}
		var ne *strconv.NumError
		if errors.As(err, &ne) && ne.Err == strconv.ErrRange {
			return 0, "number out of the float64 range"
		}
		return 0, "expected a number"
	}
	if math.IsInf(v, 0) {
		return 0, "expected a finite number"
	}
	return v, ""
}

func leadingSpace(f []byte) int {
	n := 0
	for n < len(f) && (f[n] == ' ' || f[n] == '\t') {
		n++
	}
	if n == len(f) {
		return 0
	}
	return n
}

// sniff picks the delimiter from the header row: tab, then comma (not with
// decimal commas), then semicolon; otherwise runs of blanks (returned as ' ').
func sniff(header []byte, decimal byte) byte {
	for _, c := range []byte{'\t', ',', ';'} {
		if c == ',' && decimal == ',' {
			continue
		}
		if bytes.IndexByte(header, c) >= 0 {
			return c
		}
	}
	return ' '
}

// parseMeta reads a comment line as "key: value" (or "key = value"). The key
// starts with a letter and is at most 64 characters of letters, digits, blanks
// and _ - . ( ) [ ] /; a colon between two digits belongs to a time of day
// ("14:22:05"), so a comment holding only a time stamp is kept as text with an
// empty key.
func parseMeta(s string) KV {
	s = strings.TrimSpace(s)
	for i := 0; i < len(s); i++ {
		c := s[i]
		if c != ':' && c != '=' {
			if !metaKeyByte(c) {
				break
			}
			continue
		}
		if c == ':' && i > 0 && i+1 < len(s) && isDigit(s[i-1]) && isDigit(s[i+1]) {
			break // a time of day: no key before it
		}
		k := strings.TrimSpace(s[:i])
		if k == "" || len(k) > 64 || !isLetter(k[0]) {
			break
		}
		return KV{Key: k, Value: strings.TrimSpace(s[i+1:])}
	}
	return KV{Value: s}
}

func isDigit(c byte) bool  { return c >= '0' && c <= '9' }
func isLetter(c byte) bool { return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= 0x80 }
func metaKeyByte(c byte) bool {
	return isLetter(c) || isDigit(c) || strings.IndexByte(" \t_-.()[]/", c) >= 0
}

// headerField is one header entry and the 1-based column where its text starts.
type headerField struct {
	text string
	col  int
}

// splitHeader splits the header row into fields. With the blank delimiter, a
// bracketed group separated from its name by blanks ("B (T)") stays with the
// name, and blanks inside brackets do not split.
func splitHeader(line []byte, delim byte) []headerField {
	var out []headerField
	if delim != ' ' {
		start := 0
		for i := 0; i <= len(line); i++ {
			if i == len(line) || line[i] == delim {
				raw := line[start:i]
				out = append(out, headerField{text: strings.TrimSpace(string(raw)), col: start + 1 + leadingSpace(raw)})
				start = i + 1
			}
		}
		return out
	}
	depth, start := 0, -1
	merged := false // whether the last field already has a bracketed unit
	for i := 0; i <= len(line); i++ {
		end := i == len(line)
		if !end {
			switch line[i] {
			case '(', '[':
				depth++
			case ')', ']':
				if depth > 0 {
					depth--
				}
			}
		}
		blank := end || (depth == 0 && (line[i] == ' ' || line[i] == '\t'))
		if !blank {
			if start < 0 {
				start = i
			}
			continue
		}
		if start < 0 {
			continue
		}
		tok := string(line[start:i])
		if (tok[0] == '(' || tok[0] == '[') && len(out) > 0 && !merged {
			out[len(out)-1].text += " " + tok
			merged = true
		} else {
			out = append(out, headerField{text: tok, col: start + 1})
			merged = strings.ContainsAny(tok, "([")
		}
		start = -1
	}
	return out
}

// splitNameUnit separates "name (unit)" or "name [unit]". It returns the offset
// of the unit inside text (or -1).
func splitNameUnit(text string) (name, unit string, off int, ok bool) {
	if text == "" {
		return "", "", -1, true
	}
	last := text[len(text)-1]
	var open byte
	switch last {
	case ')':
		open = '('
	case ']':
		open = '['
	default:
		if strings.ContainsAny(text, "()[]") {
			return "", "", -1, false
		}
		return text, "", -1, true
	}
	depth := 0
	for i := len(text) - 1; i >= 0; i-- {
		switch text[i] {
		case last:
			depth++
		case open:
			depth--
			if depth == 0 {
				name = strings.TrimSpace(text[:i])
				unit = strings.TrimSpace(text[i+1 : len(text)-1])
				off = i + 1 + leadingSpace([]byte(text[i+1:len(text)-1]))
				return name, unit, off, true
			}
		}
	}
	return "", "", -1, false
}

// buildColumns makes the data set's columns from the header fields and the layout,
// and returns what the reader does with each field.
func (d *Dataset) buildColumns(fields []headerField, l *Layout) ([]colPlan, error) {
	perr := func(col int, err error, format string, a ...any) error {
		return &ParseError{File: d.Name, Line: max(d.HeaderLine, 1), Col: col, Msg: fmt.Sprintf(format, a...), Err: err}
	}
	lerr := func(p Pos, format string, a ...any) error {
		return &ParseError{File: l.Source, Line: max(p.Line, 1), Col: max(p.Col, 1), Msg: fmt.Sprintf(format, a...), Err: ErrLayout}
	}
	if l.Header != HeaderNone {
		allNumbers := true
		for _, f := range fields {
			if _, err := strconv.ParseFloat(f.text, 64); err != nil {
				allNumbers = false
			}
		}
		if allNumbers {
			return nil, perr(1, ErrNoHeader, "no header row: this line holds numbers; expected column names such as \"B (T), Rxx (Ohm)\"")
		}
	}
	used := make([]bool, len(l.Columns))
	plan := make([]colPlan, 0, len(fields))
	var fromLayout []bool // per column: its role comes from the layout
	for _, f := range fields {
		name, unit, off, ok := splitNameUnit(f.text)
		if !ok {
			return nil, perr(f.col, ErrHeader, "bad column header %q: expected \"name\", \"name (unit)\" or \"name [unit]\"", f.text)
		}
		if name == "" {
			return nil, perr(f.col, ErrHeader, "empty column name: expected \"name\", \"name (unit)\" or \"name [unit]\"")
		}
		if slices.ContainsFunc(l.Ignore, func(s string) bool { return strings.EqualFold(s, f.text) || strings.EqualFold(s, name) }) {
			plan = append(plan, colPlan{kind: colSkip, scale: 1, out: -1})
			continue
		}
		for _, c := range d.Columns {
			if strings.EqualFold(c.Name, name) {
				return nil, perr(f.col, ErrHeader, "column %q appears twice", name)
			}
		}
		var spec *ColumnSpec
		for i := range l.Columns {
			if s := &l.Columns[i]; strings.EqualFold(s.File, f.text) || strings.EqualFold(s.File, name) {
				spec, used[i] = s, true
				break
			}
		}
		c := Column{Name: name, Unit: unit}
		if l.Header != HeaderNone {
			c.HeaderCol = f.col
		}
		unitCol := f.col + off
		fromSuffix := false
		if unit == "" {
			if stem, u, ok := splitSuffixUnit(name); ok {
				c.Stem, c.Unit, fromSuffix = stem, u, true
				unitCol = f.col + len(stem) + 1
			}
		}
		if spec != nil && spec.Unit != "" {
			if unit != "" && unit != spec.Unit {
				return nil, lerr(spec.Pos, "columns: %s: the layout says %s, but the header of %s says %s: keep one", spec.File, spec.Unit, d.Name, unit)
			}
			c.Unit, fromSuffix = spec.Unit, false
		}
		base := name
		if c.Stem != "" {
			base = c.Stem
		}
		var want quantity.Dim
		known, text := false, false
		switch {
		case spec != nil && spec.Role != "":
			c.Role = spec.Role
		default:
			c.Role = sniffRole(base)
		}
		if ri, ok := lookupRole(c.Role); ok {
			want, known, text = ri.dim, !ri.text, ri.text
			if ri.name == RoleTime && c.Unit == "" {
				known = false // a time column without a unit may hold time stamps: labels
			}
		} else if kd, ok := knownDim(base); ok {
			want, known = kd, true
		}
		kind := colUndecided
		scale := 1.0
		switch {
		case c.Unit != "":
			s, dim, err := parseUnit(c.Unit)
			if err != nil {
				if spec != nil && spec.Unit != "" {
					return nil, lerr(spec.Pos, "columns: %s: unknown unit %q: %s", spec.File, c.Unit, unitMsg(err))
				}
				return nil, perr(unitCol, ErrUnknownUnit, "unknown unit %q in column %q: %v", c.Unit, name, err)
			}
			if text {
				if fromSuffix {
					c.Unit, c.Stem = "", ""
					break
				}
				return nil, perr(unitCol, ErrUnitDim, "column %q is a sweep direction (labels or ±1) and takes no unit", name)
			}
			if known && dim != want && fromSuffix && (spec == nil || spec.Role == "") {
				// A suffix unit says more than a guessed role: "t_s" is a time in seconds,
				// not a temperature. An analysis that wants the role still checks the unit.
				c.Role, known = "", false
			}
			if known && dim != want {
				if spec != nil && spec.Unit != "" {
					return nil, lerr(spec.Pos, "columns: %s: unit %q is %s; the column %s needs %s", spec.File, c.Unit, dimKind(dim), c.Role, dimName(want))
				}
				return nil, perr(unitCol, ErrUnitDim, "unit %q of column %q is %s; expected %s", c.Unit, name, dimKind(dim), dimName(want))
			}
			scale, c.Dim, kind = s, dim, colNum
		case known:
			c.Dim, kind = want, colNum
		}
		plan = append(plan, colPlan{kind: kind, scale: scale, out: len(d.Columns)})
		d.Columns = append(d.Columns, c)
		fromLayout = append(fromLayout, spec != nil && spec.Role != "")
	}
	for i, s := range l.Columns {
		if !used[i] {
			return nil, lerr(s.Pos, "columns: no column %q in %s (its columns: %s)", s.File, d.Name, d.fieldList(fields))
		}
	}
	// One column per role: a role the layout gives wins over a sniffed one, else the first.
	taken := map[string]bool{}
	for i := range d.Columns {
		if fromLayout[i] {
			taken[strings.ToLower(d.Columns[i].Role)] = true
		}
	}
	for i := range d.Columns {
		c := &d.Columns[i]
		if c.Role == "" || fromLayout[i] {
			continue
		}
		k := strings.ToLower(c.Role)
		if taken[k] {
			c.Role = ""
			continue
		}
		taken[k] = true
	}
	return plan, nil
}

// fieldList names the header's fields for messages.
func (d *Dataset) fieldList(fields []headerField) string {
	names := make([]string, len(fields))
	for i, f := range fields {
		names[i] = f.text
	}
	return strings.Join(names, ", ")
}

// pow10 holds the powers of ten that are exact in float64 (10^22 < 2^53·2^22).
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// scanFloat is the fast path of the row parser. Starting at line[pos] it reads
// optional blanks, a plain decimal number ([+-]digits[.digits][(e|E)[+-]digits])
// and optional blanks, and succeeds when that ends the field: at the end of the
// line, at the delimiter, or (blank-delimited files) at a blank. end is then the
// index of the delimiter (or len(line)), as the general path leaves it.
//
// It succeeds only when the value is exact by construction: at most 19
// significant digits forming an integer m ≤ 2^53 and a decimal exponent e with
// |e| ≤ 22, so that m and 10^|e| are both exact float64 values and one IEEE
// multiplication or division rounds correctly (W. D. Clinger, "How to read
// floating point numbers accurately", PLDI 1990, the "fast path"). The result
// is then bit-identical to strconv.ParseFloat; anything else (missing values,
// NaN, more digits, hexadecimal, bad input) returns ok = false and is left to
// the general path, which also produces the error messages.
func scanFloat(line []byte, pos int, delim byte) (v float64, end int, ok bool) {
	blank := func(c byte) bool { return c == ' ' || (c == '\t' && delim != '\t') }
	n := len(line)
	i := pos
	if delim != ' ' {
		for i < n && blank(line[i]) {
			i++
		}
	}
	neg := false
	if i < n && (line[i] == '+' || line[i] == '-') {
		neg = line[i] == '-'
		i++
	}
	var m uint64
	nd, digits, exp := 0, 0, 0 // significant digits, all digits, decimal exponent
	for ; i < n && line[i] >= '0' && line[i] <= '9'; i++ {
		digits++
		if m == 0 && line[i] == '0' {
			continue
		}
		nd++
		m = m*10 + uint64(line[i]-'0')
	}
	if i < n && line[i] == '.' {
		i++
		for ; i < n && line[i] >= '0' && line[i] <= '9'; i++ {
			digits++
			exp--
			if m == 0 && line[i] == '0' {
				continue
			}
			nd++
			m = m*10 + uint64(line[i]-'0')
		}
	}
	if digits == 0 || nd > 19 {
		return 0, pos, false
	}
	if i < n && (line[i] == 'e' || line[i] == 'E') {
		i++
		eneg := false
		if i < n && (line[i] == '+' || line[i] == '-') {
			eneg = line[i] == '-'
			i++
		}
		if i == n || line[i] < '0' || line[i] > '9' {
			return 0, pos, false
		}
		e := 0
		for ; i < n && line[i] >= '0' && line[i] <= '9'; i++ {
			if e < 10000 {
				e = e*10 + int(line[i]-'0')
			}
		}
		if eneg {
			e = -e
		}
		exp += e
	}
	// The field must end here.
	if delim == ' ' {
		if i < n && line[i] != ' ' && line[i] != '\t' {
			return 0, pos, false
		}
	} else {
		for i < n && blank(line[i]) {
			i++
		}
		if i < n && line[i] != delim {
			return 0, pos, false
		}
	}
	switch {
	case m == 0:
		v = 0
	case m > 1<<53 || exp < -22 || exp > 22:
		return 0, pos, false
	case exp < 0:
		v = float64(m) / pow10[-exp]
	default:
		v = float64(m) * pow10[exp]
	}
	if neg {
		v = -v
	}
	return v, i, true
}
