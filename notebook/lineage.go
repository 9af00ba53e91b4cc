package notebook

import (
	"slices"
	"strings"
	"sync"
)

// index builds the id map and the lineage graph. A link to a missing id, or to
// an entry of a kind the field does not allow, is left out of the graph (and
// reported by Validate).
func (nb *Notebook) index() {
	// The path index is built beside the rest (two maps of ten thousand entries each take
	// a while; nothing below reads byPath).
	var paths sync.WaitGroup
	paths.Go(func() {
		nb.byPath = make(map[string]*File, len(nb.Files))
		for _, f := range nb.Files {
			nb.byPath[f.Path] = f
		}
	})
	defer paths.Wait()
	nb.byID = make(map[string]*Entry, len(nb.Entries))
	nb.dups = map[string][]*Entry{}
	for _, e := range nb.Entries {
		if first, ok := nb.byID[e.ID]; ok {
			if len(nb.dups[e.ID]) == 0 {
				nb.dups[e.ID] = []*Entry{first}
			}
			nb.dups[e.ID] = append(nb.dups[e.ID], e)
			continue
		}
		nb.byID[e.ID] = e
	}
	for _, e := range nb.Entries {
		if nb.byID[e.ID] != e {
			continue // a duplicate: its links would make the graph ambiguous
		}
		lfs := linkFields(e.Kind)
		for _, l := range e.links() {
			t, ok := nb.byID[l.ID]
			if !ok || !linkAllows(lfs, l.Field, t.Kind) || slices.Contains(e.up, t) {
				continue
			}
			e.up = append(e.up, t)
			t.down = append(t.down, e)
		}
	}
	for _, e := range nb.Entries {
		if len(e.down) > 1 {
			slices.SortFunc(e.down, byKindThenID)
		}
	}
}

// linkAllows reports whether the link field named field (one of lfs) may point at an entry
// of kind k: only such links are edges of the lineage.
func linkAllows(lfs []FieldSpec, field string, k Kind) bool {
	for _, f := range lfs {
		if f.Name == field {
			return slices.Contains(f.Kinds, k)
		}
	}
	return false
}

// childOrder is the order in which children are listed: devices before the
// processes that also lead to them, so a tree reads wafer → piece → device.
func childOrder(k Kind) int {
	switch k {
	case KindPiece:
		return 0
	case KindDevice:
		return 1
	case KindCooldown:
		return 2
	case KindProcess:
		return 3
	case KindMask:
		return 4
	case KindWafer:
		return 5
	}
	return 99
}

func byKindThenID(a, b *Entry) int {
	ka, kb := childOrder(a.Kind), childOrder(b.Kind)
	if ka != kb {
		return ka - kb
	}
	if c := strings.Compare(a.ID, b.ID); c != 0 {
		return c
	}
	return strings.Compare(a.Path, b.Path)
}

// Parents returns the entries that e links to (from, mask, process, pieces,
// devices), in link order. Links to missing entries or to the wrong kind are
// not included.
func (nb *Notebook) Parents(e *Entry) []*Entry { return slices.Clone(e.up) }

// Children returns the entries that link to e, ordered by kind (piece,
// device, cooldown, process) then id.
func (nb *Notebook) Children(e *Entry) []*Entry { return slices.Clone(e.down) }

// Ancestors returns the ancestors of the entry with the given id, nearest
// first (breadth first; within one generation in link order). It is nil for
// an unknown id. Cycles do not make it loop.
//
// A process is a side branch of the lineage: one run may treat pieces of
// several wafers, so the walk lists a process but does not go on through it
// (unless it starts there). A device's ancestors are its piece chain, its mask
// and its processes, never the other pieces a run treated.
func (nb *Notebook) Ancestors(id string) []*Entry {
	e, ok := nb.byID[id]
	if !ok {
		return nil
	}
	return nb.walk(e, true)
}

// Descendants returns the descendants of the entry with the given id,
// nearest first (breadth first; within one generation by kind then id). As
// in [Notebook.Ancestors], a process reached on the way is listed but not
// walked through: a piece's descendants do not include the devices a shared
// run made from other pieces.
func (nb *Notebook) Descendants(id string) []*Entry {
	e, ok := nb.byID[id]
	if !ok {
		return nil
	}
	return nb.walk(e, false)
}

// walk lists the entries reached from start going up (to parents) or down (to children),
// breadth first, listing a process but not going on through it.
func (nb *Notebook) walk(start *Entry, up bool) []*Entry {
	seen := map[*Entry]bool{start: true}
	var out []*Entry
	queue := []*Entry{start}
	for len(queue) > 0 {
		e := queue[0]
		queue = queue[1:]
		next := e.down
		if up {
			next = e.up
		}
		for _, n := range next {
			if !seen[n] {
				seen[n] = true
				out = append(out, n)
				if n.Kind != KindProcess {
					queue = append(queue, n)
				}
			}
		}
	}
	return out
}

// Context returns e followed by its ancestors, nearest first: the entries a
// calc block in e reads fields from (`device.width`, `mask.probes`,
// `wafer.layers`).
func (nb *Notebook) Context(e *Entry) []*Entry {
	if e == nil {
		return nil
	}
	out := []*Entry{e}
	if nb.byID[e.ID] != e {
		return out // a duplicate id has no place in the graph
	}
	return append(out, nb.walk(e, true)...)
}

// Nearest returns the first entry of kind k in e's context (e itself, then
// its ancestors nearest first).
func (nb *Notebook) Nearest(e *Entry, k Kind) (*Entry, bool) {
	if e == nil {
		return nil, false
	}
	if e.Kind == k {
		return e, true
	}
	if nb.byID[e.ID] != e {
		return nil, false
	}
	// Context's walk, stopping at the first entry of kind k: the same answer without
	// listing every ancestor (lineages are short, so a slice does for the seen set).
	var buf [16]*Entry
	seen := append(buf[:0], e)
	var big map[*Entry]bool // the seen set once the slice grows long
	for i := 0; i < len(seen); i++ {
		if i > 0 && seen[i].Kind == KindProcess {
			continue // walk lists a process but does not go up through it
		}
		for _, n := range seen[i].up {
			if len(seen) > 64 && big == nil {
				big = make(map[*Entry]bool, 2*len(seen))
				for _, s := range seen {
					big[s] = true
				}
			}
			if big != nil && big[n] || big == nil && slices.Contains(seen, n) {
				continue
			}
			if big != nil {
				big[n] = true
			}
			if n.Kind == k {
				return n, true
			}
			seen = append(seen, n)
		}
	}
	return nil, false
}

// cycles returns each elementary cycle of the parent graph once, as a list of
// entries starting at the one with the smallest path, found with a
// depth-first search (Tarjan's strongly connected components would also do;
// a lineage graph is small and nearly acyclic, so a colouring DFS suffices to
// find one cycle through every back edge).
func (nb *Notebook) cycles() [][]*Entry {
	const (
		white = iota
		grey
		black
	)
	colour := make(map[*Entry]int, len(nb.Entries))
	var stack []*Entry
	var found [][]*Entry
	seen := map[string]bool{}
	var visit func(e *Entry)
	visit = func(e *Entry) {
		colour[e] = grey
		stack = append(stack, e)
		for _, p := range e.up {
			switch colour[p] {
			case white:
				visit(p)
			case grey:
				i := slices.Index(stack, p)
				cyc := slices.Clone(stack[i:])
				// rotate so the smallest path comes first: one report per cycle
				m := 0
				for j := range cyc {
					if cyc[j].Path < cyc[m].Path {
						m = j
					}
				}
				cyc = append(cyc[m:], cyc[:m]...)
				var key []string
				for _, c := range cyc {
					key = append(key, c.Path)
				}
				k := strings.Join(key, "\x00")
				if !seen[k] {
					seen[k] = true
					found = append(found, cyc)
				}
			}
		}
		stack = stack[:len(stack)-1]
		colour[e] = black
	}
	for _, e := range nb.Entries {
		if colour[e] == white && nb.byID[e.ID] == e {
			visit(e)
		}
	}
	return found
}
