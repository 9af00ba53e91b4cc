package transport

import (
	"errors"
	"fmt"
	"slices"
	"strings"

	"cleave/calc/quantity"
)

// KV is one metadata line of a data file: "# key: value" before the header row.
// A comment line without a colon is kept with an empty Key and the text in Value.
type KV struct {
	Key, Value string
}

// Column is one named column of a data set. Values are in coherent SI units:
// a header "B (mT)" yields values in tesla, "Rxx (kOhm)" in ohm. Missing values
// (an empty field or NaN in the file) are stored as NaN so that all columns of a
// data set keep the same length; the analyses drop NaN points pair-wise (see the
// package documentation).
type Column struct {
	Name   string       // the column name as written, without a bracketed unit ("field_T", "Magnetic Field")
	Unit   string       // the unit as written in the header, taken from a suffix ("_T") or given by a layout; "" when none
	Dim    quantity.Dim // the SI dimension of Values
	Values []float64    // SI values, NaN where the file had no number (every row of a text column)
	// Role is the canonical name the analyses look the column up by (RoleField "B",
	// RoleRxx "Rxx", ...), from the column's name or a layout; "" when it has none.
	Role string
	// Stem is the name without a unit suffix ("field" for "field_T"); "" when the name has none.
	Stem string
	// HeaderCol is the 1-based byte column of the column's name in the header row (0 when
	// unknown), for messages about the column.
	HeaderCol int
	// Text holds the labels of a text column (a sweep direction "up"/"down", a
	// comment), one per row; nil for a numeric column.
	Text []string
}

// IsText reports whether the column holds labels rather than numbers.
func (c *Column) IsText() bool { return c.Text != nil }

// Dataset is one measurement file read into memory.
type Dataset struct {
	Name       string   // the file name used in error messages
	Hash       string   // "sha256:" followed by the lowercase hex SHA-256 of the raw bytes read
	Meta       []KV     // "# key: value" lines before the header, in file order
	Columns    []Column // in header order
	HeaderLine int      // 1-based line of the header row; 0 for a data set built in memory
	Layout     string   // the name of the layout it was read with; "" when sniffed
	// FieldOffset is the field offset applied to the field column (T; see WithFieldOffset).
	FieldOffset float64
}

// WithFieldOffset returns a copy of d whose field column (found as Col("B") finds it)
// reads B + offset, for a magnet whose true field is offset when it reads zero (a
// remanent field). The copy shares every other column with d and records the offset in
// FieldOffset (added to any applied before). Without a field column, or with a zero
// offset, it returns d itself.
func (d *Dataset) WithFieldOffset(offset float64) *Dataset {
	c, err := d.Col(RoleField)
	if err != nil || offset == 0 {
		return d
	}
	out := *d
	out.Columns = slices.Clone(d.Columns)
	for i := range out.Columns {
		if &d.Columns[i] == c {
			v := make([]float64, len(c.Values))
			for k, b := range c.Values {
				v[k] = b + offset
			}
			out.Columns[i].Values = v
		}
	}
	out.FieldOffset += offset
	return &out
}

// Len returns the number of rows (the common length of all columns).
func (d *Dataset) Len() int {
	if len(d.Columns) == 0 {
		return 0
	}
	return len(d.Columns[0].Values)
}

// Col returns the column whose name matches name case-insensitively, else the one
// whose name without its unit suffix does ("field" for "field_T"), else the one with that
// role ("B" finds "Magnetic Field (T)"). If there is none, the error is a *ParseError at
// the header row that lists the available column names; errors.Is(err,
// ErrUnknownColumn) holds.
func (d *Dataset) Col(name string) (*Column, error) {
	for i := range d.Columns {
		if strings.EqualFold(d.Columns[i].Name, name) {
			return &d.Columns[i], nil
		}
	}
	for i := range d.Columns {
		if d.Columns[i].Stem != "" && strings.EqualFold(d.Columns[i].Stem, name) {
			return &d.Columns[i], nil
		}
	}
	for i := range d.Columns {
		if d.Columns[i].Role != "" && strings.EqualFold(d.Columns[i].Role, name) {
			return &d.Columns[i], nil
		}
	}
	names := make([]string, len(d.Columns))
	for i, c := range d.Columns {
		names[i] = c.Name
	}
	line := d.HeaderLine
	if line == 0 {
		line = 1
	}
	return nil, &ParseError{File: d.Name, Line: line, Col: 1,
		Msg: fmt.Sprintf("no column %q; available: %s", name, strings.Join(names, ", ")),
		Err: ErrUnknownColumn}
}

// MetaValue returns the value of the first metadata entry whose key matches key
// case-insensitively, and whether there was one.
func (d *Dataset) MetaValue(key string) (string, bool) {
	for _, kv := range d.Meta {
		if strings.EqualFold(kv.Key, key) {
			return kv.Value, true
		}
	}
	return "", false
}

// Sentinel errors. Every error returned by this package that concerns the
// content of a file wraps one of them, so callers can branch with errors.Is.
var (
	ErrNoHeader      = errors.New("no header row")
	ErrColumnCount   = errors.New("wrong number of fields")
	ErrNumber        = errors.New("bad number")
	ErrUnknownUnit   = errors.New("unknown unit")
	ErrUnitDim       = errors.New("unit of the wrong dimension")
	ErrUnknownColumn = errors.New("unknown column")
	ErrHeader        = errors.New("bad header")
	ErrTooFewPoints  = errors.New("too few points")
	ErrNoField       = errors.New("field range not covered")
	ErrBadArgument   = errors.New("bad argument")
)

// ParseError reports a problem at a position in a data file. Line and Col are
// 1-based; Col counts bytes from the start of the line. It prints as
// "file:line:col: message", like the Go compiler's messages.
type ParseError struct {
	File      string
	Line, Col int
	Msg       string
	Err       error // the sentinel this error wraps (ErrNumber, ErrUnknownUnit, ...)
}

func (e *ParseError) Error() string {
	return fmt.Sprintf("%s:%d:%d: %s", e.File, e.Line, e.Col, e.Msg)
}

// Unwrap returns the sentinel error that classifies e.
func (e *ParseError) Unwrap() error { return e.Err }
