package hooks

import (
	"path"
	"sort"

	"github.com/go-git/go-git/v5/plumbing"
)

// changedFile is a file that differs between two trees (a zero id: not there). Submodules are
// left out.
type changedFile struct {
	path     string
	old, new plumbing.Hash
}

// diffTrees lists the files that differ between two trees, in path order. Folders whose tree
// id is the same on both sides are not opened: the cost follows the size of the change, not
// of the notebook.
func (o *Objects) diffTrees(a, b plumbing.Hash) ([]changedFile, error) {
	o.mu.Lock()
	defer o.mu.Unlock()
	var out []changedFile
	if err := o.diffTreesLocked(".", a, b, &out); err != nil {
		return nil, err
	}
	sort.Slice(out, func(i, j int) bool { return out[i].path < out[j].path })
	return out, nil
}

func (o *Objects) diffTreesLocked(dir string, a, b plumbing.Hash, out *[]changedFile) error {
	if a == b {
		return nil
	}
	list := func(h plumbing.Hash) (map[string]rawEntry, error) {
		m := map[string]rawEntry{}
		if h.IsZero() {
			return m, nil
		}
		es, err := o.treeEntries(h)
		for _, e := range es {
			m[e.name] = e
		}
		return m, err
	}
	ea, err := list(a)
	if err != nil {
		return err
	}
	eb, err := list(b)
	if err != nil {
		return err
	}
	names := map[string]bool{}
	for n := range ea {
		names[n] = true
	}
	for n := range eb {
		names[n] = true
	}
	for n := range names {
		x, inA := ea[n]
		y, inB := eb[n]
		if inA && inB && x.id == y.id && x.mode == y.mode {
			continue
		}
		p := path.Join(dir, n)
		isDir := func(e rawEntry, ok bool) bool { return ok && (e.mode == "40000" || e.mode == "040000") }
		isFile := func(e rawEntry, ok bool) bool {
			if !ok {
				return false
			}
			m, known := gitMode(e.mode)
			return known && !m.IsDir()
		}
		var da, db plumbing.Hash
		if isDir(x, inA) {
			da = x.id
		}
		if isDir(y, inB) {
			db = y.id
		}
		if !da.IsZero() || !db.IsZero() {
			if err := o.diffTreesLocked(p, da, db, out); err != nil {
				return err
			}
		}
		var fa, fb plumbing.Hash
		if isFile(x, inA) {
			fa = x.id
		}
		if isFile(y, inB) {
			fb = y.id
		}
		if fa != fb {
			*out = append(*out, changedFile{path: p, old: fa, new: fb})
		}
	}
	return nil
}
