package quantity

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// Dim holds the exponents of the SI base units in the order m, kg, s, A, K,
// mol, cd. The zero value is dimensionless. Dim is comparable with ==.
//
// Exponents are int8: [Dim.Mul], [Dim.Div] and [Dim.Pow] wrap around past
// ±127 like any int8 arithmetic. [Pow] and [ParseUnit] check the range and
// return an error instead; use [Dim.MulChecked] where inputs are untrusted.
type Dim [7]int8

// Indices of the base units inside a [Dim].
const (
	IdxLength = iota
	IdxMass
	IdxTime
	IdxCurrent
	IdxTemperature
	IdxAmount
	IdxLuminous
)

// The dimensionless dimension and the seven base dimensions.
var (
	Dimensionless = Dim{}
	Length        = Dim{IdxLength: 1}
	Mass          = Dim{IdxMass: 1}
	Time          = Dim{IdxTime: 1}
	Current       = Dim{IdxCurrent: 1}
	Temperature   = Dim{IdxTemperature: 1}
	Amount        = Dim{IdxAmount: 1}
	Luminous      = Dim{IdxLuminous: 1}
)

// baseSymbols are the SI base-unit symbols, indexed like Dim.
var baseSymbols = [7]string{"m", "kg", "s", "A", "K", "mol", "cd"}

// stringOrder is the order in which [Dim.String] lists the base units:
// kg first, as in the customary "kg m^2 s^-2" for the joule.
var stringOrder = [7]int{IdxMass, IdxLength, IdxTime, IdxCurrent, IdxTemperature, IdxAmount, IdxLuminous}

// Mul returns the dimension of a product.
func (d Dim) Mul(o Dim) Dim {
	var r Dim
	for i := range d {
		r[i] = d[i] + o[i]
	}
	return r
}

// Div returns the dimension of a quotient.
func (d Dim) Div(o Dim) Dim {
	var r Dim
	for i := range d {
		r[i] = d[i] - o[i]
	}
	return r
}

// Pow returns the dimension raised to the integer power n.
func (d Dim) Pow(n int) Dim {
	var r Dim
	for i := range d {
		r[i] = d[i] * int8(n)
	}
	return r
}

// MulChecked is [Dim.Mul] that reports false when an exponent leaves the
// int8 range.
func (d Dim) MulChecked(o Dim) (Dim, bool) {
	var r Dim
	for i := range d {
		s := int(d[i]) + int(o[i])
		if s < -128 || s > 127 {
			return Dim{}, false
		}
		r[i] = int8(s)
	}
	return r, true
}

// IsDimensionless reports whether every exponent is zero.
func (d Dim) IsDimensionless() bool { return d == Dimensionless }

// String writes the dimension in SI base units, kg first, separated by
// spaces, with negative and non-unit exponents after a caret: "m^-2",
// "kg m^2 s^-2", "kg^-1 s^2 A". The dimensionless dimension is "". The
// result is accepted by [ParseUnit].
func (d Dim) String() string {
	var b strings.Builder
	for _, i := range stringOrder {
		e := d[i]
		if e == 0 {
			continue
		}
		if b.Len() > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(baseSymbols[i])
		if e != 1 {
			b.WriteByte('^')
			b.WriteString(strconv.Itoa(int(e)))
		}
	}
	return b.String()
}

// dimText is String with "1" for dimensionless, for error messages.
func dimText(d Dim) string {
	if d.IsDimensionless() {
		return "1 (dimensionless)"
	}
	return d.String()
}

// Sentinel errors. Callers branch on them with errors.Is.
var (
	// ErrDimMismatch: two dimensions that had to agree do not.
	ErrDimMismatch = errors.New("dimension mismatch")
	// ErrUnknownUnit: a unit string could not be parsed.
	ErrUnknownUnit = errors.New("unknown unit")
	// ErrNonIntegerDim: a power or root would give a fractional exponent.
	ErrNonIntegerDim = errors.New("non-integer dimension exponent")
	// ErrSyntax: a quantity string is malformed outside its unit.
	ErrSyntax = errors.New("malformed quantity")
	// ErrDomain: a function argument outside its domain (a root of a
	// negative number, a logarithm of zero).
	ErrDomain = errors.New("argument out of domain")
)

// DimError reports that an operation needed matching dimensions and got
// Left and Right. errors.Is(err, ErrDimMismatch) holds for it.
type DimError struct {
	Op          string // "+", "-", "in", "apply", ...
	Left, Right Dim
}

func (e *DimError) Error() string {
	switch e.Op {
	case "in":
		return fmt.Sprintf("dimension mismatch: cannot express %s in a unit of %s", dimText(e.Left), dimText(e.Right))
	case "apply":
		return fmt.Sprintf("dimension mismatch: function needs a dimensionless argument, got %s", dimText(e.Left))
	}
	return fmt.Sprintf("dimension mismatch in %q: %s vs %s", e.Op, dimText(e.Left), dimText(e.Right))
}

// Unwrap returns [ErrDimMismatch].
func (e *DimError) Unwrap() error { return ErrDimMismatch }
