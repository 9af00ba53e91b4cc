package compute

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"regexp"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"

	"cleave/calc"
	"cleave/notebook"
	"cleave/notebook/calcblock"
	"cleave/notebook/mdsrc"
)

// Version is mixed into every cache key (with a hash of the executable, see engineSalt), so
// a new engine never reuses old results.
// Bump it whenever a formula, a display rule or a function changes.
const Version = "cleave-engine 2"

// Options tunes Run.
type Options struct {
	// Write brings result regions up to date on disk (`cleave calc`); without it Run only
	// reports (`cleave check`).
	Write bool
	// NoCache evaluates everything even when a cached result would do.
	NoCache bool
	// Paths limits the run to these files or folders (slash or OS paths relative to the
	// notebook root); empty means every Markdown file.
	Paths []string
}

// Report is the outcome of a run over a notebook.
type Report struct {
	Files     []*calcblock.FileReport // files with at least one calc block
	Written   []string                // files rewritten on disk
	Failures  []error                 // files that could not be read, evaluated or written
	Evaluated int                     // lines handed to the evaluator
	CacheHits int                     // files answered from the cache
}

// OK reports whether every result is current and no line failed.
func (r *Report) OK() bool {
	if len(r.Failures) > 0 {
		return false
	}
	for _, f := range r.Files {
		if !f.OK() {
			return false
		}
	}
	return true
}

// Lines lists every stale result and every error as `path:line: old → new`, in file order.
func (r *Report) Lines() []string {
	var out []string
	for _, f := range r.Files {
		for _, c := range f.Stale {
			if calcblock.IsError(c.New) {
				continue // listed with the errors below, with its column
			}
			out = append(out, c.String())
		}
		for _, c := range f.Errors {
			out = append(out, ErrorLine(c))
		}
	}
	for _, err := range r.Failures {
		out = append(out, err.Error())
	}
	return out
}

// Run evaluates the calc blocks of the notebook rooted at root (see Options). The notebook
// is loaded once; every file is evaluated even when others fail. Files are evaluated in
// parallel, each with its own environment (the notebook is only read); the report lists them
// in path order, and with Write they are rewritten in that order once all are evaluated.
func Run(root string, nb *notebook.Notebook, opt Options) (*Report, error) {
	fsys := newDirFS(root)
	if nb == nil {
		var err error
		nb, err = notebook.Load(fsys)
		if err != nil {
			return nil, err
		}
	}
	var cache *calcblock.Cache
	if !opt.NoCache {
		if gd, err := calcblock.GitDir(root); err == nil {
			cache, _ = calcblock.OpenCache(gd) // no cache is only slower
		}
	}
	sel, err := selector(root, opt.Paths)
	if err != nil {
		return nil, err
	}
	var todo []*notebook.File
	for _, f := range nb.Files {
		if sel(f.Path) && hasCalcFence(f.Src.Raw) {
			todo = append(todo, f)
		}
	}
	type outcome struct {
		fr  *calcblock.FileReport
		err error
	}
	out := make([]outcome, len(todo))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(todo)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var deps *depResolver
			if cache != nil {
				deps = newDepResolver(fsys, nb)
			}
			for {
				i := int(next.Add(1)) - 1
				if i >= len(todo) {
					return
				}
				fr, err := runFile(fsys, nb, todo[i], cache, deps)
				out[i] = outcome{fr, err}
			}
		}()
	}
	wg.Wait()
	if cache != nil {
		_ = cache.Flush() // the pack only saves reads next time
	}

	rep := &Report{}
	for i, f := range todo {
		fr, err := out[i].fr, out[i].err
		if err != nil {
			rep.Failures = append(rep.Failures, err)
			continue
		}
		if len(fr.Stale)+len(fr.Errors) == 0 && !fr.Changed && fr.Evaluated == 0 && !fr.CacheHit {
			continue // no calc block after all
		}
		rep.Files = append(rep.Files, fr)
		rep.Evaluated += fr.Evaluated
		if fr.CacheHit {
			rep.CacheHits++
		}
		if opt.Write && fr.Changed {
			full := filepath.Join(root, filepath.FromSlash(f.Path))
			if err := calcblock.WriteAtomic(full, fr.NewBytes, f.Src.Raw); err != nil {
				rep.Failures = append(rep.Failures, fmt.Errorf("%s: %w", f.Path, err))
				continue
			}
			rep.Written = append(rep.Written, f.Path)
		}
	}
	return rep, nil
}

// hasCalcFence is a cheap test that skips files that cannot hold a calc block.
func hasCalcFence(raw []byte) bool { return bytes.Contains(raw, []byte(calcblock.InfoString)) }

// NewEnv is the calc environment of one notebook file: its entry's fields as names, the
// entry-bound functions, and the notebook's files for data("...").
func NewEnv(fsys fs.FS, nb *notebook.Notebook, f *notebook.File) *calc.Env {
	return newEnvDepth(fsys, nb, f, 0)
}

func newEnvDepth(fsys fs.FS, nb *notebook.Notebook, f *notebook.File, depth int) *calc.Env {
	r := newResolver(fsys, nb, f.Entry, depth)
	env := calc.NewEnv(calc.WithFS(fsys, path.Dir(f.Path)), calc.WithResolver(r))
	r.register(env)
	return env
}

// evaluator evaluates a file's lines in an environment made on the first line, so that a
// file answered from the cache never builds one.
type evaluator struct {
	make func() *calc.Env
	env  *calc.Env
}

func (ev *evaluator) EvalLine(code string, lineNo int) (string, error) {
	if ev.env == nil {
		ev.env = ev.make()
	}
	res := ev.env.EvalLine(code, lineNo)
	if res.Err != nil {
		return "", res.Err
	}
	return res.Display, nil
}

func (ev *evaluator) Deps() []string {
	if ev.env == nil {
		return nil
	}
	return ev.env.Deps()
}

// runFile recomputes one file; deps (nil without a cache) is the calling worker's.
func runFile(fsys fs.FS, nb *notebook.Notebook, f *notebook.File, cache *calcblock.Cache, deps *depResolver) (*calcblock.FileReport, error) {
	ev := &evaluator{make: func() *calc.Env { return NewEnv(fsys, nb, f) }}
	// The file's own front matter decides what its names mean (its kind, id and links), even
	// where no line reads a field: it salts the file's cache keys.
	salt := engineSalt()
	if f.Src.HasFrontMatter {
		sum := sha256.Sum256(f.Src.Raw[f.Src.FrontMatter.Start:f.Src.FrontMatter.End])
		salt += " " + hex.EncodeToString(sum[:8])
	}
	opt := calcblock.Options{Cache: cache, Salt: salt}
	if cache != nil {
		opt.Resolve = func(dep string) (string, error) { return deps.value(f.Entry, dep) }
	}
	if perr, ok := parseError(f.Src); ok {
		return calcblock.RecomputeParsed(f.Path, f.Src, perr, ev, opt)
	}
	// Front matter that did not close: parse again to get the error the report shows.
	return calcblock.RecomputeWith(f.Path, f.Src.Raw, ev, opt)
}

// parseError returns the error mdsrc.Parse gave for src when it is known to be nil: the
// front matter closed, or the file does not open with a `---` line. ok is false otherwise.
func parseError(src *mdsrc.Source) (error, bool) {
	if src.HasFrontMatter {
		return nil, true
	}
	return nil, !bytes.HasPrefix(src.Raw[src.BOM:], []byte("---"))
}

// selector returns a predicate over slash paths for the paths given on the command line.
func selector(root string, paths []string) (func(string) bool, error) {
	if len(paths) == 0 {
		return func(string) bool { return true }, nil
	}
	var prefixes []string
	for _, p := range paths {
		rel, inside, err := relToRoot(root, p)
		if err != nil {
			return nil, err
		}
		if !inside {
			return nil, fmt.Errorf("%s: outside the notebook at %s", p, root)
		}
		if _, err := os.Stat(p); err != nil {
			return nil, fmt.Errorf("%s: %w", p, errors.Unwrap(err))
		}
		prefixes = append(prefixes, rel)
	}
	sort.Strings(prefixes)
	return func(p string) bool {
		for _, pre := range prefixes {
			if pre == "." || p == pre || strings.HasPrefix(p, pre+"/") {
				return true
			}
		}
		return false
	}, nil
}

// relToRoot returns p, an OS path (absolute or relative to the working directory), as a
// slash path relative to the notebook root, and whether it lies inside the notebook (the
// root itself included).
func relToRoot(root, p string) (rel string, inside bool, err error) {
	abs, err := filepath.Abs(p)
	if err != nil {
		return "", false, err
	}
	rel, err = filepath.Rel(root, abs)
	if err != nil || !filepath.IsLocal(rel) {
		return "", false, nil
	}
	return filepath.ToSlash(rel), true, nil
}

// errPos matches the start of an error result: "error: 13:11: message".
var errPos = regexp.MustCompile(`^error: (\d+):(\d+): `)

// ErrorLine formats a failed line as `path:line:col: error: message`, taking the column
// from the evaluator's message when it has one.
func ErrorLine(c calcblock.Change) string {
	if m := errPos.FindStringSubmatch(c.New); m != nil && m[1] == strconv.Itoa(c.Line) {
		return fmt.Sprintf("%s:%d:%s: error: %s", c.Path, c.Line, m[2], c.New[len(m[0]):])
	}
	return fmt.Sprintf("%s:%d: %s", c.Path, c.Line, c.New)
}
