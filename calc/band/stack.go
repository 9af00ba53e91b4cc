package band

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
)

// Sentinel errors; the errors returned by this package wrap them.
var (
	ErrBadDoping    = errors.New("bad doping")
	ErrBadThickness = errors.New("bad thickness")
	ErrNoWell       = errors.New("no well")
	ErrNoDoping     = errors.New("no doping")
	ErrEmptyStack   = errors.New("empty stack")
)

// Doping is the intentional doping of one layer.
type Doping struct {
	Species string // chemical symbol, e.g. "Si"; empty when undoped
	// Sheet is true for delta (sheet) doping, with Density in m^-2; otherwise Density is a
	// uniform bulk density in m^-3 over the layer.
	Sheet   bool
	Density float64
}

// Donor reports whether the species is a donor in GaAs-based III–V layers
// (Si, Te, Se, S, Sn on the group-III or group-V site as grown by MBE; common practice).
func (d Doping) Donor() bool { return donors[d.Species] }

// Acceptor reports whether the species is an acceptor (Be, C, Zn, Mg; common practice).
func (d Doping) Acceptor() bool { return acceptors[d.Species] }

var (
	donors    = map[string]bool{"Si": true, "Te": true, "Se": true, "S": true, "Sn": true}
	acceptors = map[string]bool{"Be": true, "C": true, "Zn": true, "Mg": true}
)

// ParseError reports malformed doping or thickness text: the input, the 1-based column of the
// problem and what was expected. It wraps ErrBadDoping or ErrBadThickness.
type ParseError struct {
	Input string
	Col   int // 1-based, in runes
	Msg   string
	Err   error
}

func (e *ParseError) Error() string {
	return fmt.Sprintf("%v %q, column %d: %s", e.Err, e.Input, e.Col, e.Msg)
}

// Unwrap returns the sentinel.
func (e *ParseError) Unwrap() error { return e.Err }

type field struct {
	text string
	col  int // 1-based rune column
}

func fields(s string) []field {
	var out []field
	start := -1
	col := 0
	startCol := 0
	var b strings.Builder
	for _, r := range s {
		col++
		if unicode.IsSpace(r) {
			if start >= 0 {
				out = append(out, field{b.String(), startCol})
				b.Reset()
				start = -1
			}
			continue
		}
		if start < 0 {
			start = col
			startCol = col
		}
		b.WriteRune(r)
	}
	if start >= 0 {
		out = append(out, field{b.String(), startCol})
	}
	return out
}

// ParseDoping reads the doping column of a layer table:
//
//	Si 1e18 cm^-3          uniform bulk doping
//	Si delta 2.5e12 cm^-2  a delta (sheet) layer; "δ" is accepted for "delta"
//	"", "-", "none", "undoped"   no doping
//
// Volume units: cm^-3, m^-3 (also written cm-3, /cm3, cm⁻³); sheet units: cm^-2, m^-2.
// The unit decides bulk or sheet; "delta" with a volume unit is an error. The result is in SI
// (m^-3 or m^-2).
func ParseDoping(s string) (Doping, error) {
	t := strings.TrimSpace(s)
	switch strings.ToLower(t) {
	case "", "-", "–", "none", "undoped", "nid", "n.i.d.":
		return Doping{}, nil
	}
	fs := fields(s)
	bad := func(col int, msg string) (Doping, error) {
		return Doping{}, &ParseError{Input: s, Col: col, Msg: msg, Err: ErrBadDoping}
	}
	sp := fs[0]
	if !donors[sp.text] && !acceptors[sp.text] {
		return bad(sp.col, "expected a dopant species (donors Si, Te, Se, S, Sn; acceptors Be, C, Zn, Mg), found "+strconv.Quote(sp.text))
	}
	d := Doping{Species: sp.text}
	i := 1
	delta := false
	if i < len(fs) && (strings.EqualFold(fs[i].text, "delta") || fs[i].text == "δ") {
		delta = true
		i++
	}
	if i >= len(fs) {
		return bad(len([]rune(s))+1, "expected a density such as 1e18 cm^-3 or delta 2.5e12 cm^-2")
	}
	v, err := strconv.ParseFloat(fs[i].text, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return bad(fs[i].col, "expected a number, found "+strconv.Quote(fs[i].text))
	}
	if v < 0 {
		return bad(fs[i].col, "density must not be negative")
	}
	i++
	if i >= len(fs) {
		return bad(len([]rune(s))+1, "expected a unit: cm^-3 or m^-3 for bulk, cm^-2 or m^-2 for a sheet")
	}
	u := fs[i]
	scale, sheet, ok := dopingUnit(u.text)
	if !ok {
		return bad(u.col, "expected a unit: cm^-3 or m^-3 for bulk, cm^-2 or m^-2 for a sheet; found "+strconv.Quote(u.text))
	}
	if delta && !sheet {
		return bad(u.col, "delta doping needs a sheet density unit (cm^-2)")
	}
	if i+1 < len(fs) {
		return bad(fs[i+1].col, "unexpected text after the unit")
	}
	d.Sheet = sheet
	d.Density = v * scale
	return d, nil
}

func dopingUnit(u string) (scale float64, sheet, ok bool) {
	switch u {
	case "cm^-3", "cm-3", "/cm3", "/cm^3", "cm⁻³":
		return 1e6, false, true
	case "m^-3", "m-3", "/m3", "/m^3", "m⁻³":
		return 1, false, true
	case "cm^-2", "cm-2", "/cm2", "/cm^2", "cm⁻²":
		return 1e4, true, true
	case "m^-2", "m-2", "/m2", "/m^2", "m⁻²":
		return 1, true, true
	}
	return 0, false, false
}

// ParseThickness reads a layer thickness such as "10 nm", "0.5 um", "250 Å" or "1e-6 m"
// (units nm, um, µm, μm, Å, A, angstrom, mm, m; the space is optional) and returns metres.
// Negative values are an error; zero is returned as zero (a delta layer may have no
// thickness).
func ParseThickness(s string) (float64, error) {
	t := strings.TrimSpace(s)
	bad := func(col int, msg string) (float64, error) {
		return 0, &ParseError{Input: s, Col: col, Msg: msg, Err: ErrBadThickness}
	}
	lead := len([]rune(s)) - len([]rune(strings.TrimLeftFunc(s, unicode.IsSpace)))
	if t == "" {
		return bad(1, "expected a thickness such as 10 nm")
	}
	// Split at the first rune that cannot be part of a float.
	end := 0
	for i, r := range t {
		if strings.ContainsRune("0123456789.+-eE", r) {
			// 'e' followed by a letter other than a digit or sign starts no exponent, but
			// no length unit starts with e, so a greedy scan is fine.
			end = i + len(string(r))
			continue
		}
		break
	}
	num, unit := t[:end], strings.TrimSpace(t[end:])
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return bad(lead+1, "expected a number, found "+strconv.Quote(num))
	}
	ucol := lead + len([]rune(t)) - len([]rune(unit)) + 1
	var scale float64
	switch unit {
	case "nm":
		scale = 1e-9
	case "um", "µm", "μm":
		scale = 1e-6
	case "Å", "A", "angstrom", "Angstrom":
		scale = 1e-10
	case "mm":
		scale = 1e-3
	case "m":
		scale = 1
	case "":
		return bad(ucol, "expected a length unit (nm, um, Å, m)")
	default:
		return bad(ucol, "expected a length unit (nm, um, Å, m), found "+strconv.Quote(unit))
	}
	if v < 0 {
		return bad(lead+1, "thickness must not be negative")
	}
	return v * scale, nil
}

// Layer is one row of a wafer's layer table.
type Layer struct {
	Name       string  // optional label ("spacer", "cap")
	Material   string  // e.g. "GaAs", "Al0.33Ga0.67As"
	ThicknessM float64 // metres; zero only for a delta-doped layer
	Doping     Doping
}

// Surface kinds.
const (
	// SurfacePinned is a free, oxidised surface whose states pin the conduction band
	// BarrierEV above the Fermi level.
	SurfacePinned = iota
	// SurfaceGate is a metal (Schottky) gate with barrier BarrierEV at voltage GateV
	// relative to the 2DEG.
	SurfaceGate
)

// DefaultPinningEV is the conduction-band height of an oxidised GaAs surface above E_F:
// pinning near midgap, about 0.7 eV (range 0.6–0.8 eV; from memory, unverified; the
// midgap picture is the unified defect model of Spicer et al., Phys. Rev. Lett. 44, 420
// (1980), journal reference from memory).
const DefaultPinningEV = 0.7

// DefaultSchottkyEV is the Schottky barrier of a metal gate on GaAs, 0.8 eV (middle of the
// 0.7–0.9 eV range; from memory, unverified).
const DefaultSchottkyEV = 0.8

// Bottom boundary kinds (Stack.Bottom.Kind).
const (
	// BottomPinned is a semi-insulating substrate: the Fermi level is pinned PinEV below the
	// conduction band at the top of the substrate, where the grid ends.
	BottomPinned = iota
	// BottomBulk is a p-type background (acceptors BackgroundM3 in every layer without
	// intentional doping and in the substrate): the grid runs SubstrateM into the substrate
	// and joins the neutral bulk through a depletion layer (depletion approximation, see
	// [Bottom]).
	BottomBulk
	// BottomZeroField ends the grid SubstrateM below the last layer with zero electric
	// field: a flat band edge deep in an undoped buffer, which can hold electrons that a real
	// sample does not have. Kept for comparisons.
	BottomZeroField
)

// DefaultSubstratePinEV is the depth of the Fermi level below the conduction band of
// semi-insulating GaAs: pinned at the EL2 deep donor near midgap, E_c − 0.75 eV (from
// memory, unverified; EL2 after Martin, Mitonneau and Mircea, Electron. Lett. 13, 191
// (1977), reference from memory).
const DefaultSubstratePinEV = 0.75

// DefaultBackgroundM3 is the p-type background of undoped MBE GaAs and AlGaAs that
// BottomBulk assumes when none is given: 1e14 cm^-3 of carbon acceptors (common practice).
const DefaultBackgroundM3 = 1e20

// acceptorEV is the depth of the background acceptor level above the valence band that
// fixes E_F in the neutral p-type bulk: carbon in GaAs, about 26 meV (from memory,
// unverified).
const acceptorEV = 0.026

// Bottom is the boundary condition below the stack.
//
// BottomBulk joins the grid to the neutral p-type bulk through a depletion layer: with ΔV
// the band still to rise from the end of the grid to the bulk position E_c − E_F =
// E_g − 26 meV, the acceptors beyond the grid carry e·N_A·W per area with
// W = √(2εΔV/(e N_A)) (depletion approximation).
type Bottom struct {
	Kind  int     // BottomPinned (the zero value), BottomBulk or BottomZeroField
	PinEV float64 // BottomPinned: E_c − E_F at the top of the substrate, eV; 0 selects DefaultSubstratePinEV
	// BackgroundM3 is a density of acceptors (m^-3) added to every layer without
	// intentional doping and to the substrate. For BottomBulk 0 selects
	// DefaultBackgroundM3; for the other kinds 0 means none.
	BackgroundM3 float64
}

func (b Bottom) pin() float64 {
	if b.PinEV == 0 {
		return DefaultSubstratePinEV
	}
	return b.PinEV
}

func (b Bottom) background() float64 {
	if b.BackgroundM3 == 0 && b.Kind == BottomBulk {
		return DefaultBackgroundM3
	}
	return b.BackgroundM3
}

// Surface is the boundary condition at the top of the stack.
type Surface struct {
	Kind      int     // SurfacePinned or SurfaceGate
	BarrierEV float64 // E_c − E_F at the surface for zero gate voltage; 0 selects the default of the kind
	GateV     float64 // gate voltage relative to the 2DEG, volts (SurfaceGate only)
}

// barrier returns E_c − E_F at the surface in eV.
func (s Surface) barrier() float64 {
	b := s.BarrierEV
	if s.Kind == SurfaceGate {
		if b == 0 {
			b = DefaultSchottkyEV
		}
		return b - s.GateV
	}
	if b == 0 {
		b = DefaultPinningEV
	}
	return b
}

// Stack is a wafer's layer sequence from the surface down, its surface and its substrate.
//
// Layers are taken as grown coherently on the lattice of the last layer of the table (the
// buffer, taken as relaxed): a layer of another lattice constant is strained, which shifts its
// Γ edge (see Params.StrainShiftEV).
type Stack struct {
	Layers            []Layer
	Surface           Surface
	SubstrateMaterial string // "GaAs" when empty
	Bottom            Bottom // the boundary below the stack; the zero value is a semi-insulating substrate
}

// LayerError locates a problem in one layer of a stack. Layer is 1-based from the surface;
// 0 means the substrate.
type LayerError struct {
	Layer int
	Name  string
	Err   error
}

func (e *LayerError) Error() string {
	where := "substrate"
	if e.Layer > 0 {
		where = fmt.Sprintf("layer %d", e.Layer)
		if e.Name != "" {
			where += " (" + e.Name + ")"
		}
	}
	return where + ": " + e.Err.Error()
}

// Unwrap returns the underlying error.
func (e *LayerError) Unwrap() error { return e.Err }

func (s Stack) substrate() string {
	if strings.TrimSpace(s.SubstrateMaterial) == "" {
		return "GaAs"
	}
	return s.SubstrateMaterial
}

// Validate checks the stack and returns every problem found, joined: unknown materials (the
// message lists the known ones), thicknesses that are not positive (zero is allowed for a
// delta-doped layer), negative or non-finite densities, an unknown surface or bottom kind, a
// stack with no donors (unless a gate is present), and a stack with no well — no layer whose
// lowest conduction band lies below that of a neighbouring layer.
func (s Stack) Validate() error {
	_, err := s.params()
	return err
}

// params validates and returns the band parameters of each layer and of the substrate (last).
func (s Stack) params() ([]Params, error) {
	var errs []error
	if len(s.Layers) == 0 {
		return nil, ErrEmptyStack
	}
	ps := make([]Params, len(s.Layers)+1)
	anyDonor := false
	for i, l := range s.Layers {
		le := func(err error) { errs = append(errs, &LayerError{Layer: i + 1, Name: l.Name, Err: err}) }
		p, err := Lookup(l.Material)
		if err != nil {
			le(err)
		}
		ps[i] = p
		th := l.ThicknessM
		switch {
		case math.IsNaN(th) || math.IsInf(th, 0):
			le(fmt.Errorf("%w: thickness is not a finite number", ErrBadThickness))
		case th < 0:
			le(fmt.Errorf("%w: thickness %g m is negative", ErrBadThickness, th))
		case th == 0 && !l.Doping.Sheet:
			le(fmt.Errorf("%w: thickness is zero (only a delta-doped layer may have none)", ErrBadThickness))
		}
		d := l.Doping
		if math.IsNaN(d.Density) || math.IsInf(d.Density, 0) || d.Density < 0 {
			le(fmt.Errorf("%w: density %g must be a finite number ≥ 0", ErrBadDoping, d.Density))
		}
		if d.Density > 0 && !d.Donor() && !d.Acceptor() {
			le(fmt.Errorf("%w: unknown species %q", ErrBadDoping, d.Species))
		}
		if d.Donor() && d.Density > 0 {
			anyDonor = true
		}
	}
	sub, err := Lookup(s.substrate())
	if err != nil {
		errs = append(errs, &LayerError{Layer: 0, Err: err})
	}
	ps[len(s.Layers)] = sub
	if s.Surface.Kind != SurfacePinned && s.Surface.Kind != SurfaceGate {
		errs = append(errs, fmt.Errorf("surface: unknown kind %d (want SurfacePinned or SurfaceGate)", s.Surface.Kind))
	}
	if b := s.Surface.barrier(); math.IsNaN(b) || math.IsInf(b, 0) {
		errs = append(errs, errors.New("surface: barrier or gate voltage is not a finite number"))
	}
	if b := s.Bottom; b.Kind != BottomPinned && b.Kind != BottomBulk && b.Kind != BottomZeroField {
		errs = append(errs, fmt.Errorf("bottom: unknown kind %d (want BottomPinned, BottomBulk or BottomZeroField)", b.Kind))
	} else if !(b.PinEV >= 0 && b.PinEV < 5) || !(b.BackgroundM3 >= 0 && b.BackgroundM3 < 1e26) {
		errs = append(errs, fmt.Errorf("bottom: pinning %g eV or background %g m^-3 is not a finite, non-negative number of a sensible size", b.PinEV, b.BackgroundM3))
	}
	if errs != nil {
		return nil, errors.Join(errs...)
	}
	// Strain: every layer coherent on the lattice of the last layer with a thickness.
	aRef := 0.0
	for i := len(s.Layers) - 1; i >= 0; i-- {
		if s.Layers[i].ThicknessM > 0 {
			aRef = ps[i].LatticeA
			break
		}
	}
	for i := range s.Layers {
		ps[i] = ps[i].strained(aRef)
	}
	if !anyDonor && s.Surface.Kind != SurfaceGate {
		errs = append(errs, fmt.Errorf("%w: no layer has donors, and there is no gate to induce carriers", ErrNoDoping))
	}
	well := false
	for i := range ps {
		if ps[i].Name == "" || (i < len(s.Layers) && s.Layers[i].ThicknessM == 0) {
			continue
		}
		// nearest neighbours with non-zero thickness
		for _, j := range []int{prevThick(s, i), nextThick(s, i)} {
			if j >= 0 && ps[i].EcEV < ps[j].EcEV-1e-9 {
				well = true
			}
		}
	}
	if !well {
		errs = append(errs, fmt.Errorf("%w: no layer has a conduction band below a neighbour's (a heterojunction is needed)", ErrNoWell))
	}
	return ps, errors.Join(errs...)
}

func prevThick(s Stack, i int) int {
	for j := i - 1; j >= 0; j-- {
		if s.Layers[j].ThicknessM > 0 {
			return j
		}
	}
	return -1
}

func nextThick(s Stack, i int) int {
	for j := i + 1; j < len(s.Layers); j++ {
		if s.Layers[j].ThicknessM > 0 {
			return j
		}
	}
	if i < len(s.Layers) {
		return len(s.Layers) // substrate
	}
	return -1
}
