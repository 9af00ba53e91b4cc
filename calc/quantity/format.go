package quantity

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"
)

// step chooses a display unit by size: sym is used while |SI value| < below.
type step struct {
	below float64
	sym   string
}

// displayRule is the customary display for one dimension. zero is used for
// a zero or non-finite value.
type displayRule struct {
	steps []step
	zero  string
}

func fixed(sym string) displayRule { return displayRule{steps: []step{{math.Inf(1), sym}}, zero: sym} }

var inf = math.Inf(1)

// displayTable lists the customary display for each dimension; see the
// package documentation for the list and its reasons.
var displayTable = []struct {
	d Dim
	r displayRule
}{
	{Dimensionless, fixed("")},
	{Length, displayRule{steps: []step{{1e-6, "nm"}, {1e-3, "um"}, {10, "mm"}, {inf, "m"}}, zero: "nm"}},
	{Length.Pow(2), displayRule{steps: []step{{1e-6, "um^2"}, {1, "mm^2"}, {inf, "m^2"}}, zero: "um^2"}},
	{Length.Pow(-1), fixed("m^-1")},
	{Length.Pow(-2), fixed("cm^-2")},
	{Length.Pow(-3), fixed("cm^-3")},
	{Mass, fixed("m_e")},
	// Dilution-refrigerator temperatures read in mK, everything from 0.1 K up in K.
	{Temperature, displayRule{steps: []step{{0.1, "mK"}, {inf, "K"}}, zero: "K"}},
	{Time, displayRule{steps: []step{{1e-9, "ps"}, {1e-6, "ns"}, {1e-3, "us"}, {1, "ms"}, {inf, "s"}}, zero: "ps"}},
	// Frequencies by size in Hz. An angular frequency (rad/s, e.g. the cyclotron
	// frequency) has the same dimension; the function that makes one asks for rad/s.
	{dimFrequency, displayRule{steps: []step{{1e3, "Hz"}, {1e6, "kHz"}, {1e9, "MHz"}, {1e12, "GHz"}, {inf, "THz"}}, zero: "Hz"}},
	{dimEnergy, displayRule{steps: []step{{10 * ElementaryCharge, "meV"}, {1e-9, "eV"}, {inf, "J"}}, zero: "meV"}},
	// Small fields (offsets, remanence) read in mT.
	{dimField, displayRule{steps: []step{{0.01, "mT"}, {inf, "T"}}, zero: "T"}},
	{dimResistance, fixed("Ohm")},
	{dimResistance.Pow(-1), fixed("S")},
	{dimResistance.Mul(Length), fixed("Ohm cm")},
	{dimResistance.Div(dimField), fixed("Ohm/T")},
	// m^2/(V s) and T^-1 are the same dimension; mobility wins.
	{dimVoltage.Mul(Time).Pow(-1).Mul(Length.Pow(2)), fixed("cm^2/(V s)")},
	{dimVoltage, displayRule{steps: []step{{1, "mV"}, {inf, "V"}}, zero: "V"}},
	{Current, displayRule{steps: []step{{1e-6, "nA"}, {1e-3, "uA"}, {1, "mA"}, {inf, "A"}}, zero: "nA"}},
	{dimCapacit, displayRule{steps: []step{{1e-9, "pF"}, {1e-6, "nF"}, {inf, "uF"}}, zero: "pF"}},
	{dimCapacit.Div(Length.Pow(2)), fixed("nF/cm^2")},
	{dimCapacit.Div(Length), fixed("F/m")},
	// Velocities: growth and etch rates (below 1 mm/s) in nm/s, everything faster (a Fermi
	// velocity) in m/s. Å/s, um/h and nm/min are asked for with `->`.
	{Length.Div(Time), displayRule{steps: []step{{1e-3, "nm/s"}, {inf, "m/s"}}, zero: "m/s"}},
	// Field sweep rates, temperature ramps.
	{dimField.Div(Time), fixed("T/min")},
	{Temperature.Div(Time), fixed("K/min")},
	// Light intensity, exposure dose, e-beam dose.
	{dimPower.Div(Length.Pow(2)), fixed("mW/cm^2")},
	{dimEnergy.Div(Length.Pow(2)), fixed("mJ/cm^2")},
	{dimCharge.Div(Length.Pow(2)), fixed("uC/cm^2")},
	// Specific contact resistivity. (Contact resistance times width, R_c W, has the
	// dimension of a resistivity, shown in Ohm cm; a TLM result asks for Ohm mm itself.)
	{dimResistance.Mul(Length.Pow(2)), fixed("Ohm cm^2")},
	// Volumes of chemicals, gas flows, the magnetic field strength H.
	{Length.Pow(3), displayRule{steps: []step{{1e-6, "uL"}, {1e-3, "mL"}, {inf, "L"}}, zero: "mL"}},
	{Amount.Div(Time), fixed("sccm")},
	// Dopant fluxes from a cell.
	{Length.Pow(-2).Div(Time), fixed("cm^-2 s^-1")},
	{Current.Div(Length), fixed("A/m")},
	{dimVoltage.Div(Length), fixed("V/m")},
	{dimEnergy.Div(dimField), fixed("meV/T")},
	{dimEnergy.Div(Temperature), fixed("meV/K")},
	{dimEnergy.Mul(Time), fixed("J s")},
	{Length.Pow(-2).Div(dimEnergy), fixed("cm^-2 meV^-1")},
	{Length.Pow(-2).Div(dimVoltage), fixed("cm^-2 V^-1")},
	{dimFlux, fixed("Wb")},
	{dimCharge, fixed("C")},
	{dimPower, fixed("W")},
	{dimInduct, fixed("H")},
	{dimPressure, fixed("Pa")},
	{dimForce, fixed("N")},
}

// displayRules indexes displayTable by dimension.
var displayRules = func() map[Dim]displayRule {
	m := make(map[Dim]displayRule, len(displayTable))
	for _, e := range displayTable {
		m[e.d] = e.r
	}
	return m
}()

// celsiusSymbol is how an absolute temperature in °C is written.
const celsiusSymbol = "°C"

// parsedDisplay caches the parsed display units, parsed when a quantity is first displayed (a
// command that displays none, such as a check of an unchanged notebook, never parses them).
var parsedDisplay = sync.OnceValue(func() map[string]Unit {
	// The empty symbol is the dimensionless unit 1, which ParseUnit spells "1".
	m := map[string]Unit{"": {Symbol: "", Scale: 1}, celsiusSymbol: MustUnit(celsiusSymbol)}
	for _, r := range displayRules {
		for _, s := range append(r.steps, step{sym: r.zero}) {
			if _, ok := m[s.sym]; !ok {
				m[s.sym] = MustUnit(s.sym)
			}
		}
	}
	return m
})

// Customary returns the trade's display unit for q: its dimension decides
// the unit and, for some dimensions, the size of the value picks the prefix.
// A dimension without a customary unit gets its SI base-unit string
// ([Dim.String]) with scale 1, and so does a value (or uncertainty) so far
// out of range that it would overflow or fall into the subnormal range in
// the customary unit: 1e300 g is about 1e327 electron masses, beyond the
// largest float64, but prints as 1e297 kg.
//
// An absolute temperature written in °C ([TempCelsius]) is shown in °C.
func Customary(q Quantity) Unit {
	if q.temp == TempCelsius {
		return parsedDisplay()[celsiusSymbol]
	}
	r, ok := displayRules[q.d]
	if !ok {
		return siUnit(q.d)
	}
	a := math.Abs(q.v)
	if a == 0 || math.IsNaN(a) || math.IsInf(a, 0) {
		return parsedDisplay()[r.zero]
	}
	u := parsedDisplay()[r.steps[len(r.steps)-1].sym]
	for _, s := range r.steps {
		if a < s.below {
			u = parsedDisplay()[s.sym]
			break
		}
	}
	if !representable(a, u.Scale) || !representable(q.Uncertainty(), u.Scale) {
		return siUnit(q.d)
	}
	return u
}

// siUnit is the unit of dimension d in SI base units, with scale 1. (Customary writes its
// symbol out only when it is the answer.)
func siUnit(d Dim) Unit { return Unit{Symbol: d.String(), Scale: 1, D: d} }

// representable reports whether the SI magnitude x keeps its precision in
// a unit of the given scale: the converted number is finite, and either
// normal or no smaller than x (a subnormal number holds fewer significant
// digits the smaller it is, down to none at zero).
func representable(x, scale float64) bool {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return true
	}
	const minNormal = 0x1p-1022
	y := math.Abs(fromSI(x, scale))
	return !math.IsInf(y, 0) && (y >= minNormal || y >= math.Abs(x))
}

// Format writes q in its [Customary] unit; see the package documentation
// for the number format. The result is accepted by [ParseQuantity].
func Format(q Quantity) string {
	s, _ := FormatIn(q, Customary(q))
	return s
}

// FormatIn writes q in unit u. The dimensions must agree, else the error is
// a *[DimError].
func FormatIn(q Quantity, u Unit) (string, error) {
	v, err := q.In(u)
	if err != nil {
		return "", err
	}
	// the text is written into one buffer: an exact value with its unit is one allocation
	var buf [48]byte
	b := buf[:0]
	// A relative uncertainty below 1e-8 (values derived only from CODATA's measured
	// constants, e.g. mu_B B) would need a dozen digits; such values are shown as exact ones.
	if sigma := fromSI(q.Uncertainty(), u.Scale); sigma == 0 || !q.HasUncertainty() || math.Abs(sigma) < 1e-8*math.Abs(v) {
		b = appendExact(b, v)
	} else {
		b = append(b, formatUncertain(v, math.Abs(sigma))...)
	}
	if u.Symbol != "" {
		b = append(append(b, ' '), u.Symbol...)
	}
	return string(b), nil
}

// formatExact writes x to 5 significant figures, in scientific notation
// ("3.0000e11") when the rounded |x| is at least 1e5 or below 1e-3.
func formatExact(x float64) string { return string(appendExact(nil, x)) }

// appendExact appends formatExact(x) to b.
func appendExact(b []byte, x float64) []byte {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return append(b, nonFinite(x)...)
	}
	if x == 0 {
		return append(b, '0')
	}
	start := len(b)
	b = strconv.AppendFloat(b, x, 'e', 4, 64) // "-3.0000e+11"
	i := start + bytes.IndexByte(b[start:], 'e')
	e := 0
	for _, c := range b[i+2:] {
		e = 10*e + int(c-'0')
	}
	if b[i+1] == '-' {
		e = -e
	}
	if e >= 5 || e < -3 {
		return strconv.AppendInt(b[:i+1], int64(e), 10) // "-3.0000e11"
	}
	return strconv.AppendFloat(b[:start], x, 'f', max(0, 4-e), 64)
}

func nonFinite(x float64) string {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case x > 0:
		return "Inf"
	}
	return "-Inf"
}

// formatUncertain writes v ± u with u rounded to two significant figures and
// v rounded to the same decimal place: "12.50 ± 0.20", or with a common
// power of ten "(3.072 ± 0.041)e11" when the larger of the two is at least
// 1e5 or below 1e-3.
func formatUncertain(v, u float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) || math.IsNaN(u) || math.IsInf(u, 0) {
		return formatExact(v) + " ± " + formatExact(u)
	}
	us := strconv.FormatFloat(u, 'e', 1, 64) // "4.1e-02"
	udigits := us[:1] + us[2:3]
	eu, _ := strconv.Atoi(us[4:])
	last := eu - 1 // decimal exponent of the last printed digit
	if v != 0 && math.Log10(math.Abs(v))-float64(last) > 16 {
		// The uncertainty is below float64 resolution of v.
		return formatExact(v) + " ± " + formatExact(u)
	}
	n := math.Round(scale10(math.Abs(v), -last))
	vdigits := strconv.FormatFloat(n, 'f', 0, 64)
	e := eu
	if n != 0 {
		e = max(e, len(vdigits)-1+last)
	}
	x := 0
	if e >= 5 || e < -3 {
		x = e
	}
	sign := ""
	if v < 0 && n != 0 {
		sign = "-"
	}
	vs := sign + placePoint(vdigits, last-x)
	uss := placePoint(udigits, last-x)
	if x == 0 {
		return vs + " ± " + uss
	}
	return "(" + vs + " ± " + uss + ")e" + strconv.Itoa(x)
}

// scale10 returns x·10^k without overflowing on the way when the result is finite: a
// subnormal uncertainty (1e-310) puts its last digit near 10^-311, and 10^311 alone is
// beyond the largest float64, so the power is applied in steps.
func scale10(x float64, k int) float64 {
	for k > 300 {
		x *= 1e300
		k -= 300
	}
	for k < -300 {
		x *= 1e-300
		k += 300
	}
	return x * math.Pow10(k)
}

// placePoint writes the integer digits times 10^k in positional notation.
func placePoint(digits string, k int) string {
	if k >= 0 {
		if digits == "0" {
			return "0"
		}
		return digits + strings.Repeat("0", k)
	}
	d := -k
	if len(digits) <= d {
		digits = strings.Repeat("0", d-len(digits)+1) + digits
	}
	return digits[:len(digits)-d] + "." + digits[len(digits)-d:]
}

// SyntaxError reports a malformed quantity outside its unit: Offset is the
// byte offset in the input. errors.Is(err, [ErrSyntax]) holds.
type SyntaxError struct {
	Input  string
	Offset int
	Msg    string
}

func (e *SyntaxError) Error() string {
	return fmt.Sprintf("quantity %q, offset %d: %s", e.Input, e.Offset, e.Msg)
}

// Unwrap returns [ErrSyntax].
func (e *SyntaxError) Unwrap() error { return ErrSyntax }

// ParseQuantity parses a number with an optional standard uncertainty and
// an optional unit, as written in front matter and as [Format] writes:
//
//	5                        dimensionless
//	20 um
//	3.1e11 cm^-2
//	0.067 m_e
//	12.5 ± 0.2 um            also "12.5 +/- 0.2 um"
//	12.5 um ± 200 nm         the uncertainty after the unit, in the same or another unit of the dimension
//	(3.072 ± 0.041)e11 cm^-2 a common power of ten
//
// The unit is everything after the number (and uncertainty), parsed by
// [ParseUnit]; a space between number and unit is optional ("20um"). The
// numbers "Inf", "-Inf" and "NaN" are accepted because [Format] may write
// them. An uncertainty makes a new independent input ([Uncertain]).
//
// Errors are a *[SyntaxError] or a *[UnitError], with byte offsets into s,
// or a *[DimError] when the uncertainty's unit differs in dimension.
func ParseQuantity(s string) (Quantity, error) {
	q, _, err := parseQuantity(s)
	return q, err
}

// ParseQuantityUnit is [ParseQuantity] that also gives the unit the value was written in
// (the dimensionless unit, scale 1, for a bare number), for a caller that shows a value as
// written when its unit says so ([Unit.Keep]).
func ParseQuantityUnit(s string) (Quantity, Unit, error) { return parseQuantity(s) }

func parseQuantity(s string) (Quantity, Unit, error) {
	p := &qparser{s: s}
	p.space()
	if p.pos == len(s) {
		return Quantity{}, Unit{}, p.fail(p.pos, "empty quantity (expected a number such as 20, 3.1e11 or 12.5 ± 0.2)")
	}
	var val, sig string
	if p.s[p.pos] == '(' {
		open := p.pos
		p.pos++
		p.space()
		var err error
		if val, err = p.number(); err != nil {
			return Quantity{}, Unit{}, err
		}
		p.space()
		if !p.plusMinus() {
			return Quantity{}, Unit{}, p.fail(p.pos, "expected '±' or '+/-' after the value in parentheses")
		}
		p.space()
		if sig, err = p.number(); err != nil {
			return Quantity{}, Unit{}, err
		}
		p.space()
		if p.pos >= len(s) || s[p.pos] != ')' {
			return Quantity{}, Unit{}, p.fail(open, "unclosed '(' (expected \"(value ± uncertainty)e<exponent>\")")
		}
		p.pos++
		if p.pos < len(s) && (s[p.pos] == 'e' || s[p.pos] == 'E') {
			start := p.pos
			p.pos++
			if p.pos < len(s) && (s[p.pos] == '-' || s[p.pos] == '+') {
				p.pos++
			}
			d := p.pos
			for p.pos < len(s) && isDigit(s[p.pos]) {
				p.pos++
			}
			if p.pos == d {
				return Quantity{}, Unit{}, p.fail(start, "expected an integer exponent after ')e'")
			}
			exp := s[start:p.pos]
			val += exp
			sig += exp
		}
	} else {
		var err error
		if val, err = p.number(); err != nil {
			return Quantity{}, Unit{}, err
		}
		save := p.pos
		p.space()
		if p.plusMinus() {
			p.space()
			if sig, err = p.number(); err != nil {
				return Quantity{}, Unit{}, err
			}
		} else {
			p.pos = save
		}
	}
	v, err := strconv.ParseFloat(val, 64)
	if err != nil && !isRangeErr(err) {
		return Quantity{}, Unit{}, p.fail(0, "malformed number %q", val)
	}
	var sigma float64
	if sig != "" {
		sigma, err = strconv.ParseFloat(sig, 64)
		if err != nil && !isRangeErr(err) || sigma < 0 || math.IsNaN(sigma) {
			return Quantity{}, Unit{}, p.fail(0, "uncertainty %q must be a non-negative number", sig)
		}
	}
	p.space()
	u := Unit{Scale: 1}
	if p.pos < len(s) {
		unitStart := p.pos
		unitText := s[unitStart:]
		// "12.5 um ± 0.2 um": the uncertainty follows the unit.
		pmAt := -1
		if sig == "" {
			for _, pm := range []string{"±", "+/-", "+-"} {
				if i := strings.Index(unitText, pm); i >= 0 && (pmAt < 0 || i < pmAt) {
					pmAt = i
				}
			}
		}
		if pmAt >= 0 {
			unitText = unitText[:pmAt]
		}
		if u, err = parseUnitIn(s, unitStart, unitText); err != nil {
			return Quantity{}, Unit{}, err
		}
		if pmAt >= 0 {
			p.pos = unitStart + pmAt
			p.plusMinus()
			p.space()
			if sig, err = p.number(); err != nil {
				return Quantity{}, Unit{}, err
			}
			sigma, err = strconv.ParseFloat(sig, 64)
			if err != nil && !isRangeErr(err) || sigma < 0 || math.IsNaN(sigma) {
				return Quantity{}, Unit{}, p.fail(0, "uncertainty %q must be a non-negative number", sig)
			}
			sigma = toSI(sigma, u.Scale)
			p.space()
			if p.pos < len(s) {
				su, err := parseUnitIn(s, p.pos, s[p.pos:])
				if err != nil {
					return Quantity{}, Unit{}, err
				}
				if su.D != u.D {
					return Quantity{}, Unit{}, &DimError{Op: "±", Left: u.D, Right: su.D}
				}
				sigma = toSI(fromSI(sigma, u.Scale), su.Scale)
			}
			return inUnit(v, sigma, u), u, nil
		}
	}
	return inUnit(v, toSI(sigma, u.Scale), u), u, nil
}

// inUnit is the quantity v (in unit u) with standard uncertainty sigma (SI): an absolute
// temperature marked TempCelsius when u is °C.
func inUnit(v, sigma float64, u Unit) Quantity {
	q := Uncertain(toSI(v, u.Scale)+u.Offset, sigma, u.D)
	if u.Offset != 0 {
		q = q.Marked(TempCelsius)
	}
	return q
}

// parseUnitIn parses the unit text found at byte offset off of s, with
// error offsets relative to s.
func parseUnitIn(s string, off int, text string) (Unit, error) {
	u, err := ParseUnit(text)
	if err != nil {
		ue := err.(*UnitError)
		return Unit{}, &UnitError{Input: s, Offset: off + ue.Offset, Msg: ue.Msg}
	}
	return u, nil
}

func isRangeErr(err error) bool {
	ne, ok := err.(*strconv.NumError)
	return ok && ne.Err == strconv.ErrRange
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

type qparser struct {
	s   string
	pos int
}

func (p *qparser) fail(off int, format string, args ...any) error {
	return &SyntaxError{Input: p.s, Offset: off, Msg: fmt.Sprintf(format, args...)}
}

func (p *qparser) space() {
	for p.pos < len(p.s) {
		r, n := utf8.DecodeRuneInString(p.s[p.pos:])
		if !unicode.IsSpace(r) {
			return
		}
		p.pos += n
	}
}

func (p *qparser) plusMinus() bool {
	for _, pm := range []string{"±", "+/-", "+-"} {
		if strings.HasPrefix(p.s[p.pos:], pm) {
			p.pos += len(pm)
			return true
		}
	}
	return false
}

// number scans [sign] (digits [. digits] | . digits) [e [sign] digits], or
// Inf / NaN, and returns it in a form strconv.ParseFloat accepts.
func (p *qparser) number() (string, error) {
	start := p.pos
	sign := ""
	if p.pos < len(p.s) && (p.s[p.pos] == '-' || p.s[p.pos] == '+') {
		sign = p.s[p.pos : p.pos+1]
		p.pos++
	} else if strings.HasPrefix(p.s[p.pos:], "−") { // U+2212 MINUS SIGN
		sign = "-"
		p.pos += len("−")
	}
	for _, w := range []string{"Inf", "NaN"} {
		if strings.HasPrefix(p.s[p.pos:], w) {
			p.pos += len(w)
			return sign + w, nil
		}
	}
	digits := p.pos
	for p.pos < len(p.s) && isDigit(p.s[p.pos]) {
		p.pos++
	}
	n := p.pos - digits
	if p.pos < len(p.s) && p.s[p.pos] == '.' {
		p.pos++
		f := p.pos
		for p.pos < len(p.s) && isDigit(p.s[p.pos]) {
			p.pos++
		}
		n += p.pos - f
	}
	if n == 0 {
		p.pos = start
		return "", p.fail(start, "expected a number")
	}
	mant := p.s[digits:p.pos]
	if p.pos < len(p.s) && (p.s[p.pos] == 'e' || p.s[p.pos] == 'E') {
		q := p.pos + 1
		if q < len(p.s) && (p.s[q] == '-' || p.s[q] == '+') {
			q++
		}
		if q < len(p.s) && isDigit(p.s[q]) {
			for q < len(p.s) && isDigit(p.s[q]) {
				q++
			}
			mant += p.s[p.pos:q]
			p.pos = q
		}
	}
	return sign + mant, nil
}
