package calc

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"cleave/calc/constants"
	"cleave/calc/quantity"
)

func posErr(p Pos, err error, format string, args ...any) *Error {
	return &Error{Line: p.Line, Col: p.Col, Msg: fmt.Sprintf(format, args...), Err: err}
}

// DimName describes a dimension for messages: its SI base-unit string, with the trade's
// display unit in parentheses when that reads differently, or "dimensionless". Functions
// use it so that their messages name dimensions as the evaluator's do.
func DimName(d quantity.Dim) string {
	if d.IsDimensionless() {
		return "dimensionless"
	}
	s := d.String()
	if u, ok := tradeNames[d]; ok && u != s {
		s += " (" + u + ")"
	}
	return s
}

// tradeNames are the units a practitioner recognises a dimension by, for messages.
var tradeNames = map[quantity.Dim]string{
	quantity.MustUnit("T").D:          "T",
	quantity.MustUnit("cm^-2").D:      "cm^-2",
	quantity.MustUnit("eV").D:         "energy",
	quantity.MustUnit("Ohm").D:        "Ohm",
	quantity.MustUnit("cm^2/(V s)").D: "mobility, cm^2/(V s)",
	quantity.MustUnit("m/s").D:        "velocity",
	quantity.MustUnit("V").D:          "V",
	quantity.MustUnit("C").D:          "charge",
	quantity.MustUnit("J s").D:        "action",
	quantity.MustUnit("S").D:          "S",
	quantity.MustUnit("Hz").D:         "frequency",
	quantity.Mass:                     "mass, m_e",
}

func (e *Env) eval(n Node) (Value, error) {
	switch n := n.(type) {
	case *NumberLit:
		return e.evalNumber(n)
	case *StringLit:
		return String(n.Value), nil
	case *Ident:
		return e.lookupName(n)
	case *Unary:
		if lit, ok := n.X.(*NumberLit); ok && n.Op == "-" {
			// A negative literal is one number: -20 °C is 253.15 K, not -(293.15 K).
			return e.evalSignedNumber(lit, -1)
		}
		x, err := e.evalQuantity(n.X, "the operand of ", n.Op)
		if err != nil {
			return nil, err
		}
		if n.Op == "-" {
			if err := quantity.CheckNegate(x); err != nil {
				return nil, posErr(n.Pos, err, "%v", err)
			}
			return Q(x.Neg()), nil
		}
		return Q(x), nil
	case *Binary:
		return e.evalBinary(n)
	case *RangeExpr:
		lo, err := e.evalQuantity(n.Lo, "the start of a range", "")
		if err != nil {
			return nil, err
		}
		hi, err := e.evalQuantity(n.Hi, "the end of a range", "")
		if err != nil {
			return nil, err
		}
		if lo.Dim() != hi.Dim() {
			return nil, posErr(n.Pos, &quantity.DimError{Op: "..", Left: lo.Dim(), Right: hi.Dim()},
				"the ends of a range must have the same dimension: %s .. %s", DimName(lo.Dim()), DimName(hi.Dim()))
		}
		return Range{Lo: lo, Hi: hi}, nil
	case *ListExpr:
		out := make(List, 0, len(n.Elems))
		for _, x := range n.Elems {
			v, err := e.eval(x)
			if err != nil {
				return nil, err
			}
			out = append(out, v)
		}
		return out, nil
	case *FieldAccess:
		return e.evalPostfix(n)
	case *IndexExpr:
		return e.evalPostfix(n)
	case *Call:
		return e.evalCall(n)
	case *Convert:
		return e.evalConvert(n)
	}
	return nil, fmt.Errorf("calc: unknown node %T", n)
}

// parseUnitAt parses unit text written at p, mapping a unit error to its column.
func parseUnitAt(text string, p Pos) (quantity.Unit, error) {
	u, err := quantity.ParseUnit(text)
	if err == nil {
		return u, nil
	}
	var ue *quantity.UnitError
	col := p.Col
	msg := err.Error()
	if errors.As(err, &ue) {
		off := min(max(ue.Offset, 0), len(text))
		col += utf8.RuneCountInString(text[:off])
		msg = ue.Msg
		if !strings.Contains(ue.Msg, "\""+text+"\"") {
			msg = "in unit \"" + text + "\": " + ue.Msg
		}
	}
	return quantity.Unit{}, &Error{Line: p.Line, Col: col, Msg: msg, Err: err}
}

func parseFloatAt(text string, p Pos) (float64, error) {
	v, err := strconv.ParseFloat(text, 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, posErr(p, nil, "number %s is out of range", text)
	}
	return v, nil
}

func (e *Env) evalNumber(n *NumberLit) (Value, error) { return e.evalSignedNumber(n, 1) }

// evalSignedNumber evaluates sign × the literal n. A literal in °C is an absolute temperature
// (t + 273.15 K); a literal in a unit the trade keeps (rpm, Torr, Oe, ...) is shown in it.
func (e *Env) evalSignedNumber(n *NumberLit, sign float64) (Value, error) {
	q, u, err := e.literal(n, sign)
	if err != nil {
		return nil, err
	}
	if n.Unit == "" {
		return q, nil
	}
	if u.Offset != 0 {
		q.Q = quantity.Celsius(q.Q.Value(), q.Q.Uncertainty())
	}
	if u.Keep {
		keep := u // a copy of its own, made only for a unit that is kept
		q.Unit = &keep
	}
	return q, nil
}

// literal is the value sign × n in SI, before a unit's offset, and the unit it is written in.
func (e *Env) literal(n *NumberLit, sign float64) (Quantity, quantity.Unit, error) {
	unit := quantity.Unit{Scale: 1}
	if n.Unit != "" {
		u, err := parseUnitAt(n.Unit, n.UnitPos)
		if err != nil {
			return Quantity{}, unit, err
		}
		unit = u
	}
	v, err := parseFloatAt(n.Text, n.Pos)
	if err != nil {
		return Quantity{}, unit, err
	}
	v *= sign
	if n.Unc == "" {
		return Q(quantity.New(v*unit.Scale, unit.D)), unit, nil
	}
	var sigma float64 // in SI
	if strings.HasPrefix(n.Unc, "(") {
		// concise form: the digits count in the last place of the mantissa, then the exponent applies.
		mant, exp := splitExponent(n.Text)
		digits := strings.Trim(n.Unc, "()")
		decimals := 0
		if i := strings.IndexByte(mant, '.'); i >= 0 {
			decimals = len(mant) - i - 1
		}
		s := digits + "e" + strconv.Itoa(-decimals)
		u, err := strconv.ParseFloat(s, 64)
		if err != nil {
			return Quantity{}, unit, posErr(n.UncPos, nil, "uncertainty %s is out of range", n.Unc)
		}
		if exp != "" {
			p, err := strconv.Atoi(strings.TrimPrefix(exp[1:], "+"))
			if err != nil || p > 400 || p < -400 {
				return Quantity{}, unit, posErr(n.Pos, nil, "number %s is out of range", n.Text)
			}
			u *= math.Pow(10, float64(p))
		}
		sigma = u * unit.Scale
	} else {
		u, err := parseFloatAt(n.Unc, n.UncPos)
		if err != nil {
			return Quantity{}, unit, err
		}
		uScale := unit.Scale
		if n.UncAfter && n.UncUnit != "" {
			uu, err := parseUnitAt(n.UncUnit, n.UncUPos)
			if err != nil {
				return Quantity{}, unit, err
			}
			if uu.D != unit.D {
				return Quantity{}, unit, posErr(n.UncUPos, &quantity.DimError{Op: "±", Left: unit.D, Right: uu.D},
					"the uncertainty is in %s but the value is in %s: their dimensions differ (%s vs %s)", n.UncUnit, n.Unit, DimName(uu.D), DimName(unit.D))
			}
			uScale = uu.Scale
		}
		sigma = u * uScale
	}
	if sigma < 0 || math.IsInf(sigma, 0) || math.IsNaN(sigma) {
		return Quantity{}, unit, posErr(n.UncPos, nil, "an uncertainty must be a finite number >= 0")
	}
	return Q(quantity.Uncertain(v*unit.Scale, sigma, unit.D)), unit, nil
}

// evalQuantity evaluates n and requires a quantity; what followed by op names the operand
// for messages (joined only for a message: most operands are quantities).
func (e *Env) evalQuantity(n Node, what, op string) (quantity.Quantity, error) {
	v, err := e.eval(n)
	if err != nil {
		return quantity.Quantity{}, err
	}
	q, ok := v.(Quantity)
	if !ok {
		p := n.Position()
		return quantity.Quantity{}, posErr(p, ErrType, "%s%s must be a quantity, found a %s", what, op, v.Type())
	}
	return q.Q, nil
}

// chainOp reports whether op is left-associative and may therefore repeat along a left spine
// as long as the line: a + b + c + … or a * b * c * ….
func chainOp(op string) bool { return op == "+" || op == "-" || op == "*" || op == "/" }

// evalBinary evaluates n. A run of left-associative operators (a + b - c + …) makes a tree
// as deep as the run is long, so the left spine is walked in a loop, not by recursion: the
// depth of the evaluator's recursion stays bounded by the parser's nesting limit, whatever
// the length of the line. Operands are still evaluated left to right, and errors are the
// same as the recursive form gave.
func (e *Env) evalBinary(n *Binary) (Value, error) {
	if !chainOp(n.Op) {
		x, err := e.evalQuantity(n.X, "the left operand of ", n.Op)
		if err != nil {
			return nil, err
		}
		return e.binaryRight(n, x)
	}
	var buf [16]*Binary // a short run needs no slice of its own
	spine := append(buf[:0], n)
	for {
		b, ok := spine[len(spine)-1].X.(*Binary)
		if !ok || !chainOp(b.Op) {
			break
		}
		spine = append(spine, b)
	}
	first := spine[len(spine)-1]
	x, err := e.evalQuantity(first.X, "the left operand of ", first.Op)
	if err != nil {
		return nil, err
	}
	var v Value
	for i := len(spine) - 1; i >= 0; i-- {
		if v, err = e.binaryRight(spine[i], x); err != nil {
			return nil, err
		}
		x = v.(Quantity).Q
	}
	return v, nil
}

// binaryRight evaluates the right operand of n and applies n's operator to x and it. A
// result that overflows to an infinity, or a product or quotient of two non-zero numbers that
// underflows to zero, is an error at the operator: it would otherwise be written as a result.
func (e *Env) binaryRight(n *Binary, x quantity.Quantity) (Value, error) {
	y, err := e.evalQuantity(n.Y, "the right operand of ", n.Op)
	if err != nil {
		return nil, err
	}
	r, err := applyBinary(n, x, y)
	if err != nil {
		return nil, err
	}
	if err := finiteResult(n, x, y, r.(Quantity).Q); err != nil {
		return nil, err
	}
	return r, nil
}

// finiteResult checks the outcome r of x op y.
func finiteResult(n *Binary, x, y, r quantity.Quantity) error {
	v, u := r.Value(), r.Uncertainty()
	switch {
	case math.IsInf(v, 0) || math.IsNaN(v):
		return posErr(n.Pos, ErrNotFinite, "%g %s %g overflows: the result is beyond the largest number (about 1.8e308 in SI units)", x.Value(), n.Op, y.Value())
	case math.IsInf(u, 0) || math.IsNaN(u):
		return posErr(n.Pos, ErrNotFinite, "the uncertainty of %g %s %g overflows: it is beyond the largest number (about 1.8e308 in SI units)", x.Value(), n.Op, y.Value())
	case v == 0 && n.Op != "+" && n.Op != "-" && x.Value() != 0 && (n.Op == "^" || y.Value() != 0):
		return posErr(n.Pos, ErrNotFinite, "%g %s %g underflows to zero: the result is below the smallest number (about 4.9e-324 in SI units)", x.Value(), n.Op, y.Value())
	}
	return nil
}

// applyBinary applies n's operator to its evaluated operands.
func applyBinary(n *Binary, x, y quantity.Quantity) (Value, error) {
	switch n.Op {
	case "+", "-":
		var r quantity.Quantity
		var err error
		if n.Op == "+" {
			r, err = quantity.Add(x, y)
		} else {
			r, err = quantity.Sub(x, y)
		}
		if errors.Is(err, quantity.ErrAmbiguousTemperature) {
			return nil, posErr(n.Pos, err, "%v", err)
		}
		if err != nil {
			verb := map[string]string{"+": "add", "-": "subtract"}[n.Op]
			return nil, posErr(n.Pos, err, "cannot %s %s and %s: the dimensions differ", verb, DimName(x.Dim()), DimName(y.Dim()))
		}
		return Q(r), nil
	case "*":
		if err := quantity.CheckScaling("*", x, y); err != nil {
			return nil, posErr(n.Pos, err, "%v", err)
		}
		return Q(quantity.Mul(x, y)), nil
	case "/":
		if y.Value() == 0 {
			return nil, posErr(n.Pos, nil, "division by zero")
		}
		if err := quantity.CheckScaling("/", x, y); err != nil {
			return nil, posErr(n.Pos, err, "%v", err)
		}
		return Q(quantity.Div(x, y)), nil
	case "^":
		if !y.Dim().IsDimensionless() {
			return nil, posErr(n.Y.Position(), &quantity.DimError{Op: "^", Left: x.Dim(), Right: y.Dim()},
				"an exponent must be dimensionless, found %s", DimName(y.Dim()))
		}
		if y.HasUncertainty() && y.Uncertainty() > 0 {
			return nil, posErr(n.Y.Position(), nil, "an exponent must be exact (it has an uncertainty)")
		}
		r, err := quantity.Pow(x, y.Value())
		if err != nil {
			return nil, posErr(n.Pos, err, "cannot raise %s to the power %g: %v", DimName(x.Dim()), y.Value(), err)
		}
		switch {
		case math.IsNaN(r.Value()):
			return nil, posErr(n.Pos, ErrNotFinite, "%g ^ %g is not a real number", x.Value(), y.Value())
		case math.IsInf(r.Value(), 0) && x.Value() == 0:
			return nil, posErr(n.Pos, ErrNotFinite, "0 ^ %g is a division by zero", y.Value())
		}
		return Q(r), nil
	}
	return nil, posErr(n.Pos, nil, "unknown operator %s", n.Op)
}

func (e *Env) evalConvert(n *Convert) (Value, error) {
	u, err := parseUnitAt(n.Unit, n.Pos)
	if err != nil {
		return nil, err
	}
	v, err := e.eval(n.X)
	if err != nil {
		return nil, err
	}
	return convertValue(v, u, n)
}

func convertValue(v Value, u quantity.Unit, n *Convert) (Value, error) {
	check := func(d quantity.Dim) error {
		if d != u.D {
			return posErr(n.Pos, &quantity.DimError{Op: "->", Left: d, Right: u.D},
				"cannot show %s in %s (%s)", DimName(d), n.Unit, u.D.String())
		}
		return nil
	}
	switch v := v.(type) {
	case Quantity:
		q := thermal(v.Q, u.D)
		if err := check(q.Dim()); err != nil {
			return nil, err
		}
		// In °C a temperature is absolute from here on, in K thermodynamic (it may be scaled).
		q, err := q.ExpressedIn(u)
		if err != nil {
			return nil, posErr(n.Pos, err, "%v", err)
		}
		return Quantity{Q: q, Unit: &u}, nil
	case Range:
		lo, hi := thermal(v.Lo, u.D), thermal(v.Hi, u.D)
		if err := check(lo.Dim()); err != nil {
			return nil, err
		}
		return Range{Lo: lo, Hi: hi, Unit: &u}, nil
	case List:
		out := make(List, len(v))
		for i, x := range v {
			c, err := convertValue(x, u, n)
			if err != nil {
				return nil, err
			}
			out[i] = c
		}
		return out, nil
	}
	return nil, posErr(n.ArrowAt, ErrType, "-> needs a quantity, range or list, found a %s", v.Type())
}

// evalPostfix evaluates a chain of field accesses and indexes (r.a[0].b) from its innermost
// operand outwards, in a loop: a long chain costs no recursion.
func (e *Env) evalPostfix(n Node) (Value, error) {
	var buf [8]Node // a short chain needs no slice of its own
	spine := buf[:0]
	cur := n
spine:
	for {
		switch c := cur.(type) {
		case *FieldAccess:
			spine = append(spine, c)
			cur = c.X
		case *IndexExpr:
			spine = append(spine, c)
			cur = c.X
		default:
			break spine
		}
	}
	x, err := e.eval(cur)
	if err != nil {
		return nil, err
	}
	for i := len(spine) - 1; i >= 0; i-- {
		switch s := spine[i].(type) {
		case *FieldAccess:
			x, err = e.field(s, x)
		case *IndexExpr:
			x, err = e.index(s, x)
		}
		if err != nil {
			return nil, err
		}
	}
	return x, nil
}

// field reads the field n.Name of x.
func (e *Env) field(n *FieldAccess, x Value) (Value, error) {
	f, ok := x.(Fielder)
	if !ok {
		return nil, posErr(n.Pos, ErrType, "a %s has no fields (found .%s)", x.Type(), n.Name)
	}
	v, ok := f.Field(n.Name)
	if !ok {
		names := f.FieldNames()
		msg := fmt.Sprintf("no field %q", n.Name)
		r, isRec := x.(*Record)
		if isRec && r.Path != "" {
			msg = fmt.Sprintf("%s has no field %q", r.Path, n.Name)
		} else if name := recordName(x); isRec && name != "a record" {
			// A material (or another named record): say which lacks what, and what it has.
			return nil, posErr(n.Pos, ErrUnknownName, "%s has no %s; its fields: %s", name, n.Name, strings.Join(names, ", "))
		}
		if s := nearest(n.Name, names); s != "" {
			msg += " (did you mean " + s + "?)"
		} else if len(names) > 0 {
			msg += "; fields: " + strings.Join(names, ", ")
		}
		return nil, posErr(n.Pos, ErrUnknownName, "%s", msg)
	}
	if r, ok := x.(*Record); ok && r.Path != "" {
		if sub, ok := v.(*Record); ok {
			cp := *sub
			cp.Path = r.Path + "." + n.Name
			return &cp, nil
		}
	}
	return v, nil
}

// index reads x[i]: the item of a list at a 0-based index (negative counts from the end: -1
// is the last), or the field of a record (any value with fields) named by a string.
func (e *Env) index(n *IndexExpr, x Value) (Value, error) {
	iv, err := e.eval(n.Index)
	if err != nil {
		return nil, err
	}
	at := n.Index.Position()
	if name, ok := iv.(String); ok {
		if _, ok := x.(Fielder); !ok {
			return nil, posErr(at, ErrType, "a %s has no fields (found [%s])", x.Type(), quoteString(string(name)))
		}
		return e.field(&FieldAccess{Pos: at, Name: string(name)}, x)
	}
	l, ok := x.(List)
	if !ok {
		return nil, posErr(n.Pos, ErrType, "[ ] indexes a list (or a record by a field name in quotes), found a %s", x.Type())
	}
	q, ok := iv.(Quantity)
	if !ok || !q.Q.Dim().IsDimensionless() || q.Q.HasUncertainty() {
		return nil, posErr(at, ErrType, "a list index is a whole number such as 0 (the first item) or -1 (the last), found %s", Display(iv))
	}
	f := q.Q.Value()
	if f != math.Trunc(f) || math.IsInf(f, 0) || math.IsNaN(f) {
		return nil, posErr(at, ErrType, "a list index is a whole number such as 0 (the first item) or -1 (the last), found %s", Display(iv))
	}
	i := f
	if i < 0 {
		i += float64(len(l))
	}
	if i < 0 || i >= float64(len(l)) {
		what := fmt.Sprintf("the list has %d items, indexes 0 to %d (or -1 to -%d from the end)", len(l), len(l)-1, len(l))
		if len(l) == 0 {
			what = "the list is empty"
		}
		return nil, posErr(at, ErrArgument, "index %g is out of range: %s", f, what)
	}
	return l[int(i)], nil
}

func (e *Env) evalCall(n *Call) (Value, error) {
	f, ok := e.lookupFunc(n.Func)
	if !ok {
		if m, ok := materialCall(n); ok {
			return m, nil
		}
		msg := fmt.Sprintf("unknown function %q", n.Func)
		if s := nearest(n.Func, e.funcNames()); s != "" {
			msg += " (did you mean " + s + "?)"
		}
		return nil, posErr(n.Pos, ErrUnknownFunction, "%s", msg)
	}
	args := make([]Value, len(f.Params))
	var posBuf [8]Pos // positions are read only for messages: most calls need no slice for them
	argPos := posBuf[:0]
	if len(f.Params) > len(posBuf) {
		argPos = make([]Pos, len(f.Params))
	}
	argPos = argPos[:len(f.Params)]
	var extra List
	for i, a := range n.Args {
		v, err := e.eval(a.Value)
		if err != nil {
			return nil, err
		}
		idx := -1
		if a.Name == "" {
			switch {
			case f.Variadic && i >= len(f.Params)-1:
				extra = append(extra, v)
				argPos[len(f.Params)-1] = a.Pos
				continue
			case i >= len(f.Params):
				return nil, posErr(a.Pos, ErrArgument, "too many arguments: %s takes %d", f.Signature(), len(f.Params))
			}
			idx = i
		} else {
			for j, p := range f.Params {
				if p.Name == a.Name {
					idx = j
				}
			}
			if idx < 0 {
				return nil, posErr(a.Pos, ErrArgument, "%s has no parameter %q; parameters: %s", n.Func, a.Name, f.Signature())
			}
			if args[idx] != nil {
				return nil, posErr(a.Pos, ErrArgument, "argument %s given twice in %s", a.Name, f.Signature())
			}
		}
		args[idx] = v
		argPos[idx] = a.Pos
	}
	if f.Variadic {
		last := len(f.Params) - 1
		if extra != nil {
			if len(extra) == 1 {
				if l, ok := extra[0].(List); ok {
					extra = l
				}
			}
			args[last] = extra
		}
	}
	// A record standing in for a parameter (a material for a mass) also supplies the
	// degeneracies gs and gv the call leaves out: Si(100) has two valleys.
	for i, p := range f.Params {
		if p.FromRecord == "" || args[i] == nil {
			continue
		}
		fl, ok := args[i].(Fielder)
		if !ok {
			continue
		}
		if _, ok := fl.Field(p.FromRecord); !ok {
			return nil, posErr(argPos[i], ErrArgument, "%s: argument %s: %s has no %s (its fields: %s); give a value such as `0.067 m_e`",
				n.Func, p.Name, recordName(args[i]), p.FromRecord, strings.Join(fl.FieldNames(), ", "))
		}
		for j, q := range f.Params {
			if args[j] != nil || q.Name != "gs" && q.Name != "gv" {
				continue
			}
			if fv, ok := fl.Field(q.Name); ok {
				args[j], argPos[j] = fv, argPos[i]
			}
		}
	}
	for i, p := range f.Params {
		if args[i] == nil {
			if p.Default == nil {
				return nil, posErr(n.Pos, ErrArgument, "missing argument %s: %s", p.Name, f.Signature())
			}
			args[i] = p.Default
			argPos[i] = n.Pos
			continue
		}
		if p.FromRecord != "" {
			if fl, ok := args[i].(Fielder); ok {
				if fv, ok := fl.Field(p.FromRecord); ok {
					args[i] = fv
				}
			}
		}
		if p.Dim != nil {
			q, ok := args[i].(Quantity)
			if !ok {
				return nil, posErr(argPos[i], ErrType, "%s: argument %s must be a quantity (%s), found a %s", n.Func, p.Name, DimName(*p.Dim), args[i].Type())
			}
			if q.Q.Dim() != *p.Dim {
				hint := ""
				if q.Q.Dim().IsDimensionless() {
					// A bare number where a quantity belongs: most often a forgotten unit.
					u := quantity.Customary(quantity.New(q.Q.Value(), *p.Dim))
					hint = fmt.Sprintf("; write it with its unit, e.g. `%s %s`", strings.Replace(strconv.FormatFloat(q.Q.Value(), 'g', -1, 64), "e+", "e", 1), u.Symbol)
					if p.FromRecord == "mstar" {
						hint += " or a material such as GaAs"
					}
				}
				return nil, posErr(argPos[i], &quantity.DimError{Op: n.Func, Left: q.Q.Dim(), Right: *p.Dim},
					"%s: argument %s must be %s, found %s%s", n.Func, p.Name, DimName(*p.Dim), DimName(q.Q.Dim()), hint)
			}
		}
	}
	v, err := f.Call(e, args)
	if err != nil {
		var ae *ArgError
		if errors.As(err, &ae) && ae.Arg >= 0 && ae.Arg < len(argPos) {
			if strings.HasPrefix(ae.Err.Error(), n.Func+":") {
				return nil, posErr(argPos[ae.Arg], ae.Err, "%v", ae.Err)
			}
			return nil, posErr(argPos[ae.Arg], ae.Err, "%s: %v", n.Func, ae.Err)
		}
		var ce *Error
		if errors.As(err, &ce) {
			return nil, ce
		}
		if strings.HasPrefix(err.Error(), n.Func+":") {
			return nil, posErr(n.Pos, err, "%v", err) // the function already names itself
		}
		return nil, posErr(n.Pos, err, "%s: %v", n.Func, err)
	}
	if q, ok := v.(Quantity); ok {
		if x := q.Q.Value(); math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, posErr(n.Pos, ErrNotFinite, "%s: the result is not a finite number", n.Func)
		}
		if u := q.Q.Uncertainty(); math.IsNaN(u) || math.IsInf(u, 0) {
			return nil, posErr(n.Pos, ErrNotFinite, "%s: the uncertainty of the result is not a finite number", n.Func)
		}
	}
	return v, nil
}

// recordName is how a message names a record: its "name" field (a material's name), else
// "a record".
func recordName(v Value) string {
	if r, ok := v.(*Record); ok {
		if nv, ok := r.Field("name"); ok {
			if s, ok := nv.(String); ok && s != "" {
				return string(s)
			}
		}
	}
	return "a record"
}

// thermal converts an energy asked for in a temperature unit to E/k_B, and a temperature
// asked for in an energy unit to k_B T (`1 meV -> K` is 11.6 K; common practice, k_B exact
// in the SI since 2019 [src:CODATA2018]); anything else is returned as it is.
func thermal(q quantity.Quantity, want quantity.Dim) quantity.Quantity {
	energy := quantity.MustUnit("J").D
	kB := quantity.New(constants.Value("k_B"), energy.Div(quantity.Temperature))
	switch {
	case q.Dim() == energy && want == quantity.Temperature:
		return quantity.Div(q, kB)
	case q.Dim() == quantity.Temperature && want == energy:
		return quantity.Mul(q, kB)
	}
	return q
}
