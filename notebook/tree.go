package notebook

import (
	"bufio"
	"fmt"
	"io"
	"slices"
	"strings"
)

// Tree prints a lineage as plain indented text, one entry a line:
//
//	wafer W23-017  (wafers/W23-017.md)
//
// With id == "" it prints the whole notebook: one tree under each root (wafers
// first, then masks, then any other entry without parents, each group by id);
// an entry reached a second time (a device under its piece and under its
// process or mask) is printed again with "(see above)" and without its
// subtree. A process below a piece is listed without its devices (a run may
// treat pieces of several wafers; its devices appear under their own pieces).
// Files without an entry are not listed.
//
// With an id it prints that entry's ancestors along its first links (wafer,
// then piece, …), the entry itself marked with "*" and its descendants indented
// below it, then a line "other ancestors:" listing the ancestors not on that
// chain (its mask and processes, for a device).
func (nb *Notebook) Tree(w io.Writer, id string) error {
	bw := bufio.NewWriter(w)
	seen := map[*Entry]bool{}
	if id == "" {
		var roots []*Entry
		for _, e := range nb.Entries {
			if nb.byID[e.ID] == e && len(e.up) == 0 {
				roots = append(roots, e)
			}
		}
		slices.SortFunc(roots, func(a, b *Entry) int {
			ra, rb := rootRank(a.Kind), rootRank(b.Kind)
			if ra != rb {
				return ra - rb
			}
			return strings.Compare(a.ID, b.ID)
		})
		for _, r := range roots {
			nb.printTree(bw, r, 0, seen, "")
		}
		// Entries only reachable through a cycle have no root: print them too.
		for _, e := range nb.Entries {
			if nb.byID[e.ID] == e && !seen[e] {
				nb.printTree(bw, e, 0, seen, "  (in a lineage cycle)")
			}
		}
		return bw.Flush()
	}
	e, ok := nb.byID[id]
	if !ok {
		return fmt.Errorf("no entry has id %q", id)
	}
	// The chain of first parents, farthest first.
	var chain []*Entry
	onChain := map[*Entry]bool{e: true}
	for p := e; len(p.up) > 0; {
		p = p.up[0]
		if onChain[p] {
			break // a cycle
		}
		onChain[p] = true
		chain = append(chain, p)
	}
	slices.Reverse(chain)
	for i, a := range chain {
		fmt.Fprintf(bw, "%s%s\n", strings.Repeat("  ", i), label(a))
		seen[a] = true
	}
	nb.printTree(bw, e, len(chain), seen, " *")
	var others []*Entry
	for _, a := range nb.Ancestors(id) {
		if !onChain[a] {
			others = append(others, a)
		}
	}
	if len(others) > 0 {
		fmt.Fprintln(bw, "other ancestors:")
		for _, a := range others {
			fmt.Fprintf(bw, "  %s\n", label(a))
		}
	}
	return bw.Flush()
}

func rootRank(k Kind) int {
	switch k {
	case KindWafer:
		return 0
	case KindMask:
		return 1
	}
	return 2
}

func label(e *Entry) string {
	return fmt.Sprintf("%s %s  (%s)", e.Kind, e.ID, e.Path)
}

func (nb *Notebook) printTree(w io.Writer, e *Entry, depth int, seen map[*Entry]bool, mark string) {
	ind := strings.Repeat("  ", depth)
	if e.Kind == KindProcess && len(e.up) > 0 && mark == "" {
		seen[e] = true
		fmt.Fprintf(w, "%s%s\n", ind, label(e)) // a side branch: see the doc of Tree
		return
	}
	if seen[e] {
		fmt.Fprintf(w, "%s%s  (see above)\n", ind, label(e))
		return
	}
	seen[e] = true
	fmt.Fprintf(w, "%s%s%s\n", ind, label(e), mark)
	for _, c := range e.down {
		nb.printTree(w, c, depth+1, seen, "")
	}
}
