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

// Valley names, in the order of Params.Valleys.
const (
	ValleyGamma = "Γ"
	ValleyXz    = "X_z"  // the X valley whose long axis is the (001) growth axis
	ValleyXxy   = "X_xy" // the two X valleys whose long axes lie in the plane
	ValleyL     = "L"    // the four L valleys
)

// valleyNames lists the valleys in the order of Params.Valleys.
var valleyNames = [...]string{ValleyGamma, ValleyXz, ValleyXxy, ValleyL}

// NValleys is the number of conduction-band valleys the solver occupies.
const NValleys = len(valleyNames)

// Valley is one family of equivalent conduction-band minima as seen by a layer grown on a
// (001) surface. The confinement along the growth axis uses Mz; each subband holds
// Gv·Md/(πħ²) states per unit area and energy (spin included).
//
// For an ellipsoidal minimum with masses m_l (long axis) and m_t, (001) growth gives
// (Stern & Howard, Phys. Rev. 163, 816 (1967)): X_z, one valley with Mz = m_l and
// Md = m_t; X_xy, two valleys with Mz = m_t and Md = √(m_l m_t); L, four valleys along
// ⟨111⟩ with 1/Mz = (1/m_l + 2/m_t)/3 and Md = √(m_t (m_t + 2m_l)/3). The X minima sit on
// the zone boundary, so six half-valleys make three valleys; the L minima make four.
type Valley struct {
	Name string
	EcEV float64 // band edge on the common scale of Vurgaftman et al. (valence-band offset + gap), eV
	Mz   float64 // mass along the growth axis, m*/m_e
	Md   float64 // in-plane density-of-states mass of one valley, m*/m_e
	Gv   int     // number of equivalent valleys
}

// Params are the low-temperature (0 K) band parameters of one layer material. The band
// edges and the X and L masses are this package's; the Γ mass Mstar and EpsR come from
// cleave/calc/materials, which is the one table of Γ masses and permittivities.
type Params struct {
	Name     string  // the name as written, e.g. "Al0.33Ga0.67As"
	Elements string  // the alloy without fractions, e.g. "AlGaAs"
	X        float64 // alloy fraction of the first element (Al in AlGaAs, In in InGaAs); NaN for a binary
	EgEV     float64 // Γ band gap at 0 K, unstrained, eV
	VBOEV    float64 // valence-band maximum on the common scale of Vurgaftman et al., eV
	// EcEV is the lowest conduction-band edge of the layer on that scale (the minimum over
	// Valleys, strain included), eV. For GaAs it is the Γ edge; for AlAs and for
	// Al(x)Ga(1−x)As above the Γ–X crossover it is an X edge.
	EcEV    float64
	Valleys [NValleys]Valley // Γ, X_z, X_xy, L, each with its edge (strain included) and masses
	Mstar   float64          // Γ conduction-band effective mass, m*/m_e (from materials.Lookup)
	EpsR    float64          // static relative permittivity (from materials.Lookup)
	// LatticeA is the lattice constant (Å, 300 K values of Vurgaftman et al.); StrainXX the
	// in-plane strain (a_ref − a)/a when the layer is grown coherently on a reference
	// lattice (0 when unstrained); StrainShiftEV the resulting shift of the Γ edge,
	// 2a_c(1 − c12/c11)·StrainXX (hydrostatic part; Van de Walle, Phys. Rev. B 39, 1871
	// (1989)). Only the Γ edge is shifted: the splitting of the X and L valleys by shear
	// strain is not modelled.
	LatticeA      float64
	StrainXX      float64
	StrainShiftEV float64
	// DonorEV is the shallow (hydrogenic, effective-mass) donor binding energy
	// Ry·(m*/m_e)/ε_r² of the Γ mass, eV. It is not the DX level.
	DonorEV float64
	Sources map[string]string // parameter name → source

	ac, c11, c12 float64 // Γ deformation potential (eV) and elastic constants (GPa)
}

// Valley returns the valley with the given name (see [ValleyGamma] and the others).
func (p Params) Valley(name string) (Valley, bool) {
	for _, v := range p.Valleys {
		if v.Name == name {
			return v, true
		}
	}
	return Valley{}, false
}

// Lowest returns the valley with the lowest edge (Γ when two edges tie).
func (p Params) Lowest() Valley {
	best := p.Valleys[0]
	for _, v := range p.Valleys[1:] {
		if v.EcEV < best.EcEV-1e-12 {
			best = v
		}
	}
	return best
}

const (
	srcVMR   = "Vurgaftman, Meyer, Ram-Mohan, J. Appl. Phys. 89, 5815 (2001)"
	srcHydro = "effective-mass hydrogenic donor Ry·m*/ε_r², with Ry from CODATA 2018 constants"
	srcMat   = " (cleave/calc/materials)"
)

// binary holds the parameters of a binary compound at 0 K from Vurgaftman, Meyer and
// Ram-Mohan, J. Appl. Phys. 89, 5815 (2001) (their tables of each binary):
// gaps at Γ, X and L, the valence-band offset on their common scale, the longitudinal and
// transverse X and L masses, and the Γ deformation potential and elastic constants used for
// strain. The lattice constants (300 K, same source) are calc/materials' (Material.A).
type binary struct {
	egG, egX, egL, vbo float64 // eV
	mXl, mXt, mLl, mLt float64 // m_e
	ac                 float64 // eV
	c11, c12           float64 // GPa
}

// The binaries, Vurgaftman et al. (2001). InP gives only density-of-states masses for X
// (0.88) and L (0.47); they are used as isotropic masses.
var (
	bGaAs = binary{egG: 1.519, egX: 1.981, egL: 1.815, vbo: -0.80,
		mXl: 1.3, mXt: 0.23, mLl: 1.9, mLt: 0.0754, ac: -7.17, c11: 1221, c12: 566}
	bAlAs = binary{egG: 3.099, egX: 2.24, egL: 2.46, vbo: -1.33,
		mXl: 0.97, mXt: 0.22, mLl: 1.32, mLt: 0.15, ac: -5.64, c11: 1250, c12: 534}
	bInAs = binary{egG: 0.417, egX: 1.433, egL: 1.133, vbo: -0.59,
		mXl: 1.13, mXt: 0.16, mLl: 0.64, mLt: 0.05, ac: -5.08, c11: 832.9, c12: 452.6}
	bInP = binary{egG: 1.4236, egX: 2.384, egL: 2.014, vbo: -0.94,
		mXl: 0.88, mXt: 0.88, mLl: 0.47, mLt: 0.47, ac: -6.0, c11: 1011, c12: 561}
	bAlSb = binary{egG: 2.386, egX: 1.696, egL: 2.329, vbo: -0.41,
		mXl: 1.357, mXt: 0.123, mLl: 1.64, mLt: 0.23, ac: -4.5, c11: 876.9, c12: 434.1}
)

// bowing holds the bowing parameters C of a ternary A(x)B(1−x)C, P(x) = xP_A + (1−x)P_B
// − x(1−x)C (Vurgaftman et al. 2001, their ternary sections). A nil egG function means a
// constant egGc.
type bowing struct {
	egG         func(x float64) float64
	egGc        float64
	egX, egL    float64
	vbo, ac     float64
	description string
}

// system is one row of the parameter table: a binary, or a ternary between two binaries.
type system struct {
	alloy bool
	a, b  binary // a is the end point x = 1 (the first element), b the end point x = 0
	bow   bowing
	// name used in messages and in Known
	known string
}

var table = map[string]system{
	"GaAs": {a: bGaAs, b: bGaAs, known: "GaAs"},
	"AlAs": {a: bAlAs, b: bAlAs, known: "AlAs"},
	"InAs": {a: bInAs, b: bInAs, known: "InAs"},
	"InP":  {a: bInP, b: bInP, known: "InP"},
	"AlSb": {a: bAlSb, b: bAlSb, known: "AlSb"},
	// Al(x)Ga(1−x)As: Γ-gap bowing −0.127 + 1.310x eV, X-gap bowing 0.055 eV, L and the
	// valence-band offset linear.
	"AlGaAs": {alloy: true, a: bAlAs, b: bGaAs, known: "Al(x)Ga(1-x)As",
		bow: bowing{egG: func(x float64) float64 { return -0.127 + 1.310*x }, egX: 0.055,
			description: "Γ-gap bowing −0.127+1.310x eV, X-gap bowing 0.055 eV, L gap and VBO linear"}},
	// In(x)Ga(1−x)As: bowing of the Γ gap 0.477, X gap 1.4, L gap 0.33, VBO −0.38 and
	// a_c 2.61 eV.
	"InGaAs": {alloy: true, a: bInAs, b: bGaAs, known: "In(x)Ga(1-x)As",
		bow: bowing{egGc: 0.477, egX: 1.4, egL: 0.33, vbo: -0.38, ac: 2.61,
			description: "bowing Γ 0.477, X 1.4, L 0.33, VBO −0.38, a_c 2.61 eV"}},
	// In(x)Al(1−x)As: bowing of the Γ gap 0.70, VBO −0.64 and a_c −1.4 eV; X and L linear.
	"InAlAs": {alloy: true, a: bInAs, b: bAlAs, known: "In(x)Al(1-x)As",
		bow: bowing{egGc: 0.70, vbo: -0.64, ac: -1.4,
			description: "bowing Γ 0.70, VBO −0.64, a_c −1.4 eV; X and L gaps linear"}},
}

// Known returns the material families that have band parameters, sorted.
func Known() []string {
	out := make([]string, 0, len(table))
	for _, s := range table {
		out = append(out, s.known)
	}
	sort.Strings(out)
	return out
}

// lin interpolates between the end points with bowing c: x·a + (1−x)·b − x(1−x)c.
func lin(x, a, b, c float64) float64 { return x*a + (1-x)*b - x*(1-x)*c }

// valleys builds the four valleys of (001) growth from the edges and the ellipsoid masses
// (see [Valley] for the formulas).
func valleys(ecG, ecX, ecL, mG, mXl, mXt, mLl, mLt float64) [NValleys]Valley {
	return [NValleys]Valley{
		{Name: ValleyGamma, EcEV: ecG, Mz: mG, Md: mG, Gv: 1},
		{Name: ValleyXz, EcEV: ecX, Mz: mXl, Md: mXt, Gv: 1},
		{Name: ValleyXxy, EcEV: ecX, Mz: mXt, Md: math.Sqrt(mXl * mXt), Gv: 2},
		{Name: ValleyL, EcEV: ecL, Mz: 3 / (1/mLl + 2/mLt), Md: math.Sqrt(mLt * (mLt + 2*mLl) / 3), Gv: 4},
	}
}

// Lookup returns the unstrained band parameters of a material written as in a layer table:
// "GaAs", "AlAs", "InAs", "InP", "AlSb", or an alloy with its fraction: "Al0.33Ga0.67As",
// "In0.2Ga0.8As", "In0.52Al0.48As". The error wraps [ErrUnknownMaterial] and lists the known
// materials, or carries the composition error.
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
		return Params{}, fmt.Errorf("material %q: alloy needs its fraction, e.g. %s", name, example(elems))
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
		xe = 1
	}
	a, b, bw := sys.a, sys.b, sys.bow
	cG := bw.egGc
	if bw.egG != nil {
		cG = bw.egG(xe)
	}
	egG := lin(xe, a.egG, b.egG, cG)
	egX := lin(xe, a.egX, b.egX, bw.egX)
	egL := lin(xe, a.egL, b.egL, bw.egL)
	vbo := lin(xe, a.vbo, b.vbo, bw.vbo)
	mass := func(pa, pb float64) float64 { return lin(xe, pa, pb, 0) } // X and L masses: linear
	p := Params{
		Name: name, Elements: elems, X: x,
		EgEV: egG, VBOEV: vbo,
		Valleys: valleys(vbo+egG, vbo+egX, vbo+egL, m.Mstar,
			mass(a.mXl, b.mXl), mass(a.mXt, b.mXt), mass(a.mLl, b.mLl), mass(a.mLt, b.mLt)),
		Mstar: m.Mstar, EpsR: m.EpsR,
		LatticeA: m.A, // Vegard's law in calc/materials, the same interpolation as lin
		ac:       lin(xe, a.ac, b.ac, bw.ac), c11: lin(xe, a.c11, b.c11, 0), c12: lin(xe, a.c12, b.c12, 0),
		DonorEV: rydbergEV * m.Mstar / (m.EpsR * m.EpsR),
	}
	p.EcEV = p.Lowest().EcEV
	alloyNote := ""
	if sys.alloy {
		alloyNote = " (" + bw.description + ")"
	}
	p.Sources = map[string]string{
		"EgEV":     srcVMR + ", 0 K" + alloyNote,
		"VBOEV":    srcVMR + ", 0 K, common scale" + alloyNote,
		"Valleys":  "gaps at X and L and the X and L masses, " + srcVMR + "; (001) valley masses and degeneracies: Stern & Howard, Phys. Rev. 163, 816 (1967)",
		"Mstar":    m.Sources["Mstar"] + srcMat,
		"EpsR":     m.Sources["EpsR"] + srcMat,
		"LatticeA": m.Sources["A"] + srcMat,
		"Strain":   "hydrostatic Γ-edge shift 2a_c(1 − c12/c11)ε, Van de Walle, Phys. Rev. B 39, 1871 (1989); a_c, c11, c12 from " + srcVMR,
		"DonorEV":  srcHydro,
	}
	return p, nil
}

// example suggests a written composition for an alloy family.
func example(elems string) string {
	switch elems {
	case "InGaAs":
		return "In0.2Ga0.8As"
	case "InAlAs":
		return "In0.52Al0.48As"
	}
	return "Al0.3Ga0.7As"
}

// latticeMatchedStrain is the mismatch below which a layer is taken as lattice-matched and
// left unstrained: Al(x)Ga(1−x)As on GaAs (at most 0.14 %, AlAs) is conventionally treated
// so in band-offset tables (common practice).
const latticeMatchedStrain = 2e-3

// strained returns p grown coherently on a lattice of constant aRef (Å): the in-plane strain
// and the hydrostatic shift of the Γ edge, with EcEV updated. A mismatch below
// latticeMatchedStrain leaves p unchanged.
func (p Params) strained(aRef float64) Params {
	if !(aRef > 0) || math.Abs(aRef-p.LatticeA) < latticeMatchedStrain*p.LatticeA {
		return p
	}
	p.StrainXX = (aRef - p.LatticeA) / p.LatticeA
	p.StrainShiftEV = 2 * p.ac * (1 - p.c12/p.c11) * p.StrainXX
	p.Valleys[0].EcEV += p.StrainShiftEV
	p.EcEV = p.Lowest().EcEV
	return p
}
