package physics

import (
	"errors"
	"math"
	"testing"

	"cleave/calc/quantity"
)

// FuzzFunctions feeds arbitrary values (including NaN, ±Inf, zero and negatives) to every
// function. Property: no panic; an error is always an *ArgError; a result without error
// has the documented dimension.
func FuzzFunctions(f *testing.F) {
	f.Add(1.0, 3e15, 0.067, 2, 1, 1e-12)
	f.Add(0.0, -1.0, math.NaN(), 0, -1, math.Inf(1))
	f.Add(-45.0, 1e300, 1e-300, 1000, 3, 0.0)
	f.Add(math.Inf(-1), 0.0, 5.0, -3, 0, -1e-12)
	f.Fuzz(func(t *testing.T, x, y, z float64, N, g int, w float64) {
		T := quantity.MustUnit("T").D
		J := quantity.MustUnit("J").D
		m2 := quantity.MustUnit("m^-2").D
		ohm := quantity.MustUnit("Ohm").D
		mob := quantity.MustUnit("m^2/(V s)").D
		B := quantity.New(x, T)
		n := quantity.New(y, m2)
		m := EffectiveMass(z)
		num := quantity.Scalar(w)
		tau := quantity.New(w, quantity.Time)
		vF := quantity.New(y, quantity.MustUnit("m/s").D)
		gs, gv := g%5, (g/5)%3
		N %= 1000
		calls := []struct {
			name string
			dim  quantity.Dim
			call func() (quantity.Quantity, error)
		}{
			{"magnetic_length", quantity.Length, func() (quantity.Quantity, error) { return MagneticLength(B) }},
			{"cyclotron_frequency", quantity.MustUnit("s^-1").D, func() (quantity.Quantity, error) { return CyclotronFrequency(B, m) }},
			{"landau_level", J, func() (quantity.Quantity, error) { return LandauLevel(N, B, m) }},
			{"filling_factor", quantity.Dimensionless, func() (quantity.Quantity, error) { return FillingFactor(n, B) }},
			{"field_at_filling", T, func() (quantity.Quantity, error) { return FieldAtFilling(n, num) }},
			{"zeeman_energy", J, func() (quantity.Quantity, error) { return ZeemanEnergy(B, num) }},
			{"hall_resistance", ohm, func() (quantity.Quantity, error) { return HallResistance(num) }},
			{"dirac_landau_level", J, func() (quantity.Quantity, error) { return DiracLandauLevel(N, B, vF) }},
			{"sdh_frequency", T, func() (quantity.Quantity, error) { return SdHFrequency(n, gs, gv) }},
			{"thermal_damping", quantity.Dimensionless, func() (quantity.Quantity, error) {
				return ThermalDamping(quantity.New(w, quantity.Temperature), B, m)
			}},
			{"dingle_factor", quantity.Dimensionless, func() (quantity.Quantity, error) { return DingleFactor(B, tau, m) }},
			{"dingle_temperature", quantity.Temperature, func() (quantity.Quantity, error) { return DingleTemperature(tau) }},
			{"quantum_mobility", mob, func() (quantity.Quantity, error) { return QuantumMobility(tau, m) }},
			{"fermi_energy", J, func() (quantity.Quantity, error) { return FermiEnergy(n, m, gs, gv) }},
			{"fermi_wavevector", quantity.MustUnit("m^-1").D, func() (quantity.Quantity, error) { return FermiWavevector(n, gs, gv) }},
			{"fermi_velocity", quantity.MustUnit("m/s").D, func() (quantity.Quantity, error) { return FermiVelocity(n, m, gs, gv) }},
			{"mobility", mob, func() (quantity.Quantity, error) { return Mobility(quantity.New(x, ohm), n) }},
			{"transport_time", quantity.Time, func() (quantity.Quantity, error) { return TransportTime(quantity.New(x, mob), m) }},
			{"mean_free_path", quantity.Length, func() (quantity.Quantity, error) { return MeanFreePath(quantity.New(x, mob), n, gs, gv) }},
			{"hall_density", m2, func() (quantity.Quantity, error) { return HallDensity(quantity.New(x, quantity.MustUnit("Ohm/T").D)) }},
			{"vdp", ohm, func() (quantity.Quantity, error) {
				return VdpSheetResistance(quantity.New(x, ohm), quantity.New(y, ohm))
			}},
			{"interaction_parameter", quantity.Dimensionless, func() (quantity.Quantity, error) { return InteractionParameter(n, m, num) }},
			{"dirac_fermi_energy", J, func() (quantity.Quantity, error) {
				return DiracFermiEnergy(n, quantity.New(x, quantity.MustUnit("m/s").D))
			}},
			{"dirac_cyclotron_mass", quantity.Mass, func() (quantity.Quantity, error) {
				return DiracCyclotronMass(n, quantity.New(x, quantity.MustUnit("m/s").D))
			}},
			{"squares", quantity.Dimensionless, func() (quantity.Quantity, error) {
				h := HallBar{Width: quantity.New(w, quantity.Length), Probes: []Probe{
					{Name: "a", Position: quantity.New(x, quantity.Length), Side: "top"},
					{Name: "b", Position: quantity.New(y, quantity.Length), ArmWidth: quantity.New(z, quantity.Length), Side: "bottom"},
				}}
				_ = h.Warnings()
				_ = h.HallPairs()
				return h.Squares("a", "b")
			}},
		}
		for _, c := range calls {
			r, err := c.call()
			if err != nil {
				var ae *ArgError
				if !errors.As(err, &ae) {
					t.Fatalf("%s: error %v is not an *ArgError", c.name, err)
				}
				continue
			}
			if r.Dim() != c.dim {
				t.Fatalf("%s: result dimension %v, want %v", c.name, r.Dim(), c.dim)
			}
		}
	})
}
