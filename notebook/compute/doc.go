// Package compute ties the notebook model to the calc engine: it evaluates the calc blocks of
// every Markdown file of a notebook, with each entry's front matter and its ancestors' as
// names (`device.width`, `mask.probes`, `wafer.layers`, `geometry.width`), data files read
// through the notebook's file system, and results cached under the git directory.
//
// It is what `cleave calc`, `cleave check` and `cleave eval` call. It writes notebook files only
// through [calcblock.WriteAtomic], which refuses a file that changed on disk since it was read.
// Its own state lives under the git directory: the calc cache ([calcblock.OpenCache]) and the
// digest of the notebook as the last check without problems saw it ([RememberGoodCheck]), which
// lets `cleave check` skip a notebook that has not changed since ([UnchangedSinceGoodCheck]).
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
