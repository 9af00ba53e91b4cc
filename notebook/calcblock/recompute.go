package calcblock

import (
	"bytes"
	"errors"
	"fmt"

	"cleave/notebook/mdsrc"
)

// Evaluator evaluates the code lines of one file's calc blocks, in order;
// later lines and blocks see the names defined by earlier ones.
type Evaluator interface {
	// EvalLine evaluates one line of code (the line's content with its
	// result region removed, blanks kept) found on the 1-based line lineNo
	// of the file, and returns the text to show in its result region.
	EvalLine(code string, lineNo int) (display string, err error)
	// Deps lists everything outside the file's calc blocks that the lines
	// evaluated so far have read (front-matter fields, data files, ...), as
	// names that the caller's resolver understands (see [Options.Resolve]).
	Deps() []string
}

// Change is one line whose result text differs from what it should be, or
// one failed line.
type Change struct {
	Path     string
	Line     int
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
	// Evaluated counts the lines handed to the Evaluator (0 on a cache hit).
	Evaluated int
	// CacheHit reports whether the results came from the cache.
	CacheHit bool
}

// OK reports whether the file needs no change and shows no error.
func (r *FileReport) OK() bool { return len(r.Stale) == 0 && len(r.Errors) == 0 }

// Options tunes [RecomputeWith]. The zero value evaluates everything and
// uses no cache.
type Options struct {
	// Cache, if not nil, stores results keyed as described in the package
	// documentation. It is used only if Resolve is set as well.
	Cache *Cache
	// Resolve returns the current value of a dependency named by
	// [Evaluator.Deps]: a field's value, a data file's content hash. An
	// error makes the lookup a miss (and the results are not stored).
	Resolve func(dep string) (string, error)
	// Salt is mixed into every cache key; pass the calc engine's version so
	// that a new engine never reuses old results.
	Salt string
}

// Recompute evaluates every code line of every calc block in raw, in order,
// with ev, and reports which result regions are stale or failed together
// with the updated file. Only a broken parse is an error; problems in the
// file itself are listed in the report.
func Recompute(path string, raw []byte, ev Evaluator) (*FileReport, error) {
	return RecomputeWith(path, raw, ev, Options{})
}

// RecomputeWith is [Recompute] with a cache.
func RecomputeWith(path string, raw []byte, ev Evaluator, opt Options) (*FileReport, error) {
	s, perr := mdsrc.Parse(raw)
	return RecomputeParsed(path, s, perr, ev, opt)
}

// RecomputeParsed is [RecomputeWith] for a file already parsed: s and perr
// are what mdsrc.Parse returned for it (s must not be nil). It saves a second
// Markdown parse when the caller has loaded the notebook. s is only read, so
// files may be recomputed in parallel.
func RecomputeParsed(path string, s *mdsrc.Source, perr error, ev Evaluator, opt Options) (*FileReport, error) {
	var pe *mdsrc.PosError
	if perr != nil && !errors.As(perr, &pe) {
		return nil, fmt.Errorf("%s: %w", path, perr)
	}
	if s == nil {
		return nil, fmt.Errorf("%s: no parsed source", path)
	}
	raw := s.Raw
	rep := &FileReport{Path: path, NewBytes: raw}
	if pe != nil {
		rep.Errors = append(rep.Errors, Change{Path: path, Line: pe.Line, New: "error: " + pe.Msg})
	}
	blocks, err := Find(s)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}

	var code []*Line
	for bi := range blocks {
		for li := range blocks[bi].Lines {
			if blocks[bi].Lines[li].Kind() == Code {
				code = append(code, &blocks[bi].Lines[li])
			}
		}
	}
	if len(code) == 0 {
		return rep, nil
	}

	results := lookup(opt, path, blocks)
	if results != nil {
		rep.CacheHit = true
	} else {
		results = make([]cached, len(code))
		for i, l := range code {
			d, err := ev.EvalLine(l.Code, l.LineNo)
			if err != nil {
				results[i] = cached{failed: true, text: err.Error()}
			} else {
				results[i] = cached{text: d}
			}
		}
		rep.Evaluated = len(code)
		store(opt, path, blocks, ev.Deps(), results)
	}

	byLine := make(map[int]string, len(code))
	fenceOf := map[int]*Block{}
	for bi := range blocks {
		for _, l := range blocks[bi].Lines {
			fenceOf[l.LineNo] = &blocks[bi]
		}
	}
	for i, l := range code {
		b := fenceOf[l.LineNo]
		text := results[i].text
		if results[i].failed {
			text = ErrorText(text, l.Old)
		}
		text = Sanitize(text, b.Fence, b.FenceLen)
		byLine[l.LineNo] = text
		if results[i].failed {
			rep.Errors = append(rep.Errors, Change{Path: path, Line: l.LineNo, Old: l.Old, New: text})
		}
		if text != l.Old || !l.HasResult() {
			rep.Stale = append(rep.Stale, Change{Path: path, Line: l.LineNo, Old: l.Old, New: text})
		}
	}
	for _, b := range blocks {
		if b.ReadOnly {
			rep.Errors = append(rep.Errors, Change{Path: path, Line: b.Line,
				New: "error: calc block is not closed by a matching fence; its results are not updated"})
		}
	}
	rep.NewBytes = Rewrite(s, blocks, byLine)
	rep.Changed = !bytes.Equal(rep.NewBytes, raw)
	if !rep.Changed {
		rep.NewBytes = raw
	}
	return rep, nil
}
