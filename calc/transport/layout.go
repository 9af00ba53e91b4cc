package transport

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"

	"cleave/calc/quantity"

	"go.yaml.in/yaml/v3"
)

// Layout describes how one kind of data file is written, for files that [Read]'s
// sniffing does not understand on its own: which lines are comments, the
// delimiter and decimal mark, which line holds the column names, what each
// column is (its role and unit), which columns to ignore, and which columns to
// derive (a resistance from a voltage and a current). A notebook keeps its
// layouts as YAML files, one per layout, and [ParseLayout] reads one; the format
// is in the package documentation.
type Layout struct {
	Name   string // the layout's name, for messages
	Source string // the file it was read from, for messages ("layouts/lockin-tsv.yaml")

	Comments  []string // comment prefixes; nil means the defaults of Read
	Delimiter byte     // 0: sniffed from the header row; ' ' means runs of blanks
	Decimal   byte     // '.' (default) or ','
	// Header is the 1-based line of the column names: 0 means the first line that
	// is not blank or a comment; HeaderNone means the file has none and Names
	// gives the columns.
	Header int
	Names  []string

	Columns []ColumnSpec // what the named columns of the file are
	Ignore  []string     // columns dropped without being read
	Derive  []Derived    // columns computed after reading

	// Excitation is the excitation current (A) that a derived column with
	// `current: excitation` divides by; the caller fills it in from the
	// cooldown's record before reading (see UsesExcitation).
	Excitation float64
}

// HeaderNone is Layout.Header for files without a row of column names.
const HeaderNone = -1

// ColumnSpec says what one column of a file is: its role and, when the file
// does not say, its unit.
type ColumnSpec struct {
	File string // the column's name in the file (header text, or the name without a bracketed unit)
	Role string // a role (RoleField ...), or ""
	Unit string // the unit when the header gives none, or ""
	Pos  Pos    // where the layout names it
}

// Derived is a column computed from others: R = V/I (a resistance from a
// voltage and a current), for the in-phase X channel of a lock-in and, when Y
// is given, its out-of-phase channel (a column named Name + "_Y").
type Derived struct {
	Name string // the new column ("Rxx"); its role when Name is one
	X, Y string // voltage columns (Y optional)
	// The current: a column (CurrentCol), a fixed value in A (CurrentValue), or
	// the cooldown's recorded excitation current (FromExcitation).
	CurrentCol     string
	CurrentValue   float64
	FromExcitation bool
	Gain           float64 // the voltages are divided by this preamplifier gain (1 when not given)
	Pos            Pos
}

// Pos is a 1-based line and column in a layout file.
type Pos struct{ Line, Col int }

// UsesExcitation reports whether a derived column divides by the cooldown's
// excitation current, which the caller must then put in Excitation.
func (l *Layout) UsesExcitation() bool {
	for _, d := range l.Derive {
		if d.FromExcitation {
			return true
		}
	}
	return false
}

// ErrLayout is wrapped by every error about a layout file.
var ErrLayout = errors.New("bad layout")

// defaultComments are the comment prefixes Read recognises without a layout:
// the usual ones of measurement scripts and instrument exports (common
// practice). A ';' line after the header is a comment only when ';' is not the
// delimiter.
var defaultComments = []string{"#", "%", ";", "//", "!"}

var layoutNameRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]*$`)

// ValidLayoutName reports whether name can name a layout: letters, digits, '.',
// '_' and '-', starting with a letter or digit (no folders).
func ValidLayoutName(name string) bool { return layoutNameRE.MatchString(name) && len(name) <= 100 }

// ParseLayout reads a layout from YAML. source names the file in errors, which
// are "source:line:col: message" wrapping ErrLayout. The keys:
//
//	note: free text
//	comments: ["%", "#"]        # comment prefixes (default # % ; // !)
//	delimiter: tab              # tab, comma, semicolon, space or one character (default: sniffed)
//	decimal: point              # point or comma
//	header: 3                   # the line of column names: first (default), none, or a line number
//	names: [B, X1, Y1]          # the columns, with header: none
//	columns:                    # what the file's columns are
//	  "Magnetic Field (T)": B   # a role
//	  X1: {unit: V}             # a unit the file does not give
//	  T_mc: {role: T, unit: mK}
//	ignore: [time, comment]     # columns not read
//	derive:                     # R = V/I
//	  Rxx: {x: X1, y: Y1, current: I_meas}
//	  Rxy: {x: X2, current: excitation, gain: 100}
func ParseLayout(source string, b []byte) (*Layout, error) {
	l := &Layout{Source: source, Decimal: '.'}
	name := source
	if i := strings.LastIndexByte(name, '/'); i >= 0 {
		name = name[i+1:]
	}
	l.Name = strings.TrimSuffix(strings.TrimSuffix(name, ".yaml"), ".yml")
	fail := func(n *yaml.Node, format string, a ...any) error {
		line, col := 1, 1
		if n != nil && n.Line > 0 {
			line, col = n.Line, n.Column
		}
		return &ParseError{File: source, Line: line, Col: col, Msg: fmt.Sprintf(format, a...), Err: ErrLayout}
	}
	var doc yaml.Node
	if err := decodeLayoutYAML(b, &doc); err != nil {
		msg := strings.TrimPrefix(err.Error(), "yaml: ")
		line := 1
		if m := yamlLineRE.FindStringSubmatch(msg); m != nil {
			line, _ = strconv.Atoi(m[1])
			msg = m[2]
			if strings.HasPrefix(msg, "did not find expected") {
				line++ // the YAML parser (not its scanner) counts lines from 0
			}
		}
		return nil, &ParseError{File: source, Line: max(line, 1), Col: 1, Msg: "YAML syntax error: " + msg, Err: ErrLayout}
	}
	if len(doc.Content) == 0 {
		return nil, fail(nil, "empty layout: expected keys such as `delimiter:`, `columns:` and `derive:`")
	}
	m := doc.Content[0]
	if m.Kind != yaml.MappingNode {
		return nil, fail(m, "a layout is a map of keys (comments, delimiter, decimal, header, names, columns, ignore, derive)")
	}
	seen := map[string]bool{}
	var columnsNode, deriveNode *yaml.Node
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := m.Content[i], m.Content[i+1]
		if seen[k.Value] {
			return nil, fail(k, "key `%s` repeated", k.Value)
		}
		seen[k.Value] = true
		switch k.Value {
		case "note":
		case "comments":
			list, err := stringList(v)
			if err != nil {
				return nil, fail(v, "comments: %v", err)
			}
			for _, c := range list {
				if c == "" || strings.ContainsAny(c, " \t") {
					return nil, fail(v, "comments: %q: expected a prefix such as \"#\" or \"%%\" without blanks", c)
				}
			}
			l.Comments = list
		case "delimiter":
			d, ok := delimiterNames[strings.ToLower(v.Value)]
			if !ok && v.Kind == yaml.ScalarNode && len(v.Value) == 1 && v.Value[0] > ' ' && v.Value[0] < 0x7f && !strings.ContainsAny(v.Value, ".0123456789+-eE\"") {
				d, ok = v.Value[0], true
			}
			if !ok || v.Kind != yaml.ScalarNode {
				return nil, fail(v, "delimiter: expected tab, comma, semicolon, space or one punctuation character, found %q", v.Value)
			}
			l.Delimiter = d
		case "decimal":
			switch strings.ToLower(v.Value) {
			case "point", ".":
				l.Decimal = '.'
			case "comma", ",":
				l.Decimal = ','
			default:
				return nil, fail(v, "decimal: expected point or comma, found %q", v.Value)
			}
		case "header":
			switch strings.ToLower(v.Value) {
			case "first":
				l.Header = 0
			case "none":
				l.Header = HeaderNone
			default:
				n, err := strconv.Atoi(v.Value)
				if err != nil || n < 1 || n > 10000 || v.Kind != yaml.ScalarNode {
					return nil, fail(v, "header: expected first, none or the line number of the column names (1–10000), found %q", v.Value)
				}
				l.Header = n
			}
		case "names":
			list, err := stringList(v)
			if err != nil {
				return nil, fail(v, "names: %v", err)
			}
			l.Names = list
		case "columns":
			columnsNode = v
		case "ignore":
			list, err := stringList(v)
			if err != nil {
				return nil, fail(v, "ignore: %v", err)
			}
			l.Ignore = list
		case "derive":
			deriveNode = v
		default:
			return nil, fail(k, "unknown key `%s`: expected note, comments, delimiter, decimal, header, names, columns, ignore or derive", k.Value)
		}
	}
	if l.Decimal == ',' && l.Delimiter == ',' {
		return nil, fail(m, "decimal: comma needs another delimiter (tab, semicolon or space)")
	}
	if l.Header == HeaderNone && len(l.Names) == 0 {
		return nil, fail(m, "header: none needs `names:`, the column names in file order")
	}
	if l.Header != HeaderNone && len(l.Names) > 0 {
		return nil, fail(m, "names: only with `header: none` (the file's header row names the columns)")
	}
	if columnsNode != nil {
		if columnsNode.Kind != yaml.MappingNode {
			return nil, fail(columnsNode, "columns: expected a map from the file's column names to a role or {role, unit}")
		}
		for i := 0; i+1 < len(columnsNode.Content); i += 2 {
			k, v := columnsNode.Content[i], columnsNode.Content[i+1]
			spec := ColumnSpec{File: strings.TrimSpace(k.Value), Pos: Pos{k.Line, k.Column}}
			if spec.File == "" {
				return nil, fail(k, "columns: empty column name")
			}
			for _, c := range l.Columns {
				if strings.EqualFold(c.File, spec.File) {
					return nil, fail(k, "columns: %q appears twice", spec.File)
				}
			}
			switch v.Kind {
			case yaml.ScalarNode:
				spec.Role = v.Value
			case yaml.MappingNode:
				for j := 0; j+1 < len(v.Content); j += 2 {
					kk, vv := v.Content[j], v.Content[j+1]
					if vv.Kind != yaml.ScalarNode {
						return nil, fail(vv, "columns: %s: %s: expected a text", spec.File, kk.Value)
					}
					switch kk.Value {
					case "role":
						spec.Role = vv.Value
					case "unit":
						spec.Unit = vv.Value
					default:
						return nil, fail(kk, "columns: %s: unknown key `%s`: expected role or unit", spec.File, kk.Value)
					}
				}
			default:
				return nil, fail(v, "columns: %s: expected a role such as B or {role: T, unit: mK}", spec.File)
			}
			var ri roleInfo
			if spec.Role != "" {
				r, ok := lookupRole(spec.Role)
				if !ok {
					return nil, fail(v, "columns: %s: unknown role %q: expected one of %s", spec.File, spec.Role, roleNames())
				}
				spec.Role, ri = r.name, r
			}
			if spec.Unit != "" {
				_, dim, err := parseUnit(spec.Unit)
				if err != nil {
					return nil, fail(v, "columns: %s: unknown unit %q: %v", spec.File, spec.Unit, unitMsg(err))
				}
				if ri.text {
					return nil, fail(v, "columns: %s: the role %s holds labels and takes no unit", spec.File, ri.name)
				}
				if spec.Role != "" && dim != ri.dim {
					return nil, fail(v, "columns: %s: unit %q is %s, but the role %s needs %s", spec.File, spec.Unit, dimKind(dim), ri.name, dimName(ri.dim))
				}
			}
			if spec.Role == "" && spec.Unit == "" {
				return nil, fail(v, "columns: %s: give a role, a unit or both", spec.File)
			}
			l.Columns = append(l.Columns, spec)
		}
	}
	if deriveNode != nil {
		if err := l.parseDerive(deriveNode, fail); err != nil {
			return nil, err
		}
	}
	return l, nil
}

var delimiterNames = map[string]byte{
	"tab": '\t', "\t": '\t', "comma": ',', ",": ',', "semicolon": ';', ";": ';', "space": ' ', "blank": ' ', "blanks": ' ', "whitespace": ' ',
}

var identRE = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9_]*$`)

func (l *Layout) parseDerive(n *yaml.Node, fail func(*yaml.Node, string, ...any) error) error {
	if n.Kind != yaml.MappingNode {
		return fail(n, "derive: expected a map from a new column's name to {x, y, current}")
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		k, v := n.Content[i], n.Content[i+1]
		d := Derived{Name: k.Value, Gain: 1, Pos: Pos{k.Line, k.Column}}
		if !identRE.MatchString(d.Name) {
			return fail(k, "derive: %q: a new column's name is letters, digits and '_', such as Rxx", d.Name)
		}
		if r, ok := lookupRole(d.Name); ok && r.dim != DimResistance {
			return fail(k, "derive: %s: a derived column is a resistance (V/I); the role %s needs %s", d.Name, r.name, dimName(r.dim))
		}
		for _, o := range l.Derive {
			if strings.EqualFold(o.Name, d.Name) {
				return fail(k, "derive: %s appears twice", d.Name)
			}
		}
		if v.Kind != yaml.MappingNode {
			return fail(v, "derive: %s: expected {x: VOLTAGE, y: VOLTAGE, current: CURRENT}", d.Name)
		}
		var curNode *yaml.Node
		for j := 0; j+1 < len(v.Content); j += 2 {
			kk, vv := v.Content[j], v.Content[j+1]
			if vv.Kind != yaml.ScalarNode || strings.TrimSpace(vv.Value) == "" {
				return fail(vv, "derive: %s: %s: expected a column name or value", d.Name, kk.Value)
			}
			val := strings.TrimSpace(vv.Value)
			switch kk.Value {
			case "x", "voltage":
				d.X = val
			case "y":
				d.Y = val
			case "current":
				curNode = vv
				switch {
				case strings.EqualFold(val, "excitation"):
					d.FromExcitation = true
				case startsNumber(val):
					q, err := quantity.ParseQuantity(val)
					if err != nil || q.Dim() != DimCurrent || !(q.Value() > 0) || math.IsInf(q.Value(), 0) {
						return fail(vv, "derive: %s: current %q: expected a positive current such as 10 nA, a current column, or excitation", d.Name, val)
					}
					d.CurrentValue = q.Value()
				default:
					d.CurrentCol = val
				}
			case "gain":
				g, err := strconv.ParseFloat(val, 64)
				if err != nil || !(g > 0) || math.IsInf(g, 0) {
					return fail(vv, "derive: %s: gain %q: expected a positive number (the preamplifier's voltage gain)", d.Name, val)
				}
				d.Gain = g
			default:
				return fail(kk, "derive: %s: unknown key `%s`: expected x, y, current or gain", d.Name, kk.Value)
			}
		}
		if d.X == "" {
			return fail(v, "derive: %s: no `x:` (the in-phase voltage column)", d.Name)
		}
		if curNode == nil {
			return fail(v, "derive: %s: no `current:` (a current column, a value such as 10 nA, or excitation for the cooldown's excitation current)", d.Name)
		}
		l.Derive = append(l.Derive, d)
	}
	return nil
}

func startsNumber(s string) bool {
	return s != "" && (s[0] >= '0' && s[0] <= '9' || s[0] == '.' || s[0] == '+' || s[0] == '-')
}

func stringList(n *yaml.Node) ([]string, error) {
	switch n.Kind {
	case yaml.ScalarNode:
		return []string{n.Value}, nil
	case yaml.SequenceNode:
		out := make([]string, 0, len(n.Content))
		for _, c := range n.Content {
			if c.Kind != yaml.ScalarNode {
				return nil, errors.New("expected a list of texts")
			}
			out = append(out, c.Value)
		}
		return out, nil
	}
	return nil, errors.New("expected a list of texts")
}

// unitMsg is the reason of a unit error without the repeated unit text.
func unitMsg(err error) string {
	var ue *quantity.UnitError
	if errors.As(err, &ue) {
		return ue.Msg
	}
	return err.Error()
}

var yamlLineRE = regexp.MustCompile(`^line (\d+): (.*)$`)

// decodeLayoutYAML decodes into a node, turning a panic inside the YAML library into an
// error so that a bad layout can never crash a run.
func decodeLayoutYAML(b []byte, n *yaml.Node) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("yaml: cannot parse: %v", r)
		}
	}()
	if len(b) > 1<<20 {
		return errors.New("yaml: layout file larger than 1 MB")
	}
	return yaml.Unmarshal(b, n)
}

// derive computes the layout's derived columns: R = (V/gain)/I for X and, when
// given, Y (a column Name+"_Y"). A missing current or a current of 0 gives NaN.
func (d *Dataset) derive(l *Layout) error {
	lerr := func(p Pos, format string, a ...any) error {
		return &ParseError{File: l.Source, Line: max(p.Line, 1), Col: max(p.Col, 1), Msg: fmt.Sprintf(format, a...), Err: ErrLayout}
	}
	for _, dv := range l.Derive {
		volt := func(what, name string) ([]float64, error) {
			c, err := d.Col(name)
			if err != nil {
				return nil, lerr(dv.Pos, "derive: %s: %s: no column %q in %s (its columns: %s)", dv.Name, what, name, d.Name, d.names())
			}
			if c.IsText() {
				return nil, lerr(dv.Pos, "derive: %s: %s: column %q holds text, not a voltage", dv.Name, what, c.Name)
			}
			if c.Unit != "" && c.Dim != DimVoltage {
				return nil, lerr(dv.Pos, "derive: %s: %s: column %q is in %s, %s; expected a voltage (V)", dv.Name, what, c.Name, c.Unit, dimKind(c.Dim))
			}
			if c.Unit == "" && c.Dim != DimVoltage && c.Dim != (quantity.Dim{}) {
				return nil, lerr(dv.Pos, "derive: %s: %s: column %q is %s; expected a voltage (V)", dv.Name, what, c.Name, dimName(c.Dim))
			}
			return c.Values, nil
		}
		x, err := volt("x", dv.X)
		if err != nil {
			return err
		}
		var y []float64
		if dv.Y != "" {
			if y, err = volt("y", dv.Y); err != nil {
				return err
			}
		}
		var cur []float64
		fixed := dv.CurrentValue
		switch {
		case dv.CurrentCol != "":
			c, err := d.Col(dv.CurrentCol)
			if err != nil {
				return lerr(dv.Pos, "derive: %s: current: no column %q in %s (its columns: %s)", dv.Name, dv.CurrentCol, d.Name, d.names())
			}
			if c.IsText() || (c.Unit != "" || c.Dim != (quantity.Dim{})) && c.Dim != DimCurrent {
				return lerr(dv.Pos, "derive: %s: current: column %q is %s; expected a current (A)", dv.Name, c.Name, dimName(c.Dim))
			}
			cur = c.Values
		case dv.FromExcitation:
			if !(l.Excitation > 0) {
				return lerr(dv.Pos, "derive: %s: current: excitation needs the cooldown's excitation current (record `excitation: {current: 10 nA}` in the cooldown)", dv.Name)
			}
			fixed = l.Excitation
		}
		ratio := func(v []float64) []float64 {
			out := make([]float64, len(v))
			for i, u := range v {
				i0 := fixed
				if cur != nil {
					i0 = cur[i]
				}
				if i0 == 0 || math.IsNaN(i0) {
					out[i] = math.NaN()
					continue
				}
				out[i] = u / dv.Gain / i0
			}
			return out
		}
		add := func(name string, vals []float64) error {
			for _, c := range d.Columns {
				if strings.EqualFold(c.Name, name) {
					return lerr(dv.Pos, "derive: %s: %s already has a column %q", dv.Name, d.Name, c.Name)
				}
			}
			role := ""
			if r, ok := lookupRole(name); ok {
				role = r.name
				for i := range d.Columns {
					if strings.EqualFold(d.Columns[i].Role, role) {
						d.Columns[i].Role = "" // the derived column takes the role
					}
				}
			}
			d.Columns = append(d.Columns, Column{Name: name, Unit: "Ohm", Dim: DimResistance, Values: vals, Role: role})
			return nil
		}
		if err := add(dv.Name, ratio(x)); err != nil {
			return err
		}
		if y != nil {
			if err := add(dv.Name+"_Y", ratio(y)); err != nil {
				return err
			}
		}
	}
	return nil
}

// names lists the data set's column names for messages.
func (d *Dataset) names() string {
	names := make([]string, len(d.Columns))
	for i, c := range d.Columns {
		names[i] = c.Name
	}
	return strings.Join(names, ", ")
}
