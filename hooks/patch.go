package hooks

import (
	"bytes"
	"maps"

	"cleave/notebook/calcblock"
	"cleave/notebook/mdsrc"
)

// carryResults brings the results the hook computed for a staged file into the work-tree copy
// of that file, which may hold unstaged work (a file staged in part with `git add -p`).
//
// staged is the blob as it was staged, recomputed the same blob with its result regions up to
// date, work the work-tree file. When work equals staged the answer is recomputed. Otherwise
// only result regions change, and only where the work-tree line has the same inputs as the
// staged one: the same front matter and layer table (the entry's fields), and the same code on
// this line and every code line before it in the file (the names it can see). A region the
// person edited in the work tree is left alone too. carried counts the regions brought over,
// left those that changed in the index but stay as they were in the work tree.
func carryResults(path string, staged, recomputed, work []byte) (out []byte, carried, left int) {
	if bytes.Equal(work, staged) {
		n := countChanged(staged, recomputed)
		return recomputed, n, 0
	}
	s, errS := mdsrc.Parse(staged)
	r, errR := mdsrc.Parse(recomputed)
	w, errW := mdsrc.Parse(work)
	if errS != nil || errR != nil || errW != nil {
		return work, 0, countChanged(staged, recomputed)
	}
	sb, err1 := calcblock.Find(s)
	rb, err2 := calcblock.Find(r)
	wb, err3 := calcblock.Find(w)
	if err1 != nil || err2 != nil || err3 != nil {
		return work, 0, countChanged(staged, recomputed)
	}
	sl, rl, wl := calcblock.CodeLines(sb), calcblock.CodeLines(rb), calcblock.CodeLines(wb)
	if len(sl) != len(rl) {
		return work, 0, countChanged(staged, recomputed) // cannot happen: only results differ
	}
	same := sameFields(path, s, w)
	results := map[int]string{}
	for k := range sl {
		if rl[k].Old == sl[k].Old {
			continue // this result did not change
		}
		if same && k < len(wl) && prefixSame(sl, wl, k) && wl[k].Old == sl[k].Old {
			results[wl[k].LineNo] = rl[k].Old
			carried++
		} else {
			left++
		}
	}
	if carried == 0 {
		return work, 0, left
	}
	return calcblock.Rewrite(w, wb, results), carried, left
}

// prefixSame reports whether code lines 0..k have the same code in a and b.
func prefixSame(a, b []*calcblock.Line, k int) bool {
	for i := 0; i <= k; i++ {
		if a[i].Input() != b[i].Input() {
			return false
		}
	}
	return true
}

// countChanged counts the code lines whose result differs between two versions of a file that
// differ only in result regions.
func countChanged(a, b []byte) int {
	sa, err1 := mdsrc.Parse(a)
	sb, err2 := mdsrc.Parse(b)
	if err1 != nil || err2 != nil {
		return 1
	}
	ba, err1 := calcblock.Find(sa)
	bb, err2 := calcblock.Find(sb)
	if err1 != nil || err2 != nil {
		return 1
	}
	la, lb := calcblock.CodeLines(ba), calcblock.CodeLines(bb)
	n := 0
	for i := range min(len(la), len(lb)) {
		if la[i].Old != lb[i].Old {
			n++
		}
	}
	return n
}

// sameFields reports whether two versions of a file give a calc block the same fields: the same
// front-matter values and, for a wafer, the same layer table (see parseVersion).
func sameFields(path string, a, b *mdsrc.Source) bool {
	if a.HasFrontMatter != b.HasFrontMatter {
		return false
	}
	return maps.Equal(parseVersion(path, a.Raw).fields, parseVersion(path, b.Raw).fields)
}
