package hooks

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"path"
	"path/filepath"
	"slices"
	"strings"
	"sync"

	"github.com/go-git/go-billy/v5"
	"github.com/go-git/go-billy/v5/osfs"
	"github.com/go-git/go-git/v5/plumbing"
	"github.com/go-git/go-git/v5/plumbing/cache"
	"github.com/go-git/go-git/v5/plumbing/object"
	"github.com/go-git/go-git/v5/storage/filesystem"
	"github.com/go-git/go-git/v5/storage/filesystem/dotgit"
)

// ErrObjectFormat is returned by OpenObjects for a repository whose objects go-git cannot read
// (SHA-256 object names).
var ErrObjectFormat = errors.New("go-git reads only repositories with SHA-1 object names")

// Objects reads the commits, trees and blobs of a repository with go-git. Revisions are
// resolved by the git binary (which knows every form a user may type); refs, the index and
// everything that writes go through git as well.
//
// The storage is opened directly on the git directories that git reported, so settings that
// only matter to commands which write or to the configuration (extensions.worktreeConfig,
// preciousObjects, partialClone) do not stop it; a blob missing from a partial clone is
// reported when read. Methods are safe for concurrent use (go-git is not).
type Objects struct {
	repo  *Repo
	mu    sync.Mutex
	st    *filesystem.Storage
	packs *packReader
}

// OpenObjects opens the object store of r for reading.
func (r *Repo) OpenObjects() (*Objects, error) {
	format, err := r.git().line("rev-parse", "--show-object-format")
	if err == nil && format != "" && format != "sha1" {
		return nil, fmt.Errorf("%s: %w (this one uses %s)", r.Top, ErrObjectFormat, format)
	}
	var dot billy.Filesystem = osfs.New(r.GitDir)
	if r.CommonDir != r.GitDir {
		dot = dotgit.NewRepositoryFilesystem(dot, osfs.New(r.CommonDir))
	}
	// A larger object cache than go-git's default pays off on long history walks.
	st := filesystem.NewStorageWithOptions(dot, cache.NewObjectLRU(256*cache.MiByte), filesystem.Options{KeepDescriptors: true})
	return &Objects{repo: r, st: st, packs: openPacks(filepath.Join(r.CommonDir, "objects"))}, nil
}

// Close releases the pack files held open.
func (o *Objects) Close() error { return errors.Join(o.packs.close(), o.st.Close()) }

// raw returns the type and content of an object: from the packs when it is there, else
// through go-git's storage (loose objects, alternates). The caller holds o.mu.
func (o *Objects) raw(h plumbing.Hash) (plumbing.ObjectType, []byte, error) {
	typ, data, err := o.packs.read(h)
	if err == nil {
		return typ, data, nil
	}
	obj, err := o.st.EncodedObject(plumbing.AnyObject, h)
	if err != nil {
		return plumbing.InvalidObject, nil, fmt.Errorf("reading object %s: %w", h, err)
	}
	rd, err := obj.Reader()
	if err != nil {
		return plumbing.InvalidObject, nil, err
	}
	defer rd.Close()
	buf := bytes.NewBuffer(make([]byte, 0, obj.Size()))
	if _, err := io.Copy(buf, rd); err != nil {
		return plumbing.InvalidObject, nil, err
	}
	return obj.Type(), buf.Bytes(), nil
}

// rawOf is raw for an object that must have the given type.
func (o *Objects) rawOf(want plumbing.ObjectType, h plumbing.Hash) ([]byte, error) {
	typ, data, err := o.raw(h)
	if err != nil {
		return nil, err
	}
	if typ != want {
		return nil, fmt.Errorf("object %s is a %s, not a %s", h, typ, want)
	}
	return data, nil
}

// Resolve turns a revision (a branch, a tag, HEAD~3, an abbreviated id…) into a commit id,
// with the git binary.
func (r *Repo) Resolve(rev string) (plumbing.Hash, error) {
	id, err := r.resolveID(rev)
	if err != nil {
		return plumbing.ZeroHash, err
	}
	if !plumbing.IsHash(id) {
		return plumbing.ZeroHash, fmt.Errorf("%q: %w", rev, ErrObjectFormat)
	}
	return plumbing.NewHash(id), nil
}

// resolveID is the full id of the commit rev names, in the repository's own object format.
func (r *Repo) resolveID(rev string) (string, error) {
	if strings.HasPrefix(rev, "-") {
		return "", fmt.Errorf("%q: not a revision", rev)
	}
	id, err := r.git().line("rev-parse", "--verify", "--quiet", "--end-of-options", rev+"^{commit}")
	if err != nil || id == "" {
		return "", fmt.Errorf("%q: no such commit in %s", rev, r.Top)
	}
	return id, nil
}

// Commit reads a commit.
func (o *Objects) Commit(h plumbing.Hash) (*object.Commit, error) {
	o.mu.Lock()
	defer o.mu.Unlock()
	data, err := o.rawOf(plumbing.CommitObject, h)
	if err != nil {
		return nil, fmt.Errorf("reading commit %s: %w", h, err)
	}
	mo := &plumbing.MemoryObject{}
	mo.SetType(plumbing.CommitObject)
	mo.Write(data)
	c := &object.Commit{}
	if err := c.Decode(mo); err != nil {
		return nil, fmt.Errorf("reading commit %s: %w", h, err)
	}
	c.Hash = h
	return c, nil
}

// Blob reads a blob's content.
func (o *Objects) Blob(h plumbing.Hash) ([]byte, error) {
	o.mu.Lock()
	defer o.mu.Unlock()
	data, err := o.rawOf(plumbing.BlobObject, h)
	if err != nil {
		return nil, fmt.Errorf("reading blob %s: %w", h, err)
	}
	return data, nil
}

// treeEntries lists a tree object's entries (mode, name, id) in the order stored, without
// building go-git's Tree. The caller holds o.mu.
func (o *Objects) treeEntries(h plumbing.Hash) ([]rawEntry, error) {
	data, err := o.rawOf(plumbing.TreeObject, h)
	if err != nil {
		return nil, fmt.Errorf("reading tree %s: %w", h, err)
	}
	var out []rawEntry
	for len(data) > 0 {
		e, rest, ok := nextTreeEntry(data)
		if !ok {
			return nil, fmt.Errorf("tree %s is damaged", h)
		}
		out = append(out, e)
		data = rest
	}
	return out, nil
}

// rawEntry is one entry of a tree object.
type rawEntry struct {
	mode string // octal, as stored ("100644", "40000", …)
	name string
	id   plumbing.Hash
}

// nextTreeEntry decodes the first entry of a tree object's content: "MODE NAME\0" and 20 bytes
// of object id.
func nextTreeEntry(data []byte) (rawEntry, []byte, bool) {
	sp := bytes.IndexByte(data, ' ')
	if sp < 0 {
		return rawEntry{}, nil, false
	}
	nul := bytes.IndexByte(data[sp+1:], 0)
	if nul < 0 || sp+1+nul+21 > len(data) {
		return rawEntry{}, nil, false
	}
	nul += sp + 1
	var id plumbing.Hash
	copy(id[:], data[nul+1:nul+21])
	return rawEntry{mode: string(data[:sp]), name: string(data[sp+1 : nul]), id: id}, data[nul+21:], true
}

// TreeFS is the tree of a commit as a file system (see gitFS).
func (o *Objects) TreeFS(commit plumbing.Hash) (fs.FS, error) {
	c, err := o.Commit(commit)
	if err != nil {
		return nil, err
	}
	return newGitFS(&treeDirs{o: o, root: c.TreeHash, dirs: map[string][]treeEntry{}}), nil
}

// treeDirs is a treeSource over a go-git tree: each folder's tree object is read when first
// listed.
type treeDirs struct {
	o    *Objects
	root plumbing.Hash

	mu   sync.Mutex
	dirs map[string][]treeEntry
}

func (t *treeDirs) list(dir string) ([]treeEntry, error) {
	t.mu.Lock()
	defer t.mu.Unlock()
	return t.listLocked(dir)
}

func (t *treeDirs) listLocked(dir string) ([]treeEntry, error) {
	if e, ok := t.dirs[dir]; ok {
		return e, nil
	}
	id := t.root
	if dir != "." {
		parent, base := path.Split(dir)
		entries, err := t.listLocked(path.Clean(parent))
		if err != nil {
			return nil, err
		}
		i, ok := slices.BinarySearchFunc(entries, base, func(e treeEntry, n string) int { return strings.Compare(e.name, n) })
		if !ok || !entries[i].mode.IsDir() {
			return nil, fs.ErrNotExist
		}
		id = plumbing.NewHash(entries[i].id)
	}
	t.o.mu.Lock()
	entries, err := t.o.treeEntries(id)
	t.o.mu.Unlock()
	if err != nil {
		return nil, err
	}
	out := make([]treeEntry, 0, len(entries))
	for _, e := range entries {
		if m, ok := gitMode(e.mode); ok {
			out = append(out, treeEntry{name: e.name, mode: m, id: e.id.String()})
		}
	}
	slices.SortFunc(out, func(a, b treeEntry) int { return strings.Compare(a.name, b.name) })
	t.dirs[dir] = out
	return out, nil
}

func (t *treeDirs) blob(id string) ([]byte, error) { return t.o.Blob(plumbing.NewHash(id)) }

// RevFS returns the tree of the commit rev names as a file system, read with go-git, or, for a
// repository go-git cannot read (SHA-256 object names), with `git ls-tree` and
// `git cat-file`. close releases what it holds.
func (r *Repo) RevFS(rev string) (fsys fs.FS, commit string, close func() error, err error) {
	objs, err := r.OpenObjects()
	if errors.Is(err, ErrObjectFormat) {
		return r.revFSWithGit(rev)
	}
	if err != nil {
		return nil, "", nil, err
	}
	h, err := r.Resolve(rev)
	if err != nil {
		objs.Close()
		return nil, "", nil, err
	}
	t, err := objs.TreeFS(h)
	if err != nil {
		objs.Close()
		return nil, "", nil, err
	}
	return t, h.String(), objs.Close, nil
}

// revFSWithGit lists a commit's tree with `git ls-tree -r` and reads blobs with
// `git cat-file --batch`.
func (r *Repo) revFSWithGit(rev string) (fs.FS, string, func() error, error) {
	id, err := r.resolveID(rev)
	if err != nil {
		return nil, "", nil, err
	}
	out, err := r.git().run(nil, "ls-tree", "-r", "-z", "--full-tree", id)
	if err != nil {
		return nil, "", nil, err
	}
	files := map[string]treeEntry{}
	for _, rec := range bytes.Split(out, []byte{0}) {
		meta, p, ok := strings.Cut(string(rec), "\t")
		f := strings.Fields(meta)
		if !ok || len(f) != 3 {
			continue
		}
		if m, ok := gitMode(f[0]); ok && !m.IsDir() {
			files[p] = treeEntry{mode: m, id: f[2]}
		}
	}
	cat, err := startCatFile(r.git())
	if err != nil {
		return nil, "", nil, err
	}
	return newGitFS(newListing(files, cat.read)), id, cat.close, nil
}
