package transport_test

import (
	"fmt"

	"cleave/calc/transport"
)

// Amplitudes of one SdH extremum at 1 T measured at five temperatures
// (invented values, generated from the Lifshitz–Kosevich form with
// m* = 0.067 m_e A0 = 4 Ohm, and rounded to 0.01 Ohm).
func ExampleLKMassTable() {
	T := []float64{0.5, 1, 1.5, 2.5, 4.2}
	A := []float64{3.84, 3.42, 2.85, 1.69, 0.53} // Ohm
	r, err := transport.LKMassTable(T, A, 1,
		transport.WithExpectedMass(transport.GaAsMassRange[0], transport.GaAsMassRange[1]))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("m*/m_e = %.4f ± %.4f, A0 = %.2f Ohm, %d warnings\n",
		r.MassRatio.Value, r.MassRatio.Uncertainty, r.A0.Value, len(r.Warnings))
	_, err = transport.LKMassTable(T[:2], A[:2], 1)
	fmt.Println(err)
	// Output:
	// m*/m_e = 0.0670 ± 0.0001, A0 = 4.00 Ohm, 0 warnings
	// LK mass at 1 T: 2 temperatures; need at least 3: too few points
}

// A synthetic sweep of an invented GaAs 2DEG (n = 3e11 cm^-2, μ = 1e6
// cm^2/(V s), τ_q = 1 ps) at 1.5 K, analysed between 0.2 and 1 T.
func ExampleQuantumLifetime() {
	d, err := transport.Sweep(transport.SweepParams{
		Density: 3e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 1e-12,
		Temperature: 1.5, Squares: 5, BStart: 0.15, BEnd: 1, Points: 6000, Noise: 0.05, Seed: 2,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	const me = 9.1093837015e-31 // kg, CODATA 2018
	r, err := transport.QuantumLifetime(d, 0.2, 1, 0.067*me, 3e15, 1.5, transport.WithMobility(100, 1))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("τ_q = %.2f ps, T_D = %.2f K, τ_t/τ_q = %.0f, intercept %.2f\n",
		r.QuantumLifetime.Value*1e12, r.DingleTemperature.Value, r.DingleRatio.Value, r.Intercept.Value)
	// Output:
	// τ_q = 1.00 ps, T_D = 1.22 K, τ_t/τ_q = 38, intercept 0.00
}
