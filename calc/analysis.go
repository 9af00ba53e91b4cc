package calc

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// This file wires the data-file reader and the magnetotransport analyses of calc/transport
// into the language: data("path") gives a *DataSet, and each analysis returns a *Result
// whose main value is shown in the result region and whose fields a later line can read
// (`hall.n`, `sdh.frequency`, `lk.mass`).

func init() {
	DataLoader = func(name string, r io.Reader) (Value, error) {
		ds, err := transport.Read(name, r)
		if err != nil {
			return nil, err
		}
		return &DataSet{D: ds}, nil
	}
}

// DataSet is a measurement file read by data("path"), or a data set derived from one
// (symmetrize, antisymmetrize).
type DataSet struct{ D *transport.Dataset }

// Type implements Value.
func (*DataSet) Type() string { return "data set" }

// Display shows the file, its size, columns and content hash.
func (d *DataSet) Display() string {
	var cols []string
	for _, c := range d.D.Columns {
		if c.Unit != "" {
			cols = append(cols, c.Name+" ("+c.Unit+")")
		} else {
			cols = append(cols, c.Name)
		}
	}
	h := d.D.Hash
	if len(h) > 15 {
		h = h[:15]
	}
	s := fmt.Sprintf("%s: %d rows; %s", d.D.Name, d.D.Len(), strings.Join(cols, ", "))
	if h != "" {
		s += "; " + h
	}
	return s
}

// Field gives metadata values by key (`d.T`, `d.sample`) and the row count (`d.rows`).
func (d *DataSet) Field(name string) (Value, bool) {
	if name == "rows" {
		return num(float64(d.D.Len())), true
	}
	if name == "hash" {
		return String(d.D.Hash), true
	}
	if v, ok := d.D.MetaValue(name); ok {
		if q, err := quantity.ParseQuantity(strings.TrimSpace(v)); err == nil {
			return Q(q), true
		}
		return String(v), true
	}
	return nil, false
}

// FieldNames implements Fielder.
func (d *DataSet) FieldNames() []string {
	names := []string{"rows", "hash"}
	for _, kv := range d.D.Meta {
		if kv.Key != "" {
			names = append(names, kv.Key)
		}
	}
	return names
}

// Result is the outcome of an analysis: named fields (values with uncertainties, the
// parameters and points used, warnings) and the field shown in a result region.
type Result struct {
	Kind     string // the function that made it
	Main     string // the field displayed first
	Extra    []string
	Rec      *Record
	Warnings []string

	hall *transport.HallResult // kept for compare_densities
	sdh  *transport.SdHResult
}

// Type implements Value.
func (r *Result) Type() string { return r.Kind + " result" }

// Field implements Fielder; `warnings` lists the sanity checks that failed.
func (r *Result) Field(name string) (Value, bool) {
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
func (r *Result) FieldNames() []string { return append(r.Rec.FieldNames(), "warnings") }

// Display shows the main value, the extra fields and every warning.
func (r *Result) Display() string {
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

func newResult(kind, main string, extra []string, kv ...any) *Result {
	return &Result{Kind: kind, Main: main, Extra: extra, Rec: NewRecord("", kv...)}
}

func (r *Result) warn(ws []transport.Warning) *Result {
	for _, w := range ws {
		r.Warnings = append(r.Warnings, w.Msg)
	}
	return r
}

// est turns a transport estimate into a quantity; an unknown uncertainty stays unknown.
func est(e transport.Estimate, d quantity.Dim) Quantity {
	if e.Uncertainty > 0 && !math.IsNaN(e.Uncertainty) {
		return Q(quantity.Uncertain(e.Value, e.Uncertainty, d))
	}
	return Q(quantity.New(e.Value, d))
}

// dataArg reads a data-set argument.
func dataArg(args []Value, i int) (*transport.Dataset, error) {
	d, ok := args[i].(*DataSet)
	if !ok {
		return nil, &ArgError{Arg: i, Err: fmt.Errorf("%w: expected a data set from data(\"path\"), found %s", ErrArgument, args[i].Type())}
	}
	return d.D, nil
}

// fieldRange reads a field range `0 T .. 0.5 T` as |B| bounds in tesla.
func fieldRange(args []Value, i int) (lo, hi float64, err error) {
	r, ok := args[i].(Range)
	if !ok {
		return 0, 0, &ArgError{Arg: i, Err: fmt.Errorf("%w: expected a field range such as `0.05 T .. 0.5 T`, found %s", ErrArgument, args[i].Type())}
	}
	if r.Lo.Dim() != dField || r.Hi.Dim() != dField {
		return 0, 0, &ArgError{Arg: i, Err: fmt.Errorf("%w: the range must be a magnetic field (T), found %s", ErrArgument, r.Lo.Dim())}
	}
	lo, hi = math.Abs(r.Lo.Value()), math.Abs(r.Hi.Value())
	if lo > hi {
		lo, hi = hi, lo
	}
	return lo, hi, nil
}

// dataAndRange reads the usual first two arguments of an analysis: a data set and a field range.
func dataAndRange(a []Value) (*transport.Dataset, float64, float64, error) {
	d, err := dataArg(a, 0)
	if err != nil {
		return nil, 0, 0, err
	}
	lo, hi, err := fieldRange(a, 1)
	return d, lo, hi, err
}

// strArg reads a text argument (a column name).
func strArg(args []Value, i int) (string, error) {
	s, ok := args[i].(String)
	if !ok {
		return "", &ArgError{Arg: i, Err: fmt.Errorf("%w: expected a column name in quotes, found %s", ErrArgument, args[i].Type())}
	}
	return string(s), nil
}

// registerAnalysis adds the data-file analyses.
func registerAnalysis(e *Env) {
	e.Register(Func{Name: "hall_density",
		Doc:    "Hall density from a linear fit of R_xy against B over a |B| range: n = 1/(e |slope|); the sign of the slope says electrons (negative, with B along +z) or holes",
		Params: []Param{{Name: "d"}, {Name: "range"}, {Name: "x", Default: String("B")}, {Name: "y", Default: String("Rxy")}},
		Call: func(_ *Env, a []Value) (Value, error) {
			d, lo, hi, err := dataAndRange(a)
			if err != nil {
				return nil, err
			}
			x, _ := strArg(a, 2)
			y, _ := strArg(a, 3)
			h, err := transport.HallDensity(d, x, y, lo, hi)
			if err != nil {
				return nil, err
			}
			return hallValue(h), nil
		}})
	e.Register(Func{Name: "sdh_density",
		Doc:    "Shubnikov-de Haas density from the Fourier spectrum of R_xx against 1/B over a |B| range: n = gs gv (e/h) f_B",
		Params: []Param{{Name: "d"}, {Name: "range"}, {Name: "gs", Default: num(2)}, {Name: "gv", Default: num(1)}, {Name: "x", Default: String("B")}, {Name: "y", Default: String("Rxx")}},
		Call: func(_ *Env, a []Value) (Value, error) {
			d, lo, hi, err := dataAndRange(a)
			if err != nil {
				return nil, err
			}
			gs, err := intArg(a, 2)
			if err != nil {
				return nil, err
			}
			gv, err := intArg(a, 3)
			if err != nil {
				return nil, err
			}
			x, _ := strArg(a, 4)
			y, _ := strArg(a, 5)
			s, err := transport.SdHDensity(d, lo, hi, float64(gs), transport.WithColumns(x, y), transport.WithValleyDegeneracy(float64(gv)))
			if err != nil {
				return nil, err
			}
			return sdhValue(s), nil
		}})
	e.Register(Func{Name: "compare_densities",
		Doc:    "Hall against SdH density: flags parallel conduction when they differ by more than twice their combined uncertainty and by more than 5 %",
		Params: []Param{{Name: "hall"}, {Name: "sdh"}},
		Call: func(_ *Env, a []Value) (Value, error) {
			h, ok1 := a[0].(*Result)
			s, ok2 := a[1].(*Result)
			if !ok1 || h.Kind != "hall_density" {
				return nil, &ArgError{Arg: 0, Err: fmt.Errorf("%w: expected the result of hall_density", ErrArgument)}
			}
			if !ok2 || s.Kind != "sdh_density" {
				return nil, &ArgError{Arg: 1, Err: fmt.Errorf("%w: expected the result of sdh_density", ErrArgument)}
			}
			c := transport.CompareDensities(h.hall, s.sdh)
			verdict := "agree"
			if c.Disagree {
				verdict = "disagree: possible parallel conduction or a second subband"
			}
			r := newResult("compare_densities", "relative_difference", []string{"verdict"},
				"relative_difference", num(c.RelDiff),
				"difference", est(c.Diff, dDensity),
				"verdict", String(verdict))
			if c.Warning != nil {
				r.Warnings = append(r.Warnings, c.Warning.Msg)
			}
			return r, nil
		}})
	e.Register(Func{Name: "zero_field",
		Doc:    "a column's value at B = 0, by a local low-order fit over the points nearest zero field",
		Params: []Param{{Name: "d"}, {Name: "column", Default: String("Rxx")}},
		Call: func(_ *Env, a []Value) (Value, error) {
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
		}})
	e.Register(Func{Name: "symmetrize",
		Doc:    "the data set over |B| with R_xx symmetrised and R_xy antisymmetrised from sweeps over +B and -B (with y=: only that column, symmetrised)",
		Params: []Param{{Name: "d"}, {Name: "y", Default: String("")}, {Name: "x", Default: String("B")}},
		Call:   func(_ *Env, a []Value) (Value, error) { return symmetrizeCall(a, +1) }})
	e.Register(Func{Name: "antisymmetrize",
		Doc:    "the data set over |B| with column y (default Rxy) antisymmetrised from sweeps over +B and -B",
		Params: []Param{{Name: "d"}, {Name: "y", Default: String("Rxy")}, {Name: "x", Default: String("B")}},
		Call:   func(_ *Env, a []Value) (Value, error) { return symmetrizeCall(a, -1) }})
}

// hallValue is the language's view of a Hall fit.
func hallValue(h *transport.HallResult) *Result {
	r := newResult("hall_density", "n", []string{"carriers"},
		"n", est(h.Density, dDensity),
		"carriers", String(h.Carriers),
		"slope", est(h.Slope, dHallSlope),
		"intercept", est(h.Intercept, dResistance),
		"points", num(float64(len(h.B))),
		"range", Range{Lo: quantity.New(h.BMin, dField), Hi: quantity.New(h.BMax, dField)},
	).warn(h.Warnings)
	r.hall = h
	return r
}

// sdhValue is the language's view of an SdH analysis.
func sdhValue(s *transport.SdHResult) *Result {
	r := newResult("sdh_density", "n", []string{"frequency"},
		"n", est(s.Density, dDensity),
		"frequency", est(s.Frequency, dField),
		"oscillations", num(s.Oscillations),
		"gs", num(s.GS),
		"gv", num(s.GV),
		"points", num(float64(s.Points)),
		"range", Range{Lo: quantity.New(s.BMin, dField), Hi: quantity.New(s.BMax, dField)},
	).warn(s.Warnings)
	r.sdh = s
	return r
}

// symmetrizeCall implements symmetrize (sign +1) and antisymmetrize (sign -1).
func symmetrizeCall(a []Value, sign int) (Value, error) {
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
	out := &transport.Dataset{Name: d.Name, Hash: d.Hash, Meta: d.Meta}
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

// AddDep records that what is being evaluated depends on something outside the file (for
// functions registered by the notebook, which read other entries). hash may be empty; the
// caller's dependency resolver gives current values when a cache checks them.
func (e *Env) AddDep(dep, hash string) { e.addDep(dep, hash) }
