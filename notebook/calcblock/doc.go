// Package calcblock finds calc blocks in a Markdown notebook file and
// rewrites their result regions, leaving every other byte of the file alone.
//
// # Calc blocks and result regions
//
// A calc block is a fenced code block (backticks or tildes, any length of
// three or more) whose info string's first word is `cleave`. Every content line
// is either blank, a comment (its first non-blank character is `#`, and it is
// not a result marker), or code. The tool owns one part of each code line, the
// result region: from the first `#~` to the end of the line's content, not
// including the line ending. Everything before the region, and every byte of
// the line's container prefix (`> `, list indentation, tabs), belongs to the
// person and is never touched.
//
// Rewriting is done from byte offsets into the raw file ([mdsrc.Source.Raw]),
// line by line, never through goldmark's Segment.Value (which adds padding
// for tabs and a newline at end of file):
//
//   - a line with a region `#~ old` becomes `#~ new`, keeping whatever
//     whitespace preceded `#~`; when new equals old nothing is written, so
//     trailing spaces after an unchanged result survive;
//   - a code line without a region gets two spaces and `#~ new` appended
//     before its line ending (LF or CRLF, whichever the line has);
//   - blank and comment lines get nothing.
//
// A result never contains a line break (CR and LF become spaces) and never a
// run of the fence character as long as the fence (each character of such a
// run is preceded by a backslash), so a result cannot end its block.
//
// A block that is not closed by a matching fence (closed by the end of the
// file or of its container) is read-only: its lines are still evaluated, so
// later blocks see its names, but nothing in it is rewritten, and it is
// reported as an error.
//
// # Failed evaluations
//
// A line whose evaluation fails shows `#~ error: <message>`. If the line held
// a good value before, that value stays visible: `#~ error: <message> (was:
// <old>)`. A later run that fails the same way writes the same text, so the
// file does not churn; a run that succeeds replaces the whole region with the
// value. Every failed line is listed in [FileReport.Errors], so a check fails
// for as long as an error is shown, even though the region is not stale. To
// keep this round trip unambiguous, the text `(was:` inside an error message is
// written as `(was :`.
//
// # Cache
//
// [RecomputeWith] can skip evaluation entirely when nothing a file's results
// depend on has changed. Entries live under `<gitdir>/cleave/cache/` (see
// [GitDir] and [OpenCache]) and are keyed by SHA-256 hashes:
//
//   - the text key hashes the cache format version [CacheVersion], the
//     caller's salt (the calc engine's version), and every code line of every
//     calc block in the file, each with its line number (error messages may
//     mention line numbers);
//   - the entry stored under the text key is the list of dependencies the
//     evaluator reported ([Evaluator.Deps]) the last time this text was
//     evaluated;
//   - the full key hashes the text key and each of those dependencies
//     together with its current value, as given by the caller's resolver
//     (front-matter field values, content hashes of data files);
//   - the entry stored under the full key is the list of results, one per
//     code line.
//
// So a lookup first re-hashes the dependencies of the previous evaluation and
// only then looks for results. This is sound because evaluation is
// deterministic: with the same text and the same values for every dependency
// it read, the evaluator would read the same dependencies again and produce
// the same results. A dependency that cannot be resolved, a missing entry, an
// entry that fails its checksum or has the wrong number of results all count
// as a miss, and the file is evaluated in full; deleting the cache therefore
// changes no result, only the time taken.
//
// The cache is file-level, not block-level: the [Evaluator] carries names from
// earlier blocks into later ones and offers no way to restore that state from
// cached display strings, so a change anywhere in a file's calc blocks
// re-evaluates the whole file.
//
// Each entry is a file of its own; in addition [Cache.Flush] writes the
// entries one session used into a single pack file in the same directory,
// which the next session reads at its first lookup instead of one file per
// entry. The pack holds only what the last session used; entry files are
// never evicted, so delete the directory to reclaim space (results stay the
// same, only the next run is slower).
//
// # Writing files
//
// [WriteAtomic] replaces a file only if it still holds the bytes that were
// read, through a temporary file in the same directory, keeping the file mode,
// with fsync before the rename and of the directory after it.
package calcblock
