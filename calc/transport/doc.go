// Package transport reads magnetotransport data files of Hall bars and van der
// Pauw samples and runs the standard analyses on them, each with a standard
// uncertainty and a list of warnings. It also generates synthetic sweeps from
// published models, for tests and for the demo notebook.
//
// Everything inside is float64 in coherent SI units (T, Ohm, K, m^-2, kg, s);
// units are converted once, when a file is read. The package does not know
// about calc blocks, notebooks or git, and it must not import package calc
// (calc/library imports it and wraps the analyses as calc functions).
//
// # Data files
//
// [Read] takes delimited text as instruments and measurement scripts write it:
// comment lines before the header ("#", "%", ";", "//" or "!"; "key: value" and
// "key = value" comments are kept in order as [Dataset.Meta], other comments with
// an empty key, a time of day is never a key), then one header row, then one row of
// values per line. The delimiter is taken from the header row: a tab if it has one,
// else a comma, else a semicolon, else runs of blanks. Header names may carry a
// unit, "B (mT)" or "Rxx [kOhm]", or a unit suffix from a short list ("field_T",
// "X1_V", "I_nA"), parsed by the calc unit parser (package quantity); values are
// scaled to SI. Columns get a role from their name (RoleField for "B", "Field",
// "Magnetic Field", ...; see the Role constants) and are found by name, by name
// without the suffix, or by role, case-insensitively ([Dataset.Col]). A column with
// a role or a resistance-like name (Rxx_X) is checked for the dimension of its
// bracketed unit; a suffix unit that contradicts the role its name suggests drops
// the role instead ("t_s" is a time, not a temperature); a column without a unit is
// taken to be in the SI unit of its role. Words, times of day and dates in a column
// without a unit make it a text column. A column whose first
// value is a word is kept as labels ([Column.Text]: a sweep direction), never parsed
// as numbers. Blank lines and comment lines after the header are skipped. An empty
// field or NaN is a missing value, stored as NaN so that all columns keep the same
// length; infinities are errors, and so are decimal commas without a layout.
//
// [ReadLayout] reads a file with a [Layout] ([ParseLayout] reads one from YAML):
// comment prefixes, delimiter, decimal comma, the line of the header or none,
// each column's role and unit, columns to ignore, and derived columns R = V/I from
// a lock-in's X and Y channels and a current column, a fixed current or the
// cooldown's excitation current. [Dataset.WithFieldOffset] adds a magnet's
// remanent field to the field column. [WriteCSV] writes a data set back in the
// format Read reads.
//
// Missing values are dropped pair-wise at analysis time: an analysis of Rxy
// against B skips the rows where B or Rxy is NaN, whatever the other columns hold.
//
// Read streams the input line by line with its own scanner (no encoding/csv,
// no allocation per row) and computes the SHA-256 of the bytes read as
// [Dataset.Hash], which results carry as DataHash so that a changed file makes
// a stored result stale. Errors about the content are [*ParseError] values,
// "file:line:col: message", wrapping a sentinel such as [ErrUnknownUnit] or
// [ErrUnitDim]; a unit of the wrong kind is named in trade terms ("unit "Ohm"
// of column "B" is a resistance; expected a magnetic field (T)").
//
// # Analyses
//
// Of a field sweep ([Dataset]):
//
//   - [HallDensity]: n = 1/(e|dR_xy/dB|) from a straight-line fit;
//   - [ZeroField]: a column's value at B = 0 from a local fit;
//   - [Symmetrize] and [Antisymmetrize]: the even and odd parts over ±B on one
//     |B| grid, with the field offset that best explains the removed part;
//   - [SdHDensity]: the Shubnikov–de Haas frequency of R_xx against 1/B
//     (background removal, Fourier transform, least-squares refinement) and
//     n = g_s g_v (e/h) f_B;
//   - [QuantumLifetime]: the Dingle analysis, τ_q, the Dingle temperature,
//     the quantum mobility and, with [WithMobility], the ratio τ_t/τ_q;
//   - [LKMassSweeps]: the effective mass from sweeps at several temperatures,
//     an LK fit at each extremum of the oscillation and their weighted mean;
//   - [Plateaus]: quantum Hall plateaus in R_xy with their filling factors and
//     deviations from R_K/ν;
//   - [CheckSweep]: sanity checks of a raw sweep that belong to no one analysis.
//
// Of numbers taken from results or typed in:
//
//   - [LKMassTable]: the Lifshitz–Kosevich fit of amplitudes against T at one field;
//   - [LandauFan]: density and intercept from filling factors against 1/B;
//   - [GateCapacitance] and [ParallelPlateCapacitance]: n(V_g) and its
//     geometric expectation; [MobilityPowerLaw]: μ ∝ n^α;
//   - [VdPHallDensity], [VdPHallDensityPolarity] and [VdPSheet]: van der Pauw
//     density and sheet resistance;
//   - [CompareDensities]: Hall against SdH density; [Scorecard]: per-wafer
//     summaries of density and mobility, dark and illuminated.
//
// [SdHFrequency], [DensityFromSdH], [ThermalDamping] and [DingleFactor] are
// the closed forms the analyses use. Each function's comment states its
// method, its units and the reference it follows, by name or as a key of
// calc/SOURCES.md ([src:KEY]).
//
// # Uncertainties
//
// Each result holds its values as [Estimate] (value and standard uncertainty).
// Fits go through [FitPoly], a weighted or unweighted polynomial least-squares
// fit; without weights its covariance is scaled by the residuals, with
// weights (WithSigma, or bin counts in SdHDensity) it is that of the weights,
// scaled by sqrt(χ²/DoF) where the analysis says so. Non-linear fits (the SdH
// refinement, the LK fit) take σ from the covariance σ̂²(JᵀWJ)⁻¹ at the
// optimum. Derived values carry the relative uncertainty of the fitted one
// (first-order propagation); independent readings are combined in quadrature.
// The SdH, Dingle and LK uncertainties are tested for coverage over 50 seeded
// synthetic sweeps each: how often the true value lies within ±2σ (95 % for
// an exact σ; each test states the fraction it requires).
//
// # Warnings
//
// Bad arguments and too few points are errors (sentinels [ErrBadArgument],
// [ErrTooFewPoints], [ErrNoField], [ErrNoOscillation]); doubtful data gives a
// result with [Warning] values. A warning's Code is stable and meant for
// programs (the review report), its Msg for people. The codes are the Warn...
// constants: fit shape and offsets ([WarnCurvature], [WarnEvenPart],
// [WarnOddPart], [WarnOffset], [WarnXYAtZero], [WarnExtrapolated],
// [WarnNegative]), data quality ([WarnFewPoints], [WarnOutOfPhase],
// [WarnGap], [WarnDensityRange]), the SdH spectrum ([WarnWeakPeak],
// [WarnHarmonic], [WarnDisagree]), the quantum Hall regime ([WarnRxxNotZero],
// [WarnPlateauDev], [WarnFilling], [WarnFanIntercept]), the LK and Dingle
// analyses ([WarnSaturation], [WarnMass], [WarnDingleRatio], [WarnIntercept],
// [WarnFrequency], [WarnInsignificant]), gates ([WarnGateCurvature]) and van
// der Pauw samples ([WarnReciprocity], [WarnVdPRatio]).
//
// # Options
//
// Options ([Option]) are shared by all analyses, and each ignores those that
// do not apply to it: columns ([WithField], [WithColumns], [WithSigma]),
// the SdH analysis ([WithValleyDegeneracy], [WithBackground], [WithPadding]),
// [WithPoints] for ZeroField, and the expectations the warnings compare with
// ([WithMobility], [WithExpectedMass], [WithDensity]). A new analysis adds
// its own With... functions in the same style.
//
// # Synthetic sweeps
//
// [Sweep] samples [SweepParams.Resistivity]: the Drude tensor of the main
// channel, optionally a parallel Drude channel ([ParallelChannel]), and the low-field
// SdH form Δρ_xx/ρ_0 = 4 (X/sinh X) exp(−π/(ω_c τ_q)) cos(2π f_B/B − π), with
// Gaussian noise from a seeded generator, an R_xx pick-up into R_xy and
// out-of-phase lock-in columns on request. With Plateaus set, a smoothed-step
// model gives the look of the quantum Hall regime. Its limits: the low-field
// form is not clipped and holds only while the oscillation is small; the
// plateau model is not a microscopic theory; spin splitting is not modelled
// (g_s = 2 gives even ν only); there is no classical magnetoresistance of
// the main channel and no temperature dependence other than X/sinh X.
//
// # Sign convention
//
// With B along +z, the current along +x and ρ_xy = E_y/j_x, the Drude model
// gives ρ_xy = B/(q n): a negative Hall slope means electrons [src:IHN2010].
// Densities always use |slope|.
//
// # Not covered here
//
// Band structure and expected densities (package band), material parameters
// (package materials), physical constants (package constants), and anything
// about notebooks: which file belongs to which device and cooldown, and where
// results are stored, is the caller's business.
package transport
