// Package compute ties the notebook model to the calc engine: it evaluates the calc blocks of
// every Markdown file of a notebook, with each entry's front matter and its ancestors' as
// names (`device.width`, `mask.probes`, `wafer.layers`, `geometry.width`), data files read
// through the notebook's file system, and results cached under the git directory.
//
// It is what `cleave calc`, `cleave check` and `cleave eval` call, and what runs over the git
// index or a commit: [Run] takes any fs.FS and returns typed results (each stale or failed line
// with its position, old and new text; the file with its result regions brought up to date;
// the invalid entries) and writes nothing. [WorkTree] is the one layer that knows about a
// folder on disk: it writes results back through [calcblock.WriteAtomic] (which refuses a file
// changed since it was read) and keeps the tool's own state under the git directory: the
// [Cache] (one file) and the digest of the notebook as the last check without problems saw it,
// which lets a check of an unchanged notebook return at once.
//
// # The cache never changes an answer
//
// A file's cached results are keyed by the engine's salt, its path and its person-owned bytes
// ([calcblock.InputDigest]), and stored with every question its evaluation asked of the
// notebook and the answer it got: the files of other entries it read (their person-owned
// bytes), which file holds an id, which entry is the nearest of a kind, which cooldowns a
// scorecard gathers, the bytes of each data file as read, the symbolic links on the way. The
// results are reused only when every answer is still the same (see view.go). The differential
// test (TestCacheDifferential) checks on random edit sequences that a run with the cache prints
// exactly what a run without it prints.
//
// # Names a calc block can read
//
//   - the entry's own front-matter fields by name (`width`, `design_density`), unless a
//     variable of the same name is defined;
//   - each kind (`wafer`, `piece`, `mask`, `process`, `device`, `cooldown`) as a record of the
//     nearest entry of that kind in the entry's lineage (itself first, then its ancestors
//     nearest first); nested maps become records and lists become lists; a scalar that parses
//     as a quantity becomes one, anything else a string;
//   - `wafer.layers`: the layer table of the nearest wafer, surface first, each row a record
//     with `index` (1 for the surface layer), `layer`, `material`, `thickness` and `doping`;
//   - `geometry`: the Hall-bar geometry calculations should use: a device's `as_built`
//     width and probes where given, the mask's drawn ones otherwise;
//   - `squares(a, b)`: the number of squares between probes a and b of that geometry, and
//     `hall_pairs()`: the probes facing each other across the bar;
//   - `scorecard()`: what the cooldowns descending from the entry measured (density and
//     mobility, dark and illuminated, with base temperatures), each cooldown evaluated
//     afresh rather than read from its result regions.
package compute
