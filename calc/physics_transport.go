package calc

import (
	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// degeneracies reads the gs and gv arguments at indexes i and i+1.
func degeneracies(a []Value, i int) (int, int, error) {
	gs, err := intArg(a, i)
	if err != nil {
		return 0, 0, err
	}
	gv, err := intArg(a, i+1)
	if err != nil {
		return 0, 0, err
	}
	return gs, gv, nil
}

// registerTransport wires the 2D Fermi-gas, Drude and van der Pauw functions.
func registerTransport(add func(name, doc string, params []Param, f func(args []Value) (quantity.Quantity, error))) {
	type q = quantity.Quantity
	add("fermi_energy", "E_F = 2 pi hbar^2 n/(gs gv m)", []Param{req("n", dDensity), mass("m"), opt("gs", 2), opt("gv", 1)},
		func(a []Value) (q, error) {
			gs, gv, err := degeneracies(a, 2)
			if err != nil {
				return q{}, err
			}
			return physics.FermiEnergy(qa(a, 0), qa(a, 1), gs, gv)
		})
	add("fermi_wavevector", "k_F = sqrt(4 pi n/(gs gv))", []Param{req("n", dDensity), opt("gs", 2), opt("gv", 1)},
		func(a []Value) (q, error) {
			gs, gv, err := degeneracies(a, 1)
			if err != nil {
				return q{}, err
			}
			return physics.FermiWavevector(qa(a, 0), gs, gv)
		})
	add("fermi_velocity", "v_F = hbar k_F/m", []Param{req("n", dDensity), mass("m"), opt("gs", 2), opt("gv", 1)},
		func(a []Value) (q, error) {
			gs, gv, err := degeneracies(a, 2)
			if err != nil {
				return q{}, err
			}
			return physics.FermiVelocity(qa(a, 0), qa(a, 1), gs, gv)
		})
	add("density_of_states", "D = gs gv m/(2 pi hbar^2)", []Param{mass("m"), opt("gs", 2), opt("gv", 1)},
		func(a []Value) (q, error) {
			gs, gv, err := degeneracies(a, 1)
			if err != nil {
				return q{}, err
			}
			return physics.DensityOfStates(qa(a, 0), gs, gv)
		})
	add("mobility", "mu = 1/(e n rho)", []Param{req("rho", dResistance), req("n", dDensity)},
		func(a []Value) (q, error) { return physics.Mobility(qa(a, 0), qa(a, 1)) })
	add("sheet_resistance", "rho = R/squares", []Param{req("R", dResistance), req("squares", dNone)},
		func(a []Value) (q, error) { return physics.SheetResistance(qa(a, 0), qa(a, 1)) })
	add("transport_time", "tau_t = mu m/e", []Param{req("mu", dMobility), mass("m")},
		func(a []Value) (q, error) { return physics.TransportTime(qa(a, 0), qa(a, 1)) })
	add("mean_free_path", "l = hbar k_F mu/e", []Param{req("mu", dMobility), req("n", dDensity), opt("gs", 2), opt("gv", 1)},
		func(a []Value) (q, error) {
			gs, gv, err := degeneracies(a, 2)
			if err != nil {
				return q{}, err
			}
			return physics.MeanFreePath(qa(a, 0), qa(a, 1), gs, gv)
		})
	add("density_from_slope", "n = 1/(e |dR_xy/dB|) from a Hall slope (hall_density fits a data set)", []Param{req("slope", dHallSlope)},
		func(a []Value) (q, error) { return physics.HallDensity(qa(a, 0)) })
	add("vdp_sheet_resistance", "van der Pauw: exp(-pi R1/Rs) + exp(-pi R2/Rs) = 1", []Param{req("R1", dResistance), req("R2", dResistance)},
		func(a []Value) (q, error) { return physics.VdpSheetResistance(qa(a, 0), qa(a, 1)) })
	add("bohr_radius", "effective Bohr radius a_B* = 4 pi eps hbar^2/(m e^2)",
		[]Param{mass("m"), {Name: "eps_r", Dim: dimp(dNone), FromRecord: "eps_r"}},
		func(a []Value) (q, error) { return physics.EffectiveBohrRadius(qa(a, 0), qa(a, 1)) })
	add("dirac_fermi_energy", "graphene: E_F = hbar vF sqrt(pi n)", []Param{req("n", dDensity), {Name: "vF", Dim: dimp(dSpeed), FromRecord: "vF"}},
		func(a []Value) (q, error) { return physics.DiracFermiEnergy(qa(a, 0), qa(a, 1)) })
}
