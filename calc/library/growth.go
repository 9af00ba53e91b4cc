package library

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"cleave/calc"
	"cleave/calc/band"
	"cleave/calc/constants"
	"cleave/calc/materials"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// growthFuncs compute what a growth record implies: the thickness of a monolayer, growth
// rates from RHEED oscillations, the Al fraction from the AlAs and GaAs rates, a cell's
// calibration (an Arrhenius fit of measured density or flux against cell temperature, from
// calibration wafers) and the doping or delta-sheet density it predicts, and the comparison
// of a wafer's logged growth with its layer table. Lattice constants are calc/materials',
// the fits calc/transport's.
func growthFuncs() []calc.Func {
	eV := quantity.MustUnit("eV")
	return []calc.Func{
		{Name: "monolayer",
			Doc:    "thickness of one monolayer of (001) growth: half the cubic lattice constant of a zincblende material (GaAs: 0.28266 nm)",
			Params: []calc.Param{{Name: "material"}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				ml, err := monolayerArg(a, 0)
				if err != nil {
					return nil, err
				}
				return calc.Q(ml), nil
			}},
		{Name: "rheed_rate",
			Doc: "growth rate from RHEED intensity oscillations, one period per monolayer: a monolayer of the material over the period, or from a RHEED trace (a data set with columns time and I) the period fitted first",
			Params: []calc.Param{{Name: "period"}, {Name: "material"}, {Name: "time", Default: calc.String("time")},
				{Name: "intensity", Default: calc.String("I")}},
			Call: rheedCall},
		{Name: "al_fraction",
			Doc:    "Al fraction x of Al(x)Ga(1-x)As from the AlAs and GaAs growth rates measured on the same system: x = r_AlAs/(r_AlAs + r_GaAs) in monolayers per second (rates in nm/s are converted with each material's monolayer)",
			Params: []calc.Param{{Name: "r_AlAs"}, {Name: "r_GaAs"}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				al, err := mlPerSecond(a, 0, "AlAs")
				if err != nil {
					return nil, err
				}
				ga, err := mlPerSecond(a, 1, "GaAs")
				if err != nil {
					return nil, err
				}
				sum, _ := quantity.Add(al, ga)
				if !(sum.Value() > 0) || al.Value() < 0 || ga.Value() < 0 {
					return nil, fmt.Errorf("%w: the rates must be positive", calc.ErrArgument)
				}
				return calc.Q(quantity.Div(al, sum)), nil
			}},
		{Name: "arrhenius_fit",
			Doc:    "fit values = A exp(-Ea/(k_B T)) to values measured at temperatures (two lists) → activation energy Ea and prefactor A; cell_density and cell_flux evaluate it",
			Params: []calc.Param{{Name: "T"}, {Name: "values"}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				T, celsius, err := temperatureList(a[0], 0)
				if err != nil {
					return nil, err
				}
				l, ok := a[1].(calc.List)
				if !ok || len(l) == 0 {
					return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: values must be a list of quantities, one per temperature", calc.ErrArgument)}
				}
				q0, ok := l[0].(calc.Quantity)
				if !ok {
					return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: values must be quantities", calc.ErrType)}
				}
				y, sy, err := quantities(a, 1, q0.Q.Dim(), "values of one dimension")
				if err != nil {
					return nil, err
				}
				return arrheniusResult("arrhenius_fit", "values", q0.Q.Dim(), T, y, sy, celsius, eV, nil)
			}},
		{Name: "cell_calibration",
			Doc:    "calibration of an effusion cell from calibration wafers: their `calibration` records of this cell (cell_temperature with density and growth_rate, or sheet_density and time) fitted as an Arrhenius law of the flux (or of the density when no rates are given) in the cell temperature",
			Params: []calc.Param{{Name: "cell"}, {Name: "wafers"}},
			Call:   func(_ *calc.Env, a []calc.Value) (calc.Value, error) { return cellCalibrationCall(a, eV) }},
		{Name: "cell_density",
			Doc:    "doping density a cell calibration predicts at a cell temperature (for a flux calibration, at growth rate rate=), with its uncertainty; a warning when the temperature lies outside the calibration",
			Params: []calc.Param{{Name: "cal"}, req("T", dTemp), {Name: "rate", Default: calc.String("none")}},
			Call:   func(_ *calc.Env, a []calc.Value) (calc.Value, error) { return cellPredict(a, "density") }},
		{Name: "cell_flux",
			Doc:    "dopant flux (atoms per area and time) a cell calibration predicts at a cell temperature (for a density calibration, at the growth rate rate= it was made at)",
			Params: []calc.Param{{Name: "cal"}, req("T", dTemp), {Name: "rate", Default: calc.String("none")}},
			Call:   func(_ *calc.Env, a []calc.Value) (calc.Value, error) { return cellPredict(a, "flux") }},
		{Name: "growth_check",
			Doc:    "a wafer's logged growth against its layer table: rate × time beside each nominal thickness (a warning beyond tolerance), and with cal= (cell calibrations) each doped layer's density from its cell temperature beside the nominal doping; .layers is the stack with the grown thicknesses for expected_density",
			Params: []calc.Param{{Name: "layers"}, {Name: "cal", Default: calc.String("none")}, {Name: "tolerance", Dim: dimp(dNone), Default: num(0.05)}},
			Call:   growthCheckCall},
		{Name: "delta_density",
			Doc:    "sheet density of a delta layer: dopant flux times the time the shutter was open (flux a quantity or a cell_flux result)",
			Params: []calc.Param{{Name: "flux"}, req("time", dTime)},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				v := a[0]
				if r, ok := v.(*calc.AnalysisResult); ok {
					if f, ok := r.Field("flux"); ok {
						v = f
					}
				}
				F, err := quantityOf([]calc.Value{v}, 0, dFlux, "flux")
				if err != nil {
					return nil, &calc.ArgError{Arg: 0, Err: errors.Unwrap(err)}
				}
				return calc.Q(quantity.Mul(F, qa(a, 1))), nil
			}},
	}
}

var (
	dFlux     = quantity.MustUnit("m^-2 s^-1").D
	dDensity3 = quantity.MustUnit("m^-3").D
	cKB       = constants.Q("k_B")
)

// materialArg reads a material: a material record (GaAs, material("GaAs")) or its name.
func materialArg(a []calc.Value, i int) (materials.Material, error) {
	var name string
	switch v := a[i].(type) {
	case calc.String:
		name = string(v)
	case *calc.Record:
		n, ok := v.Field("name")
		s, isStr := n.(calc.String)
		if !ok || !isStr {
			return materials.Material{}, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a material such as GaAs or \"Al0.3Ga0.7As\"", calc.ErrArgument)}
		}
		name = string(s)
	default:
		return materials.Material{}, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected a material such as GaAs or \"Al0.3Ga0.7As\", found a %s", calc.ErrType, a[i].Type())}
	}
	m, err := materials.Lookup(strings.TrimSpace(name))
	if err != nil {
		return m, &calc.ArgError{Arg: i, Err: err}
	}
	return m, nil
}

// monolayerArg is the monolayer of the material in argument i.
func monolayerArg(a []calc.Value, i int) (quantity.Quantity, error) {
	m, err := materialArg(a, i)
	if err != nil {
		return quantity.Quantity{}, err
	}
	ml, err := m.Monolayer()
	if err != nil {
		return quantity.Quantity{}, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: %s", calc.ErrArgument, strings.TrimPrefix(err.Error(), "materials: "))}
	}
	return quantity.New(ml, quantity.Length), nil
}

// rheedCall is rheed_rate: a monolayer over the period, the period given or fitted to a trace.
func rheedCall(_ *calc.Env, a []calc.Value) (calc.Value, error) {
	ml, err := monolayerArg(a, 1)
	if err != nil {
		return nil, err
	}
	switch v := a[0].(type) {
	case calc.Quantity:
		if v.Q.Dim() != quantity.Time || !(v.Q.Value() > 0) {
			return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: the period must be a positive time such as 3.5 s (or a RHEED trace from data())", calc.ErrArgument)}
		}
		return calc.Q(quantity.Div(ml, v.Q)), nil
	case *DataSet:
		tcol, err := strArg(a, 2)
		if err != nil {
			return nil, err
		}
		icol, err := strArg(a, 3)
		if err != nil {
			return nil, err
		}
		t, y, err := transport.RHEEDTrace(v.D, tcol, icol)
		if err != nil {
			return nil, &calc.ArgError{Arg: 0, Err: err}
		}
		res, err := transport.RHEEDPeriod(t, y)
		if err != nil {
			return nil, &calc.ArgError{Arg: 0, Err: err}
		}
		P := est(res.Period, quantity.Time).Q
		return withWarnings(newResult("rheed_rate", "rate", []string{"period"},
			"rate", calc.Q(quantity.Div(ml, P)), "period", calc.Q(P), "ML_per_s", calc.Q(quantity.Div(quantity.Scalar(1), P)),
			"oscillations", num(float64(res.Oscillations)), "monolayer", calc.Q(ml)), res.Warnings), nil
	}
	return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: expected a period such as 3.5 s or a RHEED trace from data(), found a %s", calc.ErrType, a[0].Type())}
}

// mlPerSecond reads a growth rate in monolayers per second: a frequency (ML/s, the RHEED
// oscillation frequency), a velocity divided by the monolayer of the material, or a
// rheed_rate result.
func mlPerSecond(a []calc.Value, i int, material string) (quantity.Quantity, error) {
	v := a[i]
	if r, ok := v.(*calc.AnalysisResult); ok {
		if f, ok := r.Field("rate"); ok {
			v = f
		}
	}
	q, ok := v.(calc.Quantity)
	if !ok {
		return quantity.Quantity{}, &calc.ArgError{Arg: i, Err: fmt.Errorf("%w: expected the %s growth rate (nm/s, ML/s as 1/s, or a rheed_rate result), found a %s", calc.ErrType, material, v.Type())}
	}
	switch q.Q.Dim() {
	case quantity.Time.Pow(-1):
		return q.Q, nil
	case dSpeed:
		m, _ := materials.Lookup(material)
		ml, _ := m.Monolayer()
		return q.Q.Scale(1 / ml), nil
	}
	return quantity.Quantity{}, &calc.ArgError{Arg: i, Err: &quantity.DimError{Op: "al_fraction", Left: q.Q.Dim(), Right: dSpeed}}
}

// temperatureList reads a list of temperatures (K or °C) in kelvin; celsius reports whether
// they were written in °C.
func temperatureList(v calc.Value, arg int) ([]float64, bool, error) {
	l, ok := v.(calc.List)
	if !ok {
		return nil, false, &calc.ArgError{Arg: arg, Err: fmt.Errorf("%w: expected a list of temperatures, found a %s", calc.ErrType, v.Type())}
	}
	T := make([]float64, len(l))
	celsius := false
	for i, it := range l {
		q, ok := it.(calc.Quantity)
		if !ok || q.Q.Dim() != quantity.Temperature {
			return nil, false, &calc.ArgError{Arg: arg, Err: fmt.Errorf("%w: item %d is %s, expected a temperature (K or °C)", calc.ErrArgument, i+1, calc.Display(it))}
		}
		T[i] = q.Q.Value()
		celsius = celsius || q.Q.Temp() == quantity.TempCelsius
	}
	return T, celsius, nil
}

// arrheniusFit is what cell_density and cell_flux read from an arrhenius_fit or
// cell_calibration result.
type arrheniusFit struct {
	lnA, slope quantity.Quantity // ln of the prefactor (in SI of ydim), −E_a/k_B (K); correlated
	ydim       quantity.Dim
	fitted     string // "flux", "density" or "values"
	tmin, tmax float64
	celsius    bool
}

func (f *arrheniusFit) temp(k float64) quantity.Quantity {
	if f.celsius {
		return quantity.New(k, quantity.Temperature).Marked(quantity.TempCelsius)
	}
	return quantity.New(k, quantity.Temperature)
}

// at returns the fitted value at temperature T.
func (f *arrheniusFit) at(T quantity.Quantity) (quantity.Quantity, error) {
	x, _ := quantity.Add(f.lnA, quantity.Div(f.slope, T.Marked(quantity.TempPlain)))
	y, err := quantity.Apply(x, math.Exp, math.Exp)
	if err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Mul(y, quantity.New(1, f.ydim)), nil
}

// arrheniusResult fits and builds the result; kv are extra fields put first.
func arrheniusResult(kind, fitted string, ydim quantity.Dim, T, y, sy []float64, celsius bool, eV quantity.Unit, kv []any) (*calc.AnalysisResult, error) {
	fit, err := transport.FitArrhenius(T, y, sy)
	if err != nil {
		return nil, err
	}
	p := correlated([]float64{fit.LnA.Value, fit.Slope.Value}, [][]float64{fit.Cov[0][:], fit.Cov[1][:]}, []quantity.Dim{quantity.Dimensionless, quantity.Temperature})
	f := &arrheniusFit{lnA: p[0], slope: p[1], ydim: ydim, fitted: fitted, tmin: fit.TMin, tmax: fit.TMax, celsius: celsius}
	Ea := quantity.Mul(p[1], cKB).Neg()
	A, _ := quantity.Apply(p[0], math.Exp, math.Exp)
	A = quantity.Mul(A, quantity.New(1, ydim))
	kv = append(kv, "Ea", calc.Quantity{Q: Ea, Unit: &eV}, "prefactor", calc.Q(A),
		"T_min", calc.Q(f.temp(fit.TMin)), "T_max", calc.Q(f.temp(fit.TMax)), "points", num(float64(fit.Points)),
		"scatter", num(fit.ScatterLn))
	r := withWarnings(newResult(kind, "Ea", []string{"T_min", "T_max"}, kv...), fit.Warnings)
	r.Detail = f
	return r, nil
}

// calPoint is one calibration of a cell read from a wafer.
type calPoint struct {
	wafer         string
	T             quantity.Quantity
	density, flux *quantity.Quantity
}

// cellCalibrationCall is cell_calibration(cell, wafers).
func cellCalibrationCall(a []calc.Value, eV quantity.Unit) (calc.Value, error) {
	cellV, ok := a[0].(calc.String)
	if !ok {
		return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: the cell is a name in quotes such as \"Si\"", calc.ErrType)}
	}
	cell := strings.TrimSpace(string(cellV))
	var recs []*calc.Record
	switch w := a[1].(type) {
	case *calc.Record:
		recs = append(recs, w)
	case calc.List:
		for i, it := range w {
			r, ok := it.(*calc.Record)
			if !ok {
				return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: item %d is a %s; give wafers such as entry(\"W24-020\")", calc.ErrType, i+1, it.Type())}
			}
			recs = append(recs, r)
		}
	default:
		return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: expected a list of calibration wafers such as [entry(\"W24-020\"), entry(\"W24-021\")], found a %s", calc.ErrType, a[1].Type())}
	}
	var pts []calPoint
	var ids calc.List
	for _, r := range recs {
		id := ""
		if v, ok := r.Field("id"); ok {
			id = strings.TrimSpace(calc.Display(v))
			if s, ok := v.(calc.String); ok {
				id = string(s)
			}
		}
		cv, ok := r.Field("calibration")
		if !ok {
			return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: wafer %s has no `calibration:` records", calc.ErrArgument, id)}
		}
		var items []*calc.Record
		switch c := cv.(type) {
		case *calc.Record:
			items = append(items, c)
		case calc.List:
			for _, it := range c {
				if ir, ok := it.(*calc.Record); ok {
					items = append(items, ir)
				}
			}
		}
		n := 0
		for _, it := range items {
			c, _ := it.Field("cell")
			if cs, ok := c.(calc.String); !ok || !strings.EqualFold(strings.TrimSpace(string(cs)), cell) {
				continue
			}
			p, err := readCalPoint(it, id)
			if err != nil {
				return nil, &calc.ArgError{Arg: 1, Err: err}
			}
			pts = append(pts, p)
			n++
		}
		if n > 0 {
			ids = append(ids, calc.String(id))
		}
	}
	if len(pts) == 0 {
		return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: no calibration of cell %q in these wafers", calc.ErrArgument, cell)}
	}
	useFlux, useDensity := true, true
	for _, p := range pts {
		useFlux = useFlux && p.flux != nil
		useDensity = useDensity && p.density != nil
	}
	fitted, ydim := "flux", dFlux
	someFlux := false
	for _, p := range pts {
		someFlux = someFlux || p.flux != nil
	}
	switch {
	case useFlux:
	case useDensity:
		fitted, ydim = "density", dDensity3
	default:
		return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: the calibrations of cell %q mix densities without growth rates and sheet densities: give every point growth_rate (or all densities at one rate)", calc.ErrArgument, cell)}
	}
	T := make([]float64, len(pts))
	y := make([]float64, len(pts))
	sy := make([]float64, len(pts))
	anyS, celsius := false, false
	for i, p := range pts {
		q := p.density
		if fitted == "flux" {
			q = p.flux
		}
		T[i], y[i], sy[i] = p.T.Value(), q.Value(), q.Uncertainty()
		anyS = anyS || sy[i] > 0
		celsius = celsius || p.T.Temp() == quantity.TempCelsius
	}
	if !anyS {
		sy = nil
	}
	r, err := arrheniusResult("cell_calibration", fitted, ydim, T, y, sy, celsius, eV,
		[]any{"cell", calc.String(cell), "fitted", calc.String(fitted), "wafers", ids})
	if err == nil && fitted == "density" && someFlux {
		r.Warnings = append(r.Warnings, "growth rates are given for some calibrations only: fitted the densities as measured")
	}
	return r, err
}

// readCalPoint reads one calibration record: cell_temperature and density (with growth_rate
// for a flux) or sheet_density and time.
func readCalPoint(r *calc.Record, wafer string) (calPoint, error) {
	p := calPoint{wafer: wafer}
	get := func(name string, d quantity.Dim) (*quantity.Quantity, error) {
		v, ok := stepField(r, name)
		if !ok {
			return nil, nil
		}
		q, ok := v.(calc.Quantity)
		if !ok || q.Q.Dim() != d {
			return nil, fmt.Errorf("%w: wafer %s: calibration %s is %s, expected %s", calc.ErrArgument, wafer, name, calc.Display(v), calc.DimName(d))
		}
		return &q.Q, nil
	}
	T, err := get("cell_temperature", quantity.Temperature)
	if err != nil {
		return p, err
	}
	if T == nil {
		return p, fmt.Errorf("%w: wafer %s: a calibration without cell_temperature", calc.ErrArgument, wafer)
	}
	p.T = *T
	if p.density, err = get("density", dDensity3); err != nil {
		return p, err
	}
	rate, err := get("growth_rate", dSpeed)
	if err != nil {
		return p, err
	}
	ns, err := get("sheet_density", dDensity)
	if err != nil {
		return p, err
	}
	t, err := get("time", quantity.Time)
	if err != nil {
		return p, err
	}
	switch {
	case p.density != nil && rate != nil:
		f := quantity.Mul(*p.density, *rate)
		p.flux = &f
	case ns != nil && t != nil:
		f := quantity.Div(*ns, *t)
		p.flux = &f
	case p.density == nil:
		return p, fmt.Errorf("%w: wafer %s: a calibration needs density (with growth_rate) or sheet_density with time", calc.ErrArgument, wafer)
	}
	return p, nil
}

// cellPredict is cell_density and cell_flux: the calibration at T, converted with rate= where
// the calibration fitted the other quantity.
func cellPredict(a []calc.Value, want string) (calc.Value, error) {
	r, ok := a[0].(*calc.AnalysisResult)
	var f *arrheniusFit
	if ok {
		f, ok = r.Detail.(*arrheniusFit)
	}
	if !ok {
		return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: expected a cell_calibration or arrhenius_fit result, found a %s", calc.ErrType, a[0].Type())}
	}
	T := qa(a, 1)
	rate, hasRate, err := optQ(a, 2, dSpeed, "a growth rate such as 1 ML(GaAs)/s")
	if err != nil {
		return nil, err
	}
	out, err := f.predict(want, T, rate, hasRate)
	if err != nil {
		var ae *calc.ArgError
		if errors.As(err, &ae) {
			return nil, err
		}
		return nil, &calc.ArgError{Arg: 2, Err: err}
	}
	name := "n"
	if want == "flux" {
		name = "flux"
	}
	res := newResult("cell_"+want, name, nil, name, calc.Q(out), "T", calc.Q(T))
	if w := f.outside(T); w != "" {
		res.Warnings = append(res.Warnings, w)
	}
	return res, nil
}

// predict is the density or the flux (want) at cell temperature T, converted with the growth
// rate where the calibration fitted the other one.
func (f *arrheniusFit) predict(want string, T, rate quantity.Quantity, hasRate bool) (quantity.Quantity, error) {
	y, err := f.at(T)
	if err != nil {
		return y, err
	}
	switch {
	case want == "density" && f.ydim == dDensity3, want == "flux" && f.ydim == dFlux:
		return y, nil
	case want == "density" && f.ydim == dFlux:
		if !hasRate {
			return y, fmt.Errorf("%w: this calibration is of the flux: give the growth rate, rate= (e.g. 1 ML(GaAs)/s)", calc.ErrArgument)
		}
		return quantity.Div(y, rate), nil
	case want == "flux" && f.ydim == dDensity3:
		if !hasRate {
			return y, fmt.Errorf("%w: this calibration is of the density: give the growth rate it was made at, rate=", calc.ErrArgument)
		}
		return quantity.Mul(y, rate), nil
	}
	return y, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: this fit is of %s, not a density or a flux", calc.ErrArgument, calc.DimName(f.ydim))}
}

// outside is the warning for a cell temperature outside the calibration, or "".
func (f *arrheniusFit) outside(T quantity.Quantity) string {
	const slack = 0.5 // K: a reading rounded to the degree is still inside
	if T.Value() < f.tmin-slack || T.Value() > f.tmax+slack {
		return fmt.Sprintf("%s lies outside the calibrated cell temperatures %s .. %s: extrapolated",
			quantity.Format(T), quantity.Format(f.temp(f.tmin)), quantity.Format(f.temp(f.tmax)))
	}
	return ""
}

// growthCheckCall is growth_check(layers, cal=, tolerance=).
func growthCheckCall(_ *calc.Env, a []calc.Value) (calc.Value, error) {
	l, ok := a[0].(calc.List)
	if !ok || len(l) == 0 {
		return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: expected a layer table such as wafer.layers", calc.ErrArgument)}
	}
	cals := map[string]*arrheniusFit{}
	if !isNone(a[1]) {
		list, isList := a[1].(calc.List)
		if !isList {
			list = calc.List{a[1]}
		}
		for _, c := range list {
			r, ok := c.(*calc.AnalysisResult)
			if !ok {
				return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: cal= takes cell_calibration results (one per cell), found a %s", calc.ErrArgument, c.Type())}
			}
			f, ok := r.Detail.(*arrheniusFit)
			cell, _ := fieldText(r, "cell")
			if !ok || cell == "" {
				return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: cal= takes cell_calibration results (one per cell)", calc.ErrArgument)}
			}
			cals[strings.ToLower(cell)] = f
		}
	}
	tol := qa(a, 2).Value()
	var rows, stack calc.List
	var warns, dopingNotes []string
	worst, worstName, compared := 0.0, "", 0
	for k, it := range l {
		rec, ok := it.(*calc.Record)
		if !ok {
			return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: layer %d is a %s, not a row of a layer table", calc.ErrArgument, k+1, it.Type())}
		}
		name, _ := fieldText(rec, "layer")
		if name == "" {
			name, _ = fieldText(rec, "material")
		}
		if name == "" {
			name = fmt.Sprintf("layer %d", k+1)
		}
		row := []any{"layer", calc.String(name)}
		grown, hasGrown := fieldQ(rec, "grown", quantity.Length)
		nominal, hasNominal := fieldQ(rec, "nominal", quantity.Length)
		if hasGrown {
			row = append(row, "grown", calc.Q(grown))
		}
		if hasGrown && hasNominal && nominal.Value() > 0 {
			dev := quantity.Div(grown, nominal)
			dev, _ = quantity.Add(dev, quantity.Scalar(-1))
			row = append(row, "nominal", calc.Q(nominal), "deviation", calc.Quantity{Q: dev, Unit: percent})
			compared++
			if math.Abs(dev.Value()) > math.Abs(worst) || worstName == "" {
				worst, worstName = dev.Value(), name
			}
			if math.Abs(dev.Value()) > tol {
				warns = append(warns, fmt.Sprintf("%s: rate × time gives %s, the table %s (%s)", name,
					quantity.Format(grown), quantity.Format(nominal), signedPercent(dev.Value())))
			}
		}
		// The stack the solver reads: the grown thickness wherever the growth is logged.
		cp := &calc.Record{Fields: append([]calc.RecordField(nil), rec.Fields...)}
		if hasGrown {
			for i := range cp.Fields {
				if cp.Fields[i].Name == "thickness" {
					cp.Fields[i].Value = calc.Q(grown)
				}
			}
		}
		stack = append(stack, cp)
		// Doping from the cell calibration.
		if dtext, _ := fieldText(rec, "doping"); dtext != "" && len(cals) > 0 {
			d, err := band.ParseDoping(dtext)
			if err != nil {
				return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%s: %w", name, err)}
			}
			f := cals[strings.ToLower(d.Species)]
			cellT, hasT := cellTemp(rec, d.Species)
			if d.Species != "" && f != nil && hasT {
				pred, nominalN, err := predictDoping(f, d, cellT, rec)
				if err != nil {
					dopingNotes = append(dopingNotes, fmt.Sprintf("%s: %v", name, err))
				} else {
					ddev := quantity.Div(pred, nominalN)
					ddev, _ = quantity.Add(ddev, quantity.Scalar(-1))
					row = append(row, "doping", calc.Q(nominalN), "predicted", calc.Q(pred), "doping_deviation", calc.Quantity{Q: ddev, Unit: percent})
					dopingNotes = append(dopingNotes, fmt.Sprintf("%s %s predicted, table %s (%s)", name, quantity.Format(pred), quantity.Format(nominalN), signedPercent(ddev.Value())))
					if w := f.outside(cellT); w != "" {
						warns = append(warns, name+": "+w)
					}
				}
			}
		}
		rows = append(rows, calc.NewRecord("", row...))
	}
	summary := fmt.Sprintf("%d of %d layers with rate × time beside a thickness", compared, len(l))
	if compared > 0 {
		summary += fmt.Sprintf("; largest difference %s (%s)", signedPercent(worst), worstName)
	}
	if len(dopingNotes) > 0 {
		summary += "; doping: " + strings.Join(dopingNotes, ", ")
	}
	res := newResult("growth_check", "summary", nil, "summary", calc.String(summary), "rows", rows, "layers", stack,
		"largest", calc.Quantity{Q: quantity.Scalar(worst), Unit: percent})
	res.Warnings = warns
	return res, nil
}

var percent = func() *quantity.Unit { u := quantity.MustUnit("%"); return &u }()

// predictDoping is the density (bulk) or sheet density (delta) a calibration gives for a
// row's doping at the cell temperature T, with the nominal one to compare: bulk doping needs
// the row's rate for a flux calibration; a delta layer needs a flux and the row's time.
func predictDoping(f *arrheniusFit, d band.Doping, T quantity.Quantity, rec *calc.Record) (pred, nominal quantity.Quantity, err error) {
	rate, hasRate := fieldQ(rec, "rate", dSpeed)
	if d.Sheet {
		nominal = quantity.New(d.Density, dDensity)
		t, ok := fieldQ(rec, "time", quantity.Time)
		if !ok {
			return pred, nominal, errors.New("a delta layer needs its time (the shutter-open time) to predict the sheet density")
		}
		flux, err := f.predict("flux", T, rate, hasRate)
		if err != nil {
			return pred, nominal, err
		}
		return quantity.Mul(flux, t), nominal, nil
	}
	nominal = quantity.New(d.Density, dDensity3)
	pred, err = f.predict("density", T, rate, hasRate)
	return pred, nominal, err
}

// cellTemp is the temperature of a cell in a row's cells record.
func cellTemp(rec *calc.Record, cell string) (quantity.Quantity, bool) {
	cv, ok := rec.Field("cells")
	cells, isRec := cv.(*calc.Record)
	if !ok || !isRec {
		return quantity.Quantity{}, false
	}
	for _, f := range cells.Fields {
		if strings.EqualFold(f.Name, cell) {
			if q, ok := f.Value.(calc.Quantity); ok && q.Q.Dim() == quantity.Temperature {
				return q.Q, true
			}
		}
	}
	return quantity.Quantity{}, false
}

// fieldText is a text field of a record (or of an analysis result).
func fieldText(f calc.Fielder, name string) (string, bool) {
	if f == nil {
		return "", false
	}
	v, ok := f.Field(name)
	if !ok {
		return "", false
	}
	return textOf(v), true
}

// fieldQ is a quantity field of dimension d.
func fieldQ(r *calc.Record, name string, d quantity.Dim) (quantity.Quantity, bool) {
	v, ok := r.Field(name)
	q, isQ := v.(calc.Quantity)
	if !ok || !isQ || q.Q.Dim() != d {
		return quantity.Quantity{}, false
	}
	return q.Q, true
}

// signedPercent writes a relative difference as "+1.2 %", with "+0.0 %" for one that rounds
// to zero either side.
func signedPercent(x float64) string {
	if math.Abs(100*x) < 0.05 {
		return "+0.0 %"
	}
	return fmt.Sprintf("%+.1f %%", 100*x)
}
