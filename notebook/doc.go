// Package notebook is the model of a cleave notebook: a tree of Markdown files
// in a git repository, some of which are entries (files whose YAML front matter
// carries an id and a kind).
//
// # What it does
//
// [Load] walks any [io/fs.FS] (a working tree, the git index, a commit tree) for
// *.md files, parses each with package mdsrc, decodes the front matter into
// yaml.Node values so every field keeps its file line and column, reads a wafer's
// layer table, and builds the lineage graph (wafer → piece → process → device →
// cooldown, with masks feeding devices). [Notebook.Validate] reports every
// problem it finds (duplicate ids, dangling links, links to the wrong kind,
// cycles, malformed front matter or layer tables, quantity fields without a unit
// or of the wrong dimension) as file:line:col messages; it never stops at the
// first one. [Notebook.Tree] prints the lineage, [Notebook.CheckNew] and
// [DefaultPath] support creating entries.
//
// # Kinds and fields
//
// The six kinds and their fields are described by [Schema]. Fields not in the
// schema are allowed and kept (free fields). A field left empty (`width:` with no
// value) counts as not given. Quantities are strings with units, parsed by
// quantity.ParseQuantity; a bare number in a quantity field is a problem unless
// the field is dimensionless.
//
// # What it leaves out
//
// It does not evaluate calc blocks, rewrite files, or talk to git; those live in
// notebook/calcblock, the hooks package and the command.
package notebook
