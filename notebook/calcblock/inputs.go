package calcblock

import (
	"crypto/sha256"

	"cleave/notebook/mdsrc"
)

// InputDigest hashes everything in the file that a person owns and that can
// change a result: every byte of s.Raw except, on each line of blocks, the
// result region and the blanks at the end of the code (the first write puts
// two blanks before a new region). Writing results never changes it; any
// other edit (a field, a table cell, a line of code, a line break) does.
// blocks must be what [Find] returned for s.
func InputDigest(s *mdsrc.Source, blocks []Block) [sha256.Size]byte {
	h := sha256.New()
	prev := 0
	for _, b := range blocks {
		for _, l := range b.Lines {
			cut := l.Span.Start + len(l.Input())
			if cut < prev || cut > l.Span.End {
				continue // cannot happen for lines Find made; keep the bytes
			}
			h.Write(s.Raw[prev:cut])
			prev = l.Span.End
		}
	}
	h.Write(s.Raw[prev:])
	var sum [sha256.Size]byte
	h.Sum(sum[:0])
	return sum
}
