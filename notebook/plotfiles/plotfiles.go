// Package plotfiles keeps the SVG files of plot(...) lines in step with their result regions.
//
// A plot line's result region reads `plot plots/<entry file name>/<name>.svg sha256:<12 hex>`:
// the file's path relative to the entry's folder and the start of its hash. The engine draws
// in memory and writes nothing; after `cleave calc` has written the result regions, [Sync]
// writes each plot file that is missing or differs (evaluating only the files that have one)
// and removes SVG files of the entry's plots folder that no line names any more. `cleave
// check` calls [Verify], which reads the files and compares their hashes with the result
// regions, evaluating nothing.
//
// Every `plots/` folder next to an entry belongs to the tool: its files are written and
// removed by `cleave calc` only.
package plotfiles

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
	"strings"

	"cleave/calc/plot"
	"cleave/notebook"
	"cleave/notebook/calcblock"
	"cleave/notebook/compute"
	"cleave/notebook/mdsrc"
)

// Ref is one plot line of a file.
type Ref struct {
	File string // slash path of the Markdown file, relative to the notebook root
	Line int    // 1-based line of the plot line
	Path string // slash path of the SVG relative to the notebook root
	Hash string // the 12 hex digits its result region shows
}

// Problem is a plot file that is missing or differs from its result region, or a plot name
// used twice in one file.
type Problem struct {
	Ref
	Msg string
}

func (p Problem) Error() string { return fmt.Sprintf("%s:%d: %s", p.File, p.Line, p.Msg) }

// marker is the text every plot result region holds; a file without it has no plot line.
var marker = []byte("plot " + plot.Dir + "/")

// Refs lists the plot lines of the Markdown file at p (slash path) with content raw.
func Refs(p string, raw []byte) []Ref {
	if !bytes.Contains(raw, marker) {
		return nil
	}
	src, _ := mdsrc.Parse(raw)
	if src == nil {
		return nil
	}
	blocks, err := calcblock.Find(src)
	if err != nil {
		return nil
	}
	var out []Ref
	for _, b := range blocks {
		for _, l := range b.Lines {
			rel, hash, ok := plot.ParseResult(l.Old)
			if !ok || l.Kind() != calcblock.Code {
				continue
			}
			out = append(out, Ref{File: p, Line: l.LineNo, Path: path.Join(path.Dir(p), rel), Hash: hash})
		}
	}
	return out
}

// Verify reads the plot lines of the Markdown files of nb, the notebook at root as a run
// loaded it (only those in sel when sel is not nil), and reports each plot file that is missing or whose hash differs from its
// result region, and each plot path two lines of one file name.
func Verify(root string, nb *notebook.Notebook, sel func(string) bool) ([]Problem, error) {
	var probs []Problem
	err := eachFile(root, nb, sel, func(_ string, refs []Ref, dups []Problem) error {
		probs = append(probs, dups...)
		for _, r := range refs {
			if msg := state(root, r); msg != "" {
				probs = append(probs, Problem{Ref: r, Msg: msg})
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	return probs, nil
}

// eachFile calls f with the plot lines of each Markdown file of nb in sel (all when sel is
// nil), read from the file on disk as it is now (calc may have just rewritten it), and the
// problems of plot paths named twice in it.
func eachFile(root string, nb *notebook.Notebook, sel func(string) bool, f func(path string, refs []Ref, dups []Problem) error) error {
	for _, p := range paths(nb) {
		if sel != nil && !sel(p) {
			continue
		}
		raw, err := os.ReadFile(filepath.Join(root, filepath.FromSlash(p)))
		if err != nil {
			return err
		}
		refs := Refs(p, raw)
		if err := f(p, refs, duplicates(refs)); err != nil {
			return err
		}
	}
	return nil
}

// state says what is wrong with a plot file ("" when it matches its result region).
func state(root string, r Ref) string {
	full := filepath.Join(root, filepath.FromSlash(r.Path))
	if fi, err := os.Lstat(full); err == nil && !fi.Mode().IsRegular() {
		// A FIFO would block the read for ever; a link or a folder is no plot the tool wrote.
		return fmt.Sprintf("plot %s is not a regular file (a folder, a link or a special file): remove it, and `cleave calc` draws it again", r.Path)
	}
	b, err := os.ReadFile(full)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return fmt.Sprintf("plot %s is missing (`cleave calc` writes it)", r.Path)
	case err != nil:
		return fmt.Sprintf("plot %s cannot be read: %v", r.Path, err)
	}
	sum := sha256.Sum256(b)
	if got := hex.EncodeToString(sum[:])[:12]; got != r.Hash {
		return fmt.Sprintf("plot %s differs from its result (sha256:%s on disk, sha256:%s in the block; `cleave calc` rewrites it)", r.Path, got, r.Hash)
	}
	return ""
}

func duplicates(refs []Ref) []Problem {
	var out []Problem
	first := map[string]int{}
	for _, r := range refs {
		if l, ok := first[r.Path]; ok {
			out = append(out, Problem{Ref: r, Msg: fmt.Sprintf("plot %s is also drawn on line %d: give one of them another name (plot(x, \"name\"))", r.Path, l)})
			continue
		}
		first[r.Path] = r.Line
	}
	return out
}

// Result is what Sync did.
type Result struct {
	Written  []string  // plot files written (slash paths relative to the root)
	Removed  []string  // plot files removed: no line names them any more
	Problems []Problem // files that could not be drawn as their result regions say
}

// Sync brings the plot files of the Markdown files of nb, the notebook at root as a run
// loaded it (those in sel when sel is not nil), up to date with their result regions: each
// missing or differing file is drawn again (DrawRefs) and written atomically; an SVG in an entry's plots folder
// that no line names is removed.
func Sync(root string, nb *notebook.Notebook, sel func(string) bool) (*Result, error) {
	res := &Result{}
	fsys := os.DirFS(root)
	err := eachFile(root, nb, sel, func(f string, refs []Ref, dups []Problem) error {
		res.Problems = append(res.Problems, dups...)
		var stale []Ref
		for _, r := range refs {
			if state(root, r) != "" {
				stale = append(stale, r)
			}
		}
		if len(stale) > 0 && len(dups) == 0 {
			drawn, err := DrawRefs(fsys, nb, f, stale)
			if err != nil {
				return err
			}
			for _, d := range drawn {
				if d.SVG == nil {
					res.Problems = append(res.Problems, Problem{Ref: d.Ref, Msg: d.Problem})
					continue
				}
				if err := writeFile(filepath.Join(root, filepath.FromSlash(d.Path)), d.SVG); err != nil {
					res.Problems = append(res.Problems, Problem{Ref: d.Ref, Msg: fmt.Sprintf("plot %s: %v", d.Path, err)})
					continue
				}
				res.Written = append(res.Written, d.Path)
				if d.Problem != "" {
					res.Problems = append(res.Problems, Problem{Ref: d.Ref, Msg: d.Problem})
				}
			}
		}
		removed, err := removeOrphans(root, f, refs)
		if err != nil {
			return err
		}
		res.Removed = append(res.Removed, removed...)
		return nil
	})
	if err != nil {
		return nil, err
	}
	return res, nil
}

// Drawing is a plot file drawn again for the plot line that names it: SVG is nil when the line
// no longer draws it; Problem says what does not match its result region ("" when all does).
type Drawing struct {
	Ref
	SVG     []byte
	Problem string
}

// DrawRefs draws again the plot files that refs (plot lines of the Markdown file at p) name, by
// evaluating the file's blocks in fsys: what `cleave calc` writes beside the entry and what the
// pre-commit hook stages.
func DrawRefs(fsys fs.FS, nb *notebook.Notebook, p string, refs []Ref) ([]Drawing, error) {
	figs, err := Draw(fsys, nb, p)
	if err != nil {
		return nil, err
	}
	out := make([]Drawing, 0, len(refs))
	for _, r := range refs {
		d := Drawing{Ref: r}
		fig, ok := figs[r.Line]
		switch {
		case !ok || path.Join(path.Dir(p), fig.Path) != r.Path:
			d.Problem = fmt.Sprintf("plot %s: the line no longer draws it (run `cleave calc` again)", r.Path)
		default:
			d.SVG = fig.SVG
			if !strings.HasPrefix(fig.Hash(), r.Hash) {
				d.Problem = fmt.Sprintf("plot %s: drawn with sha256:%s, the block says sha256:%s (run `cleave calc` again)", r.Path, fig.Hash()[:12], r.Hash)
			}
		}
		out = append(out, d)
	}
	return out, nil
}

// Draw evaluates the calc blocks of the Markdown file at p (a slash path in fsys) and returns
// the figures its plot lines draw, by line number.
func Draw(fsys fs.FS, nb *notebook.Notebook, p string) (map[int]*plot.Figure, error) {
	f, ok := nb.File(p)
	if !ok {
		return nil, fmt.Errorf("%s: not a Markdown file of the notebook", p)
	}
	blocks, err := calcblock.Find(f.Source())
	if err != nil {
		return nil, fmt.Errorf("%s: %w", p, err)
	}
	env := compute.NewEnv(fsys, nb, f)
	out := map[int]*plot.Figure{}
	for _, l := range calcblock.CodeLines(blocks) {
		r := env.EvalLine(l.Input(), l.LineNo)
		if fig, ok := r.Value.(*plot.Figure); ok && r.Err == nil {
			out[l.LineNo] = fig
		}
	}
	return out, nil
}

// removeOrphans removes the SVG files of the plots folder of the Markdown file p that none of
// its plot lines names, and the folder when it is left empty.
func removeOrphans(root, p string, refs []Ref) ([]string, error) {
	dir := path.Dir(plot.FilePath(p, "x"))
	full := filepath.Join(root, filepath.FromSlash(path.Join(path.Dir(p), dir)))
	ents, err := os.ReadDir(full)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	named := map[string]bool{}
	for _, r := range refs {
		named[r.Path] = true
	}
	var removed []string
	left := 0
	for _, e := range ents {
		rel := path.Join(path.Dir(p), dir, e.Name())
		if e.Type().IsRegular() && strings.HasSuffix(e.Name(), ".svg") && !named[rel] {
			if err := os.Remove(filepath.Join(full, e.Name())); err != nil {
				return removed, err
			}
			removed = append(removed, rel)
			continue
		}
		left++
	}
	if left == 0 {
		_ = os.Remove(full)
		_ = os.Remove(filepath.Dir(full)) // the plots folder, when no other entry uses it
	}
	return removed, nil
}

// writeFile replaces the file at p by data atomically (a temporary file renamed over it),
// creating its folder.
func writeFile(p string, data []byte) error {
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return err
	}
	f, err := os.CreateTemp(filepath.Dir(p), ".tmp-plot-*")
	if err != nil {
		return err
	}
	_, werr := f.Write(data)
	err = errors.Join(werr, f.Chmod(0o644), f.Sync(), f.Close())
	if err == nil {
		err = os.Rename(f.Name(), p)
	}
	if err != nil {
		os.Remove(f.Name())
	}
	return err
}

// paths lists the Markdown files of the notebook (as its loader found them), sorted.
func paths(nb *notebook.Notebook) []string {
	out := make([]string, len(nb.Files))
	for i, f := range nb.Files {
		out[i] = f.Path
	}
	return out
}
