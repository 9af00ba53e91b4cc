package physics

import (
	"math"

	"cleave/calc/quantity"
)

// MagneticLength returns l_B = sqrt(ħ/(e|B|)) in metres (25.6556 nm at 1 T).
// B must be a nonzero magnetic field. Ando, Fowler, Stern, Rev. Mod. Phys. 54, 437 (1982).
func MagneticLength(B quantity.Quantity) (quantity.Quantity, error) {
	if err := nonzero("magnetic_length", "B", B, kField); err != nil {
		return quantity.Quantity{}, err
	}
	return sqrt(quantity.Div(cHbar, quantity.Mul(cE, abs(B)))), nil
}

// CyclotronFrequency returns the angular cyclotron frequency ω_c = e|B|/m in rad/s
// (dimension s^-1). m is the effective mass in kg (e.g. 0.067 m_e); it must be positive.
func CyclotronFrequency(B, m quantity.Quantity) (quantity.Quantity, error) {
	const fn = "cyclotron_frequency"
	if err := firstErr(check(fn, "B", B, kField), positive(fn, "m", m, kMass)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(cE, abs(B)), m), nil
}

// CyclotronEnergy returns ħω_c = ħe|B|/m in joules (1.72788 meV at 1 T for m = 0.067 m_e).
func CyclotronEnergy(B, m quantity.Quantity) (quantity.Quantity, error) {
	w, err := CyclotronFrequency(B, m)
	if err != nil {
		return quantity.Quantity{}, rename(err, "cyclotron_energy")
	}
	return quantity.Mul(cHbar, w), nil
}

// LandauLevel returns the energy (N + 1/2)ħω_c of Landau level N >= 0 of a parabolic band,
// in joules, measured from the band edge, without the Zeeman term.
func LandauLevel(N int, B, m quantity.Quantity) (quantity.Quantity, error) {
	if N < 0 {
		return quantity.Quantity{}, domain("landau_level", "N", "the level index must be 0 or more, got %d", N)
	}
	e, err := CyclotronEnergy(B, m)
	if err != nil {
		return quantity.Quantity{}, rename(err, "landau_level")
	}
	return e.Scale(float64(N) + 0.5), nil
}

// FillingFactor returns ν = n h/(e|B|), the number of filled spin- and valley-resolved
// Landau levels (2.4814 for n = 3e11 cm^-2 at 5 T). n is the sheet density; B must be
// nonzero. The flux quantum is h/e, not h/2e.
func FillingFactor(n, B quantity.Quantity) (quantity.Quantity, error) {
	const fn = "filling_factor"
	if err := firstErr(check(fn, "n", n, kDensity), nonzero(fn, "B", B, kField)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(n, cH), quantity.Mul(cE, abs(B))), nil
}

// FieldAtFilling returns B_ν = n h/(ν e) in tesla, the field at which the density n
// fills ν levels. nu is a pure number (it may be fractional and may carry an uncertainty)
// and must be nonzero.
func FieldAtFilling(n, nu quantity.Quantity) (quantity.Quantity, error) {
	const fn = "field_at_filling"
	if err := firstErr(check(fn, "n", n, kDensity), nonzero(fn, "nu", nu, kNumber)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(n, cH), quantity.Mul(nu, cE)), nil
}

// ZeemanEnergy returns E_Z = |g| μ_B |B| in joules (25.469 µeV for |g| = 0.44 at 1 T).
// g is the (signed) effective g-factor, a pure number.
func ZeemanEnergy(B, g quantity.Quantity) (quantity.Quantity, error) {
	const fn = "zeeman_energy"
	if err := firstErr(check(fn, "B", B, kField), check(fn, "g", g, kNumber)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Mul(quantity.Mul(abs(g), cMuB), abs(B)), nil
}

// HallResistance returns the quantised Hall resistance R_K/ν in ohms, with
// R_K = h/e² exact (CODATA 2018); ν may be fractional (p/q) and must be nonzero.
// von Klitzing, Dorda, Pepper, Phys. Rev. Lett. 45, 494 (1980).
func HallResistance(nu quantity.Quantity) (quantity.Quantity, error) {
	if err := nonzero("hall_resistance", "nu", nu, kNumber); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(cRK, nu), nil
}

// DiracLandauLevel returns E_N = sgn(N) v_F sqrt(2eħ|B||N|) in joules, the Landau levels
// of a linear (graphene) dispersion, N = 0, ±1, ±2, ... (36.283 meV for N = 1 at 1 T with
// v_F = 1e6 m/s). Novoselov et al., Nature 438, 197 (2005).
func DiracLandauLevel(N int, B, vF quantity.Quantity) (quantity.Quantity, error) {
	const fn = "dirac_landau_level"
	if err := firstErr(check(fn, "B", B, kField), positive(fn, "vF", vF, kVelocity)); err != nil {
		return quantity.Quantity{}, err
	}
	if N == 0 {
		return quantity.New(0, quantity.MustUnit("J").D), nil
	}
	aN := N
	if aN < 0 {
		aN = -aN
	}
	root := sqrt(quantity.Mul(quantity.Mul(cE, cHbar), abs(B)).Scale(2 * float64(aN)))
	e := quantity.Mul(vF, root)
	if N < 0 {
		e = e.Neg()
	}
	return e, nil
}

// SdHFrequency returns the Shubnikov–de Haas frequency f_B = h n/(gs gv e) in tesla,
// the inverse of the period Δ(1/B) = gs gv e/(h n) (6.2035 T for GaAs at 3e11 cm^-2,
// spin-degenerate). Use gs = 1 for spin-resolved oscillations and gs = gv = 2 for graphene.
func SdHFrequency(n quantity.Quantity, gs, gv int) (quantity.Quantity, error) {
	const fn = "sdh_frequency"
	if err := firstErr(positive(fn, "n", n, kDensity), degeneracy(fn, gs, gv)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(cH, n), cE).Scale(1 / float64(gs*gv)), nil
}

// ThermalDamping returns the Lifshitz–Kosevich amplitude factor X/sinh X with
// X = 2π² k_B T/(ħω_c) = 2π² k_B T m/(ħ e |B|): a pure number in (0, 1], equal to 1 at T = 0.
// Lifshitz & Kosevich, Sov. Phys. JETP 2, 636 (1956).
func ThermalDamping(T, B, m quantity.Quantity) (quantity.Quantity, error) {
	const fn = "thermal_damping"
	if err := firstErr(check(fn, "T", T, kTemperature), nonzero(fn, "B", B, kField), positive(fn, "m", m, kMass)); err != nil {
		return quantity.Quantity{}, err
	}
	if T.Value() < 0 {
		return quantity.Quantity{}, domain(fn, "T", "temperature must not be negative, got %g K", T.Value())
	}
	wc := quantity.Div(quantity.Mul(cE, abs(B)), m)
	X := quantity.Div(quantity.Mul(cKB, T), quantity.Mul(cHbar, wc)).Scale(2 * math.Pi * math.Pi)
	return quantity.Apply(X, xOverSinh, dxOverSinh)
}

// xOverSinh is X/sinh X, continued to 1 at X = 0.
func xOverSinh(x float64) float64 {
	if math.Abs(x) < 1e-4 {
		return 1 - x*x/6
	}
	return x / math.Sinh(x)
}

// dxOverSinh is d/dX (X/sinh X) = (1 - X coth X)/sinh X.
func dxOverSinh(x float64) float64 {
	if math.Abs(x) < 1e-4 {
		return -x / 3
	}
	return (1 - x/math.Tanh(x)) / math.Sinh(x)
}

// DingleFactor returns exp(-π/(ω_c τ_q)) = exp(-π m/(e|B|τ_q)), the amplitude reduction
// of SdH oscillations by level broadening (0.30217 for GaAs at 1 T with τ_q = 1 ps).
// R. B. Dingle, Proc. R. Soc. Lond. A 211, 517 (1952).
func DingleFactor(B, tauQ, m quantity.Quantity) (quantity.Quantity, error) {
	const fn = "dingle_factor"
	if err := firstErr(nonzero(fn, "B", B, kField), positive(fn, "tau_q", tauQ, kTime), positive(fn, "m", m, kMass)); err != nil {
		return quantity.Quantity{}, err
	}
	x := quantity.Div(m, quantity.Mul(quantity.Mul(cE, abs(B)), tauQ)).Scale(-math.Pi)
	return quantity.Apply(x, math.Exp, math.Exp)
}

// DingleTemperature returns T_D = ħ/(2π k_B τ_q) in kelvin (1.21566 K for τ_q = 1 ps).
func DingleTemperature(tauQ quantity.Quantity) (quantity.Quantity, error) {
	if err := positive("dingle_temperature", "tau_q", tauQ, kTime); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(cHbar, quantity.Mul(cKB, tauQ)).Scale(1 / (2 * math.Pi)), nil
}

// QuantumMobility returns μ_q = e τ_q/m in m²/(V s) (26251 cm²/(V s) for τ_q = 1 ps and
// m = 0.067 m_e). Compare it with the transport mobility: μ/μ_q = τ_t/τ_q.
func QuantumMobility(tauQ, m quantity.Quantity) (quantity.Quantity, error) {
	const fn = "quantum_mobility"
	if err := firstErr(positive(fn, "tau_q", tauQ, kTime), positive(fn, "m", m, kMass)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(cE, tauQ), m), nil
}

// rename makes an error from a helper name the calling function.
func rename(err error, fn string) error {
	if ae, ok := err.(*ArgError); ok {
		c := *ae
		c.Func = fn
		if de, ok := c.Err.(*quantity.DimError); ok {
			d := *de
			d.Op = fn
			c.Err = &d
		}
		return &c
	}
	return err
}
