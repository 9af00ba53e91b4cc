package physics

import (
	"errors"
	"fmt"
	"math"

	"cleave/calc/quantity"
)

// ErrNoTransferLength is wrapped by [TransferLength] when the line through a TLM pattern
// meets d = 0 at a non-positive resistance: the contact resistance is not positive, so
// there is no transfer length or contact resistivity to give.
var ErrNoTransferLength = errors.New("no transfer length: the intercept is not positive")

// TLM holds the contact parameters of a transfer-length measurement.
type TLM struct {
	Rc   quantity.Quantity // contact resistance of one contact, Ohm
	RcW  quantity.Quantity // R_c times the contact width, Ohm m (shown in Ohm mm)
	Rsh  quantity.Quantity // sheet resistance of the channel between the contacts, Ohm (per square)
	Lx   quantity.Quantity // half the extrapolated length at R_T = 0: L_T coth(L/L_T)
	LT   quantity.Quantity // transfer length, m
	RhoC quantity.Quantity // specific contact resistivity, Ohm m^2 (shown in Ohm cm^2)
	// Corrected is true when the contact length was given and L_T was solved from
	// L_x = L_T coth(L/L_T); false when L_T = L_x (contacts much longer than L_T).
	Corrected bool
}

// TransferLength returns the contact parameters from the straight line R_T(d) = intercept +
// slope·d through the total resistances of a transfer-length pattern whose contacts are W
// wide and (when L is positive) L long ([src:BERGER1972], [src:RH1982], [src:SCHRODER2006]),
// taking the sheet resistance under the contacts equal to the channel's:
//
//	R_c = intercept/2           R_sh = slope·W           R_c W
//	L_x = intercept/(2 slope)   (the line meets R_T = 0 at d = −2 L_x)
//	L_T = L_x                   for contacts much longer than L_T, or, with L given,
//	L_x = L_T coth(L/L_T)       solved for L_T (the front resistance of a finite contact,
//	                            R_c = (R_sh L_T/W) coth(L/L_T))
//	ρ_c = R_sh L_T²
//
// The inputs' uncertainties and correlations (a fit's slope and intercept are correlated)
// propagate to first order; for the coth case by implicit differentiation. A non-positive
// intercept returns Rc, RcW and Rsh with an error wrapping [ErrNoTransferLength]; a
// non-positive slope or width is an *[ArgError].
func TransferLength(slope, intercept, W, L quantity.Quantity) (TLM, error) {
	const fn = "tlm"
	kSlope := kind{"a resistance per length", "Ohm/um", quantity.MustUnit("Ohm/m").D}
	if err := firstErr(positive(fn, "slope", slope, kSlope), check(fn, "intercept", intercept, kResistance),
		positive(fn, "width", W, kLength), check(fn, "contact_length", L, kLength)); err != nil {
		return TLM{}, err
	}
	var t TLM
	t.Rc = intercept.Scale(0.5)
	t.Rsh = quantity.Mul(slope, W)
	t.RcW = quantity.Mul(t.Rc, W)
	if !(intercept.Value() > 0) {
		return t, fmt.Errorf("%s: the intercept is %s: %w", fn, quantity.Format(intercept), ErrNoTransferLength)
	}
	t.Lx = quantity.Div(t.Rc, slope)
	t.LT = t.Lx
	if L.Value() > 0 {
		t.LT, t.Corrected = solveCoth(t.Lx, L), true
	}
	t.RhoC = quantity.Mul(t.Rsh, quantity.Mul(t.LT, t.LT))
	return t, nil
}

// solveCoth solves L_x = L_T coth(L/L_T) for L_T in (0, L_x]: f(L_T) = L_T coth(L/L_T) rises
// monotonically from 0 (f' = coth u + u csch² u > 0 with u = L/L_T), so bisection finds the
// root. Since ∂L_x/∂L = −csch² u, dL_T = (dL_x + csch²(u) dL)/f'.
func solveCoth(Lx, L quantity.Quantity) quantity.Quantity {
	lx, l := Lx.Value(), L.Value()
	f := func(lt float64) float64 { return lt/math.Tanh(l/lt) - lx }
	lo, hi := 0.0, lx
	for range 200 {
		mid := (lo + hi) / 2
		if mid == lo || mid == hi {
			break
		}
		if f(mid) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	lt := (lo + hi) / 2
	u := l / lt
	csch2 := 0.0
	if s := math.Sinh(u); !math.IsInf(s, 0) {
		csch2 = 1 / (s * s)
	}
	fp := 1/math.Tanh(u) + u*csch2
	return quantity.Derived(lt, quantity.Length, []quantity.Quantity{Lx, L}, []float64{1 / fp, csch2 / fp})
}

// ContactResistance returns the resistance of one contact from a two-terminal resistance
// R_2t measured through n contacts in series (2 for a source-drain pair) and the resistance
// of the channel between them, R_ch (from the sheet resistance and the squares, at the same
// temperature): R_c = (R_2t − R_ch)/n (common practice; the wiring's own resistance is part
// of R_2t unless subtracted first). The result may be negative when R_ch is overestimated.
func ContactResistance(R2t, Rch quantity.Quantity, n int) (quantity.Quantity, error) {
	const fn = "contact_resistance"
	if err := firstErr(check(fn, "R_2t", R2t, kResistance), check(fn, "R_channel", Rch, kResistance)); err != nil {
		return quantity.Quantity{}, err
	}
	if n < 1 {
		return quantity.Quantity{}, domain(fn, "contacts", "the number of contacts in series must be 1 or more, got %d", n)
	}
	d, err := quantity.Sub(R2t, Rch)
	if err != nil {
		return quantity.Quantity{}, err
	}
	return d.Scale(1 / float64(n)), nil
}
