package hooks

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"time"

	"cleave/notebook"
	"cleave/notebook/calcblock"
	"cleave/notebook/compute"
	"cleave/notebook/plotfiles"
)

// The pre-commit hook works on the index, never through the work tree: it evaluates the staged
// content, writes each recomputed file as a new blob (`git hash-object -w`) and points the
// index entry at it (`git update-index --cacheinfo`), both through the git binary so that
// $GIT_INDEX_FILE and git's own index lock are honoured (`git commit -a` hands the hook
// .git/index.lock). It never stashes, checks out, resets or runs a plain `git add`, so unstaged
// work, untracked files and the state of a merge, rebase or cherry-pick in progress are left
// as they are. Afterwards it brings the same results into the work tree where that is safe (see
// carryResults), so `git diff` keeps showing only the person's own unstaged changes.

// HookMode says how a pre-commit run may change things.
type HookMode int

const (
	// StageResults recomputes the staged content and writes the results into the index (and
	// into the work tree where that is safe): what `cleave hooks install` sets up.
	StageResults HookMode = iota
	// FixWorkTree leaves the index alone: results are written into work-tree files whose
	// content is what is staged, and the run fails so that the person reviews and stages
	// them. This is how hooks behave under the general-purpose hook framework, which has put
	// unstaged changes aside before it runs them and treats a hook that stages as a fault.
	FixWorkTree
	// StageAndStop is StageResults for the pre-merge-commit hook, followed by a stop when
	// anything was recomputed: `git merge` writes the merge commit's tree before it runs that
	// hook, so results staged by the hook would miss the commit and stay behind as staged
	// changes. Stopped, git keeps the merge in progress, and `git commit` concludes it with
	// the recomputed results (its pre-commit hook finds nothing left to do).
	StageAndStop
)

// HookReport is what one pre-commit run found and did.
type HookReport struct {
	Report    *compute.Report // the evaluation of the staged content
	Operation string          // a merge, rebase, cherry-pick or revert in progress, or ""
	// Unmerged lists paths with unresolved conflicts: the run stops before evaluating.
	Unmerged []string
	// TempIndex is set under `git commit PATH...`: git commits a temporary index that the
	// hook cannot update, so it only checks.
	TempIndex bool
	// Staged lists the files whose recomputed blob was written into the index.
	Staged []string
	// WorkTree lists the files whose work-tree copy got the recomputed results.
	WorkTree []string
	// Kept explains, per file, why its work-tree copy kept some or all of its old results.
	Kept []string
}

// Blocked reports whether the commit must stop: unresolved conflicts, invalid entries, failed
// lines, files that could not be evaluated; under a temporary index or in FixWorkTree mode,
// also stale results.
func (h *HookReport) Blocked(mode HookMode) bool {
	if len(h.Unmerged) > 0 {
		return true
	}
	if h.Report == nil {
		return false
	}
	if h.Failed() {
		return true
	}
	return len(h.Report.Changed()) > 0 && (h.TempIndex || mode == FixWorkTree || mode == StageAndStop)
}

// Failed reports problems that no recomputation fixes: invalid entries, failed lines, files that
// could not be evaluated.
func (h *HookReport) Failed() bool {
	r := h.Report
	if r == nil {
		return false
	}
	if len(r.Problems) > 0 || len(r.Failures) > 0 {
		return true
	}
	for _, f := range r.Files {
		if len(f.Errors) > 0 {
			return true
		}
	}
	return false
}

// hookLockWait is how long a hook run waits for another one in the same work tree.
const hookLockWait = 30 * time.Second

// PreCommit is the pre-commit (and pre-merge-commit) hook for the work tree around dir: it
// evaluates the staged notebook and, unless something blocks the commit, brings its results up
// to date as mode says. It holds a lock under the work tree's git directory while it runs, so
// two runs (two commits started at once, or the hook and a merge driver) cannot race.
func PreCommit(dir string, mode HookMode) (*HookReport, error) {
	repo, err := Locate(dir)
	if err != nil {
		return nil, err
	}
	lk, err := acquireLock(filepath.Join(repo.StateDir(), "hook.lock"), hookLockWait)
	if err != nil {
		return nil, err
	}
	defer lk.release()

	h := &HookReport{Operation: repo.Operation(), TempIndex: repo.TempIndex()}
	st, err := repo.ReadIndex()
	if err != nil {
		return nil, err
	}
	defer st.Close()
	if len(st.Unmerged) > 0 {
		h.Unmerged = st.Unmerged
		return h, nil
	}
	var nb *notebook.Notebook
	if h.Report, nb, err = repo.evaluate(st, nil); err != nil {
		return nil, err
	}
	changed := h.Report.Changed()
	if h.Failed() || len(changed) == 0 || h.TempIndex {
		return h, nil // nothing to write, or nothing may be written
	}
	plots, err := drawPlots(st, nb, changed)
	if err != nil {
		return nil, err
	}
	if mode != FixWorkTree {
		if err := repo.stage(st, changed); err != nil {
			return nil, err
		}
		for _, f := range changed {
			h.Staged = append(h.Staged, f.Path)
		}
		if err := repo.stagePlots(plots); err != nil {
			return nil, err
		}
		for _, p := range plots {
			h.Staged = append(h.Staged, p.path)
		}
	}
	for _, f := range changed {
		repo.carry(h, f)
	}
	for _, p := range plots {
		repo.carryPlot(h, st, p)
	}
	return h, nil
}

// plotFile is a plot file a recomputed result names, drawn from the staged content.
type plotFile struct {
	path string // slash path from the top of the work tree
	svg  []byte
}

// drawPlots draws the plot files that the recomputed files' plot lines name (a plot line's
// result holds the file's path and the start of its hash, so a new result needs the new file
// beside it in the same commit).
func drawPlots(st *Staged, nb *notebook.Notebook, files []*compute.FileResult) ([]plotFile, error) {
	var out []plotFile
	for _, f := range files {
		refs := plotfiles.Refs(f.Path, f.NewBytes)
		if len(refs) == 0 {
			continue
		}
		drawn, err := plotfiles.DrawRefs(st, nb, f.Path, refs)
		if err != nil {
			return nil, err
		}
		for _, d := range drawn {
			if d.SVG == nil || d.Problem != "" {
				continue // `check` reports a plot file that does not match its line
			}
			if old, err := fs.ReadFile(st, d.Path); err == nil && bytes.Equal(old, d.SVG) {
				continue // staged already
			}
			out = append(out, plotFile{path: d.Path, svg: d.SVG})
		}
	}
	return out, nil
}

// stagePlots writes the plot files as blobs and adds them to the index.
func (r *Repo) stagePlots(plots []plotFile) error {
	if len(plots) == 0 {
		return nil
	}
	tmp, err := os.MkdirTemp(r.StateDir(), "plots-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	var list bytes.Buffer
	for i, p := range plots {
		f := filepath.Join(tmp, fmt.Sprint(i))
		if err := os.WriteFile(f, p.svg, 0o600); err != nil {
			return err
		}
		list.WriteString(f + "\n")
	}
	out, err := r.git().run(list.Bytes(), "hash-object", "-w", "--no-filters", "--stdin-paths")
	if err != nil {
		return fmt.Errorf("writing plot files into the repository: %w", err)
	}
	ids := strings.Fields(string(out))
	if len(ids) != len(plots) {
		return fmt.Errorf("git hash-object gave %d ids for %d plot files", len(ids), len(plots))
	}
	args := []string{"update-index", "--add"}
	for i, p := range plots {
		args = append(args, "--cacheinfo", "100644,"+ids[i]+","+p.path)
	}
	if _, err := r.git().run(nil, args...); err != nil {
		return fmt.Errorf("adding plot files to the index: %w", err)
	}
	return nil
}

// carryPlot writes a drawn plot file into the work tree when nothing of the person's is there:
// no file, or the file as it was staged before the hook ran.
func (r *Repo) carryPlot(h *HookReport, st *Staged, p plotFile) {
	full := filepath.Join(r.Top, filepath.FromSlash(p.path))
	work, err := os.ReadFile(full)
	switch {
	case errors.Is(err, fs.ErrNotExist):
	case err != nil:
		h.Kept = append(h.Kept, fmt.Sprintf("%s: %v", p.path, err))
		return
	default:
		if old, err := fs.ReadFile(st, p.path); err != nil || !bytes.Equal(old, work) {
			h.Kept = append(h.Kept, p.path+": changed in the work tree; left as it is")
			return
		}
	}
	if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
		h.Kept = append(h.Kept, fmt.Sprintf("%s: %v", p.path, err))
		return
	}
	if err := calcblock.ReplaceFile(full, p.svg); err != nil {
		h.Kept = append(h.Kept, fmt.Sprintf("%s: %v", p.path, err))
		return
	}
	_ = os.Chmod(full, 0o644) // as plotfiles writes them
	h.WorkTree = append(h.WorkTree, p.path)
}

// stage writes the recomputed files as blobs and points the index at them, keeping each entry's
// mode.
func (r *Repo) stage(st *Staged, files []*compute.FileResult) error {
	tmp, err := os.MkdirTemp(r.StateDir(), "blobs-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	var list bytes.Buffer
	for i, f := range files {
		p := filepath.Join(tmp, fmt.Sprint(i))
		if err := os.WriteFile(p, f.NewBytes, 0o600); err != nil {
			return err
		}
		list.WriteString(p + "\n")
	}
	// The bytes are in repository form already: no clean or end-of-line filter may run.
	out, err := r.git().run(list.Bytes(), "hash-object", "-w", "--no-filters", "--stdin-paths")
	if err != nil {
		return fmt.Errorf("writing recomputed files into the repository: %w", err)
	}
	ids := strings.Fields(string(out))
	if len(ids) != len(files) {
		return fmt.Errorf("git hash-object gave %d ids for %d files", len(ids), len(files))
	}
	const batch = 200 // paths per update-index call, to stay far below any argument limit
	for start := 0; start < len(files); start += batch {
		args := []string{"update-index"}
		for i := start; i < min(start+batch, len(files)); i++ {
			e := st.Entries[files[i].Path]
			args = append(args, "--cacheinfo", e.Mode+","+ids[i]+","+files[i].Path)
		}
		if _, err := r.git().run(nil, args...); err != nil {
			return fmt.Errorf("updating the index: %w", err)
		}
	}
	return nil
}

// carry brings the recomputed results of one staged file into its work-tree copy where that
// is safe, and notes what it did.
func (r *Repo) carry(h *HookReport, f *compute.FileResult) {
	full := filepath.Join(r.Top, filepath.FromSlash(f.Path))
	fi, err := os.Lstat(full)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		h.Kept = append(h.Kept, f.Path+": not in the work tree")
		return
	case err != nil:
		h.Kept = append(h.Kept, fmt.Sprintf("%s: %v", f.Path, err))
		return
	case !fi.Mode().IsRegular():
		h.Kept = append(h.Kept, f.Path+": not a regular file in the work tree")
		return
	}
	work, err := os.ReadFile(full)
	if err != nil {
		h.Kept = append(h.Kept, fmt.Sprintf("%s: %v", f.Path, err))
		return
	}
	out, carried, left := carryResults(f.Path, f.Original, f.NewBytes, work)
	if carried > 0 {
		if err := calcblock.WriteAtomic(full, out, work); err != nil {
			h.Kept = append(h.Kept, fmt.Sprintf("%s: %v; run `cleave calc %s` when you are done editing", f.Path, err, f.Path))
			return
		}
		h.WorkTree = append(h.WorkTree, f.Path)
	}
	if left > 0 {
		h.Kept = append(h.Kept, fmt.Sprintf("%s: %d result(s) left as they were, where the unstaged changes touch their inputs; run `cleave calc %s` when you are done editing", f.Path, left, f.Path))
	}
}
