// Package band solves the one-dimensional self-consistent Schrödinger–Poisson problem of a
// semiconductor heterostructure wafer, sorts the electrons into the channel, doping wells and
// parasitic channels, and gives the quick analytic estimate of a modulation-doped single
// heterojunction beside it.
//
// # What it computes
//
// A [Stack] lists the layers of a wafer from the surface down (material, thickness, doping),
// the surface condition (a pinned free surface or a biased Schottky gate) and the boundary
// below the layers ([Bottom]). [Solve] discretises it on a uniform finite-difference grid and
// iterates
//
//   - the BenDaniel–Duke effective-mass Schrödinger equation
//     −ħ²/2 d/dz[(1/m_z(z)) dψ/dz] + E_c(z) ψ = E ψ for each conduction-band valley (Γ, X_z,
//     X_xy, L; see [Valley]), each on the part of the grid where its edge comes near E_F,
//   - Fermi–Dirac filling of each subband with its 2D density of states g_v m_d/(πħ²),
//   - ionised donors N_D⁺ = N_D/(1 + 2 exp((E_F − E_D)/k_BT)),
//   - Poisson's equation d/dz(ε dφ/dz) = −ρ in finite-volume form,
//
// with the predictor–corrector scheme of Trellakis et al. (J. Appl. Phys. 81, 7880 (1997)):
// the Poisson step uses the electron density predicted from the current wavefunctions with
// the subband energies shifted by the local potential change, solved by a damped Newton
// method. The Fermi level of the grounded 2DEG is the zero of energy.
//
// [Expect] solves a stack twice, cooled in the dark (Si in Al(x)Ga(1−x)As with x ≥ 0.22 at
// the DX level) and after illumination (shallow donors: persistent photoconductivity), and
// adds [Analytic], the depletion-approximation estimate of a delta-doped or uniformly doped
// barrier behind an undoped spacer with the pinned surface, iterated with the Fang–Howard
// ground-state energy. The estimate applies only to a single heterojunction; for a quantum
// well, doping wells or several channels [AnalyticInputFor] says why not.
//
// # Where the electrons are
//
// Consecutive layers with the same lowest conduction edge form a [Region]. A region below both
// neighbours is a well: the topmost is the cap, a narrow one (≤ 10 nm) with donors is a doping
// well, a layer named channel, QW, well or 2DEG is the channel, and otherwise the undoped well
// nearest the donors is. Each subband belongs to the region where its |ψ|² peaks; X states of
// a thin AlAs cladding and the notches a doping well's charge bends into the barrier beside it
// count with that doping well, and states deep in a thick channel layer (more than 100 nm from
// its interfaces) count as a parasitic well. Donors inside doping wells are taken as ionised,
// their electrons in the well's own subbands, which screen. Solution.Warnings names electrons
// in a parasitic well or barrier, in the cap, and un-ionised shallow donors above the Mott
// density (parallel conduction in a doping layer), each with where and how many.
//
// # Band parameters
//
// Band edges at Γ, X and L, the X and L masses, lattice constants, deformation potentials and
// elastic constants come from this package's table ([Lookup]): Vurgaftman, Meyer & Ram-Mohan,
// J. Appl. Phys. 89, 5815 (2001), for GaAs, AlAs, InAs, InP, AlSb and the alloys
// Al(x)Ga(1−x)As, In(x)Ga(1−x)As and In(x)Al(1−x)As at any x. The Γ masses and static
// permittivities are taken from cleave/calc/materials, the one table of them, with their
// sources. Layers are taken as coherent on the lattice of the last layer (the buffer); a
// mismatch above 0.2 % shifts the Γ edge by the hydrostatic deformation potential.
//
// # What it leaves out
//
// No holes, no nonparabolicity, no exchange–correlation term. Shear strain, which splits the
// X and L valleys (in AlAs on GaAs it lowers the in-plane X valleys by some meV; from memory),
// is not modelled:
// only the hydrostatic shift of the Γ edge is. The DX level is an effective depth below the
// local conduction band (DefaultDXDepthEV, or Options.DonorDepthEV); donors in AlAs use the
// hydrogenic level of the Γ mass. Acceptors are taken as fully ionised. The temperature is a
// smearing parameter as much as a physical one: see [Options].TemperatureK.
//
// # The deep end
//
// By default the layers sit on a semi-insulating substrate whose Fermi level is pinned
// DefaultSubstratePinEV below the conduction band at the top of the substrate, where the grid
// ends ([BottomPinned]). [BottomBulk] instead assumes a p-type background in every undoped
// layer and joins the grid to the neutral bulk through a depletion layer. [BottomZeroField]
// ends the grid in the substrate with zero field: the band of an undoped buffer then flattens
// a few meV above the ground subband and its box states hold electrons a real sample does not
// have, which the parasitic-channel warning reports.
package band
