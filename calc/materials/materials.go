// Package materials holds the band-edge parameters of the semiconductors that cleave's
// users grow 2D electron and hole gases in, each value with its source.
//
// Values are low-temperature band-edge (Γ-valley) parameters unless a source says
// otherwise; permittivities are static. Every field of a [Material] names its source in
// Material.Sources; a value marked "(from memory, unverified)" still needs checking against
// the original. Graphene's mass depends on density (m_c = ħ√(πn)/v_F), so its Mstar is 0 and
// callers use VF.
//
// The package does not compute band gaps, offsets or temperature dependences; the band
// solver (cleave/calc/band) keeps those with its own citations and takes its masses and
// permittivities from here.
package materials

import (
	"fmt"
	"maps"
	"math"
	"sort"
	"strconv"
	"strings"
	"sync"
)

// Material is one entry: the parameters a Landau-level or transport formula needs.
type Material struct {
	Name    string            // canonical, e.g. "GaAs", "Al0.33Ga0.67As", "In0.53Ga0.47As", "Si(100)", "Ge(holes)", "graphene"
	X       float64           // alloy fraction of the first-named group-III element (Al or In); NaN if not an alloy
	Mstar   float64           // band-edge effective mass / m_e (electrons, or holes where Carrier=="hole"); 0 for graphene
	EpsR    float64           // static relative permittivity; NaN where it depends on the surroundings (graphene)
	G       float64           // effective g-factor (signed); NaN where no single value applies
	Gs, Gv  int               // spin and valley degeneracy
	VF      float64           // Fermi velocity in m/s (graphene only)
	A       float64           // cubic lattice constant in Å at 300 K (zincblende III-V only); NaN otherwise
	Carrier string            // "electron" or "hole"
	Sources map[string]string // field name -> source
}

// Source strings; calc/SOURCES.md says what is taken from each.
const (
	srcVurgaftman  = "Vurgaftman, Meyer, Ram-Mohan, J. Appl. Phys. 89, 5815-5875 (2001)"
	srcIoffe       = "Ioffe/Levinshtein, Handbook Series on Semiconductor Parameters, World Scientific 1996"
	srcGaAsG       = "g* = -0.44; band-edge -0.445: Yugova et al., Phys. Rev. B 75, 245302 (2007)"
	srcAFS         = "Ando, Fowler, Stern, Rev. Mod. Phys. 54, 437 (1982)"
	srcLodari      = "Lodari et al., arXiv:1905.08064, Phys. Rev. B 100, 041304(R) (2019) (journal reference from memory, unverified)"
	srcNovoselov   = "Novoselov et al., Nature 438, 197 (2005)"
	srcInGaAsG     = "-4.070 ± 0.005: Spin-resonance determination of the electron effective g value of In0.53Ga0.47As, Phys. Rev. B (1996)"
	srcGusynin     = "Gusynin & Sharapov, Phys. Rev. Lett. 95, 146801 (2005); Novoselov et al., Nature 438, 197 (2005)"
	srcSpin        = "spin-1/2 carriers, no Zeeman splitting resolved (textbook)"
	srcGammaValley = "single Γ valley (textbook)"
	srcLattice     = "lattice constant at 300 K, " + srcVurgaftman
	srcNoLattice   = "not a zincblende III-V: no monolayer of (001) zincblende growth"
)

// Cubic lattice constants at 300 K in Å, Vurgaftman, Meyer and Ram-Mohan (2001), their
// tables of the binaries: GaAs 5.65325, AlAs 5.6611, InAs 6.0583, InP 5.8697, AlSb 6.1355
// (the same numbers calc/band's strain uses), InSb 6.4794 (from memory, unverified).
// Alloys follow Vegard's law (linear in x), as Vurgaftman et al. recommend for the
// lattice constants of these ternaries.
const (
	aGaAs = 5.65325
	aAlAs = 5.6611
	aInAs = 6.0583
	aInP  = 5.8697
	aAlSb = 6.1355
	aInSb = 6.4794
)

// vegard interpolates a lattice constant between the end points a1 (x = 1) and a0 (x = 0);
// written as calc/band writes its interpolation, so that both give the same float.
func vegard(x, a1, a0 float64) float64 { return x*a1 + (1-x)*a0 - x*(1-x)*0 }

// Monolayer returns the thickness of one monolayer of (001) growth in metres: half the cubic
// lattice constant, since a zincblende cell holds two group-III and two group-V planes along
// [001] and one monolayer is one plane of each (common practice). It is an error for a
// material without a zincblende lattice constant (Si, Ge, graphene).
func (m Material) Monolayer() (float64, error) {
	if math.IsNaN(m.A) || m.A <= 0 {
		return 0, fmt.Errorf("materials: %s has no zincblende lattice constant, so no (001) monolayer; monolayers are defined here for GaAs, AlAs, InAs, InP, AlSb, InSb and their alloys", m.Name)
	}
	return m.A * 1e-10 / 2, nil
}

// Γ-valley masses of the Al(x)Ga(1-x)As end points (Vurgaftman et al. 2001) and the Ioffe
// handbook permittivity ε_r = 12.90 - 2.84x.
const (
	mGaAs      = 0.067 // GaAs Γ mass / m_e
	mAlAsGamma = 0.15  // AlAs Γ mass / m_e
	algaasEps0 = 12.90
	algaasEpsX = -2.84
)

// AlGaAs returns Al(x)Ga(1-x)As at alloy fraction x (0 <= x <= 1):
// m*/m_e = 0.067 + 0.083x (linear between the Γ-valley end points of Vurgaftman et al.),
// ε_r = 12.90 - 2.84x (Ioffe handbook). Above x ≈ 0.4-0.45 the gap is indirect and the
// Γ mass no longer describes the lowest conduction band. g* is not tabulated (NaN): it
// changes sign with x.
func AlGaAs(x float64) (Material, error) {
	if !(x >= 0 && x <= 1) {
		return Material{}, fmt.Errorf("materials: Al fraction %g outside [0, 1]", x)
	}
	name := alloyName("Al", "Ga", "As", x)
	return Material{
		Name:  name,
		X:     x,
		Mstar: (1-x)*mGaAs + x*mAlAsGamma, // exact at both end points

		EpsR:    algaasEps0 + algaasEpsX*x,
		A:       vegard(x, aAlAs, aGaAs),
		G:       math.NaN(),
		Gs:      2,
		Gv:      1,
		Carrier: "electron",
		Sources: map[string]string{
			"Mstar": "0.067 + 0.083x, linear between the GaAs (0.067) and AlAs Γ (0.15) masses of " + srcVurgaftman +
				"; Γ valley, indirect gap above x ≈ 0.4-0.45 (from memory, unverified)",
			"EpsR": "12.90 - 2.84x, " + srcIoffe,
			"G":    "not tabulated: g* of AlGaAs depends strongly on x",
			"Gs":   srcSpin,
			"Gv":   srcGammaValley,
			"X":    "alloy fraction as written",
			"A":    "Vegard's law between AlAs and GaAs; " + srcLattice,
		},
	}, nil
}

// alloyName writes A<x>B<1-x>C with the second fraction to the precision of the first.
func alloyName(a, b, anion string, x float64) string {
	xs := strconv.FormatFloat(x, 'f', -1, 64)
	dec := 0
	if i := strings.IndexByte(xs, '.'); i >= 0 {
		dec = len(xs) - i - 1
	}
	return a + xs + b + strconv.FormatFloat(1-x, 'f', dec, 64) + anion
}

func gaas() Material {
	return Material{
		Name: "GaAs", X: math.NaN(), Mstar: mGaAs, EpsR: algaasEps0, G: -0.44, Gs: 2, Gv: 1, Carrier: "electron", A: aGaAs,
		Sources: map[string]string{
			"A":     srcLattice,
			"Mstar": srcVurgaftman + " (Adachi: 0.067)",
			"EpsR":  srcIoffe,
			"G":     srcGaAsG,
			"Gs":    srcSpin,
			"Gv":    srcGammaValley,
		},
	}
}

func alas() Material {
	m, _ := AlGaAs(1)
	m.Name = "AlAs"
	m.X = math.NaN()
	m.Sources["Mstar"] = "Γ valley 0.15, " + srcVurgaftman + " (Adachi: 0.124); the lowest conduction band is X (indirect gap)"
	m.Sources["EpsR"] = "12.90 - 2.84x at x = 1 from " + srcIoffe + "; public tables disagree (10.06, 10.1, 10.9)"
	m.Sources["A"] = srcLattice
	return m
}

func inas() Material {
	return Material{
		Name: "InAs", X: math.NaN(), Mstar: 0.026, EpsR: 15.15, G: -15, Gs: 2, Gv: 1, Carrier: "electron", A: aInAs,
		Sources: map[string]string{
			"A":     srcLattice,
			"Mstar": srcVurgaftman + " (from memory, unverified); Adachi 0.024, Ioffe 0.023",
			"EpsR":  srcIoffe,
			"G":     "about -15 (from memory, unverified)",
			"Gs":    srcSpin,
			"Gv":    srcGammaValley,
		},
	}
}

// InGaAs returns In(x)Ga(1-x)As at In fraction x (0 <= x <= 1): m*/m_e = 0.026x +
// 0.067(1-x) - 0.0091x(1-x) (Γ masses and bowing of Vurgaftman et al.) and ε_r = 15.1 -
// 2.87(1-x) + 0.67(1-x)² (Ioffe handbook formula for Ga(y)In(1-y)As with y = 1-x; from
// memory), which gives 13.9 at the composition lattice-matched to InP, In0.53Ga0.47As,
// whose g* = -4.07 is tabulated; other compositions have no g*.
func InGaAs(x float64) (Material, error) {
	if !(x >= 0 && x <= 1) {
		return Material{}, fmt.Errorf("materials: In fraction %g outside [0, 1]", x)
	}
	y := 1 - x
	m := Material{
		Name: alloyName("In", "Ga", "As", x), X: x, Mstar: x*0.026 + (1-x)*0.067 - x*(1-x)*0.0091,
		EpsR: 15.1 - 2.87*y + 0.67*y*y, G: math.NaN(), Gs: 2, Gv: 1, Carrier: "electron", A: vegard(x, aInAs, aGaAs),
		Sources: map[string]string{
			"A":     "Vegard's law between InAs and GaAs; " + srcLattice,
			"Mstar": "0.026x + 0.067(1-x) - 0.0091x(1-x), bowing of " + srcVurgaftman + " (InAs 0.026 from memory, unverified); at x = 0.53: 0.0430, commonly quoted 0.041-0.043",
			"EpsR":  "15.1 - 2.87y + 0.67y² with y = 1-x the Ga fraction, " + srcIoffe + " (formula from memory, unverified); 13.9 at x = 0.53",
			"G":     "not tabulated except at x = 0.53",
			"Gs":    srcSpin,
			"Gv":    srcGammaValley,
			"X":     "alloy fraction as written (In)",
		},
	}
	if math.Abs(x-0.53) <= fractionTol {
		m.G = -4.07
		m.Sources["G"] = "-4.07 for In0.53Ga0.47As lattice-matched to InP, " + srcInGaAsG
	}
	return m, nil
}

// InAlAs returns In(x)Al(1-x)As at In fraction x: m*/m_e = 0.026x + 0.15(1-x) - 0.049x(1-x)
// (Γ masses and bowing of Vurgaftman et al.; InAs 0.026 from memory) and ε_r linear between
// AlAs 10.06 and InAs 15.15 (linear interpolation, common practice).
func InAlAs(x float64) (Material, error) {
	if !(x >= 0 && x <= 1) {
		return Material{}, fmt.Errorf("materials: In fraction %g outside [0, 1]", x)
	}
	return Material{
		Name: alloyName("In", "Al", "As", x), X: x, Mstar: x*0.026 + (1-x)*mAlAsGamma - x*(1-x)*0.049,
		EpsR: x*15.15 + (1-x)*(algaasEps0+algaasEpsX), G: math.NaN(), Gs: 2, Gv: 1, Carrier: "electron", A: vegard(x, aInAs, aAlAs),
		Sources: map[string]string{
			"A":     "Vegard's law between InAs and AlAs; " + srcLattice,
			"Mstar": "0.026x + 0.15(1-x) - 0.049x(1-x), Γ masses and bowing of " + srcVurgaftman + " (InAs 0.026 from memory, unverified)",
			"EpsR":  "linear between AlAs 10.06 and InAs 15.15 (" + srcIoffe + "); linear interpolation is common practice",
			"G":     "not tabulated",
			"Gs":    srcSpin,
			"Gv":    srcGammaValley,
			"X":     "alloy fraction as written (In)",
		},
	}, nil
}

func inp() Material {
	return Material{
		Name: "InP", X: math.NaN(), Mstar: 0.0795, EpsR: 12.5, G: math.NaN(), Gs: 2, Gv: 1, Carrier: "electron", A: aInP,
		Sources: map[string]string{
			"A":     srcLattice,
			"Mstar": srcVurgaftman,
			"EpsR":  "12.5, " + srcIoffe + " (from memory, unverified)",
			"G":     "not tabulated",
			"Gs":    srcSpin,
			"Gv":    srcGammaValley,
		},
	}
}

func alsb() Material {
	return Material{
		Name: "AlSb", X: math.NaN(), Mstar: 0.14, EpsR: 12.04, G: math.NaN(), Gs: 2, Gv: 1, Carrier: "electron", A: aAlSb,
		Sources: map[string]string{
			"A":     srcLattice,
			"Mstar": "Γ valley 0.14, " + srcVurgaftman + "; the lowest conduction band is X (indirect gap)",
			"EpsR":  "12.04, " + srcIoffe + " (from memory, unverified)",
			"G":     "not tabulated",
			"Gs":    srcSpin,
			"Gv":    srcGammaValley,
		},
	}
}

func insb() Material {
	return Material{
		Name: "InSb", X: math.NaN(), Mstar: 0.0135, EpsR: 16.8, G: -51, Gs: 2, Gv: 1, Carrier: "electron", A: aInSb,
		Sources: map[string]string{
			"A":     "6.4794 Å at 300 K, " + srcVurgaftman + " (from memory, unverified)",
			"Mstar": srcVurgaftman + " (from memory, unverified); Adachi 0.013; strongly nonparabolic, m* rises with n",
			"EpsR":  "16.8 (from memory, unverified)",
			"G":     "about -51 (from memory, unverified)",
			"Gs":    srcSpin,
			"Gv":    srcGammaValley,
		},
	}
}

func si100() Material {
	return Material{
		Name: "Si(100)", X: math.NaN(), Mstar: 0.19, EpsR: 11.7, G: 2, Gs: 2, Gv: 2, Carrier: "electron", A: math.NaN(),
		Sources: map[string]string{
			"A":     srcNoLattice,
			"Mstar": "in-plane transverse mass 0.19 (0.916 along z), " + srcAFS + " (masses from memory, unverified)",
			"EpsR":  "Si 11.7 (from memory, unverified)",
			"G":     "about 2, close to the free-electron value (from memory)",
			"Gs":    srcSpin,
			"Gv":    "two valleys for the (100) surface, " + srcAFS + " (from memory, unverified); valley splitting small and sample-dependent",
		},
	}
}

func geHoles() Material {
	return Material{
		Name: "Ge(holes)", X: math.NaN(), Mstar: 0.061, EpsR: 16.2, G: math.NaN(), Gs: 2, Gv: 1, Carrier: "hole", A: math.NaN(),
		Sources: map[string]string{
			"A":     srcNoLattice,
			"Mstar": "0.061 at p = 2.2e11 cm^-2 (about 0.05 extrapolated to p -> 0; rises with p), strained Ge QW in SiGe, " + srcLodari,
			"EpsR":  "Ge 16.2 (from memory, unverified)",
			"G":     "not tabulated: heavy-hole-like with a strongly anisotropic g",
			"Gs":    "two heavy-hole spin states (textbook)",
			"Gv":    "single valley (textbook)",
		},
	}
}

func graphene() Material {
	return Material{
		Name: "graphene", X: math.NaN(), Mstar: 0, EpsR: math.NaN(), G: 2, Gs: 2, Gv: 2, VF: 1e6, Carrier: "electron", A: math.NaN(),
		Sources: map[string]string{
			"A":       srcNoLattice,
			"Mstar":   "linear dispersion: cyclotron mass m_c = ħ√(πn)/v_F depends on n",
			"EpsR":    "depends on the substrate and encapsulation",
			"G":       "about 2, close to the free-electron value (from memory)",
			"Gs":      srcGusynin,
			"Gv":      srcGusynin,
			"VF":      "about 1e6 m/s, " + srcNovoselov,
			"Carrier": "ambipolar; electron side by default",
		},
	}
}

// fixed maps every accepted fixed name to its constructor.
var fixed = map[string]func() Material{
	"GaAs":      gaas,
	"AlAs":      alas,
	"InAs":      inas,
	"InSb":      insb,
	"InP":       inp,
	"AlSb":      alsb,
	"Si":        si100,
	"Si(100)":   si100,
	"Ge":        geHoles,
	"Ge(holes)": geHoles,
	"graphene":  graphene,
}

// Names lists the canonical names Lookup knows. Al<x>Ga<1-x>As stands for any written
// composition such as Al0.33Ga0.67As; "Si" and "Ge" are accepted as short forms of
// "Si(100)" and "Ge(holes)".
func Names() []string {
	out := []string{"Al<x>Ga<1-x>As", "AlAs", "AlSb", "GaAs", "Ge(holes)", "In<x>Al<1-x>As", "In<x>Ga<1-x>As", "InAs", "InP", "InSb", "Si(100)", "graphene"}
	sort.Strings(out)
	return out
}

// Lookup returns the material with the given name. Element symbols are case-sensitive.
// Alloys need their composition written out: "Al0.33Ga0.67As" or "Al(0.33)Ga(0.67)As";
// "AlGaAs" and "AlxGa1-xAs" are errors. In(x)Ga(1-x)As and In(x)Al(1-x)As take any
// composition. Each call returns a fresh Sources map.
func Lookup(name string) (Material, error) {
	name = strings.TrimSpace(name)
	if m, ok := known.get(name); ok {
		m.Sources = maps.Clone(m.Sources)
		return m, nil
	}
	m, err := build(name)
	if err != nil {
		return Material{}, err
	}
	known.put(name, m)
	m.Sources = maps.Clone(m.Sources) // the memo's map is never handed out
	return m, nil
}

// Find is [Lookup] for a caller that needs only whether name is a material, and its
// parameters: it builds no error message, and the material's Sources are nil. The calc
// language tries every name it does not know otherwise as a material (`wafer`, `geometry`),
// so a name that cannot be one is refused without parsing it.
func Find(name string) (Material, bool) {
	name = strings.TrimSpace(name)
	if m, ok := known.get(name); ok {
		m.Sources = nil
		return m, true
	}
	// Beyond the fixed names, only a formula is a material, and a formula starts with an
	// element symbol (ParseAlloy refuses anything else at its first byte).
	if _, ok := fixed[name]; !ok && (name == "" || name[0] < 'A' || name[0] > 'Z') {
		return Material{}, false
	}
	m, err := build(name)
	if err != nil {
		return Material{}, false
	}
	known.put(name, m)
	m.Sources = nil
	return m, true
}

// known holds the materials looked up so far by the names they were asked for, each built
// once: the same name always gives the same material, so it holds no answer that could go
// stale. Names are few in practice (the binaries and the compositions a notebook grows);
// past maxKnown names a material is built at every lookup. Its Sources maps are read only
// to be copied.
var known = materialMemo{m: map[string]Material{}}

const maxKnown = 1024

type materialMemo struct {
	mu sync.RWMutex
	m  map[string]Material
}

func (k *materialMemo) get(name string) (Material, bool) {
	k.mu.RLock()
	m, ok := k.m[name]
	k.mu.RUnlock()
	return m, ok
}

func (k *materialMemo) put(name string, m Material) {
	k.mu.Lock()
	if len(k.m) < maxKnown {
		// a copy of the name: it may be a slice of a longer text
		k.m[strings.Clone(name)] = m
	}
	k.mu.Unlock()
}

// build makes the material name (already trimmed) names, or says why there is none.
func build(name string) (Material, error) {
	if f, ok := fixed[name]; ok {
		return f(), nil
	}
	elements, x, err := ParseAlloy(name)
	if err != nil {
		if h := caseHint(name); h != "" {
			return Material{}, fmt.Errorf("%w: %q%s", ErrUnknownMaterial, name, h)
		}
		return Material{}, fmt.Errorf("%w: %w (known: %s)", ErrUnknownMaterial, err, strings.Join(Names(), ", "))
	}
	switch {
	case elements == "AlGaAs" && !math.IsNaN(x):
		return AlGaAs(x)
	case elements == "InGaAs" && !math.IsNaN(x):
		return InGaAs(x)
	case elements == "InAlAs" && !math.IsNaN(x):
		return InAlAs(x)
	case math.IsNaN(x) && (elements == "AlGaAs" || elements == "InGaAs" || elements == "InAlAs"):
		return Material{}, fmt.Errorf("%w: %q is an alloy: write its composition, e.g. Al0.33Ga0.67As", ErrUnknownMaterial, name)
	}
	hint := caseHint(name)
	return Material{}, fmt.Errorf("%w: %q%s; known: %s", ErrUnknownMaterial, name, hint, strings.Join(Names(), ", "))
}

// caseHint suggests the correctly capitalised name when name differs only in case.
func caseHint(name string) string {
	for _, n := range append(Names(), "Si", "Ge") {
		if strings.EqualFold(n, name) {
			return fmt.Sprintf(" (names are case-sensitive: did you mean %q?)", n)
		}
	}
	return ""
}
