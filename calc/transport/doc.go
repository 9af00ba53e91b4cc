// Package transport reads magnetotransport data files and runs the standard
// analyses on them: Hall density, (anti)symmetrisation over ±B, the value at
// zero field, and the Shubnikov–de Haas (SdH) density from a Fourier analysis
// against 1/B. It also generates synthetic sweeps from published models, for
// tests and for the demo notebook.
//
// Everything inside is float64 in coherent SI units (T, Ohm, K, m^-2); units
// are converted once, when a file is read. The package does not know about
// calc blocks, notebooks or git, and it must not import package calc (calc
// imports it).
//
// # Data files
//
// [Read] takes delimited text: any number of "# key: value" lines (kept in
// order as [Dataset.Meta]; a "#" line without a colon is kept with an empty key),
// then one header row, then one row of numbers per line. The delimiter is taken
// from the header row: a tab if it has one, else a comma, else a semicolon,
// else runs of blanks. Header names may carry a unit, "B (mT)" or "Rxx [kOhm]",
// parsed by the calc unit parser (package quantity); values are scaled to SI.
// Columns are found by name, case-insensitively ([Dataset.Col]). Known names
// are checked for the dimension of their unit: B/Field (magnetic field),
// names starting with Rxx, Rxy, Ryx, Ryy, Rhoxx, Rhoxy (resistance), and
// T/Temp/Temperature/Tmc/Tsample (temperature); a known column without a unit
// is taken to be in T, Ohm or K. Blank lines and "#" lines after the header are
// skipped. An empty field or NaN is a missing value, stored as NaN so that all
// columns keep the same length; decimal commas and infinities are errors.
//
// Missing values are dropped pair-wise at analysis time: an analysis of Rxy
// against B skips the rows where B or Rxy is NaN, whatever the other columns hold.
//
// Read streams the input line by line with its own scanner (no encoding/csv,
// no allocation per row) and computes the SHA-256 of the bytes read as
// [Dataset.Hash], which results carry as DataHash so that a changed file makes
// a stored result stale. Errors about the content are [*ParseError] values,
// "file:line:col: message", wrapping a sentinel such as [ErrUnknownUnit].
//
// # Results
//
// Each analysis returns a result struct holding the value as an [Estimate]
// (value and standard uncertainty), the columns, the field range, the points
// used, the data hash and a list of [Warning] values (sanity checks a reviewer
// wants to see; codes such as [WarnCurvature] are stable). Bad arguments and
// too few points are errors; doubtful data is a warning.
//
// # Building blocks for further analyses
//
// [FitPoly] is a weighted or unweighted polynomial least-squares fit with a
// residual-based covariance ([PolyFit.CoefEstimate], [PolyFit.EvalEstimate]).
// [Symmetrize] and [Antisymmetrize] put +B and −B data on one |B| grid.
// [SdHDensity] exposes its spectrum; [SdHFrequency] and [DensityFromSdH]
// convert between density and SdH frequency; [SweepParams.Resistivity] is the
// model behind [Sweep] and can generate test data for Dingle, Lifshitz–Kosevich
// and plateau analyses (set Temperature or QuantumLifetime and sample it).
// Options ([Option]) are shared by all analyses; new analyses should add their
// own With... functions in the same style and ignore the others.
//
// # Sign convention
//
// With B along +z, the current along +x and ρ_xy = E_y/j_x, the Drude model
// gives ρ_xy = B/(q n): a negative Hall slope means electrons (REFERENCE §2.6).
// The density always uses |slope|.
//
// # Not covered here
//
// Quantum Hall plateau detection, the Lifshitz–Kosevich mass, the Dingle
// analysis, van der Pauw Hall measurements and gate series live in other
// files of this package.
package transport
