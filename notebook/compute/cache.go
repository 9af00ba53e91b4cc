package compute

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
	"unsafe"

	"cleave/notebook"
	"cleave/notebook/calcblock"
)

// Cache keeps, for each Markdown file, the results of its last evaluation with the key of its
// own inputs and every dependency it recorded (see the `deps` type), and what runs learnt about
// each file at its stamp (see fileRec). It lives in a few files (shards by path), read whole
// when a run opens it; Save rewrites (atomically) only the shards that changed, so a check of
// ten thousand files reads a few files and a run that changed one file writes one. A damaged or
// foreign shard reads as empty; deleting the cache changes no result, only the time a run
// takes. Several processes may use one cache: the last Save of a shard wins, and what it loses
// only costs time.
type Cache struct {
	dir string

	mu    sync.Mutex
	old   [cacheShards]map[string]*cacheRec // as read, by shard
	cur   map[string]*cacheRec              // answered or stored by this run
	dirty [cacheShards]bool

	// What earlier runs learnt about each file, valid while its stamp (see Scan) is the same.
	files    [cacheShards]map[string]*fileRec // as read, by shard
	curFiles map[string]*fileRec              // learnt by this run
	nlearnt  atomic.Int64                     // len(curFiles): fileAt skips the lock while it is 0
}

// fileRec is what is known of one file at one stamp.
type fileRec struct {
	stamp  string
	sum    *notebook.Summary // a Markdown file: what the notebook needs without reading it
	digest string            // a Markdown file: its input digest (calcblock.InputDigest)
	sha    string            // a file read as data: its content hash (as readValue gives it)
	report *storedReport     // a Markdown file with calc blocks: the report of its last run
}

// storedReport is a file's report: its stale and its failed lines, which stay what they are
// while neither the file nor any of its inputs change.
type storedReport struct {
	key    string // the results' key it was made with
	code   int
	errors []calcblock.Change
	stale  []calcblock.Change
}

type cacheRec struct {
	key  string
	deps []depValue // sorted by name
	outs []calcblock.Outcome
	okey string // outsKey(outs)
}

type depValue struct{ name, value string }

const cacheHeader = "cleave-engine-cache 8\n"

// cacheShards is how many files the cache is kept in.
const cacheShards = 16

// shardOf is the shard of the cache that holds what concerns the file at path p.
func shardOf(p string) int {
	h := uint32(2166136261) // FNV-1a, 32 bits
	for i := 0; i < len(p); i++ {
		h = (h ^ uint32(p[i])) * 16777619
	}
	return int(h % cacheShards)
}

func (c *Cache) shardFile(i int) string { return filepath.Join(c.dir, fmt.Sprintf("results.%02x", i)) }

// OpenCache opens the cache kept in dir (created by Save when missing).
func OpenCache(dir string) *Cache {
	c := &Cache{dir: dir, cur: map[string]*cacheRec{}, curFiles: map[string]*fileRec{}}
	var wg sync.WaitGroup
	for i := range cacheShards {
		wg.Add(1)
		go func() {
			defer wg.Done()
			data, err := os.ReadFile(c.shardFile(i))
			if err != nil {
				return
			}
			if m, f, err := decodeCache(data); err == nil {
				c.old[i], c.files[i] = m, f
			}
		}()
	}
	wg.Wait()
	for i := range cacheShards {
		if c.old[i] == nil {
			c.old[i], c.files[i] = map[string]*cacheRec{}, map[string]*fileRec{}
		}
	}
	return c
}

// fileAt returns what is known of the file at path p at stamp (never for an empty stamp).
func (c *Cache) fileAt(p, stamp string) *fileRec {
	if c == nil || stamp == "" {
		return nil
	}
	if c.nlearnt.Load() > 0 {
		c.mu.Lock()
		r, ok := c.curFiles[p]
		c.mu.Unlock()
		if ok && r.stamp == stamp {
			return r
		}
	}
	if r, ok := c.files[shardOf(p)][p]; ok && r.stamp == stamp { // files is only changed by Save
		return r
	}
	return nil
}

// learn records what this run found about the file at p at stamp (ignored for an empty
// stamp: a racy or unknown one).
func (c *Cache) learn(p, stamp string, f func(r *fileRec)) {
	if c == nil || stamp == "" {
		return
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	r, ok := c.curFiles[p]
	if !ok || r.stamp != stamp {
		r = &fileRec{stamp: stamp}
		if o, ok := c.files[shardOf(p)][p]; ok && o.stamp == stamp {
			cp := *o
			r = &cp
		}
		c.curFiles[p] = r
		c.nlearnt.Store(int64(len(c.curFiles)))
	}
	f(r)
	c.dirty[shardOf(p)] = true
}

// knownSummary is the notebook.LoadOptions.Known of a run with these stamps.
func (c *Cache) knownSummary(stamps map[string]string) func(string) (*notebook.Summary, bool) {
	if c == nil || stamps == nil {
		return nil
	}
	return func(p string) (*notebook.Summary, bool) {
		if r := c.fileAt(p, stamps[p]); r != nil && r.sum != nil && r.digest != "" {
			return r.sum, true
		}
		return nil, false
	}
}

// find returns the stored record of the file at path when its key matches, it has n
// outcomes and every recorded dependency still has its recorded value.
func (c *Cache) find(rs *runState, path, key string, n int) (*cacheRec, bool) {
	c.mu.Lock()
	r, ok := c.cur[path]
	c.mu.Unlock()
	if !ok {
		r, ok = c.old[shardOf(path)][path] // old is only changed by Save, never during a run
	}
	if !ok || r.key != key || len(r.outs) != n {
		return nil, false
	}
	for _, d := range r.deps {
		if rs.current(d.name) != d.value {
			return nil, false
		}
	}
	return r, true
}

// store keeps what an evaluation of the file at path computed and read.
func (c *Cache) store(path, key string, rec deps, outs []calcblock.Outcome, okey string) {
	r := &cacheRec{key: key, outs: outs, okey: okey}
	for k, v := range rec {
		r.deps = append(r.deps, depValue{k, v})
	}
	sort.Slice(r.deps, func(i, j int) bool { return r.deps[i].name < r.deps[j].name })
	c.mu.Lock()
	c.cur[path] = r
	c.dirty[shardOf(path)] = true
	c.mu.Unlock()
}

// Save writes the shards of the cache that changed: what this run answered or evaluated,
// and what it did not look at that still concerns a Markdown file of nb (or a data file).
// Like every write of the tool's own files, it may fail without harm.
func (c *Cache) Save(nb *notebook.Notebook) error {
	c.mu.Lock()
	defer c.mu.Unlock()
	for i := range cacheShards {
		for p := range c.old[i] {
			if _, ok := nb.File(p); !ok {
				delete(c.old[i], p)
				c.dirty[i] = true
			}
		}
		for p, r := range c.files[i] {
			if _, ok := nb.File(p); !ok && r.sum != nil {
				delete(c.files[i], p)
				c.dirty[i] = true
			}
		}
	}
	for p, r := range c.cur {
		c.old[shardOf(p)][p] = r
	}
	for p, r := range c.curFiles {
		c.files[shardOf(p)][p] = r
	}
	c.cur, c.curFiles = map[string]*cacheRec{}, map[string]*fileRec{}
	c.nlearnt.Store(0)
	var todo []int
	for i := range cacheShards {
		if c.dirty[i] {
			todo = append(todo, i)
		}
	}
	if len(todo) == 0 {
		return nil
	}
	if err := os.MkdirAll(c.dir, 0o755); err != nil {
		return err
	}
	// Shards are encoded and written in parallel: each is its own file.
	errs := make([]error, len(todo))
	var wg sync.WaitGroup
	for k, i := range todo {
		wg.Add(1)
		go func() {
			defer wg.Done()
			errs[k] = calcblock.ReplaceFile(c.shardFile(i), encodeCache(c.old[i], c.files[i]))
		}()
	}
	wg.Wait()
	for k, i := range todo {
		if errs[k] == nil {
			c.dirty[i] = false
		}
	}
	os.Remove(filepath.Join(c.dir, "results")) // the single file of an earlier version
	return errors.Join(errs...)
}

// A shard file: the header line, the CRC-32C of the rest (4 bytes, little-endian), the counts
// of results, file records, dependencies and outcomes; then for each file with results (in
// path order) its path, key, outcomes key, dependency count, each name and value, outcome
// count and each outcome (flag, column, text); then each file record (path, then see
// appendFileRec). Strings are length-prefixed (uvarint), numbers uvarints.

func encodeCache(m map[string]*cacheRec, files map[string]*fileRec) []byte {
	paths := make([]string, 0, len(m))
	for p := range m {
		paths = append(paths, p)
	}
	sort.Strings(paths)
	// The header and checksum go in front of the body, written in place at the end; the
	// buffer starts near its final size (a record takes a few hundred bytes).
	pre := len(cacheHeader) + 4
	b := make([]byte, pre, pre+512*(len(m)+len(files))+64)
	b = binary.AppendUvarint(b, uint64(len(m)))
	b = binary.AppendUvarint(b, uint64(len(files)))
	nd, no := 0, 0
	for _, r := range m {
		nd += len(r.deps)
		no += len(r.outs)
	}
	b = binary.AppendUvarint(b, uint64(nd))
	b = binary.AppendUvarint(b, uint64(no))
	for _, p := range paths {
		r := m[p]
		b = appendStr(b, p)
		b = appendStr(b, r.key)
		b = appendStr(b, r.okey)
		b = binary.AppendUvarint(b, uint64(len(r.deps)))
		for _, d := range r.deps {
			b = appendStr(b, d.name)
			b = appendStr(b, d.value)
		}
		b = binary.AppendUvarint(b, uint64(len(r.outs)))
		for _, o := range r.outs {
			flag := uint64(0)
			if o.Failed {
				flag = 1
			}
			b = binary.AppendUvarint(b, flag)
			b = binary.AppendUvarint(b, uint64(max(o.Col, 0)))
			b = appendStr(b, o.Text)
		}
	}
	fps := make([]string, 0, len(files))
	for p := range files {
		fps = append(fps, p)
	}
	sort.Strings(fps)
	for _, p := range fps {
		b = appendFileRec(appendStr(b, p), files[p])
	}
	copy(b, cacheHeader)
	binary.LittleEndian.PutUint32(b[len(cacheHeader):], crc32.Checksum(b[pre:], castagnoli()))
	return b
}

// castagnoli is the CRC-32C table: the checksum tells a damaged or torn shard (the shards are
// the tool's own files, replaced atomically), at a fraction of a cryptographic hash's cost.
var castagnoli = sync.OnceValue(func() *crc32.Table { return crc32.MakeTable(crc32.Castagnoli) }) // made when first used: a check of an unchanged notebook never needs it

var errBadCache = errors.New("damaged cache")

func decodeCache(data []byte) (map[string]*cacheRec, map[string]*fileRec, error) {
	rest, ok := bytes.CutPrefix(data, []byte(cacheHeader))
	if !ok || len(rest) < 4 {
		return nil, nil, errBadCache
	}
	sum, b := binary.LittleEndian.Uint32(rest), rest[4:]
	if crc32.Checksum(b, castagnoli()) != sum {
		return nil, nil, errBadCache
	}
	d := decoder{b: b}
	nm, nf, ndeps, nouts := d.count(), d.count(), d.count(), d.count()
	m := make(map[string]*cacheRec, nm)
	// Slabs: one allocation each for the shard's records, dependencies and outcomes.
	recs := make([]cacheRec, nm)
	deps := make([]depValue, ndeps)
	outs := make([]calcblock.Outcome, nouts)
	for i := range nm {
		p := d.str()
		r := &recs[i]
		r.key, r.okey = d.str(), d.str()
		nd := d.count()
		if nd > len(deps) {
			return nil, nil, errBadCache
		}
		r.deps, deps = deps[:nd:nd], deps[nd:]
		for j := range nd {
			r.deps[j] = depValue{d.str(), d.str()}
		}
		no := d.count()
		if no > len(outs) {
			return nil, nil, errBadCache
		}
		r.outs, outs = outs[:no:no], outs[no:]
		for j := range no {
			flag := d.uvarint()
			col := d.uvarint()
			r.outs[j] = calcblock.Outcome{Failed: flag == 1, Col: int(col), Text: d.str()}
		}
		if d.err != nil {
			return nil, nil, d.err
		}
		m[p] = r
	}
	files := make(map[string]*fileRec, nf)
	d.recs = make([]fileRec, nf) // slabs: one allocation each for the shard's records
	d.sums = make([]notebook.Summary, 0, nf)
	for i := range nf {
		p := d.str()
		r := d.fileRec(p, &d.recs[i])
		if d.err != nil {
			return nil, nil, d.err
		}
		files[p] = r
	}
	if d.err != nil || len(d.b) != 0 {
		return nil, nil, errBadCache
	}
	return m, files, nil
}

func appendStr(b []byte, s string) []byte {
	b = binary.AppendUvarint(b, uint64(len(s)))
	return append(b, s...)
}

type decoder struct {
	b    []byte
	err  error
	recs []fileRec
	sums []notebook.Summary
	strs map[string]string // interned strings: dependency names and values repeat across files
}

func (d *decoder) uvarint() uint64 {
	if d.err != nil {
		return 0
	}
	v, n := binary.Uvarint(d.b)
	if n <= 0 {
		d.err = errBadCache
		return 0
	}
	d.b = d.b[n:]
	return v
}

// count reads a length that must fit in what is left.
func (d *decoder) count() int {
	v := d.uvarint()
	if v > uint64(len(d.b)) {
		d.err = errBadCache
		return 0
	}
	return int(v)
}

func (d *decoder) str() string {
	n := d.count()
	if d.err != nil {
		return ""
	}
	if n == 0 {
		return ""
	}
	s := unsafe.String(&d.b[0], n)
	d.b = d.b[n:]
	return s
}

// current is the value dependency name has now (see the `deps` type). The values that are a
// few map lookups (md: — a Markdown file's digest is kept by the cache or by the run's parse
// of the file —, id:, near:) are answered each time; those that walk the notebook or touch
// the disk (measured:, read:, lstat:, link:) once per run, through memo.
func (rs *runState) current(name string) string {
	kind, arg, _ := strings.Cut(name, ":")
	switch kind {
	case "md":
		return rs.mdDigest(arg)
	case "id":
		e, ok := rs.nb.Entry(arg)
		return pathOf(e, ok)
	case "near":
		p, k, _ := strings.Cut(arg, "|")
		e := rs.entryAt(p)
		if e == nil {
			return ""
		}
		a, ok := rs.nb.Nearest(e, notebook.Kind(k))
		return pathOf(a, ok)
	case "measured":
		return rs.memo(name, func() string {
			e := rs.entryAt(arg)
			if e == nil {
				return "no entry"
			}
			return pathList(measuredBy(rs.nb, e))
		})
	case "read":
		return rs.memo(name, func() string { return rs.dataHash(arg) })
	case "lstat":
		return rs.memo(name, func() string { return lstatValue(fs.Lstat(rs.fsys, arg)) })
	case "link":
		return rs.memo(name, func() string { return linkValue(fs.ReadLink(rs.fsys, arg)) })
	}
	return "unknown dependency " + name // never equals a recorded value: a miss
}

// memo returns the value of dependency name made by mk, made once per run (two workers may
// both make it, outside the lock, and get the same).
func (rs *runState) memo(name string, mk func() string) string {
	rs.valMu.Lock()
	v, ok := rs.values[name]
	rs.valMu.Unlock()
	if ok {
		return v
	}
	v = mk()
	rs.valMu.Lock()
	if rs.values == nil {
		rs.values = map[string]string{}
	}
	rs.values[name] = v
	rs.valMu.Unlock()
	return v
}

// entryAt is the entry of the file at slash path p, or nil.
func (rs *runState) entryAt(p string) *notebook.Entry {
	if f, ok := rs.nb.File(p); ok {
		return f.Entry
	}
	return nil
}
