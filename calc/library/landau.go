package library

import (
	"cleave/calc"
	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// landauFuncs are the scales of a 2D system in a perpendicular field: magnetic length,
// cyclotron frequency and energy, Landau levels (parabolic and graphene's), filling factor
// and the field of a given filling, and the Zeeman energy. The formulas and their sources
// are in calc/physics (landau.go).
func landauFuncs() []calc.Func {
	// An angular frequency shares its dimension with Hz; it is shown in rad/s so that nobody
	// reads omega_c as f_c = omega_c/(2 pi).
	radPerS := quantity.MustUnit("rad/s")
	return []calc.Func{
		closedForm("magnetic_length", "l_B = sqrt(hbar/(e B))", []calc.Param{req("B", dField)},
			func(a []calc.Value) (quantity.Quantity, error) { return physics.MagneticLength(qa(a, 0)) }),
		{Name: "cyclotron_frequency", Doc: "angular cyclotron frequency omega_c = e B/m, shown in rad/s",
			Params: []calc.Param{req("B", dField), mass("m")},
			Call: func(_ *calc.Env, a []calc.Value) (calc.Value, error) {
				q, err := physics.CyclotronFrequency(qa(a, 0), qa(a, 1))
				if err != nil {
					return nil, err
				}
				return calc.Quantity{Q: q, Unit: &radPerS}, nil
			}},
		closedForm("cyclotron_energy", "hbar omega_c = hbar e B/m", []calc.Param{req("B", dField), mass("m")},
			func(a []calc.Value) (quantity.Quantity, error) { return physics.CyclotronEnergy(qa(a, 0), qa(a, 1)) }),
		closedForm("landau_level", "E_N = hbar omega_c (N + 1/2)", []calc.Param{req("N", dNone), req("B", dField), mass("m")},
			func(a []calc.Value) (quantity.Quantity, error) {
				n, err := intArg(a, 0)
				if err != nil {
					return quantity.Quantity{}, err
				}
				return physics.LandauLevel(n, qa(a, 1), qa(a, 2))
			}),
		closedForm("filling_factor", "nu = n h/(e B)", []calc.Param{req("n", dDensity), req("B", dField)},
			func(a []calc.Value) (quantity.Quantity, error) { return physics.FillingFactor(qa(a, 0), qa(a, 1)) }),
		closedForm("field_at_filling", "B_nu = n h/(nu e)", []calc.Param{req("n", dDensity), req("nu", dNone)},
			func(a []calc.Value) (quantity.Quantity, error) { return physics.FieldAtFilling(qa(a, 0), qa(a, 1)) }),
		closedForm("zeeman_energy", "E_Z = |g| mu_B B", []calc.Param{req("B", dField), {Name: "g", Dim: dimp(dNone), FromRecord: "g"}},
			func(a []calc.Value) (quantity.Quantity, error) { return physics.ZeemanEnergy(qa(a, 0), qa(a, 1)) }),
		closedForm("dirac_landau_level", "graphene: E_N = sgn(N) vF sqrt(2 e hbar B |N|)",
			[]calc.Param{req("N", dNone), req("B", dField), {Name: "vF", Dim: dimp(dSpeed), FromRecord: "vF"}},
			func(a []calc.Value) (quantity.Quantity, error) {
				n, err := intArg(a, 0)
				if err != nil {
					return quantity.Quantity{}, err
				}
				return physics.DiracLandauLevel(n, qa(a, 1), qa(a, 2))
			}),
	}
}
