package transport

// gaas returns sweep parameters for an invented GaAs/AlGaAs 2DEG: n = 3e11 cm^-2,
// μ = 1e6 cm^2/(V s), m* = 0.067 m_e [src:VURGAFTMAN2001],
// τ_q = 1 ps, T = 1.5 K, a 100 × 500 µm Hall bar (5 squares), 0–1 T.
func gaas() SweepParams {
	return SweepParams{
		Density: 3e15, Mobility: 100, MassRatio: 0.067, QuantumLifetime: 1e-12,
		Temperature: 1.5, Squares: 5, BStart: 0, BEnd: 1, Points: 2001, Seed: 1,
	}
}
