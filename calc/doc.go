// Package calc is the expression language of calc blocks: a lexer and parser with
// positions, an evaluator over quantities with units and correlated uncertainties, the
// values and their display, and the environment ([Env]) that the block runner and
// `cleave eval` call.
//
// The language has no functions of its own. An Env gets them with [WithFuncs] or
// [Env.Register] as [Func] values whose [Param]s say what each argument must be; package
// calc/library holds the tool's functions (physics, analyses, the band solver, data files)
// and its NewEnv installs them all.
//
// # Lines
//
// A calc block holds one statement per line: `name = expression`, a bare expression, a
// `# comment`, or nothing. A trailing `# comment` may follow an expression. The two
// characters `#~` start the tool-owned result region; the lexer treats them as the end
// of the line, so a stale result never becomes input. Names assigned in one block are
// visible in later lines and blocks that share the same Env (one per Markdown file).
//
// # Literals and units
//
// A number may carry an uncertainty and a unit: `5 T`, `0.067 m_e`, `3.1e11 cm^-2`,
// `2e6 cm^2/(V s)`, `12.5 ± 0.2 um`, `12.5 +/- 0.2 um`, `12.5 um ± 200 nm`,
// `3.07(4)e11 cm^-2`. The unit is the text after the number that starts with a letter:
// unit symbols with integer exponents, joined by `*` or `/` written without spaces, or by
// spaces followed by another symbol; a `(` directly after `/` opens a group. With spaces
// around an operator it is arithmetic: in `5 T / B` the B is a variable, in `5 T/B` it is
// part of the unit (and an error unless B is a unit). Write `(1 T)/h` to divide by the
// Planck constant: `1 T/h` is tesla per hour. The unit text is parsed by
// quantity.ParseUnit. See LANGUAGE.md for the full grammar.
//
// # Names
//
// A name is looked up as a variable, then `pi`, then a constant of calc/constants (CODATA
// 2018), then a material of calc/materials (`GaAs`, `Al0.33Ga0.67As`: a '.' between two
// digits stays inside a name), then through the notebook [Resolver]. A variable may
// shadow a constant for the rest of the file.
//
// # Values
//
// Expressions produce a [Value]: [Quantity], [String], [List], [Range], [Record],
// [AnalysisResult], [DataFile], or a value defined by another package. [Display] gives the result-region
// text; quantities use quantity.Format in the trade's customary units, or the unit asked
// for with `expr -> unit`, which is dimension-checked.
//
// # Errors
//
// Every error from parsing or evaluation is an [*Error] with the line and column (in
// characters, 1-based) of the offending token and a message that says what was expected;
// it wraps quantity.ErrDimMismatch, quantity.ErrUnknownUnit, [ErrUnknownName],
// [ErrUnknownFunction], [ErrArgument], [ErrType] or [ErrPath] where they apply. Nothing a
// user types makes the package panic.
//
// # Data files
//
// [Env.OpenData] resolves a data path inside the notebook folder given with [WithFS], reads
// it through that file system (the engine's records every read: that is how a data file
// becomes a dependency), and hands the bytes to the Env's
// [DataLoader] (set with [WithDataLoader]); without one it returns a [DataFile].
//
// The package leaves out the formats of data files, plotting, and anything about Markdown:
// the block runner finds the lines and writes the results.
package calc
