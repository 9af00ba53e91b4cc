// Package band solves the one-dimensional self-consistent Schrödinger–Poisson problem of a
// semiconductor heterostructure wafer, and gives the quick analytic estimate of a
// modulation-doped two-dimensional electron gas beside it.
//
// # What it computes
//
// A [Stack] lists the layers of a wafer from the surface down (material, thickness, doping),
// the surface condition (a pinned free surface or a biased Schottky gate) and the substrate.
// [Solve] discretises it on a uniform finite-difference grid and iterates
//
//   - the BenDaniel–Duke effective-mass Schrödinger equation
//     −ħ²/2 d/dz[(1/m*(z)) dψ/dz] + E_c(z) ψ = E ψ for the conduction-band subbands,
//   - Fermi–Dirac filling of each subband with its 2D density of states m*/(πħ²),
//   - ionised donors N_D⁺ = N_D/(1 + 2 exp((E_F − E_D)/k_BT)),
//   - Poisson's equation d/dz(ε dφ/dz) = −ρ in finite-volume form,
//
// with the predictor–corrector scheme of Trellakis et al. (J. Appl. Phys. 81, 7880 (1997)):
// the Poisson step uses the electron density predicted from the current wavefunctions with
// the subband energies shifted by the local potential change, solved by a damped Newton
// method. The Fermi level of the grounded 2DEG is the zero of energy.
//
// [Analytic] is the textbook depletion-approximation estimate for a delta-doped or uniformly
// doped barrier behind an undoped spacer, iterated self-consistently with the Fang–Howard
// ground-state energy.
//
// # Band parameters
//
// Band edges (Γ gaps and valence-band offsets) come from a table in this package ([Lookup]),
// each value with its source: Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001).
// The Γ masses and static permittivities are taken from cleave/calc/materials, the one
// table of them (Vurgaftman et al. for the masses, the Ioffe handbook for the permittivity
// of Al(x)Ga(1−x)As), with their sources. GaAs, AlAs and Al(x)Ga(1−x)As are known; the table
// is keyed by the element string of the alloy so that InAs, InGaAs or Ge/SiGe can be added
// as further rows.
//
// # What it leaves out
//
// Only the Γ conduction band is modelled: no holes, no X or L valleys (so Al(x)Ga(1−x)As with
// x above about 0.4, where the X valley is lowest, is treated with its Γ edge), no
// nonparabolicity, no exchange–correlation term, no strain. Si donors in Al(x)Ga(1−x)As with
// x above about 0.2 form DX centres, whose deep level and persistent photoconductivity are not
// modelled; [Options].DonorDepthEV lets the caller replace the shallow hydrogenic donor level
// by an effective deep level. Acceptors are taken as fully ionised. The temperature is a
// smearing parameter as much as a physical one: see [Options].TemperatureK.
//
// # The deep end
//
// The grid ends SubstrateM below the last layer with zero electric field, and wavefunctions
// vanish there. Without background acceptors the band of an undoped buffer flattens only a
// few meV above the ground subband, so states of the buffer (which the finite grid turns into
// closely spaced box states) may hold a few electrons at finite temperature. Real buffers are
// weakly p-type; writing that background into the buffer's doping (for example
// "C 1e14 cm^-3") gives the depletion charge N_depl of the textbook models.
package band
