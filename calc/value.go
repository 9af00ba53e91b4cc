package calc

import (
	"fmt"
	"strings"

	"cleave/calc/quantity"
)

// Value is the result of evaluating an expression. The kinds built in are [Quantity],
// [String], [List], [Range], [Record], [AnalysisResult] and [DataFile]; other packages add
// their own (data sets, band profiles) by implementing Value. Such an opaque value may also
// implement [Fielder] (for x.name access) and [Displayer] (for its text in a result region).
type Value interface {
	// Type names the kind of value in error messages, e.g. "quantity", "list".
	Type() string
}

// Fielder is implemented by values that have named fields (x.name).
type Fielder interface {
	Field(name string) (Value, bool)
	FieldNames() []string
}

// Displayer is implemented by values that choose their own result-region text.
type Displayer interface {
	Display() string
}

// Quantity is a number with dimension and uncertainty. Unit, when non-nil, is the display
// unit asked for with `-> unit`; arithmetic drops it.
type Quantity struct {
	Q    quantity.Quantity
	Unit *quantity.Unit
}

// String is a string value (used for paths).
type String string

// List is an ordered list of values.
type List []Value

// Range is lo .. hi: two quantities of the same dimension (lo may exceed hi; a sweep
// can run downwards). Unit is an optional display unit.
type Range struct {
	Lo, Hi quantity.Quantity
	Unit   *quantity.Unit
}

// RecordField is one named field of a [Record].
type RecordField struct {
	Name  string
	Value Value
}

// Record is an ordered set of named fields: a front-matter section, a material, or a
// rich function result such as a fit. Path, when set, is the notebook field path the
// record came from ("device", "wafer.layers"); reading one of its fields records the
// dependency "field:<Path>.<name>".
type Record struct {
	Path   string
	Fields []RecordField
}

// Q wraps a quantity.Quantity as a Value.
func Q(q quantity.Quantity) Quantity { return Quantity{Q: q} }

// num wraps a plain dimensionless number.
func num(v float64) Quantity { return Q(quantity.Scalar(v)) }

func (Quantity) Type() string { return "quantity" }
func (String) Type() string   { return "string" }
func (List) Type() string     { return "list" }
func (Range) Type() string    { return "range" }
func (*Record) Type() string  { return "record" }

// Field returns the named field.
func (r *Record) Field(name string) (Value, bool) {
	for _, f := range r.Fields {
		if f.Name == name {
			return f.Value, true
		}
	}
	return nil, false
}

// FieldNames returns the field names in order.
func (r *Record) FieldNames() []string {
	out := make([]string, len(r.Fields))
	for i, f := range r.Fields {
		out[i] = f.Name
	}
	return out
}

// NewRecord builds a record from alternating names and values; it panics (a programmer
// error) when the arguments do not alternate string, Value.
func NewRecord(path string, kv ...any) *Record {
	if len(kv)%2 != 0 {
		panic("calc: NewRecord needs name, value pairs")
	}
	r := &Record{Path: path}
	for i := 0; i < len(kv); i += 2 {
		name, ok1 := kv[i].(string)
		v, ok2 := kv[i+1].(Value)
		if !ok1 || !ok2 {
			panic(fmt.Sprintf("calc: NewRecord pair %d is %T, %T; want string, Value", i/2, kv[i], kv[i+1]))
		}
		r.Fields = append(r.Fields, RecordField{Name: name, Value: v})
	}
	return r
}

// DataFile is what [Env.OpenData] returns when the Env has no [DataLoader]: the file's slash
// path inside the notebook, its content hash and size.
type DataFile struct {
	Path string // slash path relative to the notebook root
	Hash string // "sha256:<hex>"
	Size int
}

func (*DataFile) Type() string { return "data file" }

// Display shows the path and a short hash.
func (d *DataFile) Display() string {
	h := d.Hash
	if len(h) > 19 {
		h = h[:19]
	}
	return fmt.Sprintf("data(%s) %d bytes %s", quoteString(d.Path), d.Size, h)
}

// Field gives path, hash and size.
func (d *DataFile) Field(name string) (Value, bool) {
	switch name {
	case "path":
		return String(d.Path), true
	case "hash":
		return String(d.Hash), true
	case "size":
		return num(float64(d.Size)), true
	}
	return nil, false
}

// FieldNames lists path, hash and size.
func (d *DataFile) FieldNames() []string { return []string{"path", "hash", "size"} }

// AnalysisResult is the outcome of an analysis or another rich function: named fields
// (values with uncertainties, the parameters and points used), the sanity checks that
// failed, and which fields its result region shows. A later line reads its fields
// (`hall.n`, `lk.mass`, `fit.warnings`).
type AnalysisResult struct {
	Kind     string   // the function that made it, e.g. "hall_density"
	Main     string   // the field displayed first
	Extra    []string // further fields displayed after it
	Rec      *Record
	Warnings []string
	// Detail, when set, is the Go value the function computed, for another function that
	// combines results (compare_densities reads the Hall and SdH fits). The language never
	// looks at it.
	Detail any
}

// Type implements Value: "<kind> result".
func (r *AnalysisResult) Type() string { return r.Kind + " result" }

// Field implements Fielder; `warnings` lists the sanity checks that failed.
func (r *AnalysisResult) Field(name string) (Value, bool) {
	if name == "warnings" {
		l := List{}
		for _, w := range r.Warnings {
			l = append(l, String(w))
		}
		return l, true
	}
	return r.Rec.Field(name)
}

// FieldNames implements Fielder.
func (r *AnalysisResult) FieldNames() []string { return append(r.Rec.FieldNames(), "warnings") }

// Display shows the main value (`n = ...`, or a text field as it is), the extra fields
// (`frequency ...`) and every warning (`; warning: ...`).
func (r *AnalysisResult) Display() string {
	var parts []string
	for i, name := range append([]string{r.Main}, r.Extra...) {
		v, ok := r.Rec.Field(name)
		if !ok {
			continue
		}
		if s, ok := v.(String); ok && i == 0 {
			parts = append(parts, string(s))
		} else if i == 0 {
			parts = append(parts, name+" = "+Display(v))
		} else if s, ok := v.(String); ok {
			parts = append(parts, string(s))
		} else {
			parts = append(parts, name+" "+Display(v))
		}
	}
	s := strings.Join(parts, ", ")
	for _, w := range r.Warnings {
		s += "; warning: " + w
	}
	return s
}

// NameText is a value read as a name (a probe, a side, a column): text as it is, a bare
// number as written (probe "2" may be written 2), anything else as displayed, nil as "".
func NameText(v Value) string {
	switch x := v.(type) {
	case nil:
		return ""
	case String:
		return string(x)
	case Quantity:
		if x.Q.Dim().IsDimensionless() {
			return fmt.Sprint(x.Q.Value())
		}
	}
	return Display(v)
}

// Display renders a value as it appears in a result region:
//   - quantities with quantity.Format (the trade's customary unit, significant figures
//     following the uncertainty), or quantity.FormatIn when a display unit was asked for;
//   - strings quoted; lists as [a, b]; ranges as lo .. hi;
//   - records compactly as name=value, name=value (nested records in braces);
//   - other values by their Display method, or <type>.
func Display(v Value) string {
	switch v := v.(type) {
	case nil:
		return ""
	case Quantity:
		return displayQuantity(v.Q, v.Unit)
	case String:
		return quoteString(string(v))
	case List:
		parts := make([]string, len(v))
		for i, e := range v {
			parts[i] = Display(e)
		}
		return "[" + strings.Join(parts, ", ") + "]"
	case Range:
		return displayQuantity(v.Lo, v.Unit) + " .. " + displayQuantity(v.Hi, v.Unit)
	case *Record:
		parts := make([]string, len(v.Fields))
		for i, f := range v.Fields {
			s := Display(f.Value)
			if _, ok := f.Value.(*Record); ok {
				s = "{" + s + "}"
			}
			parts[i] = f.Name + "=" + s
		}
		return strings.Join(parts, ", ")
	case Displayer:
		return v.Display()
	}
	return "<" + v.Type() + ">"
}

func displayQuantity(q quantity.Quantity, u *quantity.Unit) string {
	if u != nil {
		if s, err := quantity.FormatIn(q, *u); err == nil {
			return s
		}
	}
	return quantity.Format(q)
}
