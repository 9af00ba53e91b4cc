package hooks

import (
	"bytes"
	"compress/zlib"
	"container/list"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/go-git/go-git/v5/plumbing"
)

// packReader reads objects straight from the repository's pack files, for the long walks of
// history and review: go-git's pack index (idxfile) gives an object's offset, the entry is
// inflated from the pack (mapped into memory), deltas are applied with go-git's PatchDelta, and
// resolved objects are kept in a cache keyed by pack and offset. go-git's own object storage
// computes the SHA-1 of every object it resolves from a delta to key its cache; on a walk over
// thousands of commits that is most of the work, and the ids are known already. An object
// this reader does not find (a loose object, one in an alternate object store) is read by
// go-git's storage instead.
type packReader struct {
	packs []*pack
	cache *objectCache
	zr    io.ReadCloser // a zlib reader, reset for each entry
}

type pack struct {
	name  string
	idx   packIndex
	data  []byte
	unmap func() error
}

// Pack entry types (git's pack format, Documentation/gitformat-pack).
const (
	packCommit   = 1
	packTree     = 2
	packBlob     = 3
	packTag      = 4
	packOfsDelta = 6
	packRefDelta = 7
)

// openPacks opens every pack of the object directory objDir. A pack it cannot read is left to
// go-git.
func openPacks(objDir string) *packReader {
	r := &packReader{cache: newObjectCache(64 << 20)}
	idxs, _ := filepath.Glob(filepath.Join(objDir, "pack", "pack-*.idx"))
	for _, ip := range idxs {
		p, err := openPack(ip)
		if err == nil {
			r.packs = append(r.packs, p)
		}
	}
	return r
}

func openPack(idxPath string) (*pack, error) {
	idx, err := openPackIndex(idxPath)
	if err != nil {
		return nil, err
	}
	name := strings.TrimSuffix(idxPath, ".idx") + ".pack"
	data, unmap, err := mapFile(name)
	if err != nil {
		idx.unmap()
		return nil, err
	}
	if len(data) < 12 || string(data[:4]) != "PACK" {
		unmap()
		idx.unmap()
		return nil, fmt.Errorf("%s: not a pack file", name)
	}
	return &pack{name: name, idx: idx, data: data, unmap: func() error { return errors.Join(unmap(), idx.unmap()) }}, nil
}

// packIndex is a pack's index file, version 2 (Documentation/gitformat-pack, "pack-*.idx
// files have the following format"), mapped into memory: a magic number and version, 256
// cumulative counts by first byte of the id (fanout), the sorted ids, their checksums, 4-byte
// offsets (high bit set: an index into the 8-byte offsets that follow). Version 1 indexes
// (from git before 1.5.2) are left to go-git's storage.
type packIndex struct {
	data  []byte
	n     int
	names []byte // n ids of 20 bytes
	off32 []byte // n 4-byte offsets
	off64 []byte
	unmap func() error
}

func openPackIndex(name string) (packIndex, error) {
	data, unmap, err := mapFile(name)
	if err != nil {
		return packIndex{}, err
	}
	bad := func(why string) (packIndex, error) {
		unmap()
		return packIndex{}, fmt.Errorf("%s: %s", name, why)
	}
	if len(data) < 8+256*4 || string(data[:4]) != "\xfftOc" || binary.BigEndian.Uint32(data[4:8]) != 2 {
		return bad("not a version 2 pack index")
	}
	n := int(binary.BigEndian.Uint32(data[8+255*4:]))
	start := 8 + 256*4
	if len(data) < start+n*(20+4+4)+40 {
		return bad("truncated pack index")
	}
	idx := packIndex{data: data, n: n, unmap: unmap}
	idx.names = data[start : start+20*n]
	idx.off32 = data[start+24*n : start+28*n]
	idx.off64 = data[start+28*n : len(data)-40]
	return idx, nil
}

// find returns the offset in the pack of the object h.
func (x packIndex) find(h plumbing.Hash) (int64, bool) {
	lo := 0
	if h[0] > 0 {
		lo = int(binary.BigEndian.Uint32(x.data[8+4*(int(h[0])-1):]))
	}
	hi := int(binary.BigEndian.Uint32(x.data[8+4*int(h[0]):]))
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		switch c := bytes.Compare(x.names[20*mid:20*mid+20], h[:]); {
		case c == 0:
			o := binary.BigEndian.Uint32(x.off32[4*mid:])
			if o&0x80000000 == 0 {
				return int64(o), true
			}
			i := int(o&0x7fffffff) * 8
			if i+8 > len(x.off64) {
				return 0, false
			}
			return int64(binary.BigEndian.Uint64(x.off64[i:])), true
		case c < 0:
			lo = mid + 1
		default:
			hi = mid
		}
	}
	return 0, false
}

func (r *packReader) close() error {
	var errs []error
	for _, p := range r.packs {
		errs = append(errs, p.unmap())
	}
	r.packs = nil
	return errors.Join(errs...)
}

// errNotInPacks means the object is in none of the packs this reader knows.
var errNotInPacks = errors.New("not in the pack files")

// read returns the type and content of the object h.
func (r *packReader) read(h plumbing.Hash) (plumbing.ObjectType, []byte, error) {
	for i, p := range r.packs {
		if off, ok := p.idx.find(h); ok {
			return r.readAt(i, off, 0)
		}
	}
	return plumbing.InvalidObject, nil, errNotInPacks
}

// maxDeltaDepth bounds a chain of deltas (git writes at most 4095; a longer chain is damage).
const maxDeltaDepth = 10000

// readAt resolves the entry at offset off of pack i.
func (r *packReader) readAt(i int, off int64, depth int) (plumbing.ObjectType, []byte, error) {
	key := objectKey{pack: i, off: off}
	if o, ok := r.cache.get(key); ok {
		return o.typ, o.data, nil
	}
	if depth > maxDeltaDepth {
		return plumbing.InvalidObject, nil, errors.New("delta chain too long")
	}
	p := r.packs[i]
	d := p.data
	if off < 12 || off >= int64(len(d)) {
		return plumbing.InvalidObject, nil, fmt.Errorf("%s: offset %d out of range", p.name, off)
	}
	pos := int(off)
	c := d[pos]
	pos++
	typ := int(c>>4) & 7
	size := int64(c & 0x0f)
	for shift := 4; c&0x80 != 0; shift += 7 {
		if pos >= len(d) {
			return plumbing.InvalidObject, nil, fmt.Errorf("%s: truncated entry at %d", p.name, off)
		}
		c = d[pos]
		pos++
		size |= int64(c&0x7f) << shift
	}
	var baseOff int64 = -1
	var baseHash plumbing.Hash
	switch typ {
	case packOfsDelta:
		if pos >= len(d) {
			return plumbing.InvalidObject, nil, fmt.Errorf("%s: truncated entry at %d", p.name, off)
		}
		c = d[pos]
		pos++
		rel := int64(c & 0x7f)
		for c&0x80 != 0 {
			if pos >= len(d) {
				return plumbing.InvalidObject, nil, fmt.Errorf("%s: truncated entry at %d", p.name, off)
			}
			c = d[pos]
			pos++
			rel = (rel+1)<<7 | int64(c&0x7f)
		}
		baseOff = off - rel
	case packRefDelta:
		if pos+20 > len(d) {
			return plumbing.InvalidObject, nil, fmt.Errorf("%s: truncated entry at %d", p.name, off)
		}
		copy(baseHash[:], d[pos:pos+20])
		pos += 20
	case packCommit, packTree, packBlob, packTag:
	default:
		return plumbing.InvalidObject, nil, fmt.Errorf("%s: unknown entry type %d at %d", p.name, typ, off)
	}
	body, err := r.inflate(d[pos:], size)
	if err != nil {
		return plumbing.InvalidObject, nil, fmt.Errorf("%s: entry at %d: %w", p.name, off, err)
	}
	var ot plumbing.ObjectType
	switch typ {
	case packOfsDelta, packRefDelta:
		var base []byte
		switch {
		case baseOff >= 0:
			ot, base, err = r.readAt(i, baseOff, depth+1)
		default:
			ot, base, err = r.read(baseHash)
		}
		if err != nil {
			return plumbing.InvalidObject, nil, err
		}
		if body, err = applyDelta(base, body); err != nil {
			return plumbing.InvalidObject, nil, fmt.Errorf("%s: entry at %d: %w", p.name, off, err)
		}
	default:
		ot = plumbing.ObjectType(typ)
	}
	r.cache.put(key, cachedObject{typ: ot, data: body})
	return ot, body, nil
}

// inflate decompresses one zlib stream of the given inflated size from the start of src.
func (r *packReader) inflate(src []byte, size int64) ([]byte, error) {
	br := bytes.NewReader(src)
	var err error
	if r.zr == nil {
		r.zr, err = zlib.NewReader(br)
	} else {
		err = r.zr.(zlib.Resetter).Reset(br, nil)
	}
	if err != nil {
		return nil, err
	}
	out := make([]byte, size)
	if _, err := io.ReadFull(r.zr, out); err != nil {
		return nil, err
	}
	return out, nil
}

// objectCache keeps resolved objects up to a number of bytes, least recently used first out.
type objectCache struct {
	max, size int
	ll        *list.List
	m         map[objectKey]*list.Element
}

type objectKey struct {
	pack int
	off  int64
}

type cachedObject struct {
	typ  plumbing.ObjectType
	data []byte
}

type cacheItem struct {
	key objectKey
	obj cachedObject
}

func newObjectCache(maxBytes int) *objectCache {
	return &objectCache{max: maxBytes, ll: list.New(), m: map[objectKey]*list.Element{}}
}

func (c *objectCache) get(k objectKey) (cachedObject, bool) {
	e, ok := c.m[k]
	if !ok {
		return cachedObject{}, false
	}
	c.ll.MoveToFront(e)
	return e.Value.(*cacheItem).obj, true
}

func (c *objectCache) put(k objectKey, o cachedObject) {
	if _, ok := c.m[k]; ok || len(o.data) > c.max/4 {
		return
	}
	c.m[k] = c.ll.PushFront(&cacheItem{k, o})
	c.size += len(o.data)
	for c.size > c.max {
		last := c.ll.Back()
		it := last.Value.(*cacheItem)
		c.ll.Remove(last)
		delete(c.m, it.key)
		c.size -= len(it.obj.data)
	}
}

// applyDelta builds an object from its delta base and a delta in git's format
// (Documentation/gitformat-pack, "Deltified representation"): the base's size and the
// result's size as little-endian base-128 numbers, then instructions. An instruction whose
// high bit is set copies a range of the base (bits 0–3 say which offset bytes follow, bits
// 4–6 which size bytes; a size of 0 means 0x10000); any other non-zero instruction inserts
// that many bytes that follow it. The result is allocated once, at its announced size.
func applyDelta(base, delta []byte) ([]byte, error) {
	errBad := errors.New("damaged delta")
	varint := func() (int, bool) {
		v, shift := 0, 0
		for i := 0; i < len(delta); i++ {
			c := delta[i]
			v |= int(c&0x7f) << shift
			shift += 7
			if c&0x80 == 0 {
				delta = delta[i+1:]
				return v, shift <= 63
			}
		}
		return 0, false
	}
	srcSize, ok1 := varint()
	dstSize, ok2 := varint()
	if !ok1 || !ok2 || srcSize != len(base) {
		return nil, errBad
	}
	out := make([]byte, 0, dstSize)
	for len(delta) > 0 {
		cmd := delta[0]
		delta = delta[1:]
		switch {
		case cmd&0x80 != 0:
			var off, size int
			for i := range 4 {
				if cmd&(1<<i) != 0 {
					if len(delta) == 0 {
						return nil, errBad
					}
					off |= int(delta[0]) << (8 * i)
					delta = delta[1:]
				}
			}
			for i := range 3 {
				if cmd&(0x10<<i) != 0 {
					if len(delta) == 0 {
						return nil, errBad
					}
					size |= int(delta[0]) << (8 * i)
					delta = delta[1:]
				}
			}
			if size == 0 {
				size = 0x10000
			}
			if off+size > len(base) || len(out)+size > dstSize {
				return nil, errBad
			}
			out = append(out, base[off:off+size]...)
		case cmd != 0:
			n := int(cmd)
			if n > len(delta) || len(out)+n > dstSize {
				return nil, errBad
			}
			out = append(out, delta[:n]...)
			delta = delta[n:]
		default:
			return nil, errBad
		}
	}
	if len(out) != dstSize {
		return nil, errBad
	}
	return out, nil
}
