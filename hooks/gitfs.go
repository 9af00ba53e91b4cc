package hooks

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"path"
	"slices"
	"strings"
	"sync"
	"time"
)

// A gitFS is a tree of git objects (the index, a commit) as a read-only fs.FS, so the engine
// (compute.Run) evaluates staged or committed content exactly as it evaluates a folder. It
// implements fs.ReadDirFS, fs.ReadFileFS, fs.StatFS and fs.ReadLinkFS: symbolic links (mode
// 120000) are links, followed inside the tree; submodules (gitlinks) are left out.
type gitFS struct {
	src treeSource

	mu    sync.Mutex
	blobs map[string][]byte // contents read so far, by object id
}

// treeSource is what a gitFS reads: the entries of a folder and the content of a blob.
type treeSource interface {
	// list returns the entries of the folder at slash path dir ("." for the top), sorted by
	// name, or an error wrapping fs.ErrNotExist when there is no such folder.
	list(dir string) ([]treeEntry, error)
	// blob returns the content of the blob with the given id.
	blob(id string) ([]byte, error)
}

// treeEntry is one entry of a folder of a git tree or of the index.
type treeEntry struct {
	name string
	mode fs.FileMode // fs.ModeDir, fs.ModeSymlink or a regular file's permission bits
	id   string      // object id (hex)
}

// gitMode turns a git file mode (as git prints it, in octal) into an fs.FileMode; ok is false
// for a submodule and anything else that is not a file, a link or a folder.
func gitMode(m string) (fs.FileMode, bool) {
	switch m {
	case "100644", "100664":
		return 0o644, true
	case "100755":
		return 0o755, true
	case "120000":
		return fs.ModeSymlink | 0o777, true
	case "40000", "040000":
		return fs.ModeDir | 0o755, true
	}
	return 0, false
}

func newGitFS(src treeSource) *gitFS { return &gitFS{src: src, blobs: map[string][]byte{}} }

// lookup finds the entry at name without following a link in its last component; links in the
// folders on the way are followed.
func (g *gitFS) lookup(op, name string) (treeEntry, string, error) {
	if !fs.ValidPath(name) {
		return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: fs.ErrInvalid}
	}
	if name == "." {
		return treeEntry{name: ".", mode: fs.ModeDir | 0o755}, ".", nil
	}
	dir, base := path.Split(name)
	dir = path.Clean(dir)
	if dir != "." {
		d, real, err := g.resolve(op, dir, 0)
		if err != nil {
			return treeEntry{}, "", err
		}
		if !d.mode.IsDir() {
			return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: fs.ErrNotExist}
		}
		dir = real
	}
	entries, err := g.src.list(dir)
	if err != nil {
		return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: err}
	}
	i, ok := slices.BinarySearchFunc(entries, base, func(e treeEntry, n string) int { return strings.Compare(e.name, n) })
	if !ok {
		return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: fs.ErrNotExist}
	}
	return entries[i], path.Join(dir, base), nil
}

// maxLinkHops bounds how many links one lookup follows (a loop of links ends with an error).
const maxLinkHops = 40

// resolve finds the entry at name, following links (relative to the folder that holds them,
// never out of the tree), and returns it with its real path.
func (g *gitFS) resolve(op, name string, hops int) (treeEntry, string, error) {
	e, real, err := g.lookup(op, name)
	if err != nil || e.mode&fs.ModeSymlink == 0 {
		return e, real, err
	}
	if hops >= maxLinkHops {
		return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: errors.New("too many levels of symbolic links")}
	}
	target, err := g.read(e.id)
	if err != nil {
		return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: err}
	}
	t := string(target)
	if path.IsAbs(t) {
		return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: fmt.Errorf("%w: link to an absolute path", fs.ErrNotExist)}
	}
	next := path.Join(path.Dir(real), t)
	if next == ".." || strings.HasPrefix(next, "../") {
		return treeEntry{}, "", &fs.PathError{Op: op, Path: name, Err: fmt.Errorf("%w: link leaves the tree", fs.ErrNotExist)}
	}
	return g.resolve(op, next, hops+1)
}

// read returns a blob's content, read once per tree.
func (g *gitFS) read(id string) ([]byte, error) {
	g.mu.Lock()
	b, ok := g.blobs[id]
	g.mu.Unlock()
	if ok {
		return b, nil
	}
	b, err := g.src.blob(id)
	if err != nil {
		return nil, err
	}
	g.mu.Lock()
	g.blobs[id] = b
	g.mu.Unlock()
	return b, nil
}

// Open implements fs.FS.
func (g *gitFS) Open(name string) (fs.File, error) {
	e, real, err := g.resolve("open", name, 0)
	if err != nil {
		return nil, err
	}
	info := g.info(e, path.Base(name))
	if e.mode.IsDir() {
		entries, err := g.src.list(real)
		if err != nil {
			return nil, &fs.PathError{Op: "open", Path: name, Err: err}
		}
		return &gitDir{info: info, fs: g, entries: entries}, nil
	}
	b, err := g.read(e.id)
	if err != nil {
		return nil, &fs.PathError{Op: "open", Path: name, Err: err}
	}
	return &gitFile{info: info, data: b}, nil
}

// ReadFile implements fs.ReadFileFS.
func (g *gitFS) ReadFile(name string) ([]byte, error) {
	e, _, err := g.resolve("read", name, 0)
	if err != nil {
		return nil, err
	}
	if e.mode.IsDir() {
		return nil, &fs.PathError{Op: "read", Path: name, Err: errors.New("is a directory")}
	}
	b, err := g.read(e.id)
	if err != nil {
		return nil, &fs.PathError{Op: "read", Path: name, Err: err}
	}
	return slices.Clone(b), nil
}

// ReadDir implements fs.ReadDirFS.
func (g *gitFS) ReadDir(name string) ([]fs.DirEntry, error) {
	e, real, err := g.resolve("readdir", name, 0)
	if err != nil {
		return nil, err
	}
	if !e.mode.IsDir() {
		return nil, &fs.PathError{Op: "readdir", Path: name, Err: errors.New("not a directory")}
	}
	entries, err := g.src.list(real)
	if err != nil {
		return nil, &fs.PathError{Op: "readdir", Path: name, Err: err}
	}
	out := make([]fs.DirEntry, len(entries))
	for i, c := range entries {
		out[i] = fs.FileInfoToDirEntry(g.info(c, c.name))
	}
	return out, nil
}

// Stat implements fs.StatFS.
func (g *gitFS) Stat(name string) (fs.FileInfo, error) {
	e, _, err := g.resolve("stat", name, 0)
	if err != nil {
		return nil, err
	}
	return g.info(e, path.Base(name)), nil
}

// Lstat implements fs.ReadLinkFS.
func (g *gitFS) Lstat(name string) (fs.FileInfo, error) {
	e, _, err := g.lookup("lstat", name)
	if err != nil {
		return nil, err
	}
	return g.info(e, path.Base(name)), nil
}

// ReadLink implements fs.ReadLinkFS.
func (g *gitFS) ReadLink(name string) (string, error) {
	e, _, err := g.lookup("readlink", name)
	if err != nil {
		return "", err
	}
	if e.mode&fs.ModeSymlink == 0 {
		return "", &fs.PathError{Op: "readlink", Path: name, Err: fs.ErrInvalid}
	}
	b, err := g.read(e.id)
	if err != nil {
		return "", &fs.PathError{Op: "readlink", Path: name, Err: err}
	}
	return string(b), nil
}

func (g *gitFS) info(e treeEntry, name string) *gitInfo {
	return &gitInfo{name: name, mode: e.mode, id: e.id, fs: g}
}

// gitInfo is an entry's fs.FileInfo; its size is the blob's, read when asked for.
type gitInfo struct {
	name string
	mode fs.FileMode
	id   string
	fs   *gitFS
}

func (i *gitInfo) Name() string       { return i.name }
func (i *gitInfo) Mode() fs.FileMode  { return i.mode }
func (i *gitInfo) ModTime() time.Time { return time.Time{} }
func (i *gitInfo) IsDir() bool        { return i.mode.IsDir() }
func (i *gitInfo) Sys() any           { return nil }
func (i *gitInfo) Size() int64 {
	if i.mode.IsDir() {
		return 0
	}
	b, err := i.fs.read(i.id)
	if err != nil {
		return 0
	}
	return int64(len(b))
}

type gitFile struct {
	info *gitInfo
	data []byte
	off  int
}

func (f *gitFile) Stat() (fs.FileInfo, error) { return f.info, nil }
func (f *gitFile) Close() error               { return nil }
func (f *gitFile) Read(p []byte) (int, error) {
	if f.off >= len(f.data) {
		return 0, io.EOF
	}
	n := copy(p, f.data[f.off:])
	f.off += n
	return n, nil
}

type gitDir struct {
	info    *gitInfo
	fs      *gitFS
	entries []treeEntry
	off     int
}

func (d *gitDir) Stat() (fs.FileInfo, error) { return d.info, nil }
func (d *gitDir) Close() error               { return nil }
func (d *gitDir) Read([]byte) (int, error) {
	return 0, &fs.PathError{Op: "read", Path: d.info.name, Err: errors.New("is a directory")}
}

// ReadDir implements fs.ReadDirFile.
func (d *gitDir) ReadDir(n int) ([]fs.DirEntry, error) {
	rest := d.entries[d.off:]
	if n > 0 && len(rest) == 0 {
		return nil, io.EOF
	}
	if n > 0 && n < len(rest) {
		rest = rest[:n]
	}
	d.off += len(rest)
	out := make([]fs.DirEntry, len(rest))
	for i, c := range rest {
		out[i] = fs.FileInfoToDirEntry(d.fs.info(c, c.name))
	}
	return out, nil
}

// listing is a treeSource built from a flat list of files (the index, `git ls-tree -r`): every
// folder's entries are known up front.
type listing struct {
	dirs  map[string][]treeEntry
	blobs func(id string) ([]byte, error)
}

// newListing makes a listing from files (slash paths with their modes and ids); the folders
// on their way are implied.
func newListing(files map[string]treeEntry, blobs func(string) ([]byte, error)) *listing {
	l := &listing{dirs: map[string][]treeEntry{".": nil}, blobs: blobs}
	for p, e := range files {
		dir, base := path.Split(p)
		dir = path.Clean(dir)
		e.name = base
		l.dirs[dir] = append(l.dirs[dir], e)
	}
	// Every folder up to the top is listed in its parent.
	known := map[string]bool{".": true}
	for dir := range l.dirs {
		for dir != "." && !known[dir] {
			known[dir] = true
			parent, name := path.Split(dir)
			parent = path.Clean(parent)
			l.dirs[parent] = append(l.dirs[parent], treeEntry{name: name, mode: fs.ModeDir | 0o755})
			dir = parent
		}
	}
	for _, v := range l.dirs {
		slices.SortFunc(v, func(a, b treeEntry) int { return strings.Compare(a.name, b.name) })
	}
	return l
}

func (l *listing) list(dir string) ([]treeEntry, error) {
	e, ok := l.dirs[dir]
	if !ok {
		return nil, fs.ErrNotExist
	}
	return e, nil
}

func (l *listing) blob(id string) ([]byte, error) { return l.blobs(id) }
