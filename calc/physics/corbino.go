package physics

import (
	"math"

	"cleave/calc/quantity"
)

// kConductance is the dimension of a conductance (S) and of a sheet conductivity.
var kConductance = kind{"a conductance", "S", quantity.MustUnit("S").D}

// CorbinoSquares returns the geometric factor of a Corbino disc (an annulus with contacts on
// its inner and outer edges), ln(r_out/r_in)/(2π): its two-terminal resistance is the sheet
// resistance times this number. It follows from the radial current: the current density at
// radius r is I/(2πr), so R = ∫ ρ_s dr/(2πr) from r_in to r_out = ρ_s ln(r_out/r_in)/(2π)
// (the closed form of radial conduction in an annulus, derived here; common practice). In a field
// the disc has no edges for a Hall voltage, so the same form gives σ_xx (CorbinoSigma). The
// uncertainty follows from the radii's.
func CorbinoSquares(rIn, rOut quantity.Quantity) (quantity.Quantity, error) {
	const fn = "corbino"
	if err := firstErr(positive(fn, "r_in", rIn, kLength), positive(fn, "r_out", rOut, kLength)); err != nil {
		return quantity.Quantity{}, err
	}
	a, b := rIn.Value(), rOut.Value()
	if !(b > a) {
		return quantity.Quantity{}, domain(fn, "r_out", "the outer radius %g m must exceed the inner radius %g m", b, a)
	}
	v := math.Log(b/a) / (2 * math.Pi)
	// ∂/∂r_in = −1/(2π r_in), ∂/∂r_out = 1/(2π r_out).
	return quantity.Derived(v, quantity.Dimensionless, []quantity.Quantity{rIn, rOut}, []float64{-1 / (2 * math.Pi * a), 1 / (2 * math.Pi * b)}), nil
}

// CorbinoSigma returns the sheet conductivity σ = G ln(r_out/r_in)/(2π) of a Corbino disc
// whose conductance between the edges is G (in a field, σ_xx); see CorbinoSquares.
func CorbinoSigma(G, rIn, rOut quantity.Quantity) (quantity.Quantity, error) {
	if err := positive("corbino_sigma", "G", G, kConductance); err != nil {
		return quantity.Quantity{}, err
	}
	sq, err := CorbinoSquares(rIn, rOut)
	if err != nil {
		return quantity.Quantity{}, rename(err, "corbino_sigma")
	}
	return quantity.Mul(G, sq), nil
}

// CorbinoConductance returns the conductance G = 2πσ/ln(r_out/r_in) between the edges of a
// Corbino disc of sheet conductivity σ; see CorbinoSquares.
func CorbinoConductance(sigma, rIn, rOut quantity.Quantity) (quantity.Quantity, error) {
	if err := positive("corbino_conductance", "sigma", sigma, kConductance); err != nil {
		return quantity.Quantity{}, err
	}
	sq, err := CorbinoSquares(rIn, rOut)
	if err != nil {
		return quantity.Quantity{}, rename(err, "corbino_conductance")
	}
	return quantity.Div(sigma, sq), nil
}
