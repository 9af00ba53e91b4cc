package compute

import (
	"encoding/binary"

	"cleave/notebook"
	"cleave/notebook/calcblock"
)

// The encoding of a fileRec: stamp, then flags saying which parts follow, then each part.
const (
	hasSummary = 1 << iota
	hasDigest
	hasSHA
	hasReport
)

func appendFileRec(b []byte, r *fileRec) []byte {
	b = appendStr(b, r.stamp)
	var flags uint64
	if r.sum != nil {
		flags |= hasSummary
	}
	if r.digest != "" {
		flags |= hasDigest
	}
	if r.sha != "" {
		flags |= hasSHA
	}
	if r.report != nil {
		flags |= hasReport
	}
	b = binary.AppendUvarint(b, flags)
	if s := r.sum; s != nil {
		b = appendBool(b, s.Entry)
		b = appendStr(b, s.ID)
		b = appendStr(b, string(s.Kind))
		b = appendPos(b, s.IDPos)
		b = appendPos(b, s.MetaPos)
		b = binary.AppendUvarint(b, uint64(len(s.Links)))
		for _, l := range s.Links {
			b = appendStr(appendStr(b, l.Field), l.ID)
			b = appendPos(b, notebook.Pos{Line: l.Line, Col: l.Col})
		}
		b = binary.AppendUvarint(b, uint64(len(s.Data)))
		for _, d := range s.Data {
			b = appendPos(appendStr(b, d.Name), notebook.Pos{Line: d.Line, Col: d.Col})
		}
		b = binary.AppendUvarint(b, uint64(len(s.Problems)))
		for _, p := range s.Problems {
			b = appendStr(appendPos(b, notebook.Pos{Line: p.Line, Col: p.Col}), p.Msg)
		}
		b = appendBool(b, s.Fence)
		b = appendBool(b, s.Plots)
		b = appendContacts(b, s.Contacts)
	}
	if r.digest != "" {
		b = appendStr(b, r.digest)
	}
	if r.sha != "" {
		b = appendStr(b, r.sha)
	}
	if rep := r.report; rep != nil {
		b = appendStr(b, rep.key)
		b = binary.AppendUvarint(b, uint64(rep.code))
		for _, cs := range [][]calcblock.Change{rep.errors, rep.stale} {
			b = binary.AppendUvarint(b, uint64(len(cs)))
			for _, c := range cs {
				b = appendPos(b, notebook.Pos{Line: c.Line, Col: c.Col})
				b = appendStr(appendStr(b, c.Old), c.New)
			}
		}
	}
	return b
}

func appendBool(b []byte, v bool) []byte {
	if v {
		return append(b, 1)
	}
	return append(b, 0)
}

func appendPos(b []byte, p notebook.Pos) []byte {
	b = binary.AppendUvarint(b, uint64(max(p.Line, 0)))
	return binary.AppendUvarint(b, uint64(max(p.Col, 0)))
}

func (d *decoder) pos() notebook.Pos {
	l := d.uvarint()
	c := d.uvarint()
	return notebook.Pos{Line: int(l), Col: int(c)}
}

func (d *decoder) bool() bool { return d.uvarint() == 1 }

// fileRec decodes into r the record for the file at path p.
func (d *decoder) fileRec(p string, r *fileRec) *fileRec {
	r.stamp = d.str()
	flags := d.uvarint()
	if flags&hasSummary != 0 {
		var s *notebook.Summary
		if len(d.sums) < cap(d.sums) {
			d.sums = d.sums[:len(d.sums)+1]
			s = &d.sums[len(d.sums)-1]
		} else {
			s = new(notebook.Summary)
		}
		s.Path = p
		s.Entry = d.bool()
		s.ID = d.str()
		s.Kind = notebook.Kind(d.str())
		s.IDPos = d.pos()
		s.MetaPos = d.pos()
		if n := d.count(); n > 0 {
			s.Links = make([]notebook.Link, n)
			for i := range n {
				l := &s.Links[i]
				l.Field, l.ID = d.str(), d.str()
				pos := d.pos()
				l.Line, l.Col = pos.Line, pos.Col
			}
		}
		if n := d.count(); n > 0 {
			s.Data = make([]notebook.DataRef, n)
			for i := range n {
				ref := &s.Data[i]
				ref.Name = d.str()
				pos := d.pos()
				ref.Line, ref.Col = pos.Line, pos.Col
			}
		}
		for range d.count() {
			pos := d.pos()
			s.Problems = append(s.Problems, notebook.Problem{Path: p, Line: pos.Line, Col: pos.Col, Msg: d.str()})
		}
		s.Fence = d.bool()
		s.Plots = d.bool()
		s.Contacts = d.contacts()
		r.sum = s
	}
	if flags&hasDigest != 0 {
		r.digest = d.str()
	}
	if flags&hasSHA != 0 {
		r.sha = d.str()
	}
	if flags&hasReport != 0 {
		rep := &storedReport{key: d.str(), code: int(d.uvarint())}
		for _, cs := range []*[]calcblock.Change{&rep.errors, &rep.stale} {
			for range d.count() {
				pos := d.pos()
				*cs = append(*cs, calcblock.Change{Path: p, Line: pos.Line, Col: pos.Col, Old: d.str(), New: d.str()})
			}
		}
		r.report = rep
	}
	return r
}

func appendContacts(b []byte, cf *notebook.ContactFacts) []byte {
	if cf == nil {
		return appendBool(b, false)
	}
	b = appendBool(b, true)
	b = binary.AppendUvarint(b, uint64(len(cf.Mask)))
	for _, m := range cf.Mask {
		b = appendStr(b, m)
	}
	b = appendStr(b, cf.MaskID)
	b = appendBool(b, cf.GoodListed)
	for _, rs := range [][]notebook.ContactRef{cf.Bonding, cf.Good, cf.Wiring} {
		b = binary.AppendUvarint(b, uint64(len(rs)))
		for _, r := range rs {
			b = appendStr(appendStr(b, r.Key), r.Name)
			b = appendPos(b, notebook.Pos{Line: r.Line, Col: r.Col})
		}
	}
	return b
}

func (d *decoder) contacts() *notebook.ContactFacts {
	if !d.bool() {
		return nil
	}
	cf := &notebook.ContactFacts{}
	for range d.count() {
		cf.Mask = append(cf.Mask, d.str())
	}
	cf.MaskID = d.str()
	cf.GoodListed = d.bool()
	for _, rs := range []*[]notebook.ContactRef{&cf.Bonding, &cf.Good, &cf.Wiring} {
		for range d.count() {
			r := notebook.ContactRef{Key: d.str(), Name: d.str()}
			p := d.pos()
			r.Line, r.Col = p.Line, p.Col
			*rs = append(*rs, r)
		}
	}
	return cf
}
