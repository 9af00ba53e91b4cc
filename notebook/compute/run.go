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
	"sort"
	"strings"

	"cleave/calc"
	"cleave/notebook"
	"cleave/notebook/calcblock"
)

// Version is mixed into every cache key (with a hash of the executable, see engineSalt), so
// a new engine never reuses old results.
// Bump it whenever a formula, a display rule or a function changes.
const Version = "cleave-engine 1"

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
			out = append(out, c.String())
		}
		for _, c := range f.Errors {
			out = append(out, fmt.Sprintf("%s:%d: %s", c.Path, c.Line, c.New))
		}
	}
	for _, err := range r.Failures {
		out = append(out, err.Error())
	}
	return out
}

// Run evaluates the calc blocks of the notebook rooted at root (see Options). The notebook
// is loaded once; every file is evaluated even when others fail.
func Run(root string, nb *notebook.Notebook, opt Options) (*Report, error) {
	fsys := os.DirFS(root)
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
	rep := &Report{}
	for _, f := range nb.Files {
		if !sel(f.Path) || !hasCalcFence(f.Src.Raw) {
			continue
		}
		fr, err := runFile(root, fsys, nb, f, cache)
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
func hasCalcFence(raw []byte) bool { return bytes.Contains(raw, []byte("calc")) }

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

type evaluator struct{ env *calc.Env }

func (ev evaluator) EvalLine(code string, lineNo int) (string, error) {
	res := ev.env.EvalLine(code, lineNo)
	if res.Err != nil {
		return "", res.Err
	}
	return res.Display, nil
}

func (ev evaluator) Deps() []string { return ev.env.Deps() }

func runFile(root string, fsys fs.FS, nb *notebook.Notebook, f *notebook.File, cache *calcblock.Cache) (*calcblock.FileReport, error) {
	env := NewEnv(fsys, nb, f)
	opt := calcblock.Options{Cache: cache, Salt: engineSalt()}
	if cache != nil {
		// The dependency values must be computed in a fresh environment: the cache asks for
		// them before anything is evaluated.
		depEnv := NewEnv(fsys, nb, f)
		opt.Resolve = func(dep string) (string, error) { return depValue(fsys, nb, depEnv, dep) }
	}
	return calcblock.RecomputeWith(f.Path, f.Src.Raw, evaluator{env}, opt)
}

// depValue is the current value of a dependency reported by calc.Env.Deps: a field's
// displayed value, or a data file's content hash.
func depValue(fsys fs.FS, nb *notebook.Notebook, env *calc.Env, dep string) (string, error) {
	switch {
	case strings.HasPrefix(dep, "entry:"):
		// "entry:<id>:<dep>": a dependency of another entry that a scorecard evaluated.
		rest := strings.TrimPrefix(dep, "entry:")
		i := strings.Index(rest, ":")
		if i < 0 {
			return "", fmt.Errorf("bad dependency %q", dep)
		}
		e, ok := nb.Entry(rest[:i])
		if !ok {
			return "", fmt.Errorf("dependency %q: no entry %s", dep, rest[:i])
		}
		f, ok := nb.File(e.Path)
		if !ok {
			return "", fmt.Errorf("dependency %q: no file for %s", dep, rest[:i])
		}
		return depValue(fsys, nb, NewEnv(fsys, nb, f), rest[i+1:])
	case strings.HasPrefix(dep, "lineage:"):
		// "lineage:<id>": the cooldowns that measured devices cut from that entry.
		e, ok := nb.Entry(strings.TrimPrefix(dep, "lineage:"))
		if !ok {
			return "", fmt.Errorf("dependency %q: no such entry", dep)
		}
		var ids []string
		for _, c := range newResolver(fsys, nb, e, 0).measuredBy() {
			ids = append(ids, c.ID)
		}
		return strings.Join(ids, ","), nil
	case strings.HasPrefix(dep, "field:@"):
		// "field:@<id>.<field>": a front-matter field of another entry.
		rest := strings.TrimPrefix(dep, "field:@")
		id, field, _ := strings.Cut(rest, ".")
		e, ok := nb.Entry(id)
		if !ok {
			return "", fmt.Errorf("dependency %q: no entry %s", dep, id)
		}
		n, ok := e.Field(field)
		if !ok {
			return "", nil
		}
		return calc.Display(nodeValue(n, field)), nil
	case strings.HasPrefix(dep, "field:"):
		v, err := env.Eval(strings.TrimPrefix(dep, "field:"))
		if err != nil {
			return "", err
		}
		return calc.Display(v), nil
	case strings.HasPrefix(dep, "file:"):
		b, err := fs.ReadFile(fsys, strings.TrimPrefix(dep, "file:"))
		if err != nil {
			return "", err
		}
		sum := sha256.Sum256(b)
		return "sha256:" + hex.EncodeToString(sum[:]), nil
	}
	return "", fmt.Errorf("unknown dependency %q", dep)
}

// selector returns a predicate over slash paths for the paths given on the command line.
func selector(root string, paths []string) (func(string) bool, error) {
	if len(paths) == 0 {
		return func(string) bool { return true }, nil
	}
	var prefixes []string
	for _, p := range paths {
		abs, err := filepath.Abs(p)
		if err != nil {
			return nil, err
		}
		rel, err := filepath.Rel(root, abs)
		if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
			return nil, fmt.Errorf("%s: outside the notebook at %s", p, root)
		}
		if _, err := os.Stat(abs); err != nil {
			return nil, fmt.Errorf("%s: %w", p, errors.Unwrap(err))
		}
		prefixes = append(prefixes, filepath.ToSlash(rel))
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
