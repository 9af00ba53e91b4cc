package band

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"cleave/calc/constants"
	"cleave/calc/materials"
)

// Physical constants in SI, taken from cleave/calc/constants (CODATA 2018).
var (
	qe   = constants.Value("e")    // C
	hbar = constants.Value("hbar") // J s
	kB   = constants.Value("k_B")  // J/K
	me   = constants.Value("m_e")  // kg
	eps0 = constants.Value("eps0") // F/m
	hPl  = constants.Value("h")    // J s
)

// rydbergEV is the hydrogen Rydberg energy m_e e⁴/(8 ε0² h²) in eV, computed from the
// CODATA 2018 constants.
var rydbergEV = me * qe * qe * qe / (8 * eps0 * eps0 * hPl * hPl)

// ErrUnknownMaterial is returned (wrapped) for a material with no band parameters.
var ErrUnknownMaterial = errors.New("unknown material")

// Params are the low-temperature (0 K) band parameters of one layer material. The band
// edges are this package's; Mstar and EpsR come from cleave/calc/materials, which is the one
// table of masses and permittivities.
type Params struct {
	Name     string  // the name as written, e.g. "Al0.33Ga0.67As"
	Elements string  // the alloy without fractions, e.g. "AlGaAs"
	X        float64 // alloy fraction of the first element (Al in AlGaAs); NaN for a binary
	EgEV     float64 // Γ band gap at 0 K, eV
	VBOEV    float64 // valence-band maximum on the common scale of Vurgaftman et al., eV
	EcEV     float64 // Γ conduction-band edge on that scale, VBOEV + EgEV, eV
	Mstar    float64 // Γ conduction-band effective mass, m*/m_e (from materials.Lookup)
	EpsR     float64 // static relative permittivity (from materials.Lookup)
	// DonorEV is the shallow (hydrogenic, effective-mass) donor binding energy
	// Ry·(m*/m_e)/ε_r², eV. It is not the DX level.
	DonorEV float64
	Sources map[string]string // parameter name → source
}

// system is one row of the parameter table: a material or an alloy family.
type system struct {
	alloy bool // needs a fraction x in [0, 1]
	// edges gives the Γ gap and valence-band maximum (eV) at fraction x; a binary is called
	// with its own end-point fraction xFixed.
	edges  func(x float64) (eg, vbo float64)
	xFixed float64
}

const (
	srcVMR   = "Vurgaftman, Meyer, Ram-Mohan, J. Appl. Phys. 89, 5815 (2001), 0 K"
	srcHydro = "effective-mass hydrogenic donor Ry·m*/ε_r², with Ry from CODATA 2018 constants"
	srcMat   = " (cleave/calc/materials)"
)

// Vurgaftman et al. (2001) Table III/IV values at 0 K.
const (
	egGaAs  = 1.519 // eV, Γ gap
	egAlAs  = 3.099 // eV, Γ gap
	vboGaAs = -0.80 // eV
	vboAlAs = -1.33 // eV
)

// gapBowingAlGaAs is the Γ-gap bowing of Al(x)Ga(1−x)As, C(x) = −0.127 + 1.310x eV
// (Vurgaftman et al. 2001); Eg(x) = (1−x)Eg(GaAs) + x Eg(AlAs) − x(1−x)C(x).
func gapBowingAlGaAs(x float64) float64 { return -0.127 + 1.310*x }

// algaasEdges is the Γ gap with bowing and the valence-band maximum of Al(x)Ga(1−x)As, linear
// in x (no VBO bowing for AlGaAs in Vurgaftman et al.).
func algaasEdges(x float64) (eg, vbo float64) {
	eg = (1-x)*egGaAs + x*egAlAs - x*(1-x)*gapBowingAlGaAs(x)
	vbo = (1-x)*vboGaAs + x*vboAlAs
	return eg, vbo
}

var table = map[string]system{
	"GaAs":   {edges: algaasEdges, xFixed: 0},
	"AlAs":   {edges: algaasEdges, xFixed: 1},
	"AlGaAs": {alloy: true, edges: algaasEdges},
}

// Known returns the material families that have band parameters, sorted.
func Known() []string {
	out := make([]string, 0, len(table))
	for k := range table {
		if table[k].alloy {
			k = "Al(x)Ga(1-x)As"
		}
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// Lookup returns the band parameters of a material written as in a layer table: "GaAs",
// "AlAs" or an alloy with its fraction, "Al0.33Ga0.67As". The error wraps
// [ErrUnknownMaterial] and lists the known materials, or carries the composition error.
func Lookup(name string) (Params, error) {
	name = strings.TrimSpace(name)
	elems, x, err := materials.ParseAlloy(name)
	if err != nil {
		return Params{}, fmt.Errorf("%w; %w (known: %s)", err, ErrUnknownMaterial, strings.Join(Known(), ", "))
	}
	sys, ok := table[elems]
	if !ok {
		return Params{}, fmt.Errorf("material %q: %w (known: %s)", name, ErrUnknownMaterial, strings.Join(Known(), ", "))
	}
	if sys.alloy && math.IsNaN(x) {
		return Params{}, fmt.Errorf("material %q: alloy needs its fraction, e.g. Al0.3Ga0.7As", name)
	}
	if !sys.alloy && !math.IsNaN(x) {
		return Params{}, fmt.Errorf("material %q: %s takes no alloy fraction", name, elems)
	}
	m, err := materials.Lookup(name)
	if err != nil { // every row of table has a materials entry; this guards against drift
		return Params{}, fmt.Errorf("material %q: no mass or permittivity: %w", name, err)
	}
	xe := x
	if !sys.alloy {
		xe = sys.xFixed
	}
	eg, vbo := sys.edges(xe)
	return Params{
		Name: name, Elements: elems, X: x,
		EgEV: eg, VBOEV: vbo, EcEV: vbo + eg,
		Mstar: m.Mstar, EpsR: m.EpsR,
		DonorEV: rydbergEV * m.Mstar / (m.EpsR * m.EpsR),
		Sources: map[string]string{
			"EgEV":    srcVMR + " (Γ gap with bowing −0.127+1.310x eV)",
			"VBOEV":   srcVMR + " (linear in x)",
			"Mstar":   m.Sources["Mstar"] + srcMat,
			"EpsR":    m.Sources["EpsR"] + srcMat,
			"DonorEV": srcHydro,
		},
	}, nil
}
