package library

import (
	"fmt"
	"math"

	"cleave/calc"
	"cleave/calc/quantity"
	"cleave/calc/transport"
)

// gateFuncs analyse a gate series, densities and mobilities measured at several gate
// voltages: the gate capacitance and threshold from a line through n(V_g), and the power law
// mu ∝ n^alpha. The fits and their sources are in calc/transport.
func gateFuncs() []calc.Func {
	return []calc.Func{
		{Name: "gate_capacitance",
			Doc:    "gate series: fit n = C (V_g - V_th)/e to densities measured at gate voltages (two lists) → capacitance per area, dn/dV_g and threshold",
			Params: []calc.Param{{Name: "Vg"}, {Name: "n"}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
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
				res := withWarnings(newResult("gate_capacitance", "C", []string{"threshold"},
					"C", est(r.Capacitance, dCapArea), "dn_dV", est(r.Slope, dPerVolt), "threshold", est(r.Threshold, dVolt),
					"points", num(float64(r.Points))), r.Warnings)
				res.Detail = &GateDetail{GateResult: r, Vg: vg, N: n, SigmaN: sn}
				return res, nil
			}},
		{Name: "mobility_power_law",
			Doc:    "fit mu ∝ n^alpha to mobilities against densities (two lists), optionally over a density range",
			Params: []calc.Param{{Name: "n"}, {Name: "mu"}, {Name: "range", Default: calc.String("all")}},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				n, _, err := quantities(a, 0, dDensity, "densities")
				if err != nil {
					return nil, err
				}
				mu, _, err := quantities(a, 1, dMobility, "mobilities")
				if err != nil {
					return nil, err
				}
				lo, hi := 0.0, math.Inf(1)
				if r, ok := a[2].(calc.Range); ok {
					if r.Lo.Dim() != dDensity {
						return nil, &calc.ArgError{Arg: 2, Err: fmt.Errorf("%w: the range must be densities", calc.ErrArgument)}
					}
					lo, hi = r.Lo.Value(), r.Hi.Value()
				}
				r, err := transport.MobilityPowerLaw(n, mu, lo, hi)
				if err != nil {
					return nil, err
				}
				res := withWarnings(newResult("mobility_power_law", "alpha", nil, "alpha", est(r.Alpha, dNone),
					"mu_ref", est(r.Prefactor, dMobility), "n_ref", calc.Q(quantity.New(r.NRef, dDensity)),
					"points", num(float64(r.Points))), r.Warnings)
				res.Detail = &PowerLawDetail{PowerLawResult: r, N: n, Mu: mu}
				return res, nil
			}},
	}
}
