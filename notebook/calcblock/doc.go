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
// # What a person owns
//
// [InputDigest] hashes every byte of a file except the result regions and the
// blanks at the end of code lines: the bytes that can change a result. The
// engine (notebook/compute) keys its cache by it, so writing results never
// invalidates anything, and [Line.Input] is the code the evaluator is given
// (without those trailing blanks), so nothing the digest leaves out can reach
// an evaluation.
//
// # Writing files
//
// [WriteAtomic] replaces a file only if it still holds the bytes that were
// read, through a temporary file in the same directory, keeping the file mode,
// with fsync before the swap and of the directory after it. On Linux the swap
// is an exchange (renameat2 with RENAME_EXCHANGE) followed by a check of what
// came out, so a save that lands at any moment is kept; elsewhere a last stat
// comparison just before the rename narrows that window. A read-only file is
// refused. Temporary files are named `.NAME.tmp-RANDOM` ([IsTempName]) and
// locked while in use; [RemoveStaleTemps] removes those a killed run left.
package calcblock
