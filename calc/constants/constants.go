// Package constants is the table of physical constants that cleave uses, pinned to a
// single CODATA edition ([Edition]).
//
// Every entry records its value and standard uncertainty in coherent SI units, whether it
// is exact, and its source. Since the 2019 revision of the SI, e, h, k_B, c and N_A are exact
// by definition, and so is every constant built only from them (ħ, R_K = h/e², h/e, Φ₀ = h/2e).
// The electron mass, ε₀, μ₀ and μ_B are measured.
//
// The package leaves out constants that the magnetotransport workflow does not use, and it
// does not model the full CODATA covariance matrix: measured constants are independent
// inputs, except where an exact SI relation ties two of them together (μ₀ = 1/(ε₀c²) and
// μ_B = eħ/(2m_e)), in which case the dependent one shares its parent's uncertainty source
// so that the two correlate exactly. See [Constant.Quantity].
package constants

import (
	"fmt"
	"math"
	"sort"
)

// Edition names the CODATA adjustment that every value in this package comes from.
const Edition = "CODATA 2018"

// Constant is one entry of the table. Value and Uncertainty are in coherent SI units
// (the unit named by Unit); Uncertainty is the standard uncertainty, 0 when Exact.
type Constant struct {
	Symbol      string  // the name used in calc blocks, e.g. "hbar", "k_B", "R_K"
	Name        string  // a human-readable name
	Value       float64 // SI value
	Uncertainty float64 // standard uncertainty (SI); 0 if exact
	Unit        string  // SI unit in the syntax of the unit parser, e.g. "J s"
	Exact       bool    // true when the value is exact by definition of the SI (or a convention)
	Source      string  // where the value comes from
	Note        string  // caveats, e.g. "conventional value; use only by explicit name"

	dim    [7]int8 // exponents of m, kg, s, A, K, mol, cd
	parent string  // for measured constants tied to another by an exact relation
}

// Exact SI defining values (CODATA 2018 / SI 2019).
const (
	elementaryCharge = 1.602176634e-19 // C, exact
	planck           = 6.62607015e-34  // J s, exact
	boltzmann        = 1.380649e-23    // J/K, exact
	lightSpeed       = 299792458.0     // m/s, exact
	avogadro         = 6.02214076e23   // mol^-1, exact
)

// Measured values (CODATA 2018) with their standard uncertainties.
const (
	electronMass  = 9.1093837015e-31 // kg
	electronMassU = 0.0000000028e-31 // kg
	eps0          = 8.8541878128e-12 // F/m
	eps0U         = 0.0000000013e-12 // F/m
	mu0           = 1.25663706212e-6 // N/A^2
	mu0U          = 0.00000000019e-6 // N/A^2
	bohrMagneton  = 9.2740100783e-24 // J/T
	bohrMagnetonU = 0.0000000028e-24 // J/T
)

const codata = "CODATA 2018 (Tiesinga, Mohr, Newell, Taylor; NIST SP 961, 2019)"

// dims in the order m, kg, s, A, K, mol, cd.
var (
	dimCharge       = [7]int8{0, 0, 1, 1, 0, 0, 0}
	dimAction       = [7]int8{2, 1, -1, 0, 0, 0, 0}
	dimEntropy      = [7]int8{2, 1, -2, 0, -1, 0, 0}
	dimVelocity     = [7]int8{1, 0, -1, 0, 0, 0, 0}
	dimPerMole      = [7]int8{0, 0, 0, 0, 0, -1, 0}
	dimMass         = [7]int8{0, 1, 0, 0, 0, 0, 0}
	dimPermittivity = [7]int8{-3, -1, 4, 2, 0, 0, 0}
	dimPermeability = [7]int8{1, 1, -2, -2, 0, 0, 0}
	dimMagMoment    = [7]int8{2, 0, 0, 1, 0, 0, 0} // J/T = A m^2
	dimResistance   = [7]int8{2, 1, -3, -2, 0, 0, 0}
	dimConductance  = [7]int8{-2, -1, 3, 2, 0, 0, 0}
	dimFlux         = [7]int8{2, 1, -2, -1, 0, 0, 0}
)

var table = []Constant{
	{Symbol: "e", Name: "elementary charge", Value: elementaryCharge, Unit: "C", Exact: true, Source: codata, dim: dimCharge},
	{Symbol: "h", Name: "Planck constant", Value: planck, Unit: "J s", Exact: true, Source: codata, dim: dimAction},
	{Symbol: "hbar", Name: "reduced Planck constant h/2π", Value: planck / (2 * math.Pi), Unit: "J s", Exact: true, Source: codata + "; computed as h/2π", dim: dimAction},
	{Symbol: "k_B", Name: "Boltzmann constant", Value: boltzmann, Unit: "J/K", Exact: true, Source: codata, dim: dimEntropy},
	{Symbol: "c", Name: "speed of light in vacuum", Value: lightSpeed, Unit: "m/s", Exact: true, Source: codata, dim: dimVelocity},
	{Symbol: "N_A", Name: "Avogadro constant", Value: avogadro, Unit: "mol^-1", Exact: true, Source: codata, dim: dimPerMole},
	{Symbol: "m_e", Name: "electron mass", Value: electronMass, Uncertainty: electronMassU, Unit: "kg", Source: codata, dim: dimMass},
	{Symbol: "eps0", Name: "vacuum electric permittivity", Value: eps0, Uncertainty: eps0U, Unit: "F/m", Source: codata,
		Note: "measured since the 2019 SI revision", dim: dimPermittivity},
	{Symbol: "mu0", Name: "vacuum magnetic permeability", Value: mu0, Uncertainty: mu0U, Unit: "N/A^2", Source: codata,
		Note: "measured since the 2019 SI revision; tied to eps0 by mu0 eps0 c^2 = 1", dim: dimPermeability, parent: "eps0"},
	{Symbol: "mu_B", Name: "Bohr magneton eħ/2m_e", Value: bohrMagneton, Uncertainty: bohrMagnetonU, Unit: "J/T", Source: codata,
		Note: "tied to m_e by mu_B = e hbar/(2 m_e)", dim: dimMagMoment, parent: "m_e"},
	{Symbol: "R_K", Name: "von Klitzing constant h/e²", Value: planck / (elementaryCharge * elementaryCharge), Unit: "Ohm", Exact: true,
		Source: codata + "; computed as h/e^2", dim: dimResistance},
	{Symbol: "R_K90", Name: "conventional von Klitzing constant R_K-90", Value: 25812.807, Unit: "Ohm", Exact: true,
		Source: "BIPM, CIPM 1988 Recommendation 2",
		Note:   "conventional value in force 1990-01-01 to 2019-05-20; use only by explicit name", dim: dimResistance},
	{Symbol: "G_0", Name: "conductance quantum 2e²/h", Value: 2 * elementaryCharge * elementaryCharge / planck, Unit: "S", Exact: true,
		Source: codata + "; computed as 2e^2/h", dim: dimConductance},
	{Symbol: "h_e", Name: "single-electron flux quantum h/e", Value: planck / elementaryCharge, Unit: "Wb", Exact: true,
		Source: codata + "; computed as h/e",
		Note:   "the flux quantum that sets the Landau-level degeneracy and the filling factor", dim: dimFlux},
	{Symbol: "Phi_0", Name: "magnetic flux quantum h/2e", Value: planck / (2 * elementaryCharge), Unit: "Wb", Exact: true,
		Source: codata + "; computed as h/(2e)",
		Note:   "the superconducting flux quantum; not the one for the filling factor", dim: dimFlux},
}

// aliases maps alternative spellings to table symbols.
var aliases = map[string]string{
	"ħ":         "hbar",
	"kB":        "k_B",
	"me":        "m_e",
	"eps_0":     "eps0",
	"epsilon0":  "eps0",
	"ε0":        "eps0",
	"ε₀":        "eps0",
	"mu_0":      "mu0",
	"μ0":        "mu0",
	"μ₀":        "mu0",
	"muB":       "mu_B",
	"μ_B":       "mu_B",
	"RK":        "R_K",
	"R_K-90":    "R_K90",
	"RK90":      "R_K90",
	"G0":        "G_0",
	"Phi0":      "Phi_0",
	"Φ0":        "Phi_0",
	"Φ₀":        "Phi_0",
	"h/e":       "h_e",
	"h/2e":      "Phi_0",
	"NA":        "N_A",
	"avogadro":  "N_A",
	"planck":    "h",
	"boltzmann": "k_B",
}

var index = func() map[string]int {
	m := make(map[string]int, len(table))
	for i, c := range table {
		m[c.Symbol] = i
	}
	return m
}()

// Lookup returns the constant with the given symbol (or a listed alias such as "ħ",
// "kB", "μ_B", "R_K-90", "h/e"). Symbols are case-sensitive.
func Lookup(sym string) (Constant, bool) {
	if a, ok := aliases[sym]; ok {
		sym = a
	}
	i, ok := index[sym]
	if !ok {
		return Constant{}, false
	}
	return table[i], true
}

// Value returns the SI value of the table constant with the given symbol or alias. Like
// [Q] it panics if the symbol is unknown: it is meant for package-level variables with
// literal symbols, such as the float64 constants of a numerical solver.
func Value(sym string) float64 {
	c, ok := Lookup(sym)
	if !ok {
		panic(fmt.Sprintf("constants: unknown symbol %q", sym))
	}
	return c.Value
}

// All returns a copy of the table, sorted by symbol.
func All() []Constant {
	out := make([]Constant, len(table))
	copy(out, table)
	sort.Slice(out, func(i, j int) bool { return out[i].Symbol < out[j].Symbol })
	return out
}

// Symbols returns the table symbols (without aliases), sorted.
func Symbols() []string {
	out := make([]string, 0, len(table))
	for _, c := range table {
		out = append(out, c.Symbol)
	}
	sort.Strings(out)
	return out
}

// RelativeUncertainty is Uncertainty/|Value| (0 for exact constants).
func (c Constant) RelativeUncertainty() float64 {
	if c.Uncertainty == 0 {
		return 0
	}
	return c.Uncertainty / math.Abs(c.Value)
}
