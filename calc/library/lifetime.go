package library

import (
	"fmt"
	"math"
	"strings"

	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// lifetimeFuncs give the effective mass and the scattering times: the mass from the thermal
// damping of the oscillations (Lifshitz–Kosevich) and the quantum lifetime from a Dingle
// plot, both fitted to data sets, and the closed forms beside them (the damping factors, the
// Dingle temperature, the quantum mobility, the transport time from a mobility). The
// analyses and their sources are in calc/transport, the closed forms in calc/physics.
func lifetimeFuncs() []calc.Func {
	type q = quantity.Quantity
	return []calc.Func{
		{Name: "lk_mass",
			Doc: "effective mass from the thermal damping X/sinh X of the oscillation amplitude (Lifshitz–Kosevich): " +
				"lk_mass([data sets at several temperatures], B range) with each file's temperature from its metadata (T), " +
				"or given as a list T=[...]; or lk_mass(table, B) with a table of columns T and A at one field B",
			Params: []calc.Param{{Name: "x"}, {Name: "B"}, {Name: "T", Default: calc.String("T")}, {Name: "A", Default: calc.String("A")},
				{Name: "field", Default: calc.String("B")}, {Name: "y", Default: calc.String("Rxx")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				switch x := a[0].(type) {
				case calc.List:
					var sweeps []*transport.Dataset
					for k, it := range x {
						d, ok := it.(*DataSet)
						if !ok {
							return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: item %d: expected a data set, found %s", calc.ErrArgument, k+1, it.Type())}
						}
						sweeps = append(sweeps, d.D)
					}
					lo, hi, err := fieldRange(a, 1)
					if err != nil {
						return nil, err
					}
					var temps []float64 // nil: each file's metadata
					if tl, ok := a[2].(calc.List); ok {
						if temps, _, err = quantities(a, 2, dTemp, "temperatures, one per data set"); err != nil {
							return nil, err
						}
						if len(tl) != len(sweeps) {
							return nil, &calc.ArgError{Arg: 2, Err: fmt.Errorf("%w: %d temperatures for %d data sets", calc.ErrArgument, len(tl), len(sweeps))}
						}
					}
					fcol, _ := strArg(a, 4)
					ycol, _ := strArg(a, 5)
					r, err := transport.LKMassSweeps(sweeps, temps, lo, hi, transport.WithColumns(fcol, ycol))
					if err != nil {
						return nil, err
					}
					res := withWarnings(newResult("lk_mass", "mass", []string{"extrema"},
						"mass", est(r.Mass, dMass),
						"mass_ratio", est(r.MassRatio, dNone),
						"extrema", calc.String(fmt.Sprintf("%d extrema, %d temperatures", len(r.Extrema), len(r.Temperatures))),
						"frequency", calc.Q(quantity.New(r.Frequency, dField)),
						"chi2", num(r.Chi2),
					), r.Warnings)
					res.Detail = r
					return res, nil
				case *DataSet:
					bq, ok := a[1].(calc.Quantity)
					if !ok || bq.Q.Dim() != dField {
						return nil, &calc.ArgError{Arg: 1, Err: fmt.Errorf("%w: with a table, B is the field of the amplitudes, e.g. 0.6 T", calc.ErrArgument)}
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
					res := withWarnings(newResult("lk_mass", "mass", nil,
						"mass", est(r.Mass, dMass),
						"mass_ratio", est(r.MassRatio, dNone),
						"A0", est(r.A0, ac.Dim),
						"chi2", num(r.Chi2),
					), r.Warnings)
					res.Detail = r
					return res, nil
				}
				return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: expected a list of data sets or a table, found %s", calc.ErrArgument, a[0].Type())}
			}},
		{Name: "quantum_lifetime",
			Doc: "quantum lifetime tau_q from a Dingle plot of the oscillation amplitudes over a B range, for mass m and density n at temperature T " +
				"(from the file's metadata when not given); with mu= also the transport time and the Dingle ratio tau_t/tau_q",
			Params: []calc.Param{{Name: "d"}, {Name: "range"}, mass("m"), {Name: "n", Dim: dimp(dDensity)},
				{Name: "T", Default: calc.String("none")}, {Name: "mu", Default: calc.String("none")},
				{Name: "x", Default: calc.String("B")}, {Name: "y", Default: calc.String("Rxx")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
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
						return nil, fmt.Errorf("%w: %s has no temperature in its metadata (a line `# T: 0.3 K`); give T=", calc.ErrArgument, d.Name)
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
				res := withWarnings(newResult("quantum_lifetime", "tau_q", extra, kv...), r.Warnings)
				res.Detail = r
				return res, nil
			}},
		closedForm("thermal_damping", "Lifshitz-Kosevich X/sinh X", []calc.Param{req("T", dTemp), req("B", dField), mass("m")},
			func(a []calc.Value) (q, error) { return physics.ThermalDamping(qa(a, 0), qa(a, 1), qa(a, 2)) }),
		closedForm("dingle_factor", "exp(-pi m/(e B tau_q))", []calc.Param{req("B", dField), req("tau_q", dTime), mass("m")},
			func(a []calc.Value) (q, error) { return physics.DingleFactor(qa(a, 0), qa(a, 1), qa(a, 2)) }),
		closedForm("dingle_temperature", "T_D = hbar/(2 pi k_B tau_q)", []calc.Param{req("tau_q", dTime)},
			func(a []calc.Value) (q, error) { return physics.DingleTemperature(qa(a, 0)) }),
		closedForm("quantum_mobility", "mu_q = e tau_q/m", []calc.Param{req("tau_q", dTime), mass("m")},
			func(a []calc.Value) (q, error) { return physics.QuantumMobility(qa(a, 0), qa(a, 1)) }),
		closedForm("transport_time", "tau_t = mu m/e", []calc.Param{req("mu", dMobility), mass("m")},
			func(a []calc.Value) (q, error) { return physics.TransportTime(qa(a, 0), qa(a, 1)) }),
	}
}
