package quantity

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Unit is a unit of measurement: the SI value of a number n written in this
// unit is n*Scale, with dimension D. Symbol is the text that names it and
// that [ParseUnit] accepts.
type Unit struct {
	Symbol string
	Scale  float64
	D      Dim
}

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
	// Pressure in growth chambers: 1 bar = 1e5 Pa, 1 Torr = 101325/760 Pa.
	"bar":  {1, 5, dimPressure, true},
	"Torr": {101325.0 / 760, 0, dimPressure, false},
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
	return Unit{Symbol: strings.TrimSpace(s), Scale: scale, D: d}, nil
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
	return unicode.IsLetter(r) || r == '_' || r == '%' || r == '°'
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
		return factor{mant: 1}, nil
	case isSymbolRune(r):
		start := p.pos
		for {
			r, n := p.peek()
			if n == 0 || !isSymbolRune(r) {
				break
			}
			p.pos += n
			if r == '%' || r == '°' {
				break // these stand alone
			}
		}
		return p.lookup(start, p.s[start:p.pos])
	}
	return factor{}, p.fail(p.pos, "unexpected %q (expected a unit symbol such as m, T, eV or Ohm)", r)
}

func (p *unitParser) lookup(off int, sym string) (factor, error) {
	mk := func(u unitDef, pexp int) factor {
		f := factor{mant: u.mant, exp10: float64(u.exp10 + pexp)}
		for i, e := range u.d {
			f.d[i] = int(e)
		}
		return f
	}
	if u, ok := units[sym]; ok {
		return mk(u, 0), nil
	}
	for _, pre := range prefixes {
		if rest, ok := strings.CutPrefix(sym, pre.sym); ok {
			if u, ok := units[rest]; ok && u.prefixOK {
				return mk(u, pre.exp), nil
			}
		}
	}
	return factor{}, p.fail(off, "unknown unit %q (expected a unit such as m, um, T, mT, G, K, eV, meV, Ohm, kOhm, V, A, s, Hz, m_e or 1)", sym)
}

// In returns the number that expresses q in unit u. The dimensions must
// agree, else the error is a *[DimError] with Op "in".
func (q Quantity) In(u Unit) (float64, error) {
	if q.d != u.D {
		return 0, &DimError{Op: "in", Left: q.d, Right: u.D}
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
