package library

import (
	"fmt"
	"strings"

	"cleave/calc"
	"cleave/calc/materials"
)

// materialFuncs give material(name): the material record for a name held in a string, such
// as a wafer's channel field, so `material(wafer.channel).mstar` reads its mass. (A
// material written as a name, `GaAs.mstar`, is the language's own: see calc.MaterialRecord.)
// The parameters and their sources are in calc/materials.
func materialFuncs() []calc.Func {
	return []calc.Func{{Name: "material",
		Doc:    "the material parameters (mstar, eps_r, g, gs, gv, vF) for a material name such as \"GaAs\" or \"Al0.33Ga0.67As\", e.g. material(wafer.channel)",
		Params: []calc.Param{{Name: "name"}},
		Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
			name, ok := a[0].(calc.String)
			if !ok {
				return nil, &calc.ArgError{Arg: 0, Err: fmt.Errorf("%w: expected a material name in quotes or a text field, found %s", calc.ErrArgument, a[0].Type())}
			}
			m, err := materials.Lookup(strings.TrimSpace(string(name)))
			if err != nil {
				return nil, &calc.ArgError{Arg: 0, Err: err}
			}
			return calc.MaterialRecord(m), nil
		}}}
}
