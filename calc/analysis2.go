package calc

import (
	"fmt"
	"math"
	"strings"

	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// The second half of the data analyses: effective mass from the thermal damping of the
// oscillations, quantum lifetime from a Dingle plot, quantum Hall plateaus, gate series,
// van der Pauw Hall density and the sanity checks of a raw sweep.

// optQ reads an optional quantity argument whose default is the string "none".
func optQ(args []Value, i int, d quantity.Dim, what string) (quantity.Quantity, bool, error) {
	switch v := args[i].(type) {
	case String:
		if string(v) == "none" || string(v) == "" {
			return quantity.Quantity{}, false, nil
		}
	case Quantity:
		if v.Q.Dim() != d {
			return quantity.Quantity{}, false, &ArgError{Arg: i, Err: fmt.Errorf("%w: expected %s, found dimension %s", ErrArgument, what, v.Q.Dim())}
		}
		return v.Q, true, nil
	}
	return quantity.Quantity{}, false, &ArgError{Arg: i, Err: fmt.Errorf("%w: expected %s, found %s", ErrArgument, what, args[i].Type())}
}

// quantities reads a list of quantities of one dimension as SI numbers and uncertainties.
func quantities(args []Value, i int, d quantity.Dim, what string) ([]float64, []float64, error) {
	l, ok := args[i].(List)
	if !ok {
		return nil, nil, &ArgError{Arg: i, Err: fmt.Errorf("%w: expected a list of %s, found %s", ErrArgument, what, args[i].Type())}
	}
	v := make([]float64, len(l))
	s := make([]float64, len(l))
	anyUnc := false
	for k, it := range l {
		q, ok := it.(Quantity)
		if !ok || q.Q.Dim() != d {
			return nil, nil, &ArgError{Arg: i, Err: fmt.Errorf("%w: item %d: expected %s", ErrArgument, k+1, what)}
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

func registerAnalysis2(e *Env) {
	e.Register(Func{Name: "lk_mass",
		Doc: "effective mass from the thermal damping X/sinh X of the oscillation amplitude (Lifshitz–Kosevich): " +
			"lk_mass([data sets at several temperatures], B range) with each file's temperature from its metadata (T), " +
			"or given as a list T=[...]; or lk_mass(table, B) with a table of columns T and A at one field B",
		Params: []Param{{Name: "x"}, {Name: "B"}, {Name: "T", Default: String("T")}, {Name: "A", Default: String("A")},
			{Name: "field", Default: String("B")}, {Name: "y", Default: String("Rxx")}},
		Call: func(_ *Env, a []Value) (Value, error) {
			switch x := a[0].(type) {
			case List:
				var sweeps []*transport.Dataset
				for k, it := range x {
					d, ok := it.(*DataSet)
					if !ok {
						return nil, &ArgError{Arg: 0, Err: fmt.Errorf("%w: item %d: expected a data set, found %s", ErrArgument, k+1, it.Type())}
					}
					sweeps = append(sweeps, d.D)
				}
				lo, hi, err := fieldRange(a, 1)
				if err != nil {
					return nil, err
				}
				var temps []float64 // nil: each file's metadata
				if tl, ok := a[2].(List); ok {
					if temps, _, err = quantities(a, 2, dTemp, "temperatures, one per data set"); err != nil {
						return nil, err
					}
					if len(tl) != len(sweeps) {
						return nil, &ArgError{Arg: 2, Err: fmt.Errorf("%w: %d temperatures for %d data sets", ErrArgument, len(tl), len(sweeps))}
					}
				}
				fcol, _ := strArg(a, 4)
				ycol, _ := strArg(a, 5)
				r, err := transport.LKMassSweeps(sweeps, temps, lo, hi, transport.WithColumns(fcol, ycol))
				if err != nil {
					return nil, err
				}
				return newResult("lk_mass", "mass", []string{"extrema"},
					"mass", est(r.Mass, dMass),
					"mass_ratio", est(r.MassRatio, dNone),
					"extrema", String(fmt.Sprintf("%d extrema, %d temperatures", len(r.Extrema), len(r.Temperatures))),
					"frequency", Q(quantity.New(r.Frequency, dField)),
					"chi2", num(r.Chi2),
				).warn(r.Warnings), nil
			case *DataSet:
				bq, ok := a[1].(Quantity)
				if !ok || bq.Q.Dim() != dField {
					return nil, &ArgError{Arg: 1, Err: fmt.Errorf("%w: with a table, B is the field of the amplitudes, e.g. 0.6 T", ErrArgument)}
				}
				tn, _ := strArg(a, 2)
				an, _ := strArg(a, 3)
				tc, err := x.D.Col(tn)
				if err != nil {
					return nil, err
				}
				ac, err := x.D.Col(an)
				if err != nil {
					return nil, err
				}
				r, err := transport.LKMassTable(tc.Values, ac.Values, math.Abs(bq.Q.Value()))
				if err != nil {
					return nil, err
				}
				return newResult("lk_mass", "mass", nil,
					"mass", est(r.Mass, dMass),
					"mass_ratio", est(r.MassRatio, dNone),
					"A0", est(r.A0, ac.Dim),
					"chi2", num(r.Chi2),
				).warn(r.Warnings), nil
			}
			return nil, &ArgError{Arg: 0, Err: fmt.Errorf("%w: expected a list of data sets or a table, found %s", ErrArgument, a[0].Type())}
		}})
	e.Register(Func{Name: "quantum_lifetime",
		Doc: "quantum lifetime tau_q from a Dingle plot of the oscillation amplitudes over a B range, for mass m and density n at temperature T " +
			"(from the file's metadata when not given); with mu= also the transport time and the Dingle ratio tau_t/tau_q",
		Params: []Param{{Name: "d"}, {Name: "range"}, mass("m"), {Name: "n", Dim: dimp(dDensity)},
			{Name: "T", Default: String("none")}, {Name: "mu", Default: String("none")},
			{Name: "x", Default: String("B")}, {Name: "y", Default: String("Rxx")}},
		Call: func(_ *Env, a []Value) (Value, error) {
			d, lo, hi, err := dataAndRange(a)
			if err != nil {
				return nil, err
			}
			T, hasT, err := optQ(a, 4, dTemp, "a temperature such as 0.3 K")
			if err != nil {
				return nil, err
			}
			temp := T.Value()
			if !hasT {
				v, ok := d.MetaValue("T")
				q, perr := quantity.ParseQuantity(strings.TrimSpace(v))
				if !ok || perr != nil || q.Dim() != dTemp {
					return nil, fmt.Errorf("%w: %s has no temperature in its metadata (a line `# T: 0.3 K`); give T=", ErrArgument, d.Name)
				}
				temp = q.Value()
			}
			xcol, _ := strArg(a, 6)
			ycol, _ := strArg(a, 7)
			opts := []transport.Option{transport.WithColumns(xcol, ycol)}
			mu, hasMu, err := optQ(a, 5, dMobility, "a mobility")
			if err != nil {
				return nil, err
			}
			if hasMu {
				opts = append(opts, transport.WithMobility(mu.Value(), mu.Uncertainty()))
			}
			r, err := transport.QuantumLifetime(d, lo, hi, qa(a, 2).Value(), qa(a, 3).Value(), temp, opts...)
			if err != nil {
				return nil, err
			}
			kv := []any{
				"tau_q", est(r.QuantumLifetime, dTime),
				"dingle_temperature", est(r.DingleTemperature, dTemp),
				"quantum_mobility", est(r.QuantumMobility, dMobility),
				"intercept", est(r.Intercept, dNone),
				"slope", est(r.Slope, dField),
				"extrema", num(float64(len(r.Extrema))),
			}
			extra := []string{"dingle_temperature"}
			if hasMu {
				kv = append(kv, "tau_t", est(r.TransportLifetime, dTime), "dingle_ratio", est(r.DingleRatio, dNone))
				extra = append(extra, "dingle_ratio")
			}
			return newResult("quantum_lifetime", "tau_q", extra, kv...).warn(r.Warnings), nil
		}})
	e.Register(Func{Name: "plateaus",
		Doc: "quantum Hall plateaus in R_xy with their filling factors and relative deviation from R_K/nu; with n= each is checked against the filling factor the density puts there",
		Params: []Param{{Name: "d"}, {Name: "n", Default: String("none")}, {Name: "fractions", Default: num(0)},
			{Name: "x", Default: String("B")}, {Name: "y", Default: String("Rxy")}, {Name: "rxx", Default: String("Rxx")}},
		Call: func(_ *Env, a []Value) (Value, error) {
			d, err := dataArg(a, 0)
			if err != nil {
				return nil, err
			}
			n, hasN, err := optQ(a, 1, dDensity, "a density")
			if err != nil {
				return nil, err
			}
			opt := transport.PlateauOptions{Fractions: qa(a, 2).Value() != 0}
			opt.XCol, _ = strArg(a, 3)
			opt.YCol, _ = strArg(a, 4)
			opt.RxxCol, _ = strArg(a, 5)
			if hasN {
				opt.Density = n.Value()
			}
			r, err := transport.Plateaus(d, opt)
			if err != nil {
				return nil, err
			}
			var list List
			var names []string
			worst := 0.0
			for _, p := range r.Plateaus {
				nu := fmt.Sprint(p.P)
				if p.Q != 1 {
					nu = fmt.Sprintf("%d/%d", p.P, p.Q)
				}
				if p.Sign > 0 {
					names = append(names, nu)
				}
				worst = math.Max(worst, math.Abs(p.Deviation))
				list = append(list, NewRecord("", "nu", num(p.Nu()), "from", Q(quantity.New(p.BMin*float64(p.Sign), dField)),
					"to", Q(quantity.New(p.BMax*float64(p.Sign), dField)), "Rxy", est(p.Rxy, dResistance),
					"deviation", num(p.Deviation), "rxx_near_zero", String(fmt.Sprint(p.RxxNearZero))))
			}
			summary := fmt.Sprintf("nu = %s at +B (%d plateaus over ±B), largest |R_xy - R_K/nu|/(R_K/nu) = %.1e", strings.Join(names, ", "), len(r.Plateaus), worst)
			if len(r.Plateaus) == 0 {
				summary = "no plateau found"
			}
			return newResult("plateaus", "summary", nil, "summary", String(summary), "plateaus", list,
				"count", num(float64(len(r.Plateaus))), "max_deviation", num(worst)).warn(r.Warnings), nil
		}})
	e.Register(Func{Name: "gate_capacitance",
		Doc:    "gate series: fit n = C (V_g - V_th)/e to densities measured at gate voltages (two lists) → capacitance per area, dn/dV_g and threshold",
		Params: []Param{{Name: "Vg"}, {Name: "n"}},
		Call: func(_ *Env, a []Value) (Value, error) {
			vg, _, err := quantities(a, 0, dVolt, "gate voltages")
			if err != nil {
				return nil, err
			}
			n, sn, err := quantities(a, 1, dDensity, "densities")
			if err != nil {
				return nil, err
			}
			r, err := transport.GateCapacitance(vg, n, sn)
			if err != nil {
				return nil, err
			}
			return newResult("gate_capacitance", "C", []string{"threshold"},
				"C", est(r.Capacitance, dCapArea), "dn_dV", est(r.Slope, dPerVolt), "threshold", est(r.Threshold, dVolt),
				"points", num(float64(r.Points))).warn(r.Warnings), nil
		}})
	e.Register(Func{Name: "landau_fan",
		Doc:    "Landau fan: fit nu = (h n/e)(1/B) + nu0 to the fields of R_xx minima (a list) and their filling factors (a list) → density n, slope and intercept nu0 (≈ 0, or a Berry phase)",
		Params: []Param{{Name: "B"}, {Name: "nu"}},
		Call: func(_ *Env, a []Value) (Value, error) {
			b, sb, err := quantities(a, 0, dField, "fields")
			if err != nil {
				return nil, err
			}
			nu, _, err := quantities(a, 1, dNone, "filling factors")
			if err != nil {
				return nil, err
			}
			r, err := transport.LandauFan(b, nu, sb)
			if err != nil {
				return nil, err
			}
			return newResult("landau_fan", "n", []string{"intercept"}, "n", est(r.Density, dDensity),
				"slope", est(r.Slope, dField), "intercept", est(r.Intercept, dNone),
				"points", num(float64(r.Points))).warn(r.Warnings), nil
		}})
	e.Register(Func{Name: "mobility_power_law",
		Doc:    "fit mu ∝ n^alpha to mobilities against densities (two lists), optionally over a density range",
		Params: []Param{{Name: "n"}, {Name: "mu"}, {Name: "range", Default: String("all")}},
		Call: func(_ *Env, a []Value) (Value, error) {
			n, _, err := quantities(a, 0, dDensity, "densities")
			if err != nil {
				return nil, err
			}
			mu, _, err := quantities(a, 1, dMobility, "mobilities")
			if err != nil {
				return nil, err
			}
			lo, hi := 0.0, math.Inf(1)
			if r, ok := a[2].(Range); ok {
				if r.Lo.Dim() != dDensity {
					return nil, &ArgError{Arg: 2, Err: fmt.Errorf("%w: the range must be densities", ErrArgument)}
				}
				lo, hi = r.Lo.Value(), r.Hi.Value()
			}
			r, err := transport.MobilityPowerLaw(n, mu, lo, hi)
			if err != nil {
				return nil, err
			}
			return newResult("mobility_power_law", "alpha", nil, "alpha", est(r.Alpha, dNone),
				"mu_ref", est(r.Prefactor, dMobility), "n_ref", Q(quantity.New(r.NRef, dDensity)),
				"points", num(float64(r.Points))).warn(r.Warnings), nil
		}})
	e.Register(Func{Name: "vdp_hall_density",
		Doc:    "van der Pauw Hall density n = 2B/(e |R_13,24(+B) - R_13,24(-B)|) from readings at both field polarities",
		Params: []Param{{Name: "B", Dim: dimp(dField)}, {Name: "R_plus", Dim: dimp(dResistance)}, {Name: "R_minus", Dim: dimp(dResistance)}},
		Call: func(_ *Env, a []Value) (Value, error) {
			r, err := transport.VdPHallDensityPolarity(math.Abs(qa(a, 0).Value()),
				transport.Estimate{Value: qa(a, 1).Value(), Uncertainty: qa(a, 1).Uncertainty()},
				transport.Estimate{Value: qa(a, 2).Value(), Uncertainty: qa(a, 2).Uncertainty()})
			if err != nil {
				return nil, err
			}
			return newResult("vdp_hall_density", "n", []string{"carriers"}, "n", est(r.Density, dDensity),
				"carriers", String(r.Carriers), "delta_R", est(r.DeltaR, dResistance)), nil
		}})
	e.Register(Func{Name: "check_sweep",
		Doc:    "the sanity checks of a raw sweep a reviewer wants flagged: R_xy away from 0 at B = 0, R_xx minima that do not reach zero (with n=), a large out-of-phase lock-in signal, too few points",
		Params: []Param{{Name: "d"}, {Name: "n", Default: String("none")}},
		Call: func(_ *Env, a []Value) (Value, error) {
			d, err := dataArg(a, 0)
			if err != nil {
				return nil, err
			}
			n, hasN, err := optQ(a, 1, dDensity, "a density")
			if err != nil {
				return nil, err
			}
			var opts []transport.Option
			if hasN {
				opts = append(opts, transport.WithDensity(n.Value()))
			}
			ws, err := transport.CheckSweep(d, opts...)
			if err != nil {
				return nil, err
			}
			verdict := "no warnings"
			if len(ws) > 0 {
				verdict = fmt.Sprintf("%d warning(s)", len(ws))
			}
			return newResult("check_sweep", "verdict", nil, "verdict", String(verdict), "count", num(float64(len(ws)))).warn(ws), nil
		}})
}
