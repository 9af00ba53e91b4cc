package compute

import (
	"strings"

	"cleave/notebook"
)

// What one file's results depend on, besides its own text, is recorded while it is evaluated:
// every question the evaluation asks of the notebook, with the answer it got. A cached result is
// reused only when asking every recorded question again gives the same answers (see
// [currentValue]); evaluation is deterministic, so with the same answers it would compute the
// same results. The questions, as dependency keys:
//
//	md:PATH          the person-owned bytes of a Markdown file read (its input digest; "-" when absent)
//	id:ID            which file holds the entry with this id ("" when none)
//	near:PATH|KIND   which file holds the nearest entry of KIND in the lineage of the entry at PATH
//	measured:PATH    which cooldown files measured a device cut from the entry at PATH (a scorecard's rows)
//	read:PATH        the bytes of a file read through the file system (their SHA-256, or the error)
//	lstat:PATH       the type of a path looked at (regular, directory, link, absent)
//	link:PATH        the target of a symbolic link followed
//
// Entries are read whole: a line that reads `mask.width` depends on every person-owned byte of
// the mask's file, which is coarser than the field but never misses a change (a changed field,
// a renamed link, a new layer row, an added calc line that a scorecard reads).
type deps map[string]string

// view is the notebook as one evaluation sees it: each query records its dependency in rec.
type view struct {
	nb  *notebook.Notebook
	run *runState
	rec deps
}

// readEntry records that the evaluation reads the contents of e's file.
func (v *view) readEntry(e *notebook.Entry) {
	if e == nil {
		return
	}
	k := "md:" + e.Path
	if _, ok := v.rec[k]; !ok {
		v.rec[k] = v.run.mdDigest(e.Path)
	}
}

// entry is nb.Entry, recorded; the entry found is read.
func (v *view) entry(id string) (*notebook.Entry, bool) {
	e, ok := v.nb.Entry(id)
	v.rec["id:"+id] = pathOf(e, ok)
	if ok {
		v.readEntry(e)
	}
	return e, ok
}

// nearest is nb.Nearest, recorded; the entry found is read.
func (v *view) nearest(e *notebook.Entry, k notebook.Kind) (*notebook.Entry, bool) {
	a, ok := v.nb.Nearest(e, k)
	v.rec["near:"+e.Path+"|"+string(k)] = pathOf(a, ok)
	if ok {
		v.readEntry(a)
	}
	return a, ok
}

// measuredBy lists the cooldowns that measured a device cut from e, recorded; the list, not
// the cooldowns' contents (a scorecard reads those itself).
func (v *view) measuredBy(e *notebook.Entry) []*notebook.Entry {
	cs := measuredBy(v.nb, e)
	v.rec["measured:"+e.Path] = pathList(cs)
	return cs
}

func pathOf(e *notebook.Entry, ok bool) string {
	if !ok || e == nil {
		return ""
	}
	return e.Path
}

func pathList(es []*notebook.Entry) string {
	ps := make([]string, len(es))
	for i, e := range es {
		ps[i] = e.Path
	}
	return strings.Join(ps, "\n")
}

// measuredBy lists the cooldowns that measured a device cut from e.
func measuredBy(nb *notebook.Notebook, e *notebook.Entry) []*notebook.Entry {
	var out []*notebook.Entry
	for _, d := range nb.Descendants(e.ID) {
		if d.Kind == notebook.KindCooldown && measures(nb, e, d) {
			out = append(out, d)
		}
	}
	return out
}

// measures reports whether cooldown c measured a device cut from e: following `from` links
// up from each of its devices (device → piece → piece … → wafer) reaches it. Other links (a
// process run that treated pieces of several wafers) do not count.
func measures(nb *notebook.Notebook, e, c *notebook.Entry) bool {
	for _, l := range c.Links() {
		if l.Field != "devices" {
			continue
		}
		d, ok := nb.Entry(l.ID)
		for hops := 0; ok && hops < 64; hops++ {
			if d.ID == e.ID {
				return true
			}
			id, has := fromLink(d)
			if !has {
				break
			}
			d, ok = nb.Entry(id)
		}
	}
	return false
}

// fromLink is the id an entry's `from:` link names (read from its links, so an entry known from
// its summary is not read for it).
func fromLink(e *notebook.Entry) (string, bool) {
	for _, l := range e.Links() {
		if l.Field == "from" {
			return l.ID, true
		}
	}
	return "", false
}
