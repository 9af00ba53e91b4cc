package library

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"path"
	"sort"
	"strings"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// dataFuncs read measurement files and prepare sweeps: data("path") (through the Env's data
// loader, [ReadData] in an Env from [NewEnv]), symmetrisation over ±B, the value of a column
// at zero field, and the sanity checks of a raw sweep. The reader and the methods are in
// calc/transport.
func dataFuncs() []calc.Func {
	return []calc.Func{
		{Name: "data", Doc: "a data file, by a path relative to the entry's folder inside the notebook; layout= names a file layout of the notebook's layouts/ folder (default: the layout the cooldown's data entry names, else sniffed); offset= is the true field when the magnet reads zero, added to the field column (default: the cooldown's magnet.offset)",
			Params: []calc.Param{{Name: "path"}, {Name: "layout", Default: calc.String("")}, {Name: "offset", Default: calc.String("none")}},
			Call:   dataCall},
		{Name: "zero_field",
			Doc:    "a column's value at B = 0, by a local low-order fit over the points nearest zero field",
			Params: []calc.Param{{Name: "d"}, {Name: "column", Default: calc.String("Rxx")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				d, err := dataArg(a, 0)
				if err != nil {
					return nil, err
				}
				col, err := strArg(a, 1)
				if err != nil {
					return nil, err
				}
				z, err := transport.ZeroField(d, col)
				if err != nil {
					return nil, err
				}
				c, err := d.Col(col)
				if err != nil {
					return nil, err
				}
				return est(z.Value, c.Dim), nil
			}},
		{Name: "symmetrize",
			Doc:    "the data set over |B| with R_xx symmetrised and R_xy antisymmetrised from sweeps over +B and -B (with y=: only that column, symmetrised)",
			Params: []calc.Param{{Name: "d"}, {Name: "y", Default: calc.String("")}, {Name: "x", Default: calc.String("B")}},
			Call:   func(_ *calc.Env, a []calc.Value) (calc.Value, error) { return symmetrizeCall(a, +1) }},
		{Name: "antisymmetrize",
			Doc:    "the data set over |B| with column y (default Rxy) antisymmetrised from sweeps over +B and -B",
			Params: []calc.Param{{Name: "d"}, {Name: "y", Default: calc.String("Rxy")}, {Name: "x", Default: calc.String("B")}},
			Call:   func(_ *calc.Env, a []calc.Value) (calc.Value, error) { return symmetrizeCall(a, -1) }},
		{Name: "split_sweep",
			Doc:    "the rising and falling branches of a back-and-forth sweep (from a direction column, else the field's own turns) and the field lag between them: .up, .down, .lag",
			Params: []calc.Param{{Name: "d"}, {Name: "x", Default: calc.String("B")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				d, err := dataArg(a, 0)
				if err != nil {
					return nil, err
				}
				x, err := strArg(a, 1)
				if err != nil {
					return nil, err
				}
				sp, err := transport.SplitSweep(d, transport.WithField(x))
				if err != nil {
					return nil, err
				}
				lag := est(sp.Lag, dField)
				if len(sp.LagColumns) == 0 {
					lag = calc.Q(quantity.New(math.NaN(), dField))
				}
				r := newResult("split_sweep", "lag", nil,
					"lag", lag,
					"points_up", num(float64(sp.Up.Len())),
					"points_down", num(float64(sp.Down.Len())),
					"up", &DataSet{D: sp.Up},
					"down", &DataSet{D: sp.Down},
					"match", num(sp.Match),
					"residual", calc.Q(quantity.New(sp.Residual, dResistance)),
					"range", calc.Range{Lo: quantity.New(sp.BMin, dField), Hi: quantity.New(sp.BMax, dField)},
					"directions", calc.String(sp.Source))
				return withWarnings(r, sp.Warnings), nil
			}},
		{Name: "check_sweep",
			Doc:    "the sanity checks of a raw sweep a reviewer wants flagged, each with the field where it happens: R_xy away from 0 at B = 0, R_xx minima that do not reach zero (with n=), a large out-of-phase lock-in signal, too few points, one-point spikes, a field reading that steps back, readings stuck at an extreme (an overloaded input), a field lag or hysteresis between up and down branches",
			Params: []calc.Param{{Name: "d"}, {Name: "n", Default: calc.String("none")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				d, err := dataArg(a, 0)
				if err != nil {
					return nil, err
				}
				n, hasN, err := optQ(a, 1, dDensity, "a density")
				if err != nil {
					return nil, err
				}
				var opts []transport.Option
				if hasN {
					opts = append(opts, transport.WithDensity(n.Value()))
				}
				ws, err := transport.CheckSweep(d, opts...)
				if err != nil {
					return nil, err
				}
				verdict := "no warnings"
				if len(ws) > 0 {
					verdict = fmt.Sprintf("%d warning(s)", len(ws))
				}
				return withWarnings(newResult("check_sweep", "verdict", nil, "verdict", calc.String(verdict), "count", num(float64(len(ws)))), ws), nil
			}},
	}
}

// dataCall reads a data file: with the layout the call or the cooldown's data entry
// names, else sniffed by the Env's data loader.
func dataCall(e *calc.Env, args []calc.Value) (calc.Value, error) {
	s, ok := args[0].(calc.String)
	if !ok {
		return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: needs a string path, found a %s", calc.ErrType, args[0].Type())}
	}
	ls, ok := args[1].(calc.String)
	if !ok {
		return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: layout= needs the name of a layout in quotes, found a %s", calc.ErrType, args[1].Type())}
	}
	off, hasOff, err := optQ(args, 2, dField, "a field offset such as 2 mT")
	if err != nil {
		return nil, err
	}
	lname, larg := strings.TrimSpace(string(ls)), 1
	cd := entryRecord(e, "cooldown")
	if !hasOff {
		off, _ = pathQuantity(cd, dField, "magnet", "offset")
	}
	if lname == "" {
		lname, larg = cooldownLayout(cd, string(s)), 0
	}
	if lname == "" {
		v, err := e.OpenData(string(s))
		if err != nil {
			return nil, &calc.ArgError{Arg: 0, Err: err}
		}
		if d, ok := v.(*DataSet); ok && off.Value() != 0 {
			return &DataSet{D: d.D.WithFieldOffset(off.Value())}, nil
		}
		return v, nil
	}
	l, err := loadLayout(e, lname)
	if err != nil {
		return nil, &calc.ArgError{Arg: larg, Err: err}
	}
	if l.UsesExcitation() {
		if I, ok := pathQuantity(cd, dCurrent, "excitation", "current"); ok {
			l.Excitation = I.Value()
		}
	}
	name, b, err := e.ReadDataFile(string(s))
	if err != nil {
		return nil, &calc.ArgError{Arg: 0, Err: err}
	}
	ds, err := transport.ReadLayout(name, bytes.NewReader(b), l)
	if err != nil {
		return nil, &calc.ArgError{Arg: 0, Err: err}
	}
	return &DataSet{D: ds.WithFieldOffset(off.Value())}, nil
}

// cooldownLayout is the layout the cooldown's data entry for path names ("" when none):
// `data: [{file: PATH, layout: NAME}]`.
func cooldownLayout(cd *calc.Record, p string) string {
	list, ok := pathField(cd, "data").(calc.List)
	if !ok {
		return ""
	}
	want := path.Clean(p)
	for _, it := range list {
		r, ok := it.(*calc.Record)
		if !ok {
			continue
		}
		if f := pathText(r, "file"); f != "" && path.Clean(f) == want {
			return pathText(r, "layout")
		}
	}
	return ""
}

// LayoutPath is where a notebook keeps the layout of a name.
func LayoutPath(name string) string { return "layouts/" + name + ".yaml" }

// loadLayout reads layouts/NAME.yaml through the Env's file system (a dependency of the line).
func loadLayout(e *calc.Env, name string) (*transport.Layout, error) {
	if !transport.ValidLayoutName(name) {
		return nil, fmt.Errorf("%w: layout %q: expected the name of a file in layouts/ without .yaml (letters, digits, '.', '_', '-')", calc.ErrArgument, name)
	}
	p, b, err := e.ReadNotebookFile(LayoutPath(name), "layout")
	if err != nil {
		return nil, err
	}
	return transport.ParseLayout(p, b)
}

// ReadData is the data loader of the library (see calc.WithDataLoader): it reads a CSV or
// TSV measurement file with transport.Read and gives a *DataSet. Its errors name the file
// and the position in it.
func ReadData(name string, r io.Reader) (calc.Value, error) {
	ds, err := transport.Read(name, r)
	if err != nil {
		return nil, err
	}
	return &DataSet{D: ds}, nil
}

// DataSet is a measurement file read by data("path"), or a data set derived from one
// (symmetrize, antisymmetrize).
type DataSet struct{ D *transport.Dataset }

// Type implements calc.Value.
func (*DataSet) Type() string { return "data set" }

// Display shows the file, its size, columns and content hash.
func (d *DataSet) Display() string {
	var cols []string
	for _, c := range d.D.Columns {
		s := c.Name
		switch {
		case c.IsText():
			s += " (text)"
		case c.Unit != "" && c.Stem == "":
			s += " (" + c.Unit + ")"
		}
		if c.Role != "" && !strings.EqualFold(c.Role, c.Name) && !strings.EqualFold(c.Role, c.Stem) {
			s += " as " + c.Role
		}
		cols = append(cols, s)
	}
	h := d.D.Hash
	if len(h) > 15 {
		h = h[:15]
	}
	s := fmt.Sprintf("%s: %d rows; %s", d.D.Name, d.D.Len(), strings.Join(cols, ", "))
	if d.D.Layout != "" {
		s += "; layout " + d.D.Layout
	}
	if d.D.FieldOffset != 0 {
		s += "; field offset " + calc.Display(calc.Q(quantity.New(d.D.FieldOffset, dField))) + " added"
	}
	if h != "" {
		s += "; " + h
	}
	return s
}

// Field gives metadata values by key (`d.T`, `d.sample`) and the row count (`d.rows`).
func (d *DataSet) Field(name string) (calc.Value, bool) {
	if name == "rows" {
		return num(float64(d.D.Len())), true
	}
	if name == "hash" {
		return calc.String(d.D.Hash), true
	}
	if name == "offset" {
		return calc.Q(quantity.New(d.D.FieldOffset, dField)), true
	}
	if name == "layout" {
		return calc.String(d.D.Layout), true
	}
	if v, ok := d.D.MetaValue(name); ok {
		if q, err := quantity.ParseQuantity(strings.TrimSpace(v)); err == nil {
			return calc.Q(q), true
		}
		return calc.String(v), true
	}
	return nil, false
}

// FieldNames implements Fielder.
func (d *DataSet) FieldNames() []string {
	names := []string{"rows", "hash", "offset", "layout"}
	for _, kv := range d.D.Meta {
		if kv.Key != "" {
			names = append(names, kv.Key)
		}
	}
	return names
}

// symmetrizeCall implements symmetrize (sign +1) and antisymmetrize (sign -1).
func symmetrizeCall(a []calc.Value, sign int) (calc.Value, error) {
	d, err := dataArg(a, 0)
	if err != nil {
		return nil, err
	}
	y, err := strArg(a, 1)
	if err != nil {
		return nil, err
	}
	x, err := strArg(a, 2)
	if err != nil {
		return nil, err
	}
	type job struct {
		col  string
		sign int
	}
	var jobs []job
	switch {
	case y != "":
		jobs = []job{{y, sign}}
	default: // symmetrize(d): the usual pair
		jobs = []job{{"Rxx", +1}, {"Rxy", -1}}
	}
	xc, err := d.Col(x)
	if err != nil {
		return nil, err
	}
	if span, oneSided := transport.SweepSpan(xc.Values); oneSided && span != "no field" {
		// Nothing to pair with: the sweep as it is, labelled.
		out := *d
		out.Name += " (" + span + ": not symmetrised, there is no other polarity)"
		return &DataSet{D: &out}, nil
	}
	out := &transport.Dataset{Name: d.Name, Hash: d.Hash, Meta: d.Meta, Layout: d.Layout, FieldOffset: d.FieldOffset}
	var grid []float64
	for _, j := range jobs {
		yc, err := d.Col(j.col)
		if err != nil {
			return nil, err
		}
		var res *transport.SymResult
		if j.sign > 0 {
			res, err = transport.Symmetrize(d, x, j.col)
		} else {
			res, err = transport.Antisymmetrize(d, x, j.col)
		}
		if err != nil {
			return nil, err
		}
		vals := res.Values
		if grid == nil {
			grid = res.B
			out.Columns = append(out.Columns, transport.Column{Name: xc.Name, Unit: "T", Dim: xc.Dim, Values: grid})
		} else if len(res.B) != len(grid) {
			vals = resample(res.B, res.Values, grid)
		}
		out.Columns = append(out.Columns, transport.Column{Name: yc.Name, Unit: yc.Unit, Dim: yc.Dim, Values: vals})
	}
	if sign > 0 && y == "" {
		out.Name += " (±B: Rxx symmetrised, Rxy antisymmetrised)"
	} else if sign > 0 {
		out.Name += " (" + y + " symmetrised over ±B)"
	} else {
		out.Name += " (" + y + " antisymmetrised over ±B)"
	}
	return &DataSet{D: out}, nil
}

// resample interpolates y(x) linearly onto grid (x increasing).
func resample(x, y, grid []float64) []float64 {
	out := make([]float64, len(grid))
	for i, g := range grid {
		j := sort.SearchFloat64s(x, g)
		switch {
		case j == 0:
			out[i] = y[0]
		case j >= len(x):
			out[i] = y[len(y)-1]
		default:
			t := (g - x[j-1]) / (x[j] - x[j-1])
			out[i] = y[j-1] + t*(y[j]-y[j-1])
		}
	}
	return out
}
