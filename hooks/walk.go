package hooks

import (
	"bytes"
	"container/heap"
	"fmt"
	"strconv"
	"strings"

	"github.com/go-git/go-git/v5/plumbing"
)

// The history of a few paths is found by walking the commits and comparing, for each commit
// and its parents, the id of each path's entry, looked up component by component in the
// commit's tree: one tree object per folder on the way, each read once and only when its id
// changed. No tree is diffed as a whole (go-git's path-filtered Log diffs every commit's whole
// tree against the next one the iterator yields, which is both slow and, across merges, not
// what `git log -- PATH` reports).
//
// The walk simplifies history the way `git log -- PATH...` does by default: a commit whose
// paths are all as in one of its parents (TREESAME) is not shown, and a merge that is TREESAME
// to a parent is followed through that parent only; a merge that differs from every parent is
// shown (compared with its first parent) and all its parents are followed.

// commitInfo is what the walk needs of a commit.
type commitInfo struct {
	tree    plumbing.Hash
	parents []plumbing.Hash
	time    int64 // committer time, seconds since 1970
}

// pathChange is one commit of a path history: which of the paths changed, with their ids in
// the commit and in the parent it is compared with (zero for a path that is not there).
type pathChange struct {
	commit, parent plumbing.Hash // parent is zero for a root commit
	changed        []int         // indices into the walk's paths
	old, new       []plumbing.Hash
}

type pathWalker struct {
	o       *Objects
	paths   [][]string // each path split at '/'
	entries map[entryKey]plumbing.Hash
	commits map[plumbing.Hash]*commitInfo
	states  map[plumbing.Hash][]plumbing.Hash // tree id → id of each path
}

type entryKey struct {
	tree plumbing.Hash
	name string
}

func newPathWalker(o *Objects, paths []string) *pathWalker {
	w := &pathWalker{o: o, entries: map[entryKey]plumbing.Hash{}, commits: map[plumbing.Hash]*commitInfo{},
		states: map[plumbing.Hash][]plumbing.Hash{}}
	for _, p := range paths {
		w.paths = append(w.paths, strings.Split(p, "/"))
	}
	return w
}

// walk returns the commits reachable from start that changed any of the paths, newest first
// (by committer time).
func (w *pathWalker) walk(start plumbing.Hash) ([]pathChange, error) {
	w.o.mu.Lock()
	defer w.o.mu.Unlock()
	var out []pathChange
	q := &commitQueue{}
	seen := map[plumbing.Hash]bool{start: true}
	push := func(h plumbing.Hash) error {
		if seen[h] {
			return nil
		}
		seen[h] = true
		c, err := w.commit(h)
		if err != nil {
			return err
		}
		heap.Push(q, queued{h, c.time})
		return nil
	}
	c0, err := w.commit(start)
	if err != nil {
		return nil, err
	}
	heap.Push(q, queued{start, c0.time})
	for q.Len() > 0 {
		h := heap.Pop(q).(queued).id
		c := w.commits[h]
		cur, err := w.state(c.tree)
		if err != nil {
			return nil, err
		}
		if len(c.parents) == 0 {
			if ch := differ(cur, make([]plumbing.Hash, len(cur))); len(ch) > 0 {
				out = append(out, pathChange{commit: h, changed: ch, old: make([]plumbing.Hash, len(cur)), new: cur})
			}
			continue
		}
		var first []plumbing.Hash
		same := -1
		for i, p := range c.parents {
			pc, err := w.commit(p)
			if err != nil {
				return nil, err
			}
			ps, err := w.state(pc.tree)
			if err != nil {
				return nil, err
			}
			if i == 0 {
				first = ps
			}
			if same < 0 && len(differ(cur, ps)) == 0 {
				same = i
			}
		}
		if same >= 0 {
			if err := push(c.parents[same]); err != nil {
				return nil, err
			}
			continue
		}
		out = append(out, pathChange{commit: h, parent: c.parents[0], changed: differ(cur, first), old: first, new: cur})
		for _, p := range c.parents {
			if err := push(p); err != nil {
				return nil, err
			}
		}
	}
	return out, nil
}

func differ(a, b []plumbing.Hash) []int {
	var out []int
	for i := range a {
		if a[i] != b[i] {
			out = append(out, i)
		}
	}
	return out
}

// state is the id of each path in the tree (zero where it is missing).
func (w *pathWalker) state(tree plumbing.Hash) ([]plumbing.Hash, error) {
	if s, ok := w.states[tree]; ok {
		return s, nil
	}
	s := make([]plumbing.Hash, len(w.paths))
	for i, comps := range w.paths {
		id := tree
		for _, name := range comps {
			next, err := w.entry(id, name)
			if err != nil {
				return nil, err
			}
			if id = next; id.IsZero() {
				break
			}
		}
		s[i] = id
	}
	w.states[tree] = s
	return s, nil
}

// entry is the id of the entry name in the tree (zero when there is none).
func (w *pathWalker) entry(tree plumbing.Hash, name string) (plumbing.Hash, error) {
	k := entryKey{tree, name}
	if id, ok := w.entries[k]; ok {
		return id, nil
	}
	data, err := w.o.rawOf(plumbing.TreeObject, tree)
	if err != nil {
		// A blob where a folder was expected: the path does not exist in this tree.
		if typ, _, err2 := w.o.raw(tree); err2 == nil && typ != plumbing.TreeObject {
			w.entries[k] = plumbing.ZeroHash
			return plumbing.ZeroHash, nil
		}
		return plumbing.ZeroHash, err
	}
	id, ok := findTreeEntry(data, name)
	if !ok {
		id = plumbing.ZeroHash
	}
	w.entries[k] = id
	return id, nil
}

// findTreeEntry finds the entry name in a tree object's content without decoding the others.
func findTreeEntry(data []byte, name string) (plumbing.Hash, bool) {
	for len(data) > 0 {
		sp := bytes.IndexByte(data, ' ')
		if sp < 0 {
			break
		}
		rest := data[sp+1:]
		nul := bytes.IndexByte(rest, 0)
		if nul < 0 || nul+21 > len(rest) {
			break
		}
		if string(rest[:nul]) == name {
			var id plumbing.Hash
			copy(id[:], rest[nul+1:nul+21])
			return id, true
		}
		data = rest[nul+21:]
	}
	return plumbing.ZeroHash, false
}

// commit reads the tree, the parents and the committer time of a commit, once.
func (w *pathWalker) commit(h plumbing.Hash) (*commitInfo, error) {
	if c, ok := w.commits[h]; ok {
		return c, nil
	}
	data, err := w.o.rawOf(plumbing.CommitObject, h)
	if err != nil {
		return nil, err
	}
	c, err := parseCommitInfo(data)
	if err != nil {
		return nil, fmt.Errorf("commit %s: %w", h, err)
	}
	w.commits[h] = c
	return c, nil
}

// parseCommitInfo reads the header lines of a commit object.
func parseCommitInfo(data []byte) (*commitInfo, error) {
	c := &commitInfo{}
	for len(data) > 0 {
		nl := bytes.IndexByte(data, '\n')
		if nl <= 0 {
			break // the blank line before the message
		}
		line := data[:nl]
		data = data[nl+1:]
		key, val, _ := bytes.Cut(line, []byte{' '})
		switch string(key) {
		case "tree":
			c.tree = plumbing.NewHash(string(val))
		case "parent":
			c.parents = append(c.parents, plumbing.NewHash(string(val)))
		case "committer":
			// NAME <EMAIL> TIME ZONE
			f := bytes.Fields(val[bytes.LastIndexByte(val, '>')+1:])
			if len(f) >= 1 {
				c.time, _ = strconv.ParseInt(string(f[0]), 10, 64)
			}
		}
	}
	if c.tree.IsZero() {
		return nil, fmt.Errorf("no tree in the commit")
	}
	return c, nil
}

// commitQueue orders commits newest first (by committer time), as git log does by default.
type commitQueue []queued

type queued struct {
	id   plumbing.Hash
	time int64
}

func (q commitQueue) Len() int           { return len(q) }
func (q commitQueue) Less(i, j int) bool { return q[i].time > q[j].time }
func (q commitQueue) Swap(i, j int)      { q[i], q[j] = q[j], q[i] }
func (q *commitQueue) Push(x any)        { *q = append(*q, x.(queued)) }
func (q *commitQueue) Pop() any {
	old := *q
	x := old[len(old)-1]
	*q = old[:len(old)-1]
	return x
}
