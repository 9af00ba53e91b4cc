package quantity

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"

	"cleave/calc/materials"
)

// Unit is a unit of measurement: the SI value of a number n written in this
// unit is n*Scale + Offset, with dimension D. Symbol is the text that names
// it and that [ParseUnit] accepts.
type Unit struct {
	Symbol string
	Scale  float64
	D      Dim
	// Offset is the SI value of the unit's zero. It is 273.15 (K) for °C
	// written alone, an absolute temperature on the Celsius scale, and 0 for
	// every other unit; °C inside a compound unit ("°C/min", "°C^-1") or
	// raised to a power is a temperature difference, 1 °C = 1 K.
	Offset float64
	// Keep says that a value written in this unit is shown in it as long as
	// nothing has been computed from it: the trade's own units (rpm, Torr,
	// Oe, inch, ppm, sccm) whose dimension's customary unit would read
	// oddly (a spin speed in Hz). Only a unit that is one such symbol,
	// possibly with a prefix, keeps.
	Keep bool
}

// CelsiusZero is 0 °C in kelvin: T/K = t/°C + 273.15 exactly (SI Brochure,
// 9th ed. (2019), section 2.3.1 [src:SI2019]).
const CelsiusZero = 273.15

// Physical values used by the unit table.
const (
	// ElementaryCharge e in C, exact in the SI since 2019 (CODATA 2018).
	ElementaryCharge = 1.602176634e-19
	// ElectronMass m_e in kg, CODATA 2018 recommended value
	// (uncertainty 2.8e-40 kg is not carried by the unit m_e).
	ElectronMass = 9.1093837015e-31
)

// Derived dimensions used below and by callers.
var (
	dimForce      = Dim{IdxMass: 1, IdxLength: 1, IdxTime: -2}
	dimEnergy     = Dim{IdxMass: 1, IdxLength: 2, IdxTime: -2}
	dimPower      = Dim{IdxMass: 1, IdxLength: 2, IdxTime: -3}
	dimCharge     = Dim{IdxCurrent: 1, IdxTime: 1}
	dimVoltage    = Dim{IdxMass: 1, IdxLength: 2, IdxTime: -3, IdxCurrent: -1}
	dimResistance = Dim{IdxMass: 1, IdxLength: 2, IdxTime: -3, IdxCurrent: -2}
	dimCapacit    = Dim{IdxMass: -1, IdxLength: -2, IdxTime: 4, IdxCurrent: 2}
	dimFlux       = Dim{IdxMass: 1, IdxLength: 2, IdxTime: -2, IdxCurrent: -1}
	dimField      = Dim{IdxMass: 1, IdxTime: -2, IdxCurrent: -1}
	dimInduct     = Dim{IdxMass: 1, IdxLength: 2, IdxTime: -2, IdxCurrent: -2}
	dimPressure   = Dim{IdxMass: 1, IdxLength: -1, IdxTime: -2}
	dimFrequency  = Dim{IdxTime: -1}
)

// unitDef is one entry of the symbol table. The SI value of 1 symbol is
// mant * 10^exp10; keeping the power of ten apart makes "cm^-2" exactly 1e4.
type unitDef struct {
	mant     float64
	exp10    int
	d        Dim
	prefixOK bool
}

// keptUnits are the symbols whose values are shown as written (see Unit.Keep), with or
// without a prefix.
var keptUnits = map[string]bool{"Torr": true, "inch": true, "in": true, "Oe": true, "ppm": true, "ppb": true,
	"rpm": true, "sccm": true, "slm": true}

// celsiusUnits are the spellings of the degree Celsius (see Unit.Offset).
var celsiusUnits = map[string]bool{"°C": true, "degC": true, "\u2103": true}

// Values behind the growth and fabrication units below.
const (
	// molarGas is R = N_A k_B in J/(mol K), exact since N_A and k_B are (CODATA 2018).
	molarGas = 6.02214076e23 * 1.380649e-23
	// sccmMolPerS is one standard cubic centimetre per minute as an amount of gas per
	// second: p0 V/(R T0) over 60 s, with the standard conditions of mass-flow controllers,
	// T0 = 273.15 K and p0 = 101325 Pa (SEMI E12; from memory): 7.4358e-7 mol/s.
	sccmMolPerS = 101325 * 1e-6 / (molarGas * CelsiusZero) / 60
)

// units maps every accepted symbol to its definition. The SI derived units
// follow the SI Brochure, 9th ed. (BIPM 2019), Table 4; the non-SI units
// are defined in the comments beside them.
var units = map[string]unitDef{
	"m":   {1, 0, Length, true},
	"g":   {1, -3, Mass, true},
	"s":   {1, 0, Time, true},
	"A":   {1, 0, Current, true},
	"K":   {1, 0, Temperature, true},
	"mol": {1, 0, Amount, true},
	"cd":  {1, 0, Luminous, true},

	"Hz":     {1, 0, dimFrequency, true},
	"N":      {1, 0, dimForce, true},
	"Pa":     {1, 0, dimPressure, true},
	"J":      {1, 0, dimEnergy, true},
	"W":      {1, 0, dimPower, true},
	"C":      {1, 0, dimCharge, true},
	"V":      {1, 0, dimVoltage, true},
	"F":      {1, 0, dimCapacit, true},
	"Ohm":    {1, 0, dimResistance, true},
	"ohm":    {1, 0, dimResistance, true},
	"Ω":      {1, 0, dimResistance, true}, // U+03A9 GREEK CAPITAL LETTER OMEGA
	"\u2126": {1, 0, dimResistance, true}, // OHM SIGN
	"S":      {1, 0, dimResistance.Pow(-1), true},
	"Wb":     {1, 0, dimFlux, true},
	"T":      {1, 0, dimField, true},
	"Tesla":  {1, 0, dimField, false}, // spelled out, as exports write it
	"tesla":  {1, 0, dimField, false},
	// "Vs" is the trade's spelling of V s in a mobility, cm^2/Vs = cm^2/(V s).
	"Vs":  {1, 0, dimFlux, false},
	"H":   {1, 0, dimInduct, true},
	"rad": {1, 0, Dimensionless, true},
	"sr":  {1, 0, Dimensionless, false},

	// Electronvolt: e times 1 V, exact since e is exact (CODATA 2018).
	"eV": {ElementaryCharge, 0, dimEnergy, true},
	// Gauss: 1 G = 1e-4 T (CGS electromagnetic unit of flux density).
	"G": {1, -4, dimField, true},
	// Ångström: 1e-10 m. "A" is the ampere, never the ångström.
	"Å":        {1, -10, Length, false}, // U+00C5
	"\u212B":   {1, -10, Length, false}, // ANGSTROM SIGN
	"Angstrom": {1, -10, Length, false},
	"angstrom": {1, -10, Length, false},
	// Electron rest mass, CODATA 2018.
	"m_e": {ElectronMass, 0, Mass, false},
	// Non-SI units accepted for use with the SI: minute, hour, degree.
	"min": {60, 0, Time, false},
	"h":   {3600, 0, Time, false},
	"deg": {math.Pi / 180, 0, Dimensionless, false},
	"°":   {math.Pi / 180, 0, Dimensionless, false},
	// Pressure in growth chambers: 1 bar = 1e5 Pa, 1 Torr = 101325/760 Pa (mTorr in
	// sputtering and etching).
	"bar":  {1, 5, dimPressure, true},
	"Torr": {101325.0 / 760, 0, dimPressure, true},
	// Degree Celsius [src:SI2019]: alone, an absolute temperature t with T/K = t/°C +
	// 273.15; in a compound unit a difference, 1 °C = 1 K. U+2103 is the DEGREE CELSIUS sign.
	"°C":     {1, 0, Temperature, false},
	"degC":   {1, 0, Temperature, false},
	"\u2103": {1, 0, Temperature, false},
	// Inch: 0.0254 m exactly (the international inch of 1959; NIST SP 811, appendix B,
	// from memory), for wafer diameters.
	"inch": {254, -4, Length, false},
	"in":   {254, -4, Length, false},
	// Litre: 1 L = 1e-3 m^3 exactly (SI Brochure 9th ed., Table 8 [src:SI2019]).
	"L": {1, -3, Length.Pow(3), true},
	// Oersted, the CGS unit of the magnetic field strength H: 1 Oe = (1000/4π) A/m
	// (SI Brochure 8th ed. (2006), Table 9, from memory). It is not the tesla: μ0 H is.
	"Oe": {1000 / (4 * math.Pi), 0, Current.Div(Length), true},
	// Parts per million and per billion: 1e-6 and 1e-9 (common practice).
	"ppm": {1, -6, Dimensionless, false},
	"ppb": {1, -9, Dimensionless, false},
	// Revolutions per minute: one cycle per 60 s (spin coaters, substrate rotation).
	"rpm": {1.0 / 60, 0, dimFrequency, false},
	// Gas flows: standard cubic centimetres and standard litres per minute, as amounts of
	// gas per time (see sccmMolPerS).
	"sccm": {sccmMolPerS, 0, Amount.Div(Time), false},
	"slm":  {sccmMolPerS * 1000, 0, Amount.Div(Time), false},
	// "Per square": sheet resistance is written Ohm/sq; sq is the number 1.
	"sq": {1, 0, Dimensionless, false},
	"%":  {1, -2, Dimensionless, false},
}

// prefixes are the SI prefixes from yocto to yotta (SI Brochure, 9th ed.,
// Table 7), with u, µ (U+00B5) and μ (U+03BC) all meaning micro.
var prefixes = []struct {
	sym string
	exp int
}{
	{"da", 1}, // before "d" so that the longer prefix is tried first
	{"y", -24}, {"z", -21}, {"a", -18}, {"f", -15}, {"p", -12}, {"n", -9},
	{"u", -6}, {"\u00b5", -6}, {"\u03bc", -6}, {"m", -3}, {"c", -2}, {"d", -1},
	{"h", 2}, {"k", 3}, {"M", 6}, {"G", 9}, {"T", 12},
	{"P", 15}, {"E", 18}, {"Z", 21}, {"Y", 24},
}

// UnitError reports a unit string that could not be parsed: Offset is the
// byte offset in the string given to [ParseUnit] (or [ParseQuantity]), Msg
// says what was found and what was expected. errors.Is(err,
// [ErrUnknownUnit]) holds for every UnitError.
type UnitError struct {
	Input  string
	Offset int
	Msg    string
}

func (e *UnitError) Error() string {
	return fmt.Sprintf("unit %q, offset %d: %s", e.Input, e.Offset, e.Msg)
}

// Reason is what a parse error of [ParseQuantity] or [ParseUnit] says went wrong, without the
// input and byte offset its Error repeats: for a message that already quotes the text it was
// given and says where it stands in the file ("thickness \"20 nmm\": unknown unit ...").
// Other errors give their Error.
func Reason(err error) string {
	var se *SyntaxError
	var ue *UnitError
	switch {
	case errors.As(err, &se):
		return se.Msg
	case errors.As(err, &ue):
		return ue.Msg
	}
	return err.Error()
}

// Unwrap returns [ErrUnknownUnit].
func (e *UnitError) Unwrap() error { return ErrUnknownUnit }

// factor is a partly built unit: mant * 10^exp10 with dimension exponents
// kept as int until the end, so range checks happen once.
type factor struct {
	mant  float64
	exp10 float64
	d     [7]int
}

func (f factor) mul(g factor) factor {
	r := factor{mant: f.mant * g.mant, exp10: f.exp10 + g.exp10}
	for i := range r.d {
		r.d[i] = f.d[i] + g.d[i]
	}
	return r
}

func (f factor) inv() factor {
	r := factor{mant: 1 / f.mant, exp10: -f.exp10}
	for i := range r.d {
		r.d[i] = -f.d[i]
	}
	return r
}

type unitParser struct {
	s   string
	pos int
	// What ParseUnit needs to decide Unit.Offset and Unit.Keep: how many atoms the unit
	// has, whether any was raised to a power, and the symbol of the last one looked up.
	atoms   int
	powered bool
	base    string // the last symbol looked up, without its prefix
}

func (p *unitParser) fail(off int, format string, args ...any) error {
	return &UnitError{Input: p.s, Offset: off, Msg: fmt.Sprintf(format, args...)}
}

func (p *unitParser) peek() (rune, int) {
	if p.pos >= len(p.s) {
		return 0, 0
	}
	return utf8.DecodeRuneInString(p.s[p.pos:])
}

func (p *unitParser) skipSpace() bool {
	start := p.pos
	for {
		r, n := p.peek()
		if n == 0 || !unicode.IsSpace(r) {
			return p.pos > start
		}
		p.pos += n
	}
}

// ParseUnit parses a unit expression.
//
// Grammar (spaces around operators are optional):
//
//	unit     = product
//	product  = power { ( " " | "*" | "·" ) power } [ "/" power ]
//	power    = atom [ "^" exponent ]
//	atom     = symbol | "1" | "(" product ")"
//	exponent = [ "-" | "+" ] digits | "(" [ "-" ] digits [ "/" digits ] ")"
//
// A symbol is looked up whole first (so "mT" is millitesla and "Pa" is the
// pascal), then as an SI prefix followed by a prefixable unit ("kOhm",
// "µm", "meV"). After a "/" only one power may follow unless parentheses
// group the denominator, as the SI Brochure asks (9th ed., 5.4.6, from
// memory): "cm^2/(V s)" is accepted, "cm^2/V s" is an error. A rational
// exponent must leave integer dimension exponents.
//
// Errors are *[UnitError] values with the byte offset of the problem.
func ParseUnit(s string) (Unit, error) {
	if len(s) > maxMemoUnitBytes {
		return parseUnit(s)
	}
	parsedUnits.mu.RLock()
	u, ok := parsedUnits.m[s]
	parsedUnits.mu.RUnlock()
	if ok {
		return u, nil
	}
	// The memo's key and the unit's Symbol share one copy of the text, which holds on to
	// no larger text it was cut from.
	k := strings.Clone(s)
	u, err := parseUnit(k)
	if err != nil {
		return Unit{}, err
	}
	parsedUnits.mu.Lock()
	if len(parsedUnits.m) < maxMemoUnits {
		parsedUnits.m[k] = u
	}
	parsedUnits.mu.Unlock()
	return u, nil
}

// parsedUnits holds the units parsed so far by their text: the same text always gives the same
// Unit (a value with nothing to share but its Symbol's immutable text), and the units a
// notebook writes are few ("T", "cm^-2", "um", on every quantity of every file). Errors are
// not kept. Past maxMemoUnits texts a unit is parsed each time.
var parsedUnits = struct {
	mu sync.RWMutex
	m  map[string]Unit
}{m: map[string]Unit{}}

const (
	maxMemoUnits     = 1024
	maxMemoUnitBytes = 64
)

// parseUnit is ParseUnit without the memo.
func parseUnit(s string) (Unit, error) {
	p := &unitParser{s: s}
	p.skipSpace()
	if p.pos == len(s) {
		return Unit{}, p.fail(0, "empty unit (expected a unit symbol such as m, T, eV or Ohm, or 1)")
	}
	f, err := p.product()
	if err != nil {
		return Unit{}, err
	}
	p.skipSpace()
	if p.pos < len(s) {
		r, _ := p.peek()
		return Unit{}, p.fail(p.pos, "unexpected %q (expected a unit symbol, '*', '/', '^' or the end)", r)
	}
	var d Dim
	for i, e := range f.d {
		if e < -128 || e > 127 {
			return Unit{}, p.fail(0, "dimension exponent %d out of range", e)
		}
		d[i] = int8(e)
	}
	scale := f.mant
	if ie := math.Round(f.exp10); ie == f.exp10 && math.Abs(ie) < 300 {
		scale *= math.Pow10(int(ie))
	} else {
		scale *= math.Pow(10, f.exp10)
	}
	u := Unit{Symbol: strings.TrimSpace(s), Scale: scale, D: d}
	if p.atoms == 1 && !p.powered {
		u.Keep = keptUnits[p.base]
		if celsiusUnits[p.base] {
			u.Offset = CelsiusZero
		}
	}
	return u, nil
}

// MustUnit is [ParseUnit] for literals in package tables; it panics with a
// message starting "quantity: " if s does not parse.
func MustUnit(s string) Unit {
	u, err := ParseUnit(s)
	if err != nil {
		panic("quantity: " + err.Error())
	}
	return u
}

func (p *unitParser) product() (factor, error) {
	f, err := p.power()
	if err != nil {
		return factor{}, err
	}
	for {
		save := p.pos
		sp := p.skipSpace()
		r, n := p.peek()
		switch {
		case n == 0 || r == ')':
			p.pos = save
			return f, nil
		case r == '*' || r == '·' || r == '⋅':
			p.pos += n
			p.skipSpace()
			g, err := p.power()
			if err != nil {
				return factor{}, err
			}
			f = f.mul(g)
		case r == '/':
			slash := p.pos
			p.pos += n
			p.skipSpace()
			g, err := p.power()
			if err != nil {
				return factor{}, err
			}
			f = f.mul(g.inv())
			// Only the end or a closing parenthesis may follow.
			save2 := p.pos
			p.skipSpace()
			if r2, n2 := p.peek(); n2 != 0 && r2 != ')' {
				return factor{}, p.fail(slash, "ambiguous '/': group the denominator in parentheses, e.g. \"cm^2/(V s)\"")
			}
			p.pos = save2
			return f, nil
		case sp:
			g, err := p.power()
			if err != nil {
				return factor{}, err
			}
			f = f.mul(g)
		default:
			p.pos = save
			return f, nil
		}
	}
}

func (p *unitParser) power() (factor, error) {
	start := p.pos
	f, err := p.atom()
	if err != nil {
		return factor{}, err
	}
	save := p.pos
	p.skipSpace()
	if r, _ := p.peek(); r != '^' {
		p.pos = save
		return f, nil
	}
	p.pos++
	p.skipSpace()
	num, den, err := p.exponent()
	if err != nil {
		return factor{}, err
	}
	p.powered = true
	r := factor{mant: 1}
	if den == 1 {
		// Integer power: repeated multiplication keeps exact mantissas exact.
		r.mant = math.Pow(f.mant, float64(num))
	} else {
		r.mant = math.Pow(f.mant, float64(num)/float64(den))
	}
	r.exp10 = f.exp10 * float64(num) / float64(den)
	for i, e := range f.d {
		if (e*num)%den != 0 {
			return factor{}, p.fail(start, "power %d/%d leaves a fractional exponent of %s", num, den, baseSymbols[i])
		}
		r.d[i] = e * num / den
	}
	return r, nil
}

func (p *unitParser) exponent() (num, den int, err error) {
	paren := false
	if r, _ := p.peek(); r == '(' {
		paren = true
		p.pos++
		p.skipSpace()
	}
	num, err = p.signedInt()
	if err != nil {
		return 0, 0, err
	}
	den = 1
	if paren {
		p.skipSpace()
		if r, _ := p.peek(); r == '/' {
			p.pos++
			p.skipSpace()
			at := p.pos
			den, err = p.signedInt()
			if err != nil {
				return 0, 0, err
			}
			if den <= 0 {
				return 0, 0, p.fail(at, "exponent denominator must be a positive integer")
			}
		}
		p.skipSpace()
		if r, _ := p.peek(); r != ')' {
			return 0, 0, p.fail(p.pos, "expected ')' to close the exponent")
		}
		p.pos++
	}
	return num, den, nil
}

func (p *unitParser) signedInt() (int, error) {
	start := p.pos
	if r, _ := p.peek(); r == '-' || r == '+' || r == '−' {
		_, n := p.peek()
		p.pos += n
	}
	digits := p.pos
	for p.pos < len(p.s) && p.s[p.pos] >= '0' && p.s[p.pos] <= '9' {
		p.pos++
	}
	if p.pos == digits {
		return 0, p.fail(p.pos, "expected an integer exponent after '^'")
	}
	if p.pos-digits > 3 {
		return 0, p.fail(digits, "exponent too large")
	}
	n, _ := strconv.Atoi(p.s[digits:p.pos])
	if r, _ := utf8.DecodeRuneInString(p.s[start:]); r == '-' || r == '−' {
		n = -n
	}
	return n, nil
}

func isSymbolRune(r rune) bool {
	return unicode.IsLetter(r) || r == '_' || r == '%' || r == '°' || r == '\u2103'
}

func (p *unitParser) atom() (factor, error) {
	r, n := p.peek()
	switch {
	case n == 0:
		return factor{}, p.fail(p.pos, "unexpected end (expected a unit symbol)")
	case r == '(':
		open := p.pos
		p.pos++
		p.skipSpace()
		f, err := p.product()
		if err != nil {
			return factor{}, err
		}
		p.skipSpace()
		if r, _ := p.peek(); r != ')' {
			return factor{}, p.fail(open, "unclosed '('")
		}
		p.pos++
		return f, nil
	case r == '1':
		p.pos++
		if p.pos < len(p.s) && p.s[p.pos] >= '0' && p.s[p.pos] <= '9' {
			return factor{}, p.fail(p.pos-1, "a number is not a unit (only 1 is allowed)")
		}
		p.atoms++
		p.base = ""
		return factor{mant: 1}, nil
	case isSymbolRune(r):
		start := p.pos
		for {
			r, n := p.peek()
			if n == 0 || !isSymbolRune(r) {
				break
			}
			p.pos += n
			if r == '%' || r == '\u2103' {
				break // these stand alone
			}
			if r == '°' {
				// "°" alone is the angle degree; "°C" the degree Celsius, "°F" refused below.
				if r2, n2 := p.peek(); n2 > 0 && unicode.IsLetter(r2) {
					p.pos += n2
				}
				break
			}
		}
		sym := p.s[start:p.pos]
		if sym == "ML" {
			return p.monolayer(start)
		}
		return p.lookup(start, sym)
	}
	return factor{}, p.fail(p.pos, "unexpected %q (expected a unit symbol such as m, T, eV or Ohm)", r)
}

func (p *unitParser) lookup(off int, sym string) (factor, error) {
	mk := func(u unitDef, pexp int, base string) factor {
		p.atoms++
		p.base = base
		f := factor{mant: u.mant, exp10: float64(u.exp10 + pexp)}
		for i, e := range u.d {
			f.d[i] = int(e)
		}
		return f
	}
	if u, ok := units[sym]; ok {
		return mk(u, 0, sym), nil
	}
	for _, pre := range prefixes {
		if rest, ok := strings.CutPrefix(sym, pre.sym); ok {
			if u, ok := units[rest]; ok && u.prefixOK {
				return mk(u, pre.exp, rest), nil
			}
		}
	}
	switch sym {
	case "°F", "degF", "F°":
		return factor{}, p.fail(off, "unknown unit %q: Fahrenheit is not supported (write °C or K)", sym)
	case "C°", "Celsius", "celsius", "°c":
		return factor{}, p.fail(off, "unknown unit %q (the degree Celsius is written °C or degC)", sym)
	}
	return factor{}, p.fail(off, "unknown unit %q (expected a unit such as m, um, T, mT, G, K, eV, meV, Ohm, kOhm, V, A, s, Hz, m_e or 1)", sym)
}

// monolayer reads "ML(material)" at off, the "ML" already consumed: one monolayer of (001)
// growth of a zincblende material, half its cubic lattice constant (calc/materials,
// [materials.Material.Monolayer]). The material is named in parentheses right after ML, as
// a layer table writes it: ML(GaAs), ML(Al0.3Ga0.7As), ML(Al(0.3)Ga(0.7)As).
func (p *unitParser) monolayer(off int) (factor, error) {
	if r, _ := p.peek(); r != '(' {
		return factor{}, p.fail(off, "ML (a monolayer) needs its material right after it, e.g. ML(GaAs) or ML(Al0.3Ga0.7As)/s (millilitres are mL)")
	}
	open := p.pos
	depth := 0
	for p.pos < len(p.s) {
		c := p.s[p.pos]
		p.pos++
		if c == '(' {
			depth++
		} else if c == ')' {
			depth--
			if depth == 0 {
				break
			}
		}
	}
	if depth != 0 {
		return factor{}, p.fail(open, "unclosed '(' after ML (expected ML(GaAs))")
	}
	name := strings.TrimSpace(p.s[open+1 : p.pos-1])
	m, err := materials.Lookup(name)
	if err != nil {
		return factor{}, p.fail(open+1, "ML(%s): %v", name, err)
	}
	ml, err := m.Monolayer()
	if err != nil {
		return factor{}, p.fail(open+1, "ML(%s): %v", name, strings.TrimPrefix(err.Error(), "materials: "))
	}
	p.atoms++
	p.base = ""
	return factor{mant: ml, d: [7]int{IdxLength: 1}}, nil
}

// In returns the number that expresses q in unit u. The dimensions must
// agree, else the error is a *[DimError] with Op "in". In °C a temperature
// reads as absolute (388.15 K is 115 °C); a temperature difference
// ([TempDifference]) cannot be expressed in °C (a *[TempError]).
func (q Quantity) In(u Unit) (float64, error) {
	if q.d != u.D {
		return 0, &DimError{Op: "in", Left: q.d, Right: u.D}
	}
	if u.Offset != 0 {
		if q.temp == TempDifference {
			return 0, differenceInCelsius(q)
		}
		return fromSI(q.v-u.Offset, u.Scale), nil
	}
	return fromSI(q.v, u.Scale), nil
}

// toSI returns x*scale, dividing by the exact power of ten 1/scale when
// scale is a negative power of ten so that "20 um" is exactly 2e-5 m.
func toSI(x, scale float64) float64 {
	if k, ok := negPow10(scale); ok {
		return x / math.Pow10(k)
	}
	return x * scale
}

// fromSI returns x/scale, the inverse of toSI with the same care.
func fromSI(x, scale float64) float64 {
	if k, ok := negPow10(scale); ok {
		return x * math.Pow10(k)
	}
	return x / scale
}

// negPow10 reports whether scale is the float64 nearest to 10^-k for an
// integer k in 1..22 (where 10^k itself is exact).
func negPow10(scale float64) (int, bool) {
	if !(scale > 0 && scale < 1) {
		return 0, false
	}
	k := int(math.Round(-math.Log10(scale)))
	if k < 1 || k > 22 || math.Pow10(-k) != scale {
		return 0, false
	}
	return k, true
}

// engineeringPrefixes are the prefixes [Engineering] chooses from.
var engineeringPrefixes = []struct {
	sym string
	exp int
}{
	{"f", -15}, {"p", -12}, {"n", -9}, {"u", -6}, {"m", -3}, {"", 0},
	{"k", 3}, {"M", 6}, {"G", 9}, {"T", 12}, {"P", 15},
}

// Engineering returns base (a symbol that takes SI prefixes, such as "Hz",
// "A" or "Ohm") with the prefix, a power of 1000 from f to P, that puts |q|
// in [1, 1000): 4.2e11 s^-1 with "Hz" gives GHz. A zero or non-finite value
// gets the bare base unit. The dimension must match the base unit.
func Engineering(q Quantity, base string) (Unit, error) {
	def, ok := units[base]
	if !ok || !def.prefixOK {
		return Unit{}, &UnitError{Input: base, Offset: 0, Msg: fmt.Sprintf("%q is not a unit that takes SI prefixes", base)}
	}
	u := MustUnit(base)
	if u.D != q.d {
		return Unit{}, &DimError{Op: "in", Left: q.d, Right: u.D}
	}
	a := math.Abs(q.v) / u.Scale
	i := 5 // no prefix
	if a != 0 && !math.IsInf(a, 0) && !math.IsNaN(a) {
		i += int(max(-5, min(5, math.Floor(math.Log10(a)/3))))
	}
	return MustUnit(engineeringPrefixes[i].sym + base), nil
}
