package hooks

import (
	"fmt"
	"io/fs"
	"path/filepath"

	"cleave/notebook"
	"cleave/notebook/compute"
)

// CheckStaged evaluates the notebook as it is staged in the index (what the next commit would
// hold) and writes nothing. Paths limits the report as compute.Options.Paths does. Paths with
// an unresolved conflict are reported as failures.
func (r *Repo) CheckStaged(paths []string) (*compute.Report, error) {
	st, err := r.ReadIndex()
	if err != nil {
		return nil, err
	}
	defer st.Close()
	rep, _, err := r.evaluate(st, paths)
	if err != nil {
		return nil, err
	}
	rep.Failures = append(rep.Failures, unmergedFailures(st.Unmerged)...)
	return rep, nil
}

// CheckRev evaluates the notebook as the commit rev holds it, read with go-git, and writes
// nothing. It returns the commit's full id with the report.
func (r *Repo) CheckRev(rev string, paths []string) (*compute.Report, string, error) {
	fsys, id, closeFS, err := r.RevFS(rev)
	if err != nil {
		return nil, "", err
	}
	defer closeFS()
	rep, _, err := r.evaluate(fsys, paths)
	return rep, id, err
}

// evaluate runs the engine over fsys with the work tree's calc cache (keyed by content, so
// results computed for the work tree answer the index and commits too).
func (r *Repo) evaluate(fsys fs.FS, paths []string) (*compute.Report, *notebook.Notebook, error) {
	nb, err := notebook.Load(fsys)
	if err != nil {
		return nil, nil, err
	}
	cache := compute.OpenCache(filepath.Join(r.StateDir(), "cache"))
	rep, err := compute.Run(fsys, nb, compute.Options{Cache: cache, Paths: paths})
	if err != nil {
		return nil, nil, err
	}
	_ = cache.Save(nb) // the cache only saves time
	return rep, nb, nil
}

func unmergedFailures(paths []string) []error {
	var out []error
	for _, p := range paths {
		out = append(out, fmt.Errorf("%s:1:1: unmerged: the conflict is not resolved in the index (resolve it, then git add it)", p))
	}
	return out
}
