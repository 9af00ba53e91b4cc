package compute

import (
	"encoding/binary"
	"hash/crc32"
	"reflect"
	"testing"

	"cleave/notebook"
	"cleave/notebook/calcblock"
)

// FuzzCacheDecode feeds the shard decoder any body behind a valid header and checksum (a
// damaged shard fails its checksum first; this reaches the decoder itself): it must never
// panic, and what it accepts must encode back to bytes that decode to the same records.
func FuzzCacheDecode(f *testing.F) {
	sample := map[string]*cacheRec{
		"cooldowns/CD-1.md": {key: "k1", okey: "o1", deps: []depValue{{"md:wafers/W.md", "abc"}, {"near:cooldowns/CD-1.md|wafer", "wafers/W.md"}},
			outs: []calcblock.Outcome{{Col: 12, Text: "(2.600 ± 0.004)e11 cm^-2"}, {Failed: true, Col: 3, Text: "error: no such name"}}},
		"devices/D.md": {key: "k2", okey: "o2"},
	}
	files := map[string]*fileRec{
		"cooldowns/CD-1.md": {stamp: "s1", digest: "d1", sum: &notebook.Summary{Path: "cooldowns/CD-1.md", Entry: true, ID: "CD-1", Kind: "cooldown",
			Links: []notebook.Link{{Field: "devices", ID: "D", Line: 4, Col: 11}}, Data: []notebook.DataRef{{Name: "data/x.csv", Line: 6, Col: 3}},
			Problems: []notebook.Problem{{Path: "cooldowns/CD-1.md", Line: 2, Col: 1, Msg: "a problem"}}, Fence: true,
			Contacts: &notebook.ContactFacts{Mask: []string{"1", "2"}, MaskID: "M", Wiring: []notebook.ContactRef{{Key: "I+", Name: "1", Line: 9, Col: 5}}}},
			report: &storedReport{key: "o1", code: 2, stale: []calcblock.Change{{Path: "cooldowns/CD-1.md", Line: 12, Col: 8, Old: "1", New: "2"}}}},
		"data/x.csv": {stamp: "s2", sha: "sha256:00"},
	}
	full := encodeCache(sample, files)
	f.Add(full[len(cacheHeader)+4:])
	f.Add(encodeCache(nil, nil)[len(cacheHeader)+4:])
	f.Add([]byte{})
	f.Add([]byte{1, 0, 200, 1, 0})
	f.Fuzz(func(t *testing.T, body []byte) {
		data := append([]byte(cacheHeader), binary.LittleEndian.AppendUint32(nil, crc32.Checksum(body, castagnoli()))...)
		data = append(data, body...)
		m, fr, err := decodeCache(data)
		if err != nil {
			return
		}
		m2, fr2, err := decodeCache(encodeCache(m, fr))
		if err != nil {
			t.Fatalf("re-encoded shard does not decode: %v", err)
		}
		if !reflect.DeepEqual(norm(m), norm(m2)) || !reflect.DeepEqual(normFiles(fr), normFiles(fr2)) {
			t.Fatalf("round trip changed the records")
		}
	})
}

// norm and normFiles drop the difference between nil and empty slices, which the encoding
// does not keep.
func norm(m map[string]*cacheRec) map[string]cacheRec {
	out := map[string]cacheRec{}
	for k, r := range m {
		c := *r
		if len(c.deps) == 0 {
			c.deps = nil
		}
		if len(c.outs) == 0 {
			c.outs = nil
		}
		out[k] = c
	}
	return out
}

func normFiles(m map[string]*fileRec) map[string]fileRec {
	out := map[string]fileRec{}
	for k, r := range m {
		c := *r
		if c.report != nil {
			rep := *c.report
			if len(rep.errors) == 0 {
				rep.errors = nil
			}
			if len(rep.stale) == 0 {
				rep.stale = nil
			}
			c.report = &rep
		}
		out[k] = c
	}
	return out
}

// The sample shard of the fuzz target decodes to what was encoded.
func TestCacheRoundTrip(t *testing.T) {
	m := map[string]*cacheRec{"a.md": {key: "k", okey: "o", deps: []depValue{{"id:X", "x.md"}}, outs: []calcblock.Outcome{{Col: 4, Text: "5 T"}}}}
	files := map[string]*fileRec{"a.md": {stamp: "st", digest: "dg", sum: &notebook.Summary{Path: "a.md", Entry: true, ID: "A", Kind: "wafer"}}}
	m2, f2, err := decodeCache(encodeCache(m, files))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(norm(m), norm(m2)) || !reflect.DeepEqual(normFiles(files), normFiles(f2)) {
		t.Fatalf("round trip: got %+v %+v", m2["a.md"], f2["a.md"])
	}
	// A flipped byte fails the checksum: the shard reads as damaged.
	b := encodeCache(m, files)
	b[len(b)-1] ^= 1
	if _, _, err := decodeCache(b); err == nil {
		t.Fatal("a damaged shard was accepted")
	}
}
