package quantity

import (
	"errors"
	"fmt"
)

// TempKind says how a temperature is to be read. Temperatures are kept in
// kelvin like every value; the kind remembers what the Celsius scale needs:
// whether a value is an absolute temperature written in °C or a difference.
//
//   - [TempPlain]: a value in K, or any value that is not a temperature. A
//     plain K value is a thermodynamic temperature or a difference, as the
//     context says (1 K of difference is 1 °C of difference).
//   - [TempCelsius]: an absolute temperature written in °C ("115 °C", i.e.
//     388.15 K). It is shown in °C.
//   - [TempDifference]: the difference of two absolute temperatures
//     (120 °C - 115 °C = 5 K). It is shown in K and cannot be shown in °C.
//
// The arithmetic that would be ambiguous on the Celsius scale is refused with
// a *[TempError] (errors.Is(err, [ErrAmbiguousTemperature])): the sum of two
// absolute temperatures (is 20 °C + 30 °C 50 °C, or 566.3 K?), a multiple of
// one by a pure number (2 × 20 °C), the negative of one, and an absolute
// temperature subtracted from a difference. What is allowed:
//
//	°C ± K or difference   → °C    (115 °C + 5 K = 120 °C)
//	°C − °C                → difference
//	K − °C                 → difference (the K value read as absolute)
//	difference ± difference → difference
//	°C × or ÷ a quantity with a dimension, 1/°C, (°C)^n, °C/°C → uses kelvin
//	                         (k_B T, an Arrhenius 1/T): thermodynamic, not ambiguous
//
// Every other operation ([Mul], [Div], [Derived], ...) gives a plain value.
type TempKind uint8

// The kinds of temperature; see [TempKind].
const (
	TempPlain TempKind = iota
	TempCelsius
	TempDifference
)

func (k TempKind) String() string {
	switch k {
	case TempCelsius:
		return "absolute temperature (°C)"
	case TempDifference:
		return "temperature difference"
	}
	return "plain"
}

// ErrAmbiguousTemperature is the sentinel of a [TempError].
var ErrAmbiguousTemperature = errors.New("ambiguous arithmetic on absolute temperatures")

// TempError reports arithmetic on absolute temperatures written in °C whose
// meaning would be ambiguous, or a difference asked for in °C.
type TempError struct {
	Op  string // "+", "-", "*", "/", "neg", "in"
	Msg string
}

func (e *TempError) Error() string { return e.Msg }

// Unwrap returns [ErrAmbiguousTemperature].
func (e *TempError) Unwrap() error { return ErrAmbiguousTemperature }

// Temp returns how the temperature q is to be read; [TempPlain] for a value
// that is not a temperature.
func (q Quantity) Temp() TempKind { return q.temp }

// Marked returns q marked as kind k. A value that is not a temperature, or
// k = TempPlain, gives q plain.
func (q Quantity) Marked(k TempKind) Quantity {
	if q.d != Temperature {
		k = TempPlain
	}
	q.temp = k
	return q
}

// Celsius returns the absolute temperature t °C with standard uncertainty
// sigma (in K, which for an uncertainty is the same as °C): t + 273.15 K,
// marked [TempCelsius]. A sigma of 0 gives an exact value.
func Celsius(t, sigma float64) Quantity {
	return Uncertain(t+CelsiusZero, sigma, Temperature).Marked(TempCelsius)
}

// sumKind is the kind of a ± b for two quantities of one dimension, or the
// error when the sum is ambiguous (see TempKind).
func sumKind(op string, a, b Quantity) (TempKind, error) {
	if a.d != Temperature || (a.temp == TempPlain && b.temp == TempPlain) {
		return TempPlain, nil
	}
	ca, cb := a.temp == TempCelsius, b.temp == TempCelsius
	switch {
	case op == "+" && ca && cb:
		return 0, &TempError{Op: op, Msg: fmt.Sprintf("cannot add two absolute temperatures (%s + %s): on the Celsius scale the sum has no meaning; "+
			"to raise a temperature by an amount, write the amount in K (e.g. %s + 10 K)", Format(a), Format(b), Format(a))}
	case op == "-" && ca && cb:
		return TempDifference, nil
	case ca || (op == "+" && cb):
		return TempCelsius, nil // °C ± K or difference, K + °C
	case op == "-" && cb && a.temp == TempDifference:
		return 0, &TempError{Op: op, Msg: fmt.Sprintf("cannot subtract an absolute temperature (%s) from a temperature difference (%s)", Format(b), Format(a))}
	case op == "-" && cb:
		return TempDifference, nil // K − °C: the K value read as absolute
	case a.temp == TempDifference && b.temp == TempDifference:
		return TempDifference, nil
	}
	return TempPlain, nil
}

// CheckScaling reports whether a op b (op "*" or "/") would be ambiguous: a
// product or quotient that is again a temperature, made from an absolute
// temperature in °C and a pure number (2 × 20 °C, 20 °C / 2). Everything
// else with an absolute temperature uses its kelvin value and is fine
// (k_B T, 1/T, T/T0). It returns nil when the operation is allowed.
func CheckScaling(op string, a, b Quantity) error {
	amb := false
	switch op {
	case "*":
		amb = a.temp == TempCelsius && b.d.IsDimensionless() || b.temp == TempCelsius && a.d.IsDimensionless()
	case "/":
		amb = a.temp == TempCelsius && b.d.IsDimensionless()
	}
	if !amb {
		return nil
	}
	t, x := a, b
	if b.temp == TempCelsius {
		t, x = b, a
	}
	return &TempError{Op: op, Msg: fmt.Sprintf("cannot scale an absolute temperature (%s) by a pure number (%s): on the Celsius scale the result is ambiguous; "+
		"convert it to a thermodynamic temperature first (`(%s) -> K`), or scale a difference in K", Format(t), Format(x), Format(t))}
}

// CheckNegate reports whether -q is ambiguous: the negative of an absolute
// temperature in °C (a literal such as -20 °C is read as one number, not as
// a negation). It returns nil when the negation is allowed.
func CheckNegate(q Quantity) error {
	if q.temp != TempCelsius {
		return nil
	}
	return &TempError{Op: "neg", Msg: fmt.Sprintf("cannot negate an absolute temperature (%s): on the Celsius scale the result is ambiguous; "+
		"write the temperature you mean, e.g. -20 °C, or negate a difference in K", Format(q))}
}

// ExpressedIn returns q as it reads once shown in unit u (a display request
// `-> u`): in °C an absolute temperature ([TempCelsius]); in K (or mK, ...) a
// plain thermodynamic temperature, which may then be scaled. A temperature
// difference cannot be shown in °C. The dimensions must agree, else the
// error is a *[DimError].
func (q Quantity) ExpressedIn(u Unit) (Quantity, error) {
	if q.d != u.D {
		return Quantity{}, &DimError{Op: "in", Left: q.d, Right: u.D}
	}
	if q.d != Temperature {
		return q, nil
	}
	if u.Offset != 0 {
		if q.temp == TempDifference {
			return Quantity{}, differenceInCelsius(q)
		}
		return q.Marked(TempCelsius), nil
	}
	if q.temp == TempCelsius {
		return q.Marked(TempPlain), nil
	}
	return q, nil
}

func differenceInCelsius(q Quantity) error {
	return &TempError{Op: "in", Msg: fmt.Sprintf("a temperature difference (%s) cannot be shown in °C, which reads as an absolute temperature: "+
		"a difference of 1 °C is 1 K", Format(q))}
}
