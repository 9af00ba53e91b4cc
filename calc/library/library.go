// Package library is the set of functions calc blocks call: the closed forms of
// calc/physics, the data analyses of calc/transport and the band solver of calc/band, each
// wrapped for the language of package calc with its parameters, their dimensions (checked
// by the evaluator before the call) and defaults.
//
// One file holds one family:
//
//	math.go       sqrt, exp, ln, log10, sin, cos, tanh, abs, min, max, mean
//	landau.go     Landau-level scales: magnetic length, cyclotron frequency and energy, levels,
//	              filling factor, Zeeman energy, graphene's levels
//	fermi.go      the 2D Fermi gas: Fermi energy, wavevector and velocity, density of states,
//	              effective Bohr radius
//	drude.go      Drude transport: mobility, sheet resistance, mean free path, van der Pauw
//	hall.go       Hall and Shubnikov–de Haas densities, their comparison, the SdH frequency
//	lifetime.go   effective mass and lifetimes: Lifshitz–Kosevich, Dingle, transport time
//	plateaus.go   quantum Hall plateaus, Landau fans, R_K/nu
//	gate.go       gate series: capacitance, mobility against density
//	band.go       expected_density: the layer stack solved self-consistently
//	data.go       data files and sweeps: data(), symmetrize, zero_field, check_sweep
//	geometry.go   device geometry: squares, Hall pairs, van der Pauw contacts, Corbino discs
//	materials.go  material(name)
//	fab.go        fabrication: tlm, contact_resistance, etch_rate, etch_depth, dose, metal_thickness
//	growth.go     growth: monolayer, rheed_rate, al_fraction, arrhenius_fit, cell_calibration,
//	              cell_density, cell_flux, delta_density, growth_check
//
// The package keeps no state of its own: [All] builds the functions, [ReadData] is the
// data-file reader, and [NewEnv] gives an environment with both installed.
package library

import (
	"sync"

	"cleave/calc"
)

// table is [All] built once into a read-only table that every environment shares (making an
// environment per file then costs nothing per function).
var table = sync.OnceValue(func() *calc.FuncTable { return calc.NewFuncTable(All()...) })

// All returns every function of the library, family by family. Each call builds new
// values, so an Env may change its copies freely.
func All() []calc.Func {
	out := make([]calc.Func, 0, 64)
	for _, family := range [][]calc.Func{
		mathFuncs(),
		landauFuncs(),
		fermiFuncs(),
		drudeFuncs(),
		hallFuncs(),
		lifetimeFuncs(),
		plateauFuncs(),
		gateFuncs(),
		bandFuncs(),
		dataFuncs(),
		geometryFuncs(),
		materialFuncs(),
		fabFuncs(),
		growthFuncs(),
	} {
		out = append(out, family...)
	}
	return out
}

// NewEnv returns a calc environment with the whole library installed (every function of
// [All], and [ReadData] as its data loader), then opts applied: a notebook folder
// (calc.WithFS), a resolver for entry fields (calc.WithResolver), further functions.
func NewEnv(opts ...calc.Option) *calc.Env {
	base := baseOptions()
	all := make([]calc.Option, 0, len(base)+len(opts))
	return calc.NewEnv(append(append(all, base...), opts...)...)
}

// baseOptions are the options every environment starts with, made once (they set the same
// table and reader each time).
var baseOptions = sync.OnceValue(func() []calc.Option {
	return []calc.Option{calc.WithFuncTable(table()), calc.WithDataLoader(ReadData)}
})
