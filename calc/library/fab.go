package library

import (
	"errors"
	"fmt"
	"strings"

	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// fabFuncs compute what a fabrication run's records imply: the transfer-length method on a
// TLM pattern, a contact's resistance from a two-terminal reading, an etch's rate and the
// depth of a planned etch, an exposure's dose, a metal stack's thickness. Each takes either
// the numbers or a step of a process entry's `steps:` (a record with the step's fields). The
// closed forms are in calc/physics, the fit in calc/transport.
func fabFuncs() []calc.Func {
	nmPerMin := quantity.MustUnit("nm/min")
	ohmMM := quantity.MustUnit("Ohm mm")
	return []calc.Func{
		{Name: "tlm",
			Doc: "transfer-length method: a line through the total resistances of a TLM pattern against its gaps gives the contact resistance Rc (and Rc·W in Ohm mm), the transfer length LT, the sheet resistance Rsh and the specific contact resistivity rho_c, with their uncertainties; gaps as a list, a pattern name on the mask, or a process step of kind tlm",
			Params: []calc.Param{{Name: "gaps"}, {Name: "resistances", Default: calc.String("none")}, {Name: "width", Default: calc.String("none")},
				{Name: "contact_length", Default: calc.String("none")}},
			Call: func(e *calc.Env, a []calc.Value) (calc.Value, error) { return tlmCall(e, a, ohmMM) }},
		{Name: "contact_resistance",
			Doc: "resistance of one contact from a two-terminal resistance minus the channel's: (R_2t - R_channel)/contacts; with width= also Rc·W, with reference= (a tlm result) the ratio to it",
			Params: []calc.Param{req("R_2t", dResistance), req("R_channel", dResistance), {Name: "contacts", Dim: dimp(dNone), Default: num(2)},
				{Name: "width", Default: calc.String("none")}, {Name: "reference", Default: calc.String("none")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) { return contactCall(a, ohmMM) }},
		{Name: "etch_rate",
			Doc:    "mean etch rate: measured depth over etch time (or an etch step with depth and time)",
			Params: []calc.Param{{Name: "depth"}, {Name: "time", Default: calc.String("none")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				depth, t, err := pairArgs(a, "depth", "time", quantity.Length, dTime)
				if err != nil {
					return nil, err
				}
				r, err := physics.EtchRate(depth, t)
				if err != nil {
					return nil, err
				}
				return calc.Quantity{Q: r, Unit: &nmPerMin}, nil
			}},
		{Name: "etch_depth",
			Doc:    "expected depth of a planned etch: rate times time",
			Params: []calc.Param{req("rate", dSpeed), req("time", dTime)},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				d, err := physics.EtchDepth(qa(a, 0), qa(a, 1))
				if err != nil {
					return nil, err
				}
				return calc.Q(d), nil
			}},
		{Name: "dose",
			Doc:    "exposure dose: intensity times exposure time (or a lithography step with intensity and exposure)",
			Params: []calc.Param{{Name: "intensity"}, {Name: "time", Default: calc.String("none")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				in, t, err := pairArgs(a, "intensity", "exposure", dIntensity, dTime)
				if err != nil {
					return nil, err
				}
				d, err := physics.Dose(in, t)
				if err != nil {
					return nil, err
				}
				return calc.Q(d), nil
			}},
		{Name: "metal_thickness",
			Doc:    "total thickness of a metal stack written as \"Ni/AuGe/Ni/Au 5/150/30/100 nm\" (or a metal step with that stack)",
			Params: []calc.Param{{Name: "stack"}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				s, err := metalStackArg(a, 0)
				if err != nil {
					return nil, err
				}
				l, err := physics.ParseStack(s)
				if err != nil {
					return nil, &calc.ArgError{Arg: 0, Err: err}
				}
				return calc.Q(physics.StackThickness(l)), nil
			}},
	}
}

var (
	dIntensity = quantity.MustUnit("W/m^2").D
	dPerLength = quantity.MustUnit("Ohm/m").D
	dResLength = quantity.MustUnit("Ohm m").D
)

// stepField reads a field of a step record.
func stepField(r *calc.Record, name string) (calc.Value, bool) {
	v, ok := r.Field(name)
	if !ok {
		return nil, false
	}
	if s, isStr := v.(calc.String); isStr && strings.TrimSpace(string(s)) == "" {
		return nil, false
	}
	return v, true
}

// stepQuantity reads a quantity field of dimension d from a step record.
func stepQuantity(r *calc.Record, name string, d quantity.Dim) (quantity.Quantity, error) {
	v, ok := stepField(r, name)
	if !ok {
		return quantity.Quantity{}, fmt.Errorf("%w: the step has no %s", calc.ErrArgument, name)
	}
	q, ok := v.(calc.Quantity)
	if !ok || q.Q.Dim() != d {
		return quantity.Quantity{}, fmt.Errorf("%w: the step's %s is %s, expected %s", calc.ErrArgument, name, calc.Display(v), calc.DimName(d))
	}
	return q.Q, nil
}

// pairArgs reads two quantities (x, y) given either as the two arguments or as a step record
// in the first with fields xName and yName.
func pairArgs(a []calc.Value, xName, yName string, dx, dy quantity.Dim) (quantity.Quantity, quantity.Quantity, error) {
	if r, ok := a[0].(*calc.Record); ok {
		x, err := stepQuantity(r, xName, dx)
		if err != nil {
			return x, x, &calc.ArgError{Arg: 0, Err: err}
		}
		y, err := stepQuantity(r, yName, dy)
		if err != nil {
			return x, y, &calc.ArgError{Arg: 0, Err: err}
		}
		return x, y, nil
	}
	x, err := quantityOf(a, 0, dx, xName)
	if err != nil {
		return x, x, err
	}
	y, err := quantityOf(a, 1, dy, yName)
	return x, y, err
}

// quantityOf reads argument i as a quantity of dimension d.
func quantityOf(a []calc.Value, i int, d quantity.Dim, what string) (quantity.Quantity, error) {
	q, ok := a[i].(calc.Quantity)
	if !ok {
		if s, isStr := a[i].(calc.String); isStr && s == "none" {
			return quantity.Quantity{}, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: %s is missing (%s)", calc.ErrArgument, what, calc.DimName(d))}
		}
		return quantity.Quantity{}, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: %s must be %s, found a %s", calc.ErrType, what, calc.DimName(d), a[i].Type())}
	}
	if q.Q.Dim() != d {
		return quantity.Quantity{}, &calc.ArgError{Arg: i, Err: &quantity.DimError{Op: what, Left: q.Q.Dim(), Right: d}}
	}
	return q.Q, nil
}

// metalStackArg reads a metal stack: a string, or a step with a `stack` field.
func metalStackArg(a []calc.Value, i int) (string, error) {
	v := a[i]
	if r, ok := v.(*calc.Record); ok {
		f, ok := stepField(r, "stack")
		if !ok {
			return "", &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: the step has no stack", calc.ErrArgument)}
		}
		v = f
	}
	s, ok := v.(calc.String)
	if !ok {
		return "", &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a stack such as \"Ni/AuGe/Ni/Au 5/150/30/100 nm\", found a %s", calc.ErrType, v.Type())}
	}
	return string(s), nil
}

// lengths reads a list of lengths (gaps) in SI.
func lengthList(v calc.Value, arg int, what string) ([]float64, error) {
	l, ok := v.(calc.List)
	if !ok {
		return nil, &calc.ArgError{Arg: arg, Err: fmt.Errorf("%w: %s must be a list of lengths such as [5 um, 10 um, 20 um], found a %s", calc.ErrType, what, v.Type())}
	}
	out := make([]float64, len(l))
	for i, it := range l {
		q, ok := it.(calc.Quantity)
		if !ok || q.Q.Dim() != quantity.Length {
			return nil, &calc.ArgError{Arg: arg, Err: fmt.Errorf("%w: %s item %d is %s, expected a length", calc.ErrArgument, what, i+1, calc.Display(it))}
		}
		out[i] = q.Q.Value()
	}
	return out, nil
}

// tlmPattern finds a TLM pattern by name on a mask: the mask named by id, or else the mask
// in the entry's lineage, read through the environment so that the notebook records the
// dependency.
func tlmPattern(e *calc.Env, name, maskID string) (*calc.Record, error) {
	expr := "mask.tlm"
	if maskID != "" {
		if strings.ContainsAny(maskID, "\"\\") {
			return nil, fmt.Errorf("%w: mask id %q", calc.ErrArgument, maskID)
		}
		expr = `entry("` + maskID + `").tlm`
	}
	v, err := e.Eval(expr)
	if err != nil {
		where := "the mask in this entry's lineage"
		if maskID != "" {
			where = "mask " + maskID
		}
		return nil, fmt.Errorf("%w: TLM pattern %q: %s has no `tlm:` patterns (%v)", calc.ErrArgument, name, where, err)
	}
	pats, ok := v.(*calc.Record)
	if !ok {
		return nil, fmt.Errorf("%w: the mask's tlm field is not a map of patterns", calc.ErrArgument)
	}
	p, ok := pats.Field(name)
	if !ok {
		return nil, fmt.Errorf("%w: the mask has no TLM pattern %q; it has: %s", calc.ErrArgument, name, strings.Join(pats.FieldNames(), ", "))
	}
	pr, ok := p.(*calc.Record)
	if !ok {
		return nil, fmt.Errorf("%w: TLM pattern %q is not a map of width, gaps and contact_length", calc.ErrArgument, name)
	}
	return pr, nil
}

// tlmCall reads the arguments of tlm (numbers, a pattern name, or a step) and fits.
func tlmCall(e *calc.Env, a []calc.Value, ohmMM quantity.Unit) (calc.Value, error) {
	var gapsV, resV, widthV, lenV calc.Value = a[0], a[1], a[2], a[3]
	none := func(v calc.Value) bool { s, ok := v.(calc.String); return ok && s == "none" }
	var pattern *calc.Record
	if step, ok := a[0].(*calc.Record); ok {
		gapsV = nil
		if v, ok := stepField(step, "resistances"); ok && none(resV) {
			resV = v
		}
		for name, dst := range map[string]*calc.Value{"width": &widthV, "contact_length": &lenV} {
			if v, ok := stepField(step, name); ok && none(*dst) {
				*dst = v
			}
		}
		if v, ok := stepField(step, "gaps"); ok {
			gapsV = v
		} else if v, ok := stepField(step, "pattern"); ok {
			maskID := ""
			if m, ok := stepField(step, "mask"); ok {
				maskID = textOf(m)
			}
			p, err := tlmPattern(e, textOf(v), maskID)
			if err != nil {
				return nil, &calc.ArgError{Arg: 0, Err: err}
			}
			pattern = p
		} else {
			return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: the step names neither gaps nor a pattern", calc.ErrArgument)}
		}
	} else if s, ok := a[0].(calc.String); ok {
		p, err := tlmPattern(e, strings.TrimSpace(string(s)), "")
		if err != nil {
			return nil, &calc.ArgError{Arg: 0, Err: err}
		}
		pattern = p
	}
	if pattern != nil {
		g, ok := stepField(pattern, "gaps")
		if !ok {
			return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: the TLM pattern has no gaps", calc.ErrArgument)}
		}
		gapsV = g
		for name, dst := range map[string]*calc.Value{"width": &widthV, "contact_length": &lenV} {
			if v, ok := stepField(pattern, name); ok && none(*dst) {
				*dst = v
			}
		}
	}
	gaps, err := lengthList(gapsV, 0, "gaps")
	if err != nil {
		return nil, err
	}
	if none(resV) {
		return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: resistances are missing: one total resistance per gap", calc.ErrArgument)}
	}
	R, sR, err := quantities([]calc.Value{resV}, 0, dResistance, "resistances")
	if err != nil {
		return nil, &calc.ArgError{Arg: 1, Err: errors.Unwrap(err)}
	}
	if none(widthV) {
		return nil, &calc.ArgError{Arg: 2, Err: fmt.Errorf("%w: the contact width is missing (width= or the pattern's width)", calc.ErrArgument)}
	}
	W, err := quantityOf([]calc.Value{widthV}, 0, quantity.Length, "width")
	if err != nil {
		return nil, &calc.ArgError{Arg: 2, Err: errors.Unwrap(err)}
	}
	L := quantity.New(0, quantity.Length)
	if !none(lenV) {
		if L, err = quantityOf([]calc.Value{lenV}, 0, quantity.Length, "contact_length"); err != nil {
			return nil, &calc.ArgError{Arg: 3, Err: errors.Unwrap(err)}
		}
	}
	fit, err := transport.FitTLM(gaps, R, sR)
	if err != nil {
		return nil, err
	}
	p := correlated([]float64{fit.Intercept.Value, fit.Slope.Value}, [][]float64{fit.Cov[0][:], fit.Cov[1][:]}, []quantity.Dim{dResistance, dPerLength})
	tl, err := physics.TransferLength(p[1], p[0], W, L)
	noLT := errors.Is(err, physics.ErrNoTransferLength)
	if err != nil && !noLT {
		return nil, err
	}
	gl := make(calc.List, len(gaps))
	for i, g := range gaps {
		gl[i] = calc.Q(quantity.New(g, quantity.Length))
	}
	kv := []any{"Rc", calc.Q(tl.Rc), "Rc_W", calc.Quantity{Q: tl.RcW, Unit: &ohmMM}}
	extra := []string{"Rc_W", "Rsh"}
	if !noLT {
		kv = append(kv, "LT", calc.Q(tl.LT), "rho_c", calc.Q(tl.RhoC))
		extra = []string{"Rc_W", "LT", "Rsh", "rho_c"}
	}
	kv = append(kv, "Rsh", calc.Q(tl.Rsh), "intercept", calc.Q(p[0]), "slope", calc.Q(p[1]),
		"R2", num(fit.R2), "points", num(float64(fit.Points)), "gaps", gl, "width", calc.Q(W))
	r := withWarnings(newResult("tlm", "Rc", extra, kv...), fit.Warnings)
	if tl.Corrected && L.Value() < 2*tl.LT.Value() {
		r.Warnings = append(r.Warnings, fmt.Sprintf("the contacts (%s) are shorter than twice the transfer length: L_T from L_x = L_T coth(L/L_T)", quantity.Format(L)))
	}
	r.Detail = tl
	return r, nil
}

// contactCall is contact_resistance.
func contactCall(a []calc.Value, ohmMM quantity.Unit) (calc.Value, error) {
	n, err := intArg(a, 2)
	if err != nil {
		return nil, err
	}
	rc, err := physics.ContactResistance(qa(a, 0), qa(a, 1), n)
	if err != nil {
		return nil, err
	}
	kv := []any{"Rc", calc.Q(rc)}
	extra := []string{}
	W, hasW, err := optQ(a, 3, quantity.Length, "a contact width")
	if err != nil {
		return nil, err
	}
	var rcw quantity.Quantity
	if hasW {
		rcw = quantity.Mul(rc, W)
		kv = append(kv, "Rc_W", calc.Quantity{Q: rcw, Unit: &ohmMM})
		extra = append(extra, "Rc_W")
	}
	var warns []string
	if rc.Value() < 0 {
		warns = append(warns, "the channel's resistance exceeds the two-terminal one: R_channel overestimated (squares, sheet resistance) or the readings are from different temperatures")
	}
	if ref := a[4]; !(isNone(ref)) {
		var ratio quantity.Quantity
		switch r := ref.(type) {
		case *calc.AnalysisResult:
			if hasW {
				v, ok := r.Field("Rc_W")
				q, isQ := v.(calc.Quantity)
				if !ok || !isQ || q.Q.Dim() != dResLength {
					return nil, &calc.ArgError{Arg: 4, Err: fmt.Errorf("%w: reference= needs a tlm result (with Rc_W)", calc.ErrArgument)}
				}
				ratio = quantity.Div(rcw, q.Q)
			} else {
				v, ok := r.Field("Rc")
				q, isQ := v.(calc.Quantity)
				if !ok || !isQ || q.Q.Dim() != dResistance {
					return nil, &calc.ArgError{Arg: 4, Err: fmt.Errorf("%w: reference= needs a tlm result (with Rc)", calc.ErrArgument)}
				}
				ratio = quantity.Div(rc, q.Q)
			}
		case calc.Quantity:
			switch {
			case r.Q.Dim() == dResistance:
				ratio = quantity.Div(rc, r.Q)
			case r.Q.Dim() == dResLength && hasW:
				ratio = quantity.Div(rcw, r.Q)
			default:
				return nil, &calc.ArgError{Arg: 4, Err: fmt.Errorf("%w: reference= is a contact resistance (Ohm), Rc·W (Ohm mm, with width=) or a tlm result", calc.ErrArgument)}
			}
		default:
			return nil, &calc.ArgError{Arg: 4, Err: fmt.Errorf("%w: reference= is a tlm result or a contact resistance, found a %s", calc.ErrType, ref.Type())}
		}
		kv = append(kv, "ratio", calc.Q(ratio))
		extra = append(extra, "ratio")
		// Common practice: alloyed contacts to a 2DEG change on cooling, by a factor of a few;
		// ten times worse points to a contact that freezes out or cracked.
		if ratio.Value() > 10 {
			warns = append(warns, fmt.Sprintf("%.3g times the reference: a contact that freezes out, or a bad contact on this pair", ratio.Value()))
		}
	}
	res := newResult("contact_resistance", "Rc", extra, kv...)
	res.Warnings = warns
	return res, nil
}

func isNone(v calc.Value) bool {
	s, ok := v.(calc.String)
	return ok && (s == "none" || s == "")
}
