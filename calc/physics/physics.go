// Package physics computes the Landau-level and magnetotransport quantities of a
// two-dimensional electron or hole gas, and the geometry of Hall bars, on
// quantity.Quantity values.
//
// Every function checks the dimensions of its arguments and returns an *[ArgError]
// naming the function (as it is called in calc blocks), the argument and what was
// expected. Results are built from quantity arithmetic or quantity.Derived, so the
// standard uncertainties of the inputs (and of measured constants such as m_e) propagate
// to first order with their correlations. Constants come from package constants
// (CODATA 2018).
//
// Conventions: densities are sheet densities (m^-2 in SI), resistivities are sheet
// resistivities (Ohm per square), masses are absolute (0.067 m_e, not 0.067; see
// [EffectiveMass]), fields enter through |B| except where a sign is documented, and
// cyclotron frequencies are angular (rad/s, shown as s^-1). gs and gv are the spin and
// valley degeneracies (GaAs: 2 and 1; Si(100): 2 and 2; graphene: 2 and 2).
//
// The formulas follow Ando, Fowler and Stern, Rev. Mod. Phys. 54, 437 (1982), and the
// standard textbook results for a parabolic 2D band; the functions for graphene follow
// Novoselov et al., Nature 438, 197 (2005). The package leaves out data analysis (fits,
// Fourier transforms), which lives in the transport package.
package physics

import (
	"fmt"
	"math"

	"cleave/calc/constants"
	"cleave/calc/quantity"
)

// ArgError reports a bad argument of a physics function.
type ArgError struct {
	Func string // the function, as called in calc blocks, e.g. "magnetic_length"
	Arg  string // the argument name, e.g. "B"
	Msg  string // what is wrong and what was expected
	Err  error  // *quantity.DimError for a dimension mismatch, else quantity.ErrDomain
}

func (e *ArgError) Error() string {
	return fmt.Sprintf("%s: argument %s: %s", e.Func, e.Arg, e.Msg)
}

// Unwrap returns the inner error, so errors.Is(err, quantity.ErrDimMismatch) and
// errors.Is(err, quantity.ErrDomain) work.
func (e *ArgError) Unwrap() error { return e.Err }

// kind is an expected argument dimension with a name and a unit for messages.
type kind struct {
	name string
	unit string
	d    quantity.Dim
}

var (
	kField       = kind{"a magnetic field", "T", quantity.MustUnit("T").D}
	kMass        = kind{"a mass", "e.g. 0.067 m_e", quantity.Mass}
	kDensity     = kind{"a sheet density", "e.g. 3e11 cm^-2", quantity.MustUnit("m^-2").D}
	kResistance  = kind{"a resistance", "Ohm", quantity.MustUnit("Ohm").D}
	kMobility    = kind{"a mobility", "e.g. 1e6 cm^2/(V s)", quantity.MustUnit("m^2/(V s)").D}
	kTime        = kind{"a time", "e.g. 1 ps", quantity.Time}
	kVelocity    = kind{"a velocity", "m/s", quantity.MustUnit("m/s").D}
	kLength      = kind{"a length", "e.g. 20 um", quantity.Length}
	kTemperature = kind{"a temperature", "K", quantity.Temperature}
	kHallSlope   = kind{"a Hall slope", "Ohm/T", quantity.MustUnit("Ohm/T").D}
	kNumber      = kind{"a pure number", "no unit", quantity.Dimensionless}
)

func dimText(d quantity.Dim) string {
	if d.IsDimensionless() {
		return "no unit (dimensionless)"
	}
	return d.String()
}

// check returns an *ArgError when q's dimension is not k's.
func check(fn, arg string, q quantity.Quantity, k kind) error {
	if q.Dim() == k.d {
		return nil
	}
	return &ArgError{Func: fn, Arg: arg,
		Msg: fmt.Sprintf("has dimension %s, expected %s (%s)", dimText(q.Dim()), k.name, k.unit),
		Err: &quantity.DimError{Op: fn, Left: q.Dim(), Right: k.d}}
}

func domain(fn, arg, format string, args ...any) error {
	return &ArgError{Func: fn, Arg: arg, Msg: fmt.Sprintf(format, args...), Err: quantity.ErrDomain}
}

// positive checks the dimension and that the value is finite and > 0.
func positive(fn, arg string, q quantity.Quantity, k kind) error {
	if err := check(fn, arg, q, k); err != nil {
		return err
	}
	if !(q.Value() > 0) || math.IsInf(q.Value(), 0) {
		return domain(fn, arg, "must be positive and finite, got %g (SI)", q.Value())
	}
	return nil
}

// nonzero checks the dimension and that the value is finite and not 0.
func nonzero(fn, arg string, q quantity.Quantity, k kind) error {
	if err := check(fn, arg, q, k); err != nil {
		return err
	}
	if q.Value() == 0 || math.IsNaN(q.Value()) || math.IsInf(q.Value(), 0) {
		return domain(fn, arg, "must be nonzero and finite, got %g (SI)", q.Value())
	}
	return nil
}

func degeneracy(fn string, gs, gv int) error {
	if gs < 1 {
		return domain(fn, "gs", "spin degeneracy must be 1 or more, got %d", gs)
	}
	if gv < 1 {
		return domain(fn, "gv", "valley degeneracy must be 1 or more, got %d", gv)
	}
	return nil
}

func firstErr(errs ...error) error {
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// abs returns |q| with the same uncertainty.
func abs(q quantity.Quantity) quantity.Quantity {
	if q.Value() < 0 {
		return q.Neg()
	}
	return q
}

// sqrt of a quantity whose dimension exponents are known to be even.
func sqrt(q quantity.Quantity) quantity.Quantity {
	r, err := quantity.Sqrt(q)
	if err != nil {
		panic("physics: internal: " + err.Error())
	}
	return r
}

// Constants used throughout (CODATA 2018, package constants).
var (
	cE    = constants.Q("e")
	cH    = constants.Q("h")
	cHbar = constants.Q("hbar")
	cKB   = constants.Q("k_B")
	cMe   = constants.Q("m_e")
	cMuB  = constants.Q("mu_B")
	cRK   = constants.Q("R_K")
	cEps0 = constants.Q("eps0")
)

// ErrDomain is quantity.ErrDomain, re-exported for callers of this package.
var ErrDomain = quantity.ErrDomain

// EffectiveMass returns ratio·m_e (with the CODATA 2018 uncertainty of m_e) for a mass
// written as a multiple of the free-electron mass, e.g. EffectiveMass(0.067) for GaAs.
func EffectiveMass(ratio float64) quantity.Quantity { return cMe.Scale(ratio) }
