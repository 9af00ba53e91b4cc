package materials

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ErrBadFormula is the sentinel inside every *FormulaError.
var ErrBadFormula = errors.New("bad chemical formula")

// ErrUnknownMaterial is returned (wrapped) by [Lookup] for a name that is not in the table.
var ErrUnknownMaterial = errors.New("unknown material")

// FormulaError reports a malformed composition: the formula, the byte offset of the
// problem and what was expected.
type FormulaError struct {
	Formula string
	Offset  int // byte offset into Formula
	Msg     string
}

func (e *FormulaError) Error() string {
	return fmt.Sprintf("material %q, column %d: %s", e.Formula, e.Offset+1, e.Msg)
}

// Unwrap returns [ErrBadFormula].
func (e *FormulaError) Unwrap() error { return ErrBadFormula }

// fractionTol is how far the written fractions may sum from 1 (rounding of written
// compositions such as Al0.33Ga0.67As; common practice).
const fractionTol = 0.005

type component struct {
	sym    string
	frac   float64 // NaN when no fraction was written
	offset int
}

// ParseAlloy splits a chemical formula into its element symbols and the alloy fraction.
//
// A fraction follows its element, either bare (Al0.33Ga0.67As) or in parentheses
// (Al(0.33)Ga(0.67)As). Fractions must be decimal numbers in [0, 1], must come as a run of
// at least two consecutive elements (one sublattice), and must add to 1 within 0.005.
// elements is the formula with the fractions removed ("AlGaAs") and x is the fraction of the
// first element that carries one (Al in Al0.33Ga0.67As, In in In0.53Ga0.47As).
//
// A formula with no fractions ("GaAs", "InSb") is valid and gives x = NaN. Symbols are
// case-sensitive (an upper-case letter, then optional lower-case letters). A symbolic
// composition such as AlxGa1-xAs is an error: cleave needs the number.
func ParseAlloy(name string) (elements string, x float64, err error) {
	comps, err := splitFormula(name)
	if err != nil {
		return "", math.NaN(), err
	}
	var b strings.Builder
	first, last := -1, -1
	for i, c := range comps {
		b.WriteString(c.sym)
		if !math.IsNaN(c.frac) {
			if first >= 0 && last != i-1 {
				return "", math.NaN(), &FormulaError{name, c.offset,
					"fractions must belong to consecutive elements of one sublattice (e.g. Al0.33Ga0.67As)"}
			}
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	if first < 0 {
		return b.String(), math.NaN(), nil
	}
	if first == last {
		next := first + 1
		where := len(name)
		what := "a second element with its fraction"
		if next < len(comps) {
			where = comps[next].offset + len(comps[next].sym)
			what = "the fraction of " + comps[next].sym
		}
		return "", math.NaN(), &FormulaError{name, where, "expected " + what + " so that the fractions add to 1"}
	}
	sum := 0.0
	for _, c := range comps[first : last+1] {
		sum += c.frac
	}
	if math.Abs(sum-1) > fractionTol {
		return "", math.NaN(), &FormulaError{name, comps[first].offset,
			fmt.Sprintf("fractions add to %s, expected 1 (within %g)", strconv.FormatFloat(sum, 'g', 6, 64), fractionTol)}
	}
	return b.String(), comps[first].frac, nil
}

func splitFormula(name string) ([]component, error) {
	if name == "" {
		return nil, &FormulaError{name, 0, "empty formula"}
	}
	var comps []component
	i := 0
	for i < len(name) {
		ch := name[i]
		if ch < 'A' || ch > 'Z' {
			return nil, &FormulaError{name, i, fmt.Sprintf("expected an element symbol (upper-case letter), found %q", rune(ch))}
		}
		start := i
		i++
		for i < len(name) && name[i] >= 'a' && name[i] <= 'z' {
			i++
		}
		c := component{sym: name[start:i], frac: math.NaN(), offset: start}
		if len(c.sym) > 3 {
			return nil, &FormulaError{name, start, fmt.Sprintf("%q is not an element symbol", c.sym)}
		}
		// A symbolic composition such as "AlxGa1-xAs" reads as the symbol "Alx": no element
		// symbol ends in x, y or z except Dy.
		if last := c.sym[len(c.sym)-1]; len(c.sym) >= 2 && (last == 'x' || last == 'y' || last == 'z') && c.sym != "Dy" {
			return nil, &FormulaError{name, i - 1, "symbolic composition: write the number, e.g. Al0.33Ga0.67As"}
		}
		paren := false
		if i < len(name) && name[i] == '(' {
			paren = true
			i++
		}
		numStart := i
		for i < len(name) && (name[i] >= '0' && name[i] <= '9' || name[i] == '.') {
			i++
		}
		if i > numStart {
			f, err := strconv.ParseFloat(name[numStart:i], 64)
			if err != nil {
				return nil, &FormulaError{name, numStart, fmt.Sprintf("malformed fraction %q", name[numStart:i])}
			}
			if f < 0 || f > 1 {
				return nil, &FormulaError{name, numStart, fmt.Sprintf("fraction %s outside [0, 1]", name[numStart:i])}
			}
			c.frac = f
		} else if paren || (i < len(name) && (name[i] == '-' || name[i] == '+')) {
			return nil, &FormulaError{name, i, "expected a decimal fraction such as 0.33"}
		}
		if paren {
			if i >= len(name) || name[i] != ')' {
				return nil, &FormulaError{name, i, "expected ')' after the fraction"}
			}
			i++
		}
		comps = append(comps, c)
	}
	return comps, nil
}
