package compute

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"io/fs"
	"os"

	"cleave/calc"
	"cleave/calc/library"
	"cleave/calc/transport"
	"cleave/notebook"
	"cleave/notebook/calcblock"
)

// JSONValue is the JSON form of `cleave eval --json`: a number in SI base units, the SI unit,
// the text a calc block would show, and the standard uncertainty in SI (omitted when the
// value carries none). A record (an analysis result, a band result, a front-matter section)
// also carries each of its fields, under the field's name, as a nested object of the same
// form (a list as an array of them); an analysis result's value and unit are those of its
// main field.
type JSONValue struct {
	Value       *float64
	Unit        string
	Display     string
	Uncertainty *float64
	Type        string
	Fields      []JSONField // a record's fields, in order
	Items       []JSONValue // a list's items
}

// JSONField is one named field of a record in JSON form.
type JSONField struct {
	Name  string
	Value JSONValue
}

// reservedJSON are the keys of every JSON value; a field of that name is left out of the
// record's object (it can still be read with EXPR.field).
var reservedJSON = map[string]bool{"value": true, "unit": true, "display": true, "uncertainty": true, "type": true, "items": true}

// MarshalJSON writes the keys in a fixed order: value, unit, display, uncertainty, type, then
// the record's fields or the list's items.
func (j JSONValue) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	put := func(k string, v any) error {
		if b.Len() > 1 {
			b.WriteByte(',')
		}
		kb, _ := json.Marshal(k)
		vb, err := json.Marshal(v)
		if err != nil {
			return err
		}
		b.Write(kb)
		b.WriteByte(':')
		b.Write(vb)
		return nil
	}
	if j.Value != nil {
		if err := put("value", *j.Value); err != nil {
			return nil, err
		}
	}
	_ = put("unit", j.Unit)
	_ = put("display", j.Display)
	if j.Uncertainty != nil {
		if err := put("uncertainty", *j.Uncertainty); err != nil {
			return nil, err
		}
	}
	if j.Type != "" {
		_ = put("type", j.Type)
	}
	for _, f := range j.Fields {
		if reservedJSON[f.Name] {
			continue
		}
		if err := put(f.Name, f.Value); err != nil {
			return nil, err
		}
	}
	if j.Items != nil {
		if err := put("items", j.Items); err != nil {
			return nil, err
		}
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// Eval evaluates one expression. With inFile set (a path to a Markdown file inside the
// notebook rooted at root), the expression sees that entry's fields and its ancestors', and
// every name its calc blocks define; otherwise only constants, materials and functions.
func Eval(root, inFile, expr string) (calc.Value, error) {
	env, err := EvalEnv(root, inFile)
	if err != nil {
		return nil, err
	}
	return env.Eval(expr)
}

// EvalEnv is the environment Eval evaluates in: with inFile, the notebook is loaded once and
// the file's calc lines evaluated, so several expressions can be asked of one entry cheaply.
func EvalEnv(root, inFile string) (*calc.Env, error) {
	if inFile == "" {
		return library.NewEnv(), nil
	}
	return fileEnv(root, inFile)
}

// JSONOf turns a value into its JSON form.
func JSONOf(v calc.Value) JSONValue { return jsonOf(v, 0) }

// maxJSONDepth bounds how deep records and lists are expanded (a band result's profile, a
// scorecard's rows); deeper values keep their display text.
const maxJSONDepth = 4

// maxJSONItems bounds how many items of a list are expanded.
const maxJSONItems = 1000

func jsonOf(v calc.Value, depth int) JSONValue {
	r := JSONValue{Display: calc.Display(v), Type: v.Type()}
	setQ := func(q calc.Quantity) {
		x := q.Q.Value()
		r.Value = &x
		r.Unit = q.Q.Dim().String()
		if q.Q.HasUncertainty() {
			u := q.Q.Uncertainty()
			r.Uncertainty = &u
		}
	}
	switch x := v.(type) {
	case calc.Quantity:
		setQ(x)
		return r
	case *calc.AnalysisResult:
		if m, ok := x.Field(x.Main); ok {
			if q, ok := m.(calc.Quantity); ok {
				setQ(q)
			}
		}
	case calc.List:
		if depth < maxJSONDepth {
			r.Items = []JSONValue{}
			for i, it := range x {
				if i == maxJSONItems {
					break
				}
				r.Items = append(r.Items, jsonOf(it, depth+1))
			}
		}
		return r
	}
	if f, ok := v.(calc.Fielder); ok && depth < maxJSONDepth {
		for _, name := range f.FieldNames() {
			fv, ok := f.Field(name)
			if !ok || fv == nil {
				continue
			}
			r.Fields = append(r.Fields, JSONField{Name: name, Value: jsonOf(fv, depth+1)})
		}
	}
	return r
}

// fileEnv loads the notebook and evaluates every calc line of the file, so that an
// expression sees the names they define.
func fileEnv(root, inFile string) (*calc.Env, error) {
	rel, inside, err := relToRoot(root, inFile)
	if err != nil {
		return nil, err
	}
	if !inside {
		return nil, fmt.Errorf("%s: not inside the notebook at %s", inFile, root)
	}
	fsys := os.DirFS(root)
	nb, err := notebook.Load(fsys)
	if err != nil {
		return nil, err
	}
	f, ok := nb.File(rel)
	if !ok {
		if _, err := fs.Stat(fsys, rel); err != nil {
			return nil, fmt.Errorf("%s: no such file in the notebook", inFile)
		}
		return nil, fmt.Errorf("%s: not a Markdown file of the notebook", inFile)
	}
	return FileEnv(fsys, nb, f)
}

// FileEnv is the environment of the notebook file f once its calc lines have been evaluated in
// order (a failing line leaves its name undefined): what `cleave eval --in` evaluates in.
func FileEnv(fsys fs.FS, nb *notebook.Notebook, f *notebook.File) (*calc.Env, error) {
	env := NewEnv(fsys, nb, f)
	blocks, err := calcblock.Find(f.Source())
	if err != nil {
		return nil, fmt.Errorf("%s: %w", f.Path, err)
	}
	for _, b := range blocks {
		for _, l := range b.Lines {
			env.EvalLine(l.Input(), l.LineNo)
		}
	}
	return env, nil
}

// WriteCSV writes a data-set value (a data file, a symmetrised sweep, a band profile) or a fit
// result's points with its fitted curve (see library.Points) as CSV with `# key: value`
// metadata lines and units in the header, the format data("...") reads.
func WriteCSV(w io.Writer, v calc.Value) error {
	d, err := library.Points(v)
	if err != nil {
		return err
	}
	return transport.WriteCSV(w, d)
}
