package library

import (
	"fmt"
	"math"

	"cleave/calc"
	"cleave/calc/quantity"
)

// mathFuncs are the general functions: square root, exponential, logarithms, trigonometry
// of dimensionless arguments, absolute value, and min, max and mean of several values.
// Uncertainties propagate to first order through quantity.Apply.
func mathFuncs() []calc.Func {
	var out []calc.Func
	oneArg := func(name, doc string, f func(q quantity.Quantity) (quantity.Quantity, error)) {
		out = append(out, calc.Func{Name: name, Doc: doc, Params: []calc.Param{{Name: "x"}},
			Call: func(_ *calc.Env, args []calc.Value) (calc.Value, error) {
				q, err := argQuantity(args, 0)
				if err != nil {
					return nil, err
				}
				r, err := f(q)
				if err != nil {
					return nil, &calc.ArgError{Arg: 0, Err: err}
				}
				return calc.Q(r), nil
			}})
	}
	dimless := func(name, doc string, f, df func(float64) float64, domain func(float64) bool) {
		oneArg(name, doc, func(q quantity.Quantity) (quantity.Quantity, error) {
			if !q.Dim().IsDimensionless() {
				return q, fmt.Errorf("needs a dimensionless argument, found %s", calc.DimName(q.Dim()))
			}
			if domain != nil && !domain(q.Value()) {
				return q, fmt.Errorf("argument %g is outside the domain", q.Value())
			}
			return quantity.Apply(q, f, df)
		})
	}
	oneArg("sqrt", "square root; the dimension exponents must be even", func(q quantity.Quantity) (quantity.Quantity, error) {
		if q.Value() < 0 {
			return q, fmt.Errorf("square root of a negative number (%g)", q.Value())
		}
		return quantity.Sqrt(q)
	})
	dimless("exp", "e^x of a dimensionless x", math.Exp, math.Exp, nil)
	dimless("ln", "natural logarithm of a dimensionless x > 0", math.Log, func(x float64) float64 { return 1 / x },
		func(x float64) bool { return x > 0 })
	dimless("log10", "base-10 logarithm of a dimensionless x > 0", math.Log10,
		func(x float64) float64 { return 1 / (x * math.Ln10) }, func(x float64) bool { return x > 0 })
	dimless("sin", "sine of an angle in radians (dimensionless)", math.Sin, math.Cos, nil)
	dimless("cos", "cosine of an angle in radians (dimensionless)", math.Cos, func(x float64) float64 { return -math.Sin(x) }, nil)
	dimless("tanh", "hyperbolic tangent of a dimensionless x", math.Tanh,
		func(x float64) float64 { c := math.Cosh(x); return 1 / (c * c) }, nil)
	oneArg("abs", "absolute value", func(q quantity.Quantity) (quantity.Quantity, error) {
		if q.Value() < 0 {
			return q.Neg(), nil
		}
		return q, nil
	})

	pick := func(name, doc string, better func(a, b float64) bool) {
		out = append(out, calc.Func{Name: name, Doc: doc, Variadic: true, Params: []calc.Param{{Name: "xs"}},
			Call: func(_ *calc.Env, args []calc.Value) (calc.Value, error) {
				qs, err := quantityList(args[0], name)
				if err != nil {
					return nil, err
				}
				best := qs[0]
				for _, q := range qs[1:] {
					if better(q.Value(), best.Value()) {
						best = q
					}
				}
				return calc.Q(best), nil
			}})
	}
	pick("min", "smallest of its arguments (or of one list); all of one dimension", func(a, b float64) bool { return a < b })
	pick("max", "largest of its arguments (or of one list); all of one dimension", func(a, b float64) bool { return a > b })
	out = append(out, calc.Func{Name: "mean", Doc: "arithmetic mean of its arguments (or of one list), uncertainties propagated with their correlations",
		Variadic: true, Params: []calc.Param{{Name: "xs"}},
		Call: func(_ *calc.Env, args []calc.Value) (calc.Value, error) {
			qs, err := quantityList(args[0], "mean")
			if err != nil {
				return nil, err
			}
			if qs[0].Temp() == quantity.TempCelsius {
				// Absolute temperatures in °C: their sum has no meaning, their mean does,
				// as the first plus the mean of the differences from it.
				dsum := quantity.New(0, qs[0].Dim())
				for _, q := range qs[1:] {
					d, err := quantity.Sub(q, qs[0])
					if err != nil {
						return nil, &calc.ArgError{Arg: 0, Err: err}
					}
					dsum, _ = quantity.Add(dsum, d.Marked(quantity.TempPlain))
				}
				m, err := quantity.Add(qs[0], dsum.Scale(1/float64(len(qs))))
				if err != nil {
					return nil, &calc.ArgError{Arg: 0, Err: err}
				}
				return calc.Q(m), nil
			}
			sum := qs[0]
			for _, q := range qs[1:] {
				var err error
				if sum, err = quantity.Add(sum, q); err != nil { // dimensions checked by quantityList
					return nil, &calc.ArgError{Arg: 0, Err: err}
				}
			}
			return calc.Q(sum.Scale(1 / float64(len(qs)))), nil
		}})
	return out
}

// quantityList reads the gathered arguments of a variadic function (or one list given
// alone) as quantities of one dimension.
func quantityList(v calc.Value, name string) ([]quantity.Quantity, error) {
	l, ok := v.(calc.List)
	if !ok {
		l = calc.List{v}
	}
	if len(l) == 0 {
		return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: needs at least one value", calc.ErrArgument)}
	}
	out := make([]quantity.Quantity, len(l))
	for i, x := range l {
		q, ok := x.(calc.Quantity)
		if !ok {
			return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: element %d is a %s, not a quantity", calc.ErrType, i+1, x.Type())}
		}
		if i > 0 && q.Q.Dim() != out[0].Dim() {
			return nil, &calc.ArgError{Arg: 0, Err: &quantity.DimError{Op: name, Left: out[0].Dim(), Right: q.Q.Dim()}}
		}
		out[i] = q.Q
	}
	return out, nil
}
