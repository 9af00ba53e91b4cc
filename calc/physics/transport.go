package physics

import (
	"math"

	"cleave/calc/quantity"
)

// DensityOfStates returns D = gs gv m/(2πħ²), the density of states of a parabolic 2D band
// per unit area and energy, in J^-1 m^-2 (2.7988e10 cm^-2 meV^-1 for GaAs, gs = 2, gv = 1).
func DensityOfStates(m quantity.Quantity, gs, gv int) (quantity.Quantity, error) {
	const fn = "density_of_states"
	if err := firstErr(positive(fn, "m", m, kMass), degeneracy(fn, gs, gv)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(m, quantity.Mul(cHbar, cHbar)).Scale(float64(gs*gv) / (2 * math.Pi)), nil
}

// FermiEnergy returns E_F = 2πħ²n/(gs gv m) in joules, measured from the subband edge,
// for a parabolic band at T = 0 (10.719 meV for GaAs at 3e11 cm^-2).
func FermiEnergy(n, m quantity.Quantity, gs, gv int) (quantity.Quantity, error) {
	const fn = "fermi_energy"
	if err := firstErr(nonNegative(fn, "n", n, kDensity), positive(fn, "m", m, kMass), degeneracy(fn, gs, gv)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(quantity.Mul(cHbar, cHbar), n), m).Scale(2 * math.Pi / float64(gs*gv)), nil
}

// FermiWavevector returns k_F = sqrt(4πn/(gs gv)) in m^-1 (1.37294e8 m^-1 at 3e11 cm^-2,
// gs gv = 2). It holds for any isotropic band, including graphene (gs = gv = 2).
func FermiWavevector(n quantity.Quantity, gs, gv int) (quantity.Quantity, error) {
	const fn = "fermi_wavevector"
	if err := firstErr(nonNegative(fn, "n", n, kDensity), degeneracy(fn, gs, gv)); err != nil {
		return quantity.Quantity{}, err
	}
	return sqrt(n.Scale(4 * math.Pi / float64(gs*gv))), nil
}

// FermiVelocity returns v_F = ħk_F/m in m/s for a parabolic band
// (2.3723e5 m/s for GaAs at 3e11 cm^-2).
func FermiVelocity(n, m quantity.Quantity, gs, gv int) (quantity.Quantity, error) {
	const fn = "fermi_velocity"
	if err := positive(fn, "m", m, kMass); err != nil {
		return quantity.Quantity{}, err
	}
	k, err := FermiWavevector(n, gs, gv)
	if err != nil {
		return quantity.Quantity{}, rename(err, fn)
	}
	return quantity.Div(quantity.Mul(cHbar, k), m), nil
}

// Mobility returns the Drude mobility μ = 1/(e n ρ) in m²/(V s), with ρ the sheet
// resistivity in ohms per square (R_xx W/L for a Hall bar) and n the sheet density;
// both must be positive.
func Mobility(rho, n quantity.Quantity) (quantity.Quantity, error) {
	const fn = "mobility"
	if err := firstErr(positive(fn, "rho", rho, kResistance), positive(fn, "n", n, kDensity)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Scalar(1), quantity.Mul(quantity.Mul(cE, n), rho)), nil
}

// SheetResistance returns R/squares in ohms (per square): the sheet resistivity from a
// four-terminal resistance and the number of squares L/W between the voltage probes.
func SheetResistance(R, squares quantity.Quantity) (quantity.Quantity, error) {
	const fn = "sheet_resistance"
	if err := firstErr(check(fn, "R", R, kResistance), positive(fn, "squares", squares, kNumber)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(R, squares), nil
}

// TransportTime returns the transport (momentum) lifetime τ_t = μ m/e in seconds
// (38.094 ps for μ = 1e6 cm²/(V s), m = 0.067 m_e).
func TransportTime(mu, m quantity.Quantity) (quantity.Quantity, error) {
	const fn = "transport_time"
	if err := firstErr(positive(fn, "mu", mu, kMobility), positive(fn, "m", m, kMass)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(mu, m), cE), nil
}

// MeanFreePath returns l = ħ k_F μ/e in metres, which equals v_F τ_t for a parabolic band
// and holds for graphene too (9.0368 µm at 3e11 cm^-2 and 1e6 cm²/(V s), gs gv = 2).
func MeanFreePath(mu, n quantity.Quantity, gs, gv int) (quantity.Quantity, error) {
	const fn = "mean_free_path"
	if err := positive(fn, "mu", mu, kMobility); err != nil {
		return quantity.Quantity{}, err
	}
	k, err := FermiWavevector(n, gs, gv)
	if err != nil {
		return quantity.Quantity{}, rename(err, fn)
	}
	return quantity.Div(quantity.Mul(quantity.Mul(cHbar, k), mu), cE), nil
}

// HallDensity returns n = 1/(e |dR_xy/dB|) in m^-2 from the low-field Hall slope in Ohm/T
// (3.0000e11 cm^-2 for 2080.5 Ohm/T). The sign of the slope depends on wiring and field
// polarity, so only its magnitude is used.
func HallDensity(slope quantity.Quantity) (quantity.Quantity, error) {
	if err := nonzero("hall_density", "slope", slope, kHallSlope); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Scalar(1), quantity.Mul(cE, abs(slope))), nil
}

// EffectiveBohrRadius returns a_B* = 4π ε0 ε_r ħ²/(m e²) in metres (10.189 nm for GaAs,
// ε_r = 12.9). epsR is the relative permittivity, a pure number.
func EffectiveBohrRadius(m, epsR quantity.Quantity) (quantity.Quantity, error) {
	const fn = "bohr_radius"
	if err := firstErr(positive(fn, "m", m, kMass), positive(fn, "eps_r", epsR, kNumber)); err != nil {
		return quantity.Quantity{}, err
	}
	num := quantity.Mul(quantity.Mul(cEps0, epsR), quantity.Mul(cHbar, cHbar))
	return quantity.Div(num, quantity.Mul(m, quantity.Mul(cE, cE))).Scale(4 * math.Pi), nil
}

// InteractionParameter returns r_s = 1/(sqrt(πn) a_B*), the mean carrier spacing in units
// of the effective Bohr radius (1.0110 for GaAs at 3e11 cm^-2). Ando, Fowler, Stern (1982).
func InteractionParameter(n, m, epsR quantity.Quantity) (quantity.Quantity, error) {
	const fn = "interaction_parameter"
	if err := positive(fn, "n", n, kDensity); err != nil {
		return quantity.Quantity{}, err
	}
	a, err := EffectiveBohrRadius(m, epsR)
	if err != nil {
		return quantity.Quantity{}, rename(err, fn)
	}
	return quantity.Div(quantity.Scalar(1), quantity.Mul(sqrt(n.Scale(math.Pi)), a)), nil
}

// DiracFermiEnergy returns E_F = ħ v_F sqrt(πn) in joules for graphene (gs = gv = 2),
// measured from the Dirac point (116.67 meV at 1e12 cm^-2, v_F = 1e6 m/s).
func DiracFermiEnergy(n, vF quantity.Quantity) (quantity.Quantity, error) {
	const fn = "dirac_fermi_energy"
	if err := firstErr(nonNegative(fn, "n", n, kDensity), positive(fn, "vF", vF, kVelocity)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Mul(quantity.Mul(cHbar, vF), sqrt(n.Scale(math.Pi))), nil
}

// DiracCyclotronMass returns m_c = ħ sqrt(πn)/v_F = E_F/v_F² in kg, the cyclotron mass of
// graphene at density n (0.020519 m_e at 1e12 cm^-2, v_F = 1e6 m/s); use it in
// [ThermalDamping].
func DiracCyclotronMass(n, vF quantity.Quantity) (quantity.Quantity, error) {
	const fn = "dirac_cyclotron_mass"
	if err := firstErr(positive(fn, "n", n, kDensity), positive(fn, "vF", vF, kVelocity)); err != nil {
		return quantity.Quantity{}, err
	}
	return quantity.Div(quantity.Mul(cHbar, sqrt(n.Scale(math.Pi))), vF), nil
}

// nonNegative checks the dimension and that the value is finite and >= 0.
func nonNegative(fn, arg string, q quantity.Quantity, k kind) error {
	if err := check(fn, arg, q, k); err != nil {
		return err
	}
	if !(q.Value() >= 0) || math.IsInf(q.Value(), 0) {
		return domain(fn, arg, "must not be negative, got %g (SI)", q.Value())
	}
	return nil
}
