package physics

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"cleave/calc/quantity"
)

// Closed forms of fabrication steps: rate = depth/time for an etch, depth = rate·time for a
// planned etch, dose = intensity·time for an exposure. They are the definitions of the rates
// and of the dose (common practice); an etch rate holds for one etchant, mixture age and
// temperature, so the depth of a planned etch is an expectation to check.

var (
	kVel       = kind{"a rate (length per time)", "e.g. 40 nm/min", quantity.Length.Div(quantity.Time)}
	kIntensity = kind{"an intensity (power per area)", "e.g. 12 mW/cm^2", quantity.MustUnit("W/m^2").D}
)

// EtchRate returns depth/time, the mean rate of an etch that removed depth in time.
func EtchRate(depth, time quantity.Quantity) (quantity.Quantity, error) {
	const fn = "etch_rate"
	if err := firstErr(check(fn, "depth", depth, kLength), positive(fn, "time", time, kTime)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(depth, time), nil
}

// EtchDepth returns rate·time, the depth a planned etch of that time is expected to reach.
func EtchDepth(rate, time quantity.Quantity) (quantity.Quantity, error) {
	const fn = "etch_depth"
	if err := firstErr(check(fn, "rate", rate, kVel), check(fn, "time", time, kTime)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Mul(rate, time), nil
}

// Dose returns intensity·time, the exposure dose of a lamp of that intensity (at the
// wavelength the resist is rated for) held for time.
func Dose(intensity, time quantity.Quantity) (quantity.Quantity, error) {
	const fn = "dose"
	if err := firstErr(check(fn, "intensity", intensity, kIntensity), check(fn, "time", time, kTime)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Mul(intensity, time), nil
}

// MetalLayer is one layer of an evaporated stack.
type MetalLayer struct {
	Metal     string
	Thickness quantity.Quantity
}

// StackError reports a metal stack that does not parse: Offset is the byte offset in Input.
type StackError struct {
	Input  string
	Offset int
	Msg    string
}

func (e *StackError) Error() string {
	return fmt.Sprintf("metal stack %q, column %d: %s", e.Input, utf8.RuneCountInString(e.Input[:e.Offset])+1, e.Msg)
}

// ParseStack reads a metal stack written as the trade writes it, the metals bottom (first
// deposited) first separated by "/", then their thicknesses in the same order, then one
// length unit: "Ni/AuGe/Ni/Au 5/150/30/100 nm", "Ti/Au 10/90 nm". A metal is a letter
// followed by letters and digits (Au, AuGe, Pt); a thickness is a non-negative decimal
// number. Errors are *[StackError] values with the offset of the problem.
func ParseStack(s string) ([]MetalLayer, error) {
	fail := func(off int, format string, args ...any) error {
		return &StackError{Input: s, Offset: off, Msg: fmt.Sprintf(format, args...)}
	}
	i := 0
	skip := func() {
		for i < len(s) {
			r, n := utf8.DecodeRuneInString(s[i:])
			if !unicode.IsSpace(r) {
				return
			}
			i += n
		}
	}
	skip()
	var metals []string
	for {
		start := i
		for i < len(s) {
			r, n := utf8.DecodeRuneInString(s[i:])
			if i == start && !unicode.IsLetter(r) || i > start && !unicode.IsLetter(r) && !unicode.IsDigit(r) {
				break
			}
			i += n
		}
		if i == start {
			return nil, fail(start, "expected a metal such as Ti, Ni, AuGe or Au (e.g. \"Ni/AuGe/Ni/Au 5/150/30/100 nm\")")
		}
		metals = append(metals, s[start:i])
		if i < len(s) && s[i] == '/' {
			i++
			continue
		}
		break
	}
	skip()
	var th []float64
	var thAt []int
	for {
		start := i
		for i < len(s) && (s[i] >= '0' && s[i] <= '9' || s[i] == '.') {
			i++
		}
		if i == start {
			return nil, fail(start, "expected the thickness of each metal after the metals, in the same order (e.g. 5/150/30/100 nm)")
		}
		v, err := strconv.ParseFloat(s[start:i], 64)
		if err != nil {
			return nil, fail(start, "malformed thickness %q", s[start:i])
		}
		th, thAt = append(th, v), append(thAt, start)
		if i < len(s) && s[i] == '/' {
			i++
			continue
		}
		break
	}
	skip()
	if i == len(s) {
		return nil, fail(i, "expected a length unit after the thicknesses, e.g. nm")
	}
	unitAt := i
	u, err := quantity.ParseUnit(strings.TrimSpace(s[i:]))
	if err != nil {
		return nil, fail(unitAt, "%v", err)
	}
	if u.D != quantity.Length {
		return nil, fail(unitAt, "the unit %q is not a length (expected nm or um)", strings.TrimSpace(s[i:]))
	}
	if len(th) != len(metals) {
		return nil, fail(thAt[0], "%d metals but %d thicknesses: give one thickness per metal", len(metals), len(th))
	}
	out := make([]MetalLayer, len(metals))
	for k := range metals {
		out[k] = MetalLayer{Metal: metals[k], Thickness: quantity.New(th[k]*u.Scale, quantity.Length)}
	}
	return out, nil
}

// StackThickness returns the total thickness of a stack.
func StackThickness(layers []MetalLayer) quantity.Quantity {
	sum := quantity.New(0, quantity.Length)
	for _, l := range layers {
		sum, _ = quantity.Add(sum, l.Thickness) // all lengths
	}
	return sum
}
