package library

import (
	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// fermiFuncs are the quantities of a degenerate 2D Fermi gas at zero field: Fermi energy,
// wavevector and velocity, density of states, graphene's Fermi energy, and the effective
// Bohr radius that sets the gas's interaction scale. Spin and valley degeneracies default
// to gs = 2, gv = 1. The formulas and their sources are in calc/physics (transport.go).
func fermiFuncs() []calc.Func {
	type q = quantity.Quantity
	return []calc.Func{
		closedForm("fermi_energy", "E_F = 2 pi hbar^2 n/(gs gv m)", []calc.Param{req("n", dDensity), mass("m"), opt("gs", 2), opt("gv", 1)},
			func(a []calc.Value) (q, error) {
				gs, gv, err := degeneracies(a, 2)
				if err != nil {
					return q{}, err
				}
				return physics.FermiEnergy(qa(a, 0), qa(a, 1), gs, gv)
			}),
		closedForm("fermi_wavevector", "k_F = sqrt(4 pi n/(gs gv))", []calc.Param{req("n", dDensity), opt("gs", 2), opt("gv", 1)},
			func(a []calc.Value) (q, error) {
				gs, gv, err := degeneracies(a, 1)
				if err != nil {
					return q{}, err
				}
				return physics.FermiWavevector(qa(a, 0), gs, gv)
			}),
		closedForm("fermi_velocity", "v_F = hbar k_F/m", []calc.Param{req("n", dDensity), mass("m"), opt("gs", 2), opt("gv", 1)},
			func(a []calc.Value) (q, error) {
				gs, gv, err := degeneracies(a, 2)
				if err != nil {
					return q{}, err
				}
				return physics.FermiVelocity(qa(a, 0), qa(a, 1), gs, gv)
			}),
		closedForm("density_of_states", "D = gs gv m/(2 pi hbar^2)", []calc.Param{mass("m"), opt("gs", 2), opt("gv", 1)},
			func(a []calc.Value) (q, error) {
				gs, gv, err := degeneracies(a, 1)
				if err != nil {
					return q{}, err
				}
				return physics.DensityOfStates(qa(a, 0), gs, gv)
			}),
		closedForm("dirac_fermi_energy", "graphene: E_F = hbar vF sqrt(pi n)", []calc.Param{req("n", dDensity), {Name: "vF", Dim: dimp(dSpeed), FromRecord: "vF"}},
			func(a []calc.Value) (q, error) { return physics.DiracFermiEnergy(qa(a, 0), qa(a, 1)) }),
		closedForm("bohr_radius", "effective Bohr radius a_B* = 4 pi eps hbar^2/(m e^2)",
			[]calc.Param{mass("m"), {Name: "eps_r", Dim: dimp(dNone), FromRecord: "eps_r"}},
			func(a []calc.Value) (q, error) { return physics.EffectiveBohrRadius(qa(a, 0), qa(a, 1)) }),
	}
}
