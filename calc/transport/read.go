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
	rd := &lineReader{br: bufio.NewReaderSize(io.TeeReader(r, h), 1<<16)}
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
		col := 0
		pos := 0
		if delim == ' ' {
			pos = i
		}
		for {
			// Find the end of the field.
			var field []byte
			start := pos
			if delim == ' ' {
				for pos < len(line) && line[pos] != ' ' && line[pos] != '\t' {
					pos++
				}
				field = line[start:pos]
			} else {
				k := bytes.IndexByte(line[pos:], delim)
				if k < 0 {
					pos = len(line)
				} else {
					pos += k
				}
				field = line[start:pos]
			}
			if col >= ncol {
				return nil, &ParseError{File: name, Line: rd.n, Col: start + 1,
					Msg: fmt.Sprintf("too many fields: expected %d (%s)", ncol, d.columnList()), Err: ErrColumnCount}
			}
			v, ferr := parseField(field)
			if ferr != "" {
				return nil, &ParseError{File: name, Line: rd.n, Col: start + 1 + leadingSpace(field),
					Msg: fmt.Sprintf("bad number %q in column %q: %s", bytes.TrimSpace(field), d.Columns[col].Name, ferr), Err: ErrNumber}
			}
			if s := scales[col]; s != 1 {
				v *= s
			}
			d.Columns[col].Values = append(d.Columns[col].Values, v)
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
			// Roll back the partial row so the columns stay aligned (the error
			// is returned anyway, but keep the invariant cheap and obvious).
			return nil, &ParseError{File: name, Line: rd.n, Col: len(line) + 1,
				Msg: fmt.Sprintf("too few fields: got %d, expected %d (%s)", col, ncol, d.columnList()), Err: ErrColumnCount}
		}
	}
	d.Hash = "sha256:" + hex.EncodeToString(h.Sum(nil))
	return d, nil
}

// lineReader yields lines without their terminator ("\n" or "\r\n") and counts them.
type lineReader struct {
	br   *bufio.Reader
	buf  []byte // used only for lines longer than the bufio buffer
	n    int    // number of lines returned so far (the 1-based number of the last one)
	long bool
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
		kd, kunit, known := knownDim(name)
		c := Column{Name: name, Unit: unit}
		scale := 1.0
		switch {
		case unit != "":
			s, dim, err := parseUnit(unit)
			if err != nil {
				return nil, perr(f.col+off, ErrUnknownUnit, "unknown unit %q in column %q: %v", unit, name, err)
			}
			if known && dim != kd {
				return nil, perr(f.col+off, ErrUnitDim, "unit %q of column %q has dimension %v; expected a unit of %v such as %s", unit, name, dim, kd, kunit)
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
