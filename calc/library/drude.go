package library

import (
	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// drudeFuncs are the zero-field transport quantities of the Drude model and the van der
// Pauw method: sheet resistance from a four-terminal resistance and the squares between the
// probes, mobility from it and a density, the mean free path, and the sheet resistance of a
// van der Pauw sample. The formulas and their sources are in calc/physics (transport.go,
// vdp.go).
func drudeFuncs() []calc.Func {
	type q = quantity.Quantity
	return []calc.Func{
		closedForm("mobility", "mu = 1/(e n rho)", []calc.Param{req("rho", dResistance), req("n", dDensity)},
			func(a []calc.Value) (q, error) { return physics.Mobility(qa(a, 0), qa(a, 1)) }),
		closedForm("sheet_resistance", "rho = R/squares", []calc.Param{req("R", dResistance), req("squares", dNone)},
			func(a []calc.Value) (q, error) { return physics.SheetResistance(qa(a, 0), qa(a, 1)) }),
		closedForm("mean_free_path", "l = hbar k_F mu/e", []calc.Param{req("mu", dMobility), req("n", dDensity), opt("gs", 2), opt("gv", 1)},
			func(a []calc.Value) (q, error) {
				gs, gv, err := degeneracies(a, 2)
				if err != nil {
					return q{}, err
				}
				return physics.MeanFreePath(qa(a, 0), qa(a, 1), gs, gv)
			}),
		closedForm("vdp_sheet_resistance", "van der Pauw: exp(-pi R1/Rs) + exp(-pi R2/Rs) = 1", []calc.Param{req("R1", dResistance), req("R2", dResistance)},
			func(a []calc.Value) (q, error) { return physics.VdpSheetResistance(qa(a, 0), qa(a, 1)) }),
	}
}
