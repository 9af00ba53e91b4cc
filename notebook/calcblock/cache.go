package calcblock

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"
)

// CacheVersion is mixed into every cache key and written into every entry.
// Change it whenever the meaning of a cached entry changes.
const CacheVersion = "cleave-calc-cache 2"

// Cache is a directory of results keyed by SHA-256 hex strings. It is safe
// for use by several processes at once: entries are written to a temporary
// file and renamed into place, and a damaged entry reads as a miss. One
// Cache may be used by several goroutines.
//
// Besides one file per entry, the directory holds a pack: a copy of the
// entries one session used, in a single file, written by [Cache.Flush] and
// read at the first Get of the next session, so that a check of ten thousand
// files reads one file instead of ten thousand. A packed entry is checked like
// a file; the pack only saves reads, and deleting it changes no result.
type Cache struct {
	dir string

	mu         sync.Mutex
	packLoaded bool
	pack       map[string][]byte // entries of the pack read at the first Get
	used       map[string][]byte // entries read or written by this session
	dirty      bool              // used differs from pack
}

// GitDir returns the git directory of the work tree rooted at root: root/.git
// if that is a directory, or the directory named by a "gitdir: <path>" line
// if root/.git is a file (linked work trees, submodules).
func GitDir(root string) (string, error) {
	dotgit := filepath.Join(root, ".git")
	fi, err := os.Stat(dotgit)
	if err != nil {
		return "", fmt.Errorf("finding the git directory of %s: %w", root, err)
	}
	if fi.IsDir() {
		return dotgit, nil
	}
	data, err := os.ReadFile(dotgit)
	if err != nil {
		return "", fmt.Errorf("finding the git directory of %s: %w", root, err)
	}
	line, _, _ := strings.Cut(string(data), "\n")
	line = strings.TrimRight(line, "\r")
	target, ok := strings.CutPrefix(line, "gitdir:")
	if !ok {
		return "", fmt.Errorf("%s: line 1: expected \"gitdir: <path>\"", dotgit)
	}
	target = strings.TrimSpace(target)
	if !filepath.IsAbs(target) {
		target = filepath.Join(root, target)
	}
	return filepath.Clean(target), nil
}

// OpenCache opens (creating it if needed) the cache under
// <gitDir>/cleave/cache.
func OpenCache(gitDir string) (*Cache, error) {
	dir := filepath.Join(gitDir, "cleave", "cache")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("opening the calc cache: %w", err)
	}
	return &Cache{dir: dir, used: map[string][]byte{}}, nil
}

// Dir returns the directory holding the entries.
func (c *Cache) Dir() string { return c.dir }

func validKey(key string) bool {
	if len(key) != 2*sha256.Size {
		return false
	}
	_, err := hex.DecodeString(key)
	return err == nil
}

func (c *Cache) path(key string) string {
	return filepath.Join(c.dir, key[:2], key[2:])
}

// entrySum is the checksum written into an entry: it covers the version, the
// key and the payload, so a truncated, edited or misplaced file is a miss.
func entrySum(key string, payload []byte) string {
	h := sha256.New()
	h.Write([]byte(CacheVersion + "\n" + key + "\n"))
	h.Write(payload)
	return hex.EncodeToString(h.Sum(nil))
}

// Get returns the strings stored under key. Any problem (no entry, a bad
// key, a damaged entry) is a miss.
func (c *Cache) Get(key string) ([]string, bool) {
	if !validKey(key) {
		return nil, false
	}
	c.mu.Lock()
	c.loadPack()
	data, packed := c.pack[key]
	c.mu.Unlock()
	if !packed {
		var err error
		if data, err = ReadFile(c.path(key)); err != nil {
			return nil, false
		}
	}
	out, ok := decodeEntry(key, data)
	if !ok && packed {
		// A damaged packed entry: the entry's own file may still be good.
		packed = false
		if fileData, err := ReadFile(c.path(key)); err == nil {
			data = fileData
			out, ok = decodeEntry(key, data)
		}
	}
	if ok {
		c.remember(key, data, !packed)
	}
	return out, ok
}

// remember notes an entry this session used, for Flush.
func (c *Cache) remember(key string, data []byte, changed bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.used == nil {
		c.used = map[string][]byte{}
	}
	c.used[key] = data
	c.dirty = c.dirty || changed
}

// decodeEntry checks and decodes the content of an entry file.
func decodeEntry(key string, data []byte) ([]string, bool) {
	header, rest, ok := bytes.Cut(data, []byte("\n"))
	if !ok || string(header) != CacheVersion {
		return nil, false
	}
	sum, payload, ok := bytes.Cut(rest, []byte("\n"))
	if !ok || string(sum) != entrySum(key, payload) {
		return nil, false
	}
	var out []string
	if err := json.Unmarshal(payload, &out); err != nil || out == nil {
		return nil, false
	}
	return out, true
}

// Put stores results under key, replacing any earlier entry.
func (c *Cache) Put(key string, results []string) error {
	if !validKey(key) {
		return fmt.Errorf("calc cache: key %q is not a SHA-256 hex string", key)
	}
	if results == nil {
		results = []string{}
	}
	payload, err := json.Marshal(results)
	if err != nil {
		return fmt.Errorf("calc cache: %w", err)
	}
	p := c.path(key)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return fmt.Errorf("calc cache: %w", err)
	}
	var buf bytes.Buffer
	buf.WriteString(CacheVersion + "\n" + entrySum(key, payload) + "\n")
	buf.Write(payload)
	if err := ReplaceFile(p, buf.Bytes()); err != nil {
		return fmt.Errorf("calc cache: %w", err)
	}
	c.remember(key, buf.Bytes(), true)
	return nil
}

const (
	packName   = "pack"
	packHeader = "cleave-calc-pack 1\n"
)

// loadPack reads the pack once; a missing or damaged pack (or the damaged
// rest of one) holds no entries. c.mu must be held.
func (c *Cache) loadPack() {
	if c.packLoaded {
		return
	}
	c.packLoaded = true
	c.pack = map[string][]byte{}
	data, err := os.ReadFile(filepath.Join(c.dir, packName)) // one large file: os.ReadFile sizes its buffer
	if err != nil {
		return
	}
	rest, ok := bytes.CutPrefix(data, []byte(packHeader))
	if !ok {
		return
	}
	// Each entry: the key, a blank, the length of the content in bytes, a
	// line feed, the content.
	for len(rest) > 0 {
		line, after, ok := bytes.Cut(rest, []byte("\n"))
		if !ok {
			return
		}
		key, size, ok := bytes.Cut(line, []byte(" "))
		n, err := strconv.Atoi(string(size))
		if !ok || err != nil || n < 0 || n > len(after) || !validKey(string(key)) {
			return
		}
		c.pack[string(key)] = after[:n:n]
		rest = after[n:]
	}
}

// Flush writes the entries this session read or wrote as the pack, if they
// differ from the pack it found. Like Put, it may fail without harm.
func (c *Cache) Flush() error {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.loadPack()
	if !c.dirty && len(c.used) == len(c.pack) {
		return nil
	}
	keys := make([]string, 0, len(c.used))
	size := len(packHeader)
	for k, v := range c.used {
		keys = append(keys, k)
		size += len(k) + len(v) + 24
	}
	sort.Strings(keys)
	buf := make([]byte, 0, size)
	buf = append(buf, packHeader...)
	for _, k := range keys {
		buf = append(buf, k...)
		buf = append(buf, ' ')
		buf = strconv.AppendInt(buf, int64(len(c.used[k])), 10)
		buf = append(buf, '\n')
		buf = append(buf, c.used[k]...)
	}
	if err := ReplaceFile(filepath.Join(c.dir, packName), buf); err != nil {
		return fmt.Errorf("calc cache: %w", err)
	}
	c.pack, c.dirty = c.used, false
	c.used = make(map[string][]byte, len(c.pack))
	return nil
}

// keyHasher hashes length-prefixed fields, so that no two different
// sequences of fields give the same input.
type keyHasher struct{ buf []byte }

func (k *keyHasher) add(fields ...string) {
	for _, f := range fields {
		k.buf = binary.AppendUvarint(k.buf, uint64(len(f)))
		k.buf = append(k.buf, f...)
	}
}

func (k *keyHasher) sum() string {
	s := sha256.Sum256(k.buf)
	return hex.EncodeToString(s[:])
}

// textKey hashes what the file's results depend on inside the file.
func textKey(opt Options, path string, blocks []Block) string {
	var k keyHasher
	k.add(CacheVersion, "text", opt.Salt, path)
	for _, b := range blocks {
		k.add("block")
		for _, l := range b.Lines {
			if l.Kind() == Code {
				// Blanks before the marker never matter, and the first
				// write adds two, so they are left out of the key.
				k.add(strconv.Itoa(l.LineNo), strings.TrimRight(l.Code, " \t"))
			}
		}
	}
	return k.sum()
}

// fullKey hashes the text key with the current value of every dependency;
// ok is false if one cannot be resolved.
func fullKey(opt Options, tk string, deps []string) (string, bool) {
	var k keyHasher
	k.add(CacheVersion, "full", tk, strconv.Itoa(len(deps)))
	for _, d := range deps {
		v, err := opt.Resolve(d)
		if err != nil {
			return "", false
		}
		k.add(d, v)
	}
	return k.sum(), true
}

// cached is one code line's outcome.
type cached struct {
	failed bool
	text   string // the display text, or the error message
}

func encodeResults(rs []cached) []string {
	out := make([]string, len(rs))
	for i, r := range rs {
		if r.failed {
			out[i] = "!" + r.text
		} else {
			out[i] = "=" + r.text
		}
	}
	return out
}

func decodeResults(ss []string) ([]cached, bool) {
	out := make([]cached, len(ss))
	for i, s := range ss {
		switch {
		case strings.HasPrefix(s, "="):
			out[i] = cached{text: s[1:]}
		case strings.HasPrefix(s, "!"):
			out[i] = cached{failed: true, text: s[1:]}
		default:
			return nil, false
		}
	}
	return out, true
}

func countCode(blocks []Block) int {
	n := 0
	for _, b := range blocks {
		for _, l := range b.Lines {
			if l.Kind() == Code {
				n++
			}
		}
	}
	return n
}

// A file's cache entry sits under its text key and holds, in order: the
// full key its results were computed under, the number of dependencies,
// the dependencies, and the encoded results. One read answers a lookup: the
// dependencies' current values give the full key, which must match.

// lookup returns cached results for the file's code lines, or nil.
func lookup(opt Options, path string, blocks []Block) []cached {
	if opt.Cache == nil || opt.Resolve == nil {
		return nil
	}
	tk := textKey(opt, path, blocks)
	ent, ok := opt.Cache.Get(tk)
	if !ok || len(ent) < 2 {
		return nil
	}
	n, err := strconv.Atoi(ent[1])
	if err != nil || n < 0 || n > len(ent)-2 {
		return nil
	}
	deps, enc := ent[2:2+n], ent[2+n:]
	if len(enc) != countCode(blocks) {
		return nil
	}
	fk, ok := fullKey(opt, tk, deps)
	if !ok || fk != ent[0] {
		return nil
	}
	rs, ok := decodeResults(enc)
	if !ok {
		return nil
	}
	return rs
}

// store saves the results of a full evaluation. Failures to write are
// ignored: the cache only saves time.
func store(opt Options, path string, blocks []Block, deps []string, rs []cached) {
	if opt.Cache == nil || opt.Resolve == nil {
		return
	}
	tk := textKey(opt, path, blocks)
	fk, ok := fullKey(opt, tk, deps)
	if !ok {
		return
	}
	ent := make([]string, 0, 2+len(deps)+len(rs))
	ent = append(ent, fk, strconv.Itoa(len(deps)))
	ent = append(ent, deps...)
	ent = append(ent, encodeResults(rs)...)
	_ = opt.Cache.Put(tk, ent)
}

// ReplaceFile writes data to a temporary file beside path and renames it over path, so a
// reader sees the old content or the new, never a part. It is for the tool's own files
// under the git directory (cache entries, the pack, the last good check's digest), where a
// lost write only costs time; notebook files go through WriteAtomic, which also fsyncs and
// refuses a file changed on disk.
func ReplaceFile(path string, data []byte) error {
	f, err := os.CreateTemp(filepath.Dir(path), ".tmp-*")
	if err != nil {
		return err
	}
	_, werr := f.Write(data)
	if err := errors.Join(werr, f.Close()); err != nil {
		os.Remove(f.Name())
		return err
	}
	if err := os.Rename(f.Name(), path); err != nil {
		os.Remove(f.Name())
		return err
	}
	return nil
}
