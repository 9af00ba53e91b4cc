package compute

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"cleave/internal/parallel"
	"cleave/notebook"
	"cleave/notebook/calcblock"
)

// WorkTree is a notebook checked out in a folder on disk: the one place where the engine's
// results meet files on disk. Run reads any fs.FS; a WorkTree gives it the folder, writes the
// results back (atomically, refusing a file changed since it was read) and keeps the record of
// the last check that found nothing wrong.
type WorkTree struct {
	Root     string // the notebook's top folder
	StateDir string // where the tool keeps its own files (under the git directory); "" for none
}

// FS is the notebook as a file system.
func (w WorkTree) FS() fs.FS { return newDirFS(w.Root) }

// Cache opens the cache in the state folder (nil when there is none).
func (w WorkTree) Cache() *Cache {
	if w.StateDir == "" {
		return nil
	}
	return OpenCache(filepath.Join(w.StateDir, "cache"))
}

// Write brings the files the report found changed up to date on disk. A file that changed
// since it was read is left alone and reported.
func (w WorkTree) Write(rep *Report) (written []string, failures []error) {
	files := rep.Changed()
	errs := make([]error, len(files))
	// Each write waits for the disk (fsync of the file and its folder): several at a time.
	parallel.ForN(8, len(files), func(i int) {
		f := files[i]
		full := filepath.Join(w.Root, filepath.FromSlash(f.Path))
		errs[i] = calcblock.WriteAtomic(full, f.NewBytes, f.Original)
	})
	for i, f := range files {
		if errs[i] != nil {
			failures = append(failures, fmt.Errorf("%s: %w", f.Path, errs[i]))
			continue
		}
		written = append(written, f.Path)
	}
	return written, failures
}

// The digest of a work tree lets a check of an unchanged notebook finish without loading it:
// it hashes every file's path, mode, size and modification time in nanoseconds (the stat data
// git's index relies on), with the engine's salt. It is taken before a check reads anything,
// and kept only when that check found nothing wrong: a file changed while the check ran has
// another modification time afterwards, so the next check does the full work. What it
// promises: a file whose content changed with its size and modification time kept (a tool
// that restores the time stamp) is not seen by this fast path — git's index has the same
// blind spot; `check --no-cache` or any other change to the notebook brings it back.

const digestFile = "last-good-check"

// Scan is the stat data of every file of a work tree, read once per run: it gives the digest
// of the notebook, and tells the engine which files cannot have changed since an earlier run
// saw them (their stamp is the same and not racy).
type Scan struct {
	Stamps map[string]string // slash path → stamp (mode, size, modification time, inode); "" when racy
	Racy   bool              // a file was modified less than a second before the scan began
	Temps  []string          // WriteAtomic's temporary files (calcblock.IsTempName), not in the digest
	// Markdown lists the files the notebook loads (notebook.Loadable regular files), sorted.
	Markdown []string
	digest   string
	salt     string // the engine's salt (saltIn), in the digest and every cache key of the run
}

// Scan reads the stat data of every file (everything but .git). A file modified less than a
// second before the scan began is racy: a later change within the same time stamp could go
// unseen (git's racy-timestamp rule), so its stamp is "" and never matches.
func (w WorkTree) Scan() (*Scan, error) {
	start := time.Now()
	limit := start.Add(-time.Second).UnixNano()
	// One goroutine lists the folders (each in path order); as each folder is listed, its
	// files go in chunks to workers that read their stat data (one system call per file,
	// relative to the open folder: the bulk of the time), so listing and stat overlap.
	// A folder stays open while its files wait for their stat data: the lister holds one
	// reference until it has listed the folder, each chunk of its files one until stat'ed;
	// whoever lets go of the last closes it (a notebook may hold thousands of folders, more
	// than the open files a process may have).
	type folder struct {
		h    dirHandle
		refs atomic.Int64
	}
	release := func(d *folder) {
		if d.refs.Add(-1) == 0 {
			d.h.close()
		}
	}
	type file struct {
		path, name string
		dir        *folder // the open folder that holds it
	}
	type chunk struct {
		files   []file
		stamps  []string
		regular []bool
		gone    []bool
	}
	var (
		chunks []*chunk
		temps  []string
		racy   atomic.Bool
		failed atomic.Pointer[error]
		wg     sync.WaitGroup
	)
	work := make(chan *chunk, 32) // bounds the folders open at once (each queued chunk holds one)
	for range max(1, runtime.GOMAXPROCS(0)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var b []byte
			var st statBuf
			for c := range work {
				for i, f := range c.files {
					if failed.Load() != nil {
						break
					}
					sd, err := f.dir.h.lstat(f.name, &st)
					if errors.Is(err, fs.ErrNotExist) {
						// Gone since its folder was listed (an editor's swap file, say): not
						// part of the tree, and the tree is changing (no digest is kept).
						c.gone[i] = true
						racy.Store(true)
						continue
					}
					if err != nil {
						failed.Store(&err)
						break
					}
					c.regular[i] = sd.regular()
					if sd.mtime >= limit {
						racy.Store(true)
						continue
					}
					b = binary.AppendUvarint(b[:0], uint64(sd.mode))
					b = binary.AppendUvarint(b, uint64(sd.size))
					b = binary.AppendVarint(b, sd.mtime)
					b = binary.AppendUvarint(b, sd.ino)
					c.stamps[i] = string(b)
				}
				release(c.files[0].dir)
			}
		}()
	}
	const chunkLen = 128
	pending := make([]file, 0, chunkLen) // files listed, not yet sent
	flush := func() {
		if n := len(pending); n > 0 {
			c := &chunk{files: pending, stamps: make([]string, n), regular: make([]bool, n), gone: make([]bool, n)}
			chunks = append(chunks, c)
			c.files[0].dir.refs.Add(1) // a chunk holds files of one folder
			work <- c
			pending = make([]file, 0, chunkLen)
		}
	}
	var walk func(rel string) error
	walk = func(rel string) error {
		h, err := openDir(filepath.Join(w.Root, filepath.FromSlash(rel)))
		if err != nil {
			return err
		}
		d := &folder{h: h}
		d.refs.Store(1)
		defer release(d)
		ents, err := h.readDir()
		if err != nil {
			return err
		}
		// Each folder's entries in the order of their slash paths (a folder's name sorts as
		// "name/"), so that the walk lists every file in path order without a global sort.
		type ent struct {
			key string
			e   fs.DirEntry
		}
		sorted := make([]ent, 0, len(ents))
		for _, e := range ents {
			switch {
			case e.IsDir() && e.Name() == ".git" && rel == ".":
			case e.IsDir():
				sorted = append(sorted, ent{e.Name() + "/", e})
			default:
				sorted = append(sorted, ent{e.Name(), e})
			}
		}
		slices.SortFunc(sorted, func(a, b ent) int { return strings.Compare(a.key, b.key) })
		for _, se := range sorted {
			e := se.e
			p := e.Name()
			if rel != "." {
				p = rel + "/" + p
			}
			switch {
			case e.IsDir():
				flush() // the files before the folder go out before the folder's own
				if err := walk(p); err != nil {
					return err
				}
			case calcblock.IsTempName(e.Name()):
				temps = append(temps, p)
			default:
				pending = append(pending, file{p, e.Name(), d})
				if len(pending) == chunkLen {
					flush()
				}
			}
		}
		flush()
		return nil
	}
	werr := walk(".")
	close(work)
	wg.Wait()
	if werr != nil {
		return nil, werr
	}
	if err := failed.Load(); err != nil {
		return nil, *err
	}
	n := 0
	for _, c := range chunks {
		n += len(c.files)
	}
	sc := &Scan{Stamps: make(map[string]string, n), Racy: racy.Load(), Temps: temps}
	h := sha256.New()
	sc.salt = saltIn(w.StateDir)
	fmt.Fprintf(h, "%s\n", sc.salt)
	var hb []byte
	last := ""
	for _, c := range chunks {
		for i, f := range c.files {
			if c.gone[i] {
				continue
			}
			if f.path <= last && last != "" {
				// Cannot happen (the walk lists in path order); the digest depends on it.
				return nil, fmt.Errorf("scan: %s listed after %s", f.path, last)
			}
			last = f.path
			sc.Stamps[f.path] = c.stamps[i]
			if c.regular[i] && notebook.Loadable(f.path) {
				sc.Markdown = append(sc.Markdown, f.path)
			}
			hb = binary.AppendUvarint(hb[:0], uint64(len(f.path)))
			hb = append(hb, f.path...)
			hb = binary.AppendUvarint(hb, uint64(len(c.stamps[i])))
			hb = append(hb, c.stamps[i]...)
			h.Write(hb)
		}
	}
	if !sc.Racy {
		sc.digest = hex.EncodeToString(h.Sum(nil))
	}
	return sc, nil
}

// Digest is the hash of the scan with the engine's salt; "" when a file was racy.
func (sc *Scan) Digest() string { return sc.digest }

// GoodCheck reports whether the digest equals the one kept after the last check that found
// no problem.
func (w WorkTree) GoodCheck(digest string) bool {
	if w.StateDir == "" || digest == "" {
		return false
	}
	b, err := os.ReadFile(filepath.Join(w.StateDir, digestFile))
	return err == nil && strings.TrimSpace(string(b)) == digest
}

// RememberGoodCheck keeps the digest taken before a check that found nothing wrong.
func (w WorkTree) RememberGoodCheck(digest string) error {
	if w.StateDir == "" || digest == "" {
		return nil
	}
	if err := os.MkdirAll(w.StateDir, 0o755); err != nil {
		return err
	}
	return calcblock.ReplaceFile(filepath.Join(w.StateDir, digestFile), []byte(digest+"\n"))
}

// ForgetGoodCheck removes the kept digest (after a check that found problems).
func (w WorkTree) ForgetGoodCheck() {
	if w.StateDir != "" {
		os.Remove(filepath.Join(w.StateDir, digestFile))
	}
}

// Rel turns command-line paths (absolute, or relative to the working directory) into the slash
// paths Options.Paths takes, refusing a path outside the notebook, one that does not exist,
// and one that goes through a symbolic link (which the run would not follow).
func (w WorkTree) Rel(paths []string) ([]string, error) {
	var out []string
	for _, p := range paths {
		rel, inside, err := relToRoot(w.Root, p)
		if err != nil {
			return nil, err
		}
		if !inside {
			return nil, fmt.Errorf("%s: outside the notebook at %s", p, w.Root)
		}
		if _, err := os.Stat(p); err != nil {
			return nil, fmt.Errorf("%s: %w", p, errors.Unwrap(err))
		}
		if err := throughLink(w.Root, p, rel); err != nil {
			return nil, err
		}
		out = append(out, rel)
	}
	return out, nil
}

// relToRoot returns p, an OS path (absolute or relative to the working directory), as a
// slash path relative to the notebook root, and whether it lies inside the notebook (the
// root itself included).
func relToRoot(root, p string) (rel string, inside bool, err error) {
	abs, err := filepath.Abs(p)
	if err != nil {
		return "", false, err
	}
	rel, err = filepath.Rel(root, abs)
	if err != nil || !filepath.IsLocal(rel) && rel != "." {
		return "", false, nil
	}
	return filepath.ToSlash(rel), true, nil
}

// CheckOptions tunes [WorkTree.Check].
type CheckOptions struct {
	Write   bool     // bring result regions on disk up to date (`cleave calc`)
	NoCache bool     // evaluate everything, ignoring (and not updating) the cache
	Paths   []string // slash paths to limit the run to (see [WorkTree.Rel])
}

// CheckResult is what a check or calc of a work tree did.
type CheckResult struct {
	*Report
	Notebook      *notebook.Notebook // the notebook as the run loaded it (nil when Unchanged)
	Unchanged     bool               // nothing changed since the last good check: nothing was run
	Removed       []string           // temporary files an interrupted calc left, removed (slash paths)
	Written       []string           // files rewritten on disk
	WriteFailures []error            // files that could not be written
}

// Bad counts the problems: stale results (for a check), failed lines, invalid entries, files
// that could not be evaluated or written. A failed line that is also stale counts once.
func (r *CheckResult) Bad(write bool) int {
	if r.Report == nil {
		return 0
	}
	n := len(r.Problems) + len(r.Failures) + len(r.WriteFailures)
	for _, f := range r.Files {
		n += len(f.Errors)
		if write {
			continue
		}
		for _, c := range f.Stale {
			if !calcblock.IsError(c.New) {
				n++
			}
		}
	}
	return n
}

// Check runs the engine over the work tree (see CheckOptions). A check of the whole notebook
// that finds nothing wrong keeps the digest of the scan taken before it read anything, so
// that the next check of an unchanged notebook returns at once.
func (w WorkTree) Check(opt CheckOptions) (*CheckResult, error) {
	whole := len(opt.Paths) == 0
	sc, err := w.Scan()
	if err != nil {
		return nil, err
	}
	removed := w.removeStaleTemps(sc.Temps)
	if !opt.NoCache && whole && w.GoodCheck(sc.Digest()) {
		return &CheckResult{Unchanged: true, Removed: removed}, nil
	}
	res, err := w.run(opt, sc)
	if err != nil {
		return nil, err
	}
	res.Removed = removed
	switch {
	case res.Bad(opt.Write) > 0:
		w.ForgetGoodCheck()
	case whole && !opt.Write && !opt.NoCache:
		_ = w.RememberGoodCheck(sc.Digest()) // only a speed-up
	}
	return res, nil
}

// run is Check without the shortcut for an unchanged notebook; sc may be nil.
func (w WorkTree) run(opt CheckOptions, sc *Scan) (*CheckResult, error) {
	fsys := w.FS()
	var cache *Cache
	var stamps map[string]string
	if !opt.NoCache {
		cache = w.Cache()
		if sc != nil {
			stamps = sc.Stamps
		}
	}
	lo := notebook.LoadOptions{Known: cache.knownSummary(stamps)}
	if sc != nil {
		lo.Paths = sc.Markdown
		if lo.Paths == nil {
			lo.Paths = []string{}
		}
	}
	nb, err := notebook.LoadWith(fsys, lo)
	if err != nil {
		return nil, err
	}
	salt := saltIn(w.StateDir)
	if sc != nil {
		salt = sc.salt
	}
	rep, err := Run(fsys, nb, Options{Cache: cache, Paths: opt.Paths, Salt: salt, Stamps: stamps, Write: opt.Write})
	if err != nil {
		return nil, err
	}
	if cache != nil {
		_ = cache.Save(nb) // the cache only saves time
	}
	res := &CheckResult{Report: rep, Notebook: nb}
	if opt.Write {
		res.Written, res.WriteFailures = w.Write(rep)
	}
	return res, nil
}

// removeStaleTemps removes the temporary files (slash paths) a killed WriteAtomic left and
// returns those it removed.
func (w WorkTree) removeStaleTemps(temps []string) []string {
	if len(temps) == 0 {
		return nil
	}
	full := make([]string, len(temps))
	for i, p := range temps {
		full[i] = filepath.Join(w.Root, filepath.FromSlash(p))
	}
	var out []string
	for _, p := range calcblock.RemoveStaleTemps(full) {
		rel, _ := filepath.Rel(w.Root, p)
		out = append(out, filepath.ToSlash(rel))
	}
	return out
}
