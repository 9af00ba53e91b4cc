package hooks

import (
	"bytes"
	"io"
	"testing"

	"github.com/go-git/go-git/v5/plumbing"
	"github.com/go-git/go-git/v5/plumbing/format/packfile"
)

// Every object of a generated repository, read from the packs by packReader, has the type
// and content go-git's own storage gives.
func TestPackReaderMatchesGoGit(t *testing.T) {
	_, objs := openObjects(t, generatedRepo(t, 400))
	if len(objs.packs.packs) == 0 {
		t.Fatal("no pack opened")
	}
	iter, err := objs.st.IterEncodedObjects(plumbing.AnyObject)
	if err != nil {
		t.Fatal(err)
	}
	n, deltas := 0, 0
	err = iter.ForEach(func(o plumbing.EncodedObject) error {
		typ, data, err := objs.packs.read(o.Hash())
		if err != nil {
			t.Errorf("%s: %v", o.Hash(), err)
			return nil
		}
		rd, _ := o.Reader()
		want, _ := io.ReadAll(rd)
		rd.Close()
		if typ != o.Type() || !bytes.Equal(data, want) {
			t.Errorf("%s: %s of %d bytes, want %s of %d", o.Hash(), typ, len(data), o.Type(), len(want))
		}
		n++
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range objs.packs.packs {
		for off := range objs.packs.cache.m {
			if off.pack == 0 && p.data[off.off]>>4&7 >= packOfsDelta {
				deltas++
			}
		}
	}
	if n < 2000 || deltas == 0 {
		t.Errorf("compared %d objects, %d of them deltas: the test did not exercise the reader", n, deltas)
	}
}

// applyDelta agrees with go-git's PatchDelta on good deltas and refuses damaged ones.
func TestApplyDelta(t *testing.T) {
	base := []byte("the quick brown fox jumps over the lazy dog")
	// base size 43, target size 20: copy "quick" (offset 4, size 5), insert " red ", copy "fox" (16, 3),
	// insert "es" + "!!!!!".
	delta := []byte{43, 20, 0x80 | 0x01 | 0x10, 4, 5, 5, ' ', 'r', 'e', 'd', ' ', 0x80 | 0x01 | 0x10, 16, 3, 7, 'e', 's', '!', '!', '!', '!', '!'}
	got, err := applyDelta(base, delta)
	if err != nil || string(got) != "quick red foxes!!!!!" {
		t.Fatalf("applyDelta = %q, %v", got, err)
	}
	want, err := packfile.PatchDelta(base, delta)
	if err != nil || !bytes.Equal(got, want) {
		t.Errorf("go-git gives %q, %v", want, err)
	}
	for name, bad := range map[string][]byte{
		"wrong base size":   append([]byte{42}, delta[1:]...),
		"copy past the end": {43, 10, 0x80 | 0x01 | 0x10, 40, 10},
		"short insert":      {43, 5, 5, 'a', 'b'},
		"too long":          append(append([]byte{}, delta...), 1, 'x'),
		"reserved zero":     {43, 1, 0},
		"no sizes":          {},
	} {
		if _, err := applyDelta(base, bad); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}
