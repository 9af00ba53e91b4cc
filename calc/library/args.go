package library

import (
	"fmt"
	"math"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// This file has what the families share: the dimensions of parameters, parameter
// constructors, readers of arguments, and the making of analysis results.

// Dimensions of the functions' parameters and results.
var (
	dField      = quantity.MustUnit("T").D
	dMass       = quantity.Mass
	dDensity    = quantity.MustUnit("m^-2").D
	dNone       = quantity.Dimensionless
	dSpeed      = quantity.MustUnit("m/s").D
	dResistance = quantity.MustUnit("Ohm").D
	dMobility   = quantity.MustUnit("m^2/(V s)").D
	dTime       = quantity.Time
	dTemp       = quantity.Temperature
	dHallSlope  = quantity.MustUnit("Ohm/T").D
	dVolt       = quantity.MustUnit("V").D
	dCurrent    = quantity.MustUnit("A").D
	dCapArea    = quantity.MustUnit("F/m^2").D
	dPerVolt    = quantity.MustUnit("m^-2/V").D
)

func dimp(d quantity.Dim) *quantity.Dim { return &d }

// req is a required parameter of dimension d.
func req(name string, d quantity.Dim) calc.Param { return calc.Param{Name: name, Dim: dimp(d)} }

// mass is a mass parameter that also accepts a material (its mstar).
func mass(name string) calc.Param {
	return calc.Param{Name: name, Dim: dimp(dMass), FromRecord: "mstar"}
}

// opt is a dimensionless parameter with a default (a degeneracy).
func opt(name string, def float64) calc.Param {
	return calc.Param{Name: name, Dim: dimp(dNone), Default: num(def)}
}

// num wraps a plain dimensionless number.
func num(v float64) calc.Quantity { return calc.Q(quantity.Scalar(v)) }

// closedForm is a function whose arguments the evaluator has checked and whose result is
// one quantity.
func closedForm(name, doc string, params []calc.Param, f func(args []calc.Value) (quantity.Quantity, error)) calc.Func {
	return calc.Func{Name: name, Doc: doc, Params: params, Call: func(_ *calc.Env, args []calc.Value) (calc.Value, error) {
		q, err := f(args)
		if err != nil {
			return nil, err
		}
		return calc.Q(q), nil
	}}
}

// qa is argument i as a quantity; only for parameters with a Dim, which the evaluator has
// checked.
func qa(args []calc.Value, i int) quantity.Quantity { return args[i].(calc.Quantity).Q }

// argQuantity reads argument i as a quantity of any dimension.
func argQuantity(args []calc.Value, i int) (quantity.Quantity, error) {
	q, ok := args[i].(calc.Quantity)
	if !ok {
		return quantity.Quantity{}, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: needs a quantity, found a %s", calc.ErrType, args[i].Type())}
	}
	return q.Q, nil
}

// intArg converts a dimensionless exact argument to an int (Landau index, degeneracy).
func intArg(args []calc.Value, i int) (int, error) {
	v := qa(args, i).Value()
	if v != math.Trunc(v) || math.Abs(v) > 1e6 {
		return 0, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: needs a whole number, found %g", calc.ErrArgument, v)}
	}
	return int(v), nil
}

// degeneracies reads the gs and gv arguments at indexes i and i+1.
func degeneracies(a []calc.Value, i int) (int, int, error) {
	gs, err := intArg(a, i)
	if err != nil {
		return 0, 0, err
	}
	gv, err := intArg(a, i+1)
	if err != nil {
		return 0, 0, err
	}
	return gs, gv, nil
}

// strArg reads a text argument (a column name).
func strArg(args []calc.Value, i int) (string, error) {
	s, ok := args[i].(calc.String)
	if !ok {
		return "", &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a column name in quotes, found %s", calc.ErrArgument, args[i].Type())}
	}
	return string(s), nil
}

// optQ reads an optional quantity argument whose default is the string "none".
func optQ(args []calc.Value, i int, d quantity.Dim, what string) (quantity.Quantity, bool, error) {
	switch v := args[i].(type) {
	case calc.String:
		if string(v) == "none" || string(v) == "" {
			return quantity.Quantity{}, false, nil
		}
	case calc.Quantity:
		if v.Q.Dim() != d {
			return quantity.Quantity{}, false, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected %s, found dimension %s", calc.ErrArgument, what, v.Q.Dim())}
		}
		return v.Q, true, nil
	}
	return quantity.Quantity{}, false, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected %s, found %s", calc.ErrArgument, what, args[i].Type())}
}

// quantities reads a list of quantities of one dimension as SI numbers and uncertainties
// (nil when none has one).
func quantities(args []calc.Value, i int, d quantity.Dim, what string) ([]float64, []float64, error) {
	l, ok := args[i].(calc.List)
	if !ok {
		return nil, nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a list of %s, found %s", calc.ErrArgument, what, args[i].Type())}
	}
	v := make([]float64, len(l))
	s := make([]float64, len(l))
	anyUnc := false
	for k, it := range l {
		q, ok := it.(calc.Quantity)
		if !ok || q.Q.Dim() != d {
			return nil, nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: item %d: expected %s", calc.ErrArgument, k+1, what)}
		}
		v[k] = q.Q.Value()
		s[k] = q.Q.Uncertainty()
		anyUnc = anyUnc || s[k] > 0
	}
	if !anyUnc {
		s = nil
	}
	return v, s, nil
}

// fieldRange reads a field range `0 T .. 0.5 T` as |B| bounds in tesla.
func fieldRange(args []calc.Value, i int) (lo, hi float64, err error) {
	r, ok := args[i].(calc.Range)
	if !ok {
		return 0, 0, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a field range such as `0.05 T .. 0.5 T`, found %s", calc.ErrArgument, args[i].Type())}
	}
	if r.Lo.Dim() != dField || r.Hi.Dim() != dField {
		return 0, 0, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: the range must be a magnetic field (T), found %s", calc.ErrArgument, r.Lo.Dim())}
	}
	lo, hi = math.Abs(r.Lo.Value()), math.Abs(r.Hi.Value())
	if lo > hi {
		lo, hi = hi, lo
	}
	return lo, hi, nil
}

// dataArg reads a data-set argument.
func dataArg(args []calc.Value, i int) (*transport.Dataset, error) {
	d, ok := args[i].(*DataSet)
	if !ok {
		return nil, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a data set from data(\"path\"), found %s", calc.ErrArgument, args[i].Type())}
	}
	return d.D, nil
}

// dataAndRange reads the usual first two arguments of an analysis: a data set and a field
// range.
func dataAndRange(a []calc.Value) (*transport.Dataset, float64, float64, error) {
	d, err := dataArg(a, 0)
	if err != nil {
		return nil, 0, 0, err
	}
	lo, hi, err := fieldRange(a, 1)
	return d, lo, hi, err
}

// est turns a transport estimate into a quantity; an unknown uncertainty stays unknown.
func est(e transport.Estimate, d quantity.Dim) calc.Quantity {
	if e.Uncertainty > 0 && !math.IsNaN(e.Uncertainty) {
		return calc.Q(quantity.Uncertain(e.Value, e.Uncertainty, d))
	}
	return calc.Q(quantity.New(e.Value, d))
}

// newResult is an analysis result of function kind showing field main, then extra, with the
// fields given as name, value pairs.
func newResult(kind, main string, extra []string, kv ...any) *calc.AnalysisResult {
	return &calc.AnalysisResult{Kind: kind, Main: main, Extra: extra, Rec: calc.NewRecord("", kv...)}
}

// withWarnings appends the messages of the sanity checks that failed.
func withWarnings(r *calc.AnalysisResult, ws []transport.Warning) *calc.AnalysisResult {
	for _, w := range ws {
		r.Warnings = append(r.Warnings, w.Msg)
	}
	return r
}
