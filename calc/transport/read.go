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
)

// maxLine bounds the length of one line so that a file without newlines cannot
// exhaust memory.
const maxLine = 16 << 20

// Read reads a delimited text data file: optional "#" metadata lines, one header
// row, then one row of numbers per line. name is used in error messages and as
// Dataset.Name. The format is described in the package documentation.
//
// Read streams: it keeps one line in memory besides the growing columns, and it
// computes the SHA-256 of every byte read (Dataset.Hash). Errors concerning the
// content are *ParseError values with the line and column.
func Read(name string, r io.Reader) (*Dataset, error) {
	h := sha256.New()
	rd := &lineReader{br: bufio.NewReaderSize(io.TeeReader(r, h), 1<<20)}
	d := &Dataset{Name: name}

	// Metadata and header.
	var header []byte
	for {
		line, err := rd.next()
		if err != nil {
			if err == io.EOF {
				return nil, &ParseError{File: name, Line: max(rd.n, 1), Col: 1,
					Msg: "no header row: expected a line of column names such as \"B (T), Rxx (Ohm)\"", Err: ErrNoHeader}
			}
			return nil, rd.wrap(name, err)
		}
		if rd.n == 1 {
			line = bytes.TrimPrefix(line, []byte("\xef\xbb\xbf"))
		}
		t := bytes.TrimSpace(line)
		if len(t) == 0 {
			continue
		}
		if t[0] == '#' {
			d.Meta = append(d.Meta, parseMeta(string(t[1:])))
			continue
		}
		header = line
		break
	}
	d.HeaderLine = rd.n
	delim := sniff(header)
	scales, err := d.parseHeader(header, delim)
	if err != nil {
		return nil, err
	}
	ncol := len(d.Columns)
	vals := make([][]float64, ncol)
	hint := sizeHint(r)
	sized := hint < 0 // whether the columns have been given their capacity
	rows := 0
	dataStart := rd.off

	// Data rows.
	for {
		line, err := rd.next()
		if err != nil {
			if err == io.EOF {
				break
			}
			return nil, rd.wrap(name, err)
		}
		// Skip blank and comment lines.
		i := 0
		for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
			i++
		}
		if i == len(line) || line[i] == '#' {
			continue
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
					Msg: fmt.Sprintf("too many fields: expected %d (%s)", ncol, d.columnList()), Err: ErrColumnCount}
			}
			start := pos
			// Fast path: a plain decimal number that ends at the delimiter,
			// blanks or the end of the line.
			v, end, ok := scanFloat(line, pos, delim)
			if ok {
				pos = end
			} else {
				// General path: find the end of the field, then parse it.
				if delim == ' ' {
					for pos < len(line) && line[pos] != ' ' && line[pos] != '\t' {
						pos++
					}
				} else if k := bytes.IndexByte(line[pos:], delim); k < 0 {
					pos = len(line)
				} else {
					pos += k
				}
				field := line[start:pos]
				var ferr string
				v, ferr = parseField(field)
				if ferr != "" {
					return nil, &ParseError{File: name, Line: rd.n, Col: start + 1 + leadingSpace(field),
						Msg: fmt.Sprintf("bad number %q in column %q: %s", bytes.TrimSpace(field), d.Columns[col].Name, ferr), Err: ErrNumber}
				}
			}
			if s := scales[col]; s != 1 {
				v *= s
			}
			vals[col] = append(vals[col], v)
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
				Msg: fmt.Sprintf("too few fields: got %d, expected %d (%s)", col, ncol, d.columnList()), Err: ErrColumnCount}
		}
		rows++
	}
	for c := range vals {
		d.Columns[c].Values = slices.Clip(vals[c])
	}
	d.Hash = "sha256:" + hex.EncodeToString(h.Sum(nil))
	return d, nil
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
// It returns a non-empty reason when the field is not a number.
func parseField(f []byte) (float64, string) {
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
		if bytes.IndexByte(f, ',') >= 0 {
			return 0, "expected a number with a decimal point (decimal commas are not supported)"
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

// sniff picks the delimiter from the header row: tab, then comma, then
// semicolon; otherwise runs of blanks (returned as ' ').
func sniff(header []byte) byte {
	for _, c := range []byte{'\t', ',', ';'} {
		if bytes.IndexByte(header, c) >= 0 {
			return c
		}
	}
	return ' '
}

func parseMeta(s string) KV {
	s = strings.TrimSpace(s)
	if k, v, ok := strings.Cut(s, ":"); ok && strings.TrimSpace(k) != "" {
		return KV{Key: strings.TrimSpace(k), Value: strings.TrimSpace(v)}
	}
	return KV{Value: s}
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

func (d *Dataset) parseHeader(line []byte, delim byte) ([]float64, error) {
	fields := splitHeader(line, delim)
	scales := make([]float64, 0, len(fields))
	perr := func(col int, err error, format string, a ...any) error {
		return &ParseError{File: d.Name, Line: d.HeaderLine, Col: col, Msg: fmt.Sprintf(format, a...), Err: err}
	}
	allNumbers := true
	for _, f := range fields {
		if _, err := strconv.ParseFloat(f.text, 64); err != nil {
			allNumbers = false
		}
	}
	if allNumbers {
		return nil, perr(1, ErrNoHeader, "no header row: this line holds numbers; expected column names such as \"B (T), Rxx (Ohm)\"")
	}
	for _, f := range fields {
		name, unit, off, ok := splitNameUnit(f.text)
		if !ok {
			return nil, perr(f.col, ErrHeader, "bad column header %q: expected \"name\", \"name (unit)\" or \"name [unit]\"", f.text)
		}
		if name == "" {
			return nil, perr(f.col, ErrHeader, "empty column name: expected \"name\", \"name (unit)\" or \"name [unit]\"")
		}
		for _, c := range d.Columns {
			if strings.EqualFold(c.Name, name) {
				return nil, perr(f.col, ErrHeader, "column %q appears twice", name)
			}
		}
		kd, known := knownDim(name)
		c := Column{Name: name, Unit: unit}
		scale := 1.0
		switch {
		case unit != "":
			s, dim, err := parseUnit(unit)
			if err != nil {
				return nil, perr(f.col+off, ErrUnknownUnit, "unknown unit %q in column %q: %v", unit, name, err)
			}
			if known && dim != kd {
				return nil, perr(f.col+off, ErrUnitDim, "unit %q of column %q is %s; expected %s", unit, name, dimKind(dim), dimName(kd))
			}
			scale = s
			c.Dim = dim
		case known:
			c.Dim = kd
		}
		d.Columns = append(d.Columns, c)
		scales = append(scales, scale)
	}
	return scales, nil
}

func (d *Dataset) columnList() string {
	names := make([]string, len(d.Columns))
	for i, c := range d.Columns {
		names[i] = c.Name
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
