package calcblock

import (
	"bytes"
	"errors"
	"fmt"
	"strings"

	"cleave/notebook/mdsrc"
)

// Evaluator evaluates the code lines of one file's calc blocks, in order;
// later lines and blocks see the names defined by earlier ones.
type Evaluator interface {
	// EvalLine evaluates one line of code (the line's content with its
	// result region removed, blanks kept) found on the 1-based line lineNo
	// of the file, and returns the text to show in its result region.
	EvalLine(code string, lineNo int) Outcome
}

// Outcome is what one code line evaluated to: a display text, or a failure
// with its message and the column (1-based, in characters, 0 when unknown)
// the message points at.
type Outcome struct {
	Failed bool
	Col    int
	Text   string // the display text, or the error message
}

// Change is one line whose result text differs from what it should be, or
// one failed line.
type Change struct {
	Path     string
	Line     int
	Col      int // for an error, the column it points at (0 when unknown)
	Old, New string
}

// String formats the change as "path:line: old → new"; an empty old text
// reads "(none)".
func (c Change) String() string {
	old := c.Old
	if old == "" {
		old = "(none)"
	}
	return fmt.Sprintf("%s:%d: %s → %s", c.Path, c.Line, old, c.New)
}

// ErrorString formats a failed line as "path:line:col: message" (without the
// column when it is unknown).
func (c Change) ErrorString() string {
	if c.Col > 0 {
		// The message names the position itself ("error: 13:11: …"); say it once.
		msg := c.New
		if rest, ok := strings.CutPrefix(msg, fmt.Sprintf("%s%d:%d: ", errorPrefix, c.Line, c.Col)); ok {
			msg = errorPrefix + rest
		}
		return fmt.Sprintf("%s:%d:%d: %s", c.Path, c.Line, c.Col, msg)
	}
	return fmt.Sprintf("%s:%d: %s", c.Path, c.Line, c.New)
}

// FileReport is the outcome of recomputing one file.
type FileReport struct {
	Path string
	// Stale lists the lines whose result text changes (in read-only blocks
	// too, where it is not written).
	Stale []Change
	// Errors lists the lines whose evaluation failed, the read-only
	// (unclosed) blocks, and unclosed front matter. A check fails when
	// Stale or Errors is not empty.
	Errors []Change
	// Changed reports whether NewBytes differs from the input.
	Changed bool
	// NewBytes is the file with every result region brought up to date; it
	// equals the input when Changed is false.
	NewBytes []byte
	// Original is the file as it was read (for a write that must refuse a
	// file changed since).
	Original []byte
	// Code is the number of code lines.
	Code int
}

// OK reports whether the file needs no change and shows no error.
func (r *FileReport) OK() bool { return len(r.Stale) == 0 && len(r.Errors) == 0 }

// CodeLines returns the code lines of blocks, in order: the lines an
// [Evaluator] is given and an outcome is expected for.
func CodeLines(blocks []Block) []*Line {
	var code []*Line
	for bi := range blocks {
		for li := range blocks[bi].Lines {
			if blocks[bi].Lines[li].Kind() == Code {
				code = append(code, &blocks[bi].Lines[li])
			}
		}
	}
	return code
}

// Evaluate hands every code line of blocks to ev, in order, without the
// blanks at its end (which [InputDigest] leaves out too).
func Evaluate(blocks []Block, ev Evaluator) []Outcome {
	code := CodeLines(blocks)
	out := make([]Outcome, len(code))
	for i, l := range code {
		out[i] = ev.EvalLine(l.Input(), l.LineNo)
	}
	return out
}

// Recompute evaluates every code line of every calc block in raw, in order,
// with ev, and reports which result regions are stale or failed together
// with the updated file. Only a broken parse is an error; problems in the
// file itself are listed in the report.
func Recompute(path string, raw []byte, ev Evaluator) (*FileReport, error) {
	s, perr := mdsrc.Parse(raw)
	var pe *mdsrc.PosError
	if perr != nil && !errors.As(perr, &pe) {
		return nil, fmt.Errorf("%s: %w", path, perr)
	}
	blocks, err := Find(s)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return Build(path, s, perr, blocks, Evaluate(blocks, ev))
}

// Build reports, for a file already parsed (s and perr are what mdsrc.Parse
// returned for it) whose blocks are blocks, which result regions the
// outcomes (one per code line, as [CodeLines] lists them) make stale or
// failed, and the file with every region brought up to date. s is only read,
// so files may be built in parallel.
func Build(path string, s *mdsrc.Source, perr error, blocks []Block, outs []Outcome) (*FileReport, error) {
	var pe *mdsrc.PosError
	if perr != nil && !errors.As(perr, &pe) {
		return nil, fmt.Errorf("%s: %w", path, perr)
	}
	if s == nil {
		return nil, fmt.Errorf("%s: no parsed source", path)
	}
	raw := s.Raw
	rep := &FileReport{Path: path, NewBytes: raw, Original: raw}
	if pe != nil {
		rep.Errors = append(rep.Errors, Change{Path: path, Line: pe.Line, Col: pe.Col, New: "error: " + pe.Msg})
	}
	code := CodeLines(blocks)
	if len(outs) != len(code) {
		return nil, fmt.Errorf("%s: %d outcomes for %d code lines", path, len(outs), len(code))
	}
	rep.Code = len(code)
	byLine := make(map[int]string, len(code))
	fenceOf := map[int]*Block{}
	for bi := range blocks {
		for _, l := range blocks[bi].Lines {
			fenceOf[l.LineNo] = &blocks[bi]
		}
	}
	for i, l := range code {
		b := fenceOf[l.LineNo]
		o := outs[i]
		text := o.Text
		if o.Failed {
			text = ErrorText(text, l.Old)
		}
		text = Sanitize(text, b.Fence, b.FenceLen)
		byLine[l.LineNo] = text
		if o.Failed {
			rep.Errors = append(rep.Errors, Change{Path: path, Line: l.LineNo, Col: o.Col, Old: l.Old, New: text})
		}
		if text != l.Old || !l.HasResult() {
			rep.Stale = append(rep.Stale, Change{Path: path, Line: l.LineNo, Old: l.Old, New: text})
		}
	}
	for _, b := range blocks {
		if b.ReadOnly {
			rep.Errors = append(rep.Errors, Change{Path: path, Line: b.Line, Col: 1,
				New: "error: calc block is not closed by a matching fence; its results are not updated"})
		}
	}
	if len(code) == 0 {
		return rep, nil
	}
	rep.NewBytes = Rewrite(s, blocks, byLine)
	rep.Changed = !bytes.Equal(rep.NewBytes, raw)
	if !rep.Changed {
		rep.NewBytes = raw
	}
	return rep, nil
}

// EvalFunc adapts a function that returns a display text or an error to an
// [Evaluator]; a failure's column is not known.
type EvalFunc func(code string, lineNo int) (string, error)

// EvalLine implements [Evaluator].
func (f EvalFunc) EvalLine(code string, lineNo int) Outcome {
	d, err := f(code, lineNo)
	if err != nil {
		return Outcome{Failed: true, Text: err.Error()}
	}
	return Outcome{Text: d}
}
