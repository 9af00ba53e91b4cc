package quantity

import (
	"fmt"
	"math"
	"slices"
	"sync/atomic"
)

// term is the first derivative of a value with respect to one independent
// uncertain input (identified by id, with standard uncertainty sigma).
type term struct {
	id    uint64
	sigma float64
	d     float64
}

// nextID numbers independent uncertain inputs.
var nextID atomic.Uint64

// Quantity is an immutable value in coherent SI with its dimension and its
// first-order derivatives with respect to independent uncertain inputs.
// Because the derivatives are kept per input, correlations are exact:
// x - x is 0 ± 0 and x*x has twice the relative uncertainty of x.
//
// The zero value is an exact dimensionless zero.
type Quantity struct {
	v     float64
	d     Dim
	terms []term   // sorted by id, no zero derivatives; never modified after creation
	temp  TempKind // for a temperature: how it is to be read (see TempKind)
}

// New returns an exact quantity of value v (SI) and dimension d.
func New(v float64, d Dim) Quantity { return Quantity{v: v, d: d} }

// Scalar returns an exact dimensionless quantity.
func Scalar(v float64) Quantity { return Quantity{v: v} }

// Uncertain returns a new independent input of value v (SI) with standard
// uncertainty sigma (SI). Each call makes an input uncorrelated with every
// other. The sign of sigma is ignored; sigma == 0 gives an exact quantity.
func Uncertain(v, sigma float64, d Dim) Quantity {
	sigma = math.Abs(sigma)
	if sigma == 0 {
		return New(v, d)
	}
	return Quantity{v: v, d: d, terms: []term{{id: nextID.Add(1), sigma: sigma, d: 1}}}
}

// Value returns the value in coherent SI units.
func (q Quantity) Value() float64 { return q.v }

// Dim returns the dimension.
func (q Quantity) Dim() Dim { return q.d }

// Uncertainty returns the standard uncertainty in SI units by first-order
// propagation: sqrt(sum_i (dq/dx_i * sigma_i)^2) over the independent inputs
// x_i (GUM, JCGM 100:2008, eq. 10 (from memory)). It is 0 for an exact
// quantity.
func (q Quantity) Uncertainty() float64 {
	switch len(q.terms) {
	case 0:
		return 0
	case 1:
		return math.Abs(q.terms[0].d * q.terms[0].sigma)
	}
	// Scaled sum of squares, so that tiny or huge SI values neither
	// underflow nor overflow.
	var scale, ssq float64 = 0, 1
	for _, t := range q.terms {
		c := math.Abs(t.d * t.sigma)
		if c == 0 {
			continue
		}
		if math.IsNaN(c) || math.IsInf(c, 0) {
			return c
		}
		if scale < c {
			ssq = 1 + ssq*(scale/c)*(scale/c)
			scale = c
		} else {
			ssq += (c / scale) * (c / scale)
		}
	}
	return scale * math.Sqrt(ssq)
}

// HasUncertainty reports whether q depends on any uncertain input.
func (q Quantity) HasUncertainty() bool { return len(q.terms) > 0 }

// Covariance returns the covariance of a and b in SI units (the product of
// their units): sum_i (da/dx_i)(db/dx_i) sigma_i^2.
func Covariance(a, b Quantity) float64 {
	var c float64
	i, j := 0, 0
	for i < len(a.terms) && j < len(b.terms) {
		switch ta, tb := a.terms[i], b.terms[j]; {
		case ta.id < tb.id:
			i++
		case ta.id > tb.id:
			j++
		default:
			c += ta.d * tb.d * ta.sigma * ta.sigma
			i++
			j++
		}
	}
	return c
}

// Correlation returns the correlation coefficient of a and b, in [-1, 1],
// or 0 when either is exact.
func Correlation(a, b Quantity) float64 {
	ua, ub := a.Uncertainty(), b.Uncertainty()
	if ua == 0 || ub == 0 {
		return 0
	}
	return Covariance(a, b) / (ua * ub)
}

// String formats q with [Format].
func (q Quantity) String() string { return Format(q) }

// GoString shows the raw SI content, for debugging.
func (q Quantity) GoString() string {
	return fmt.Sprintf("quantity.Uncertain(%g, %g, %#v)", q.v, q.Uncertainty(), q.d)
}

// combine2 returns the terms of ka*a + kb*b, merging equal inputs.
func combine2(ka float64, a []term, kb float64, b []term) []term {
	if len(a) == 0 && len(b) == 0 {
		return nil
	}
	out := make([]term, 0, len(a)+len(b))
	push := func(t term, d float64) {
		if d != 0 {
			t.d = d
			out = append(out, t)
		}
	}
	i, j := 0, 0
	for i < len(a) || j < len(b) {
		switch {
		case j == len(b) || (i < len(a) && a[i].id < b[j].id):
			push(a[i], ka*a[i].d)
			i++
		case i == len(a) || b[j].id < a[i].id:
			push(b[j], kb*b[j].d)
			j++
		default:
			push(a[i], ka*a[i].d+kb*b[j].d)
			i++
			j++
		}
	}
	if len(out) == 0 {
		return nil
	}
	return out
}

// scaleTerms returns the terms multiplied by k.
func scaleTerms(k float64, a []term) []term { return combine2(k, a, 0, nil) }

// Add returns a + b. The dimensions must agree, else the error is a
// *[DimError] (errors.Is(err, [ErrDimMismatch])). The sum of two absolute
// temperatures written in °C is a *[TempError]; see [TempKind] for how the
// kinds of temperature combine.
func Add(a, b Quantity) (Quantity, error) {
	if a.d != b.d {
		return Quantity{}, &DimError{Op: "+", Left: a.d, Right: b.d}
	}
	k, err := sumKind("+", a, b)
	if err != nil {
		return Quantity{}, err
	}
	return Quantity{v: a.v + b.v, d: a.d, terms: combine2(1, a.terms, 1, b.terms), temp: k}, nil
}

// Sub returns a - b. The dimensions must agree, else the error is a
// *[DimError]. Two absolute temperatures in °C give a difference; an absolute
// temperature subtracted from a difference is a *[TempError].
func Sub(a, b Quantity) (Quantity, error) {
	if a.d != b.d {
		return Quantity{}, &DimError{Op: "-", Left: a.d, Right: b.d}
	}
	k, err := sumKind("-", a, b)
	if err != nil {
		return Quantity{}, err
	}
	return Quantity{v: a.v - b.v, d: a.d, terms: combine2(1, a.terms, -1, b.terms), temp: k}, nil
}

// Mul returns a * b.
func Mul(a, b Quantity) Quantity {
	return Quantity{v: a.v * b.v, d: a.d.Mul(b.d), terms: combine2(b.v, a.terms, a.v, b.terms)}
}

// Div returns a / b. Division by an exact zero follows IEEE 754 (±Inf or
// NaN) without an error; callers check the result where it matters.
func Div(a, b Quantity) Quantity {
	r := a.v / b.v
	// d(a/b) = (da - r db)/b; written this way x/x has exactly zero
	// derivative because r is exactly 1.
	return Quantity{v: r, d: a.d.Div(b.d), terms: combine2(1/b.v, a.terms, -r/b.v, b.terms)}
}

// Neg returns -q.
func (q Quantity) Neg() Quantity {
	return Quantity{v: -q.v, d: q.d, terms: scaleTerms(-1, q.terms)}
}

// Scale returns k*q for an exact factor k.
func (q Quantity) Scale(k float64) Quantity {
	return Quantity{v: k * q.v, d: q.d, terms: scaleTerms(k, q.terms)}
}

// Pow returns q^p. Every exponent of q's dimension times p must be an
// integer in the int8 range, else the error wraps [ErrNonIntegerDim]. A
// negative value raised to a non-integer power is an [ErrDomain] error.
func Pow(q Quantity, p float64) (Quantity, error) {
	var d Dim
	for i, e := range q.d {
		x := float64(e) * p
		r := math.Round(x)
		if math.Abs(x-r) > 1e-9 || r < -128 || r > 127 {
			return Quantity{}, fmt.Errorf("power %g of %s: %w", p, dimText(q.d), ErrNonIntegerDim)
		}
		d[i] = int8(r)
	}
	if q.v < 0 && p != math.Trunc(p) {
		return Quantity{}, fmt.Errorf("power %g of negative value %g: %w", p, q.v, ErrDomain)
	}
	var v, dv float64
	switch p {
	case 0:
		return New(1, d), nil
	case 1:
		return q, nil
	case 2:
		v, dv = q.v*q.v, 2*q.v
	case 0.5:
		v = math.Sqrt(q.v)
		dv = 0.5 / v
	case -1:
		v, dv = 1/q.v, -1/(q.v*q.v)
	default:
		v = math.Pow(q.v, p)
		dv = p * math.Pow(q.v, p-1)
	}
	return Quantity{v: v, d: d, terms: scaleTerms(dv, q.terms)}, nil
}

// Sqrt returns the square root of q; see [Pow].
func Sqrt(q Quantity) (Quantity, error) { return Pow(q, 0.5) }

// Derived builds a result of value v (SI) and dimension d that depends on
// inputs through the partial derivatives partials[i] = dv/d(inputs[i]), in
// SI units. It is the general hook for physics functions and fits: the
// result carries the inputs' uncertainties and correlations to first order.
// It panics if the two slices differ in length (a programming error).
func Derived(v float64, d Dim, inputs []Quantity, partials []float64) Quantity {
	if len(inputs) != len(partials) {
		panic(fmt.Sprintf("quantity: Derived with %d inputs and %d partials", len(inputs), len(partials)))
	}
	var all []term
	for i, in := range inputs {
		for _, t := range in.terms {
			t.d *= partials[i]
			all = append(all, t)
		}
	}
	if len(all) == 0 {
		return New(v, d)
	}
	slices.SortStableFunc(all, func(a, b term) int {
		switch {
		case a.id < b.id:
			return -1
		case a.id > b.id:
			return 1
		}
		return 0
	})
	out := all[:0]
	for _, t := range all {
		if n := len(out); n > 0 && out[n-1].id == t.id {
			out[n-1].d += t.d
			continue
		}
		out = append(out, t)
	}
	kept := out[:0]
	for _, t := range out {
		if t.d != 0 {
			kept = append(kept, t)
		}
	}
	if len(kept) == 0 {
		kept = nil
	}
	return Quantity{v: v, d: d, terms: kept}
}

// Apply applies f, a function of one dimensionless argument such as
// math.Exp or math.Log, with its derivative df. A dimensioned argument is a
// *[DimError]; a NaN result from a non-NaN argument is an [ErrDomain] error.
func Apply(q Quantity, f, df func(float64) float64) (Quantity, error) {
	if !q.d.IsDimensionless() {
		return Quantity{}, &DimError{Op: "apply", Left: q.d, Right: Dimensionless}
	}
	v := f(q.v)
	if math.IsNaN(v) && !math.IsNaN(q.v) {
		return Quantity{}, fmt.Errorf("function of %g: %w", q.v, ErrDomain)
	}
	if len(q.terms) == 0 {
		return Scalar(v), nil
	}
	return Quantity{v: v, terms: scaleTerms(df(q.v), q.terms)}, nil
}
