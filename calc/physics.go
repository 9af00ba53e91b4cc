package calc

import (
	"fmt"
	"math"

	"cleave/calc/physics"
	"cleave/calc/quantity"
)

// Dimensions of the physics functions' parameters.
var (
	dField      = quantity.MustUnit("T").D
	dMass       = quantity.Mass
	dDensity    = quantity.MustUnit("m^-2").D
	dNone       = quantity.Dimensionless
	dSpeed      = quantity.MustUnit("m/s").D
	dResistance = quantity.MustUnit("Ohm").D
	dMobility   = quantity.MustUnit("m^2/(V s)").D
	dTime       = quantity.Time
	dTemp       = quantity.Temperature
	dHallSlope  = quantity.MustUnit("Ohm/T").D
	dVolt       = quantity.MustUnit("V").D
	dCapArea    = quantity.MustUnit("F/m^2").D
	dPerVolt    = quantity.MustUnit("m^-2/V").D
)

func dimp(d quantity.Dim) *quantity.Dim { return &d }

func req(name string, d quantity.Dim) Param { return Param{Name: name, Dim: dimp(d)} }

// mass is a mass parameter that also accepts a material (its mstar).
func mass(name string) Param { return Param{Name: name, Dim: dimp(dMass), FromRecord: "mstar"} }

func opt(name string, def float64) Param {
	return Param{Name: name, Dim: dimp(dNone), Default: num(def)}
}

// intArg converts a dimensionless exact argument to an int (Landau index, degeneracy).
func intArg(args []Value, i int) (int, error) {
	v := qa(args, i).Value()
	if v != math.Trunc(v) || math.Abs(v) > 1e6 {
		return 0, &ArgError{Arg: i, Err: fmt.Errorf("%w: needs a whole number, found %g", ErrArgument, v)}
	}
	return int(v), nil
}

func qa(args []Value, i int) quantity.Quantity { return args[i].(Quantity).Q }

// registerPhysics registers the Landau-level and transport functions under the names and
// parameter lists of the product design. Dimensions are checked before the call; the
// formulas and their sources live in calc/physics.
func registerPhysics(e *Env) {
	type fn = func(args []Value) (quantity.Quantity, error)
	add := func(name, doc string, params []Param, f fn) {
		e.Register(Func{Name: name, Doc: doc, Params: params, Call: func(_ *Env, args []Value) (Value, error) {
			q, err := f(args)
			if err != nil {
				return nil, err
			}
			return Q(q), nil
		}})
	}
	add("magnetic_length", "l_B = sqrt(hbar/(e B))", []Param{req("B", dField)},
		func(a []Value) (quantity.Quantity, error) { return physics.MagneticLength(qa(a, 0)) })
	// An angular frequency shares its dimension with Hz; it is shown in rad/s so that nobody
	// reads omega_c as f_c = omega_c/(2 pi).
	radPerS := quantity.MustUnit("rad/s")
	e.Register(Func{Name: "cyclotron_frequency", Doc: "angular cyclotron frequency omega_c = e B/m, shown in rad/s",
		Params: []Param{req("B", dField), mass("m")},
		Call: func(_ *Env, a []Value) (Value, error) {
			q, err := physics.CyclotronFrequency(qa(a, 0), qa(a, 1))
			if err != nil {
				return nil, err
			}
			return Quantity{Q: q, Unit: &radPerS}, nil
		}})
	add("cyclotron_energy", "hbar omega_c = hbar e B/m", []Param{req("B", dField), mass("m")},
		func(a []Value) (quantity.Quantity, error) { return physics.CyclotronEnergy(qa(a, 0), qa(a, 1)) })
	add("landau_level", "E_N = hbar omega_c (N + 1/2)", []Param{req("N", dNone), req("B", dField), mass("m")},
		func(a []Value) (quantity.Quantity, error) {
			n, err := intArg(a, 0)
			if err != nil {
				return quantity.Quantity{}, err
			}
			return physics.LandauLevel(n, qa(a, 1), qa(a, 2))
		})
	add("filling_factor", "nu = n h/(e B)", []Param{req("n", dDensity), req("B", dField)},
		func(a []Value) (quantity.Quantity, error) { return physics.FillingFactor(qa(a, 0), qa(a, 1)) })
	add("field_at_filling", "B_nu = n h/(nu e)", []Param{req("n", dDensity), req("nu", dNone)},
		func(a []Value) (quantity.Quantity, error) { return physics.FieldAtFilling(qa(a, 0), qa(a, 1)) })
	add("zeeman_energy", "E_Z = |g| mu_B B", []Param{req("B", dField), {Name: "g", Dim: dimp(dNone), FromRecord: "g"}},
		func(a []Value) (quantity.Quantity, error) { return physics.ZeemanEnergy(qa(a, 0), qa(a, 1)) })
	add("hall_resistance", "R_K/nu", []Param{req("nu", dNone)},
		func(a []Value) (quantity.Quantity, error) { return physics.HallResistance(qa(a, 0)) })
	add("dirac_landau_level", "graphene: E_N = sgn(N) vF sqrt(2 e hbar B |N|)",
		[]Param{req("N", dNone), req("B", dField), {Name: "vF", Dim: dimp(dSpeed), FromRecord: "vF"}},
		func(a []Value) (quantity.Quantity, error) {
			n, err := intArg(a, 0)
			if err != nil {
				return quantity.Quantity{}, err
			}
			return physics.DiracLandauLevel(n, qa(a, 1), qa(a, 2))
		})
	add("sdh_frequency", "SdH frequency in 1/B: f_B = h n/(e gs gv)", []Param{req("n", dDensity), opt("gs", 2), opt("gv", 1)},
		func(a []Value) (quantity.Quantity, error) {
			gs, err := intArg(a, 1)
			if err != nil {
				return quantity.Quantity{}, err
			}
			gv, err := intArg(a, 2)
			if err != nil {
				return quantity.Quantity{}, err
			}
			return physics.SdHFrequency(qa(a, 0), gs, gv)
		})
	add("thermal_damping", "Lifshitz-Kosevich X/sinh X", []Param{req("T", dTemp), req("B", dField), mass("m")},
		func(a []Value) (quantity.Quantity, error) {
			return physics.ThermalDamping(qa(a, 0), qa(a, 1), qa(a, 2))
		})
	add("dingle_factor", "exp(-pi m/(e B tau_q))", []Param{req("B", dField), req("tau_q", dTime), mass("m")},
		func(a []Value) (quantity.Quantity, error) { return physics.DingleFactor(qa(a, 0), qa(a, 1), qa(a, 2)) })
	add("dingle_temperature", "T_D = hbar/(2 pi k_B tau_q)", []Param{req("tau_q", dTime)},
		func(a []Value) (quantity.Quantity, error) { return physics.DingleTemperature(qa(a, 0)) })
	add("quantum_mobility", "mu_q = e tau_q/m", []Param{req("tau_q", dTime), mass("m")},
		func(a []Value) (quantity.Quantity, error) { return physics.QuantumMobility(qa(a, 0), qa(a, 1)) })
	registerTransport(add)
}
