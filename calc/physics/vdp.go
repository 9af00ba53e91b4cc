package physics

import (
	"math"

	"cleave/calc/quantity"
)

// VdpSheetResistance returns the sheet resistance R_s in ohms (per square) of a van der Pauw
// sample from its two four-terminal resistances R1 = R_12,34 and R2 = R_23,41, by solving
//
//	exp(-π R1/R_s) + exp(-π R2/R_s) = 1
//
// (L. J. van der Pauw, Philips Res. Rep. 13, 1 (1958)). For R1 = R2 = R this is
// R_s = πR/ln 2. Average each resistance over current reversal and the reciprocal
// configuration before calling. Both must be positive.
//
// The root is bracketed by πmin(R1,R2)/ln 2 <= R_s <= π(R1+R2)/(2 ln 2) and found by
// bisection to full float64 precision. The uncertainty follows by implicit
// differentiation: ∂R_s/∂R_i = R_s e_i/(R1 e1 + R2 e2) with e_i = exp(-πR_i/R_s).
func VdpSheetResistance(R1, R2 quantity.Quantity) (quantity.Quantity, error) {
	const fn = "vdp_sheet_resistance"
	if err := firstErr(positive(fn, "R1", R1, kResistance), positive(fn, "R2", R2, kResistance)); err != nil {
		return quantity.Quantity{}, err
	}
	r1, r2 := R1.Value(), R2.Value()
	if math.Min(r1, r2)/math.Max(r1, r2) < 1e-300 {
		return quantity.Quantity{}, domain(fn, "R1, R2", "ratio %g/%g is beyond floating-point range; check the contacts and wiring", r1, r2)
	}
	rs := vdpSolve(r1, r2)
	e1, e2 := math.Exp(-math.Pi*r1/rs), math.Exp(-math.Pi*r2/rs)
	den := r1*e1 + r2*e2
	return quantity.Derived(rs, R1.Dim(), []quantity.Quantity{R1, R2}, []float64{rs * e1 / den, rs * e2 / den}), nil
}

// vdpSolve solves the van der Pauw equation for r1, r2 > 0.
func vdpSolve(r1, r2 float64) float64 {
	if r1 == r2 {
		return math.Pi * r1 / math.Ln2
	}
	// Work with s = R_s/r1 scaled so that r1 = 1 to keep the exponent arithmetic O(1).
	scale := math.Max(r1, r2)
	a, b := r1/scale, r2/scale
	f := func(s float64) float64 { return math.Exp(-math.Pi*a/s) + math.Exp(-math.Pi*b/s) - 1 }
	lo := math.Pi * math.Min(a, b) / math.Ln2 // f(lo) <= 0: both terms <= 1/2
	hi := math.Pi * (a + b) / (2 * math.Ln2)  // f(hi) >= 0: convexity of exp
	for range 200 {
		mid := lo + (hi-lo)/2
		if mid <= lo || mid >= hi {
			break
		}
		if f(mid) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return scale * (lo + (hi-lo)/2)
}

// VdpFactor returns van der Pauw's correction factor f(R1/R2) defined by
// R_s = (π/ln 2)((R1+R2)/2) f, which is 1 for R1 = R2 and falls as the ratio grows
// (0.96028 at a ratio of 2). It is a pure number.
func VdpFactor(R1, R2 quantity.Quantity) (quantity.Quantity, error) {
	rs, err := VdpSheetResistance(R1, R2)
	if err != nil {
		return quantity.Quantity{}, rename(err, "vdp_factor")
	}
	sum, _ := quantity.Add(R1, R2)
	return quantity.Div(rs, sum).Scale(2 * math.Ln2 / math.Pi), nil
}
