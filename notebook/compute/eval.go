package compute

import (
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

// Result is the JSON form of `cleave eval --json`: a number in SI base units, the SI unit,
// the text a calc block would show, and the standard uncertainty in SI (omitted when the
// value carries none).
type Result struct {
	Value       *float64 `json:"value,omitempty"`
	Unit        string   `json:"unit"`
	Display     string   `json:"display"`
	Uncertainty *float64 `json:"uncertainty,omitempty"`
	Type        string   `json:"type,omitempty"`
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

// ResultOf turns a value into its JSON form.
func ResultOf(v calc.Value) Result {
	r := Result{Display: calc.Display(v), Type: v.Type()}
	if q, ok := v.(calc.Quantity); ok {
		x := q.Q.Value()
		r.Value = &x
		r.Unit = q.Q.Dim().String()
		if q.Q.HasUncertainty() {
			u := q.Q.Uncertainty()
			r.Uncertainty = &u
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
	env := NewEnv(fsys, nb, f)
	blocks, err := calcblock.Find(f.Src)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", f.Path, err)
	}
	for _, b := range blocks {
		for _, l := range b.Lines {
			env.EvalLine(l.Code, l.LineNo) // a failing line leaves its name undefined
		}
	}
	return env, nil
}

// WriteCSV writes a data-set value (a data file, a symmetrised sweep, a band profile) as CSV
// with `# key: value` metadata lines and units in the header, the format data("...") reads.
func WriteCSV(w io.Writer, v calc.Value) error {
	d, ok := v.(*library.DataSet)
	if !ok {
		return fmt.Errorf("--csv needs a data set (data(\"...\"), symmetrize(...), a band profile), found a %s", v.Type())
	}
	return transport.WriteCSV(w, d.D)
}
