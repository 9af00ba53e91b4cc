package hooks

import (
	"bytes"
	"fmt"
	"io/fs"
	"sort"
	"strings"
)

// Staged is the content of the git index (the one git uses now: $GIT_INDEX_FILE inside a hook)
// as a file system, read through the git binary: `git ls-files -s -z` for the entries and one
// `git cat-file --batch` for the blobs. go-git is never used here: it ignores GIT_INDEX_FILE
// and cannot read every index git writes.
type Staged struct {
	*gitFS
	// Entries maps each staged path (slash path from the top of the work tree) to its mode
	// (as git prints it) and blob id.
	Entries map[string]IndexEntry
	// Unmerged lists the paths with unresolved conflicts (entries in stages 1 to 3), sorted.
	Unmerged []string

	cat *catFile
}

// IndexEntry is one path of the index.
type IndexEntry struct {
	Mode string // "100644", "100755", "120000", …
	ID   string // blob id
}

// ReadIndex reads the index of the repository r. The blobs of the Markdown files are read at
// once (one stream through git), others when asked for. Close ends the git process.
func (r *Repo) ReadIndex() (*Staged, error) {
	out, err := r.git().run(nil, "ls-files", "-s", "-z")
	if err != nil {
		return nil, fmt.Errorf("reading the index: %w", err)
	}
	s := &Staged{Entries: map[string]IndexEntry{}}
	files := map[string]treeEntry{}
	unmerged := map[string]bool{}
	for _, rec := range bytes.Split(out, []byte{0}) {
		if len(rec) == 0 {
			continue
		}
		// "MODE ID STAGE\tPATH"
		meta, p, ok := strings.Cut(string(rec), "\t")
		f := strings.Fields(meta)
		if !ok || len(f) != 3 {
			return nil, fmt.Errorf("reading the index: unexpected line %q from git ls-files", rec)
		}
		if f[2] != "0" {
			unmerged[p] = true
			continue
		}
		s.Entries[p] = IndexEntry{Mode: f[0], ID: f[1]}
		if m, ok := gitMode(f[0]); ok && !m.IsDir() {
			files[p] = treeEntry{mode: m, id: f[1]}
		}
	}
	for p := range unmerged {
		s.Unmerged = append(s.Unmerged, p)
	}
	sort.Strings(s.Unmerged)
	cat, err := startCatFile(r.git())
	if err != nil {
		return nil, err
	}
	s.cat = cat
	s.gitFS = newGitFS(newListing(files, cat.read))
	if err := s.prefetch(files); err != nil {
		cat.close()
		return nil, err
	}
	return s, nil
}

// prefetch reads every Markdown blob in one stream: loading the notebook reads them all.
func (s *Staged) prefetch(files map[string]treeEntry) error {
	var ids []string
	seen := map[string]bool{}
	for p, e := range files {
		if strings.HasSuffix(p, ".md") && e.mode.IsRegular() && !seen[e.id] {
			seen[e.id] = true
			ids = append(ids, e.id)
		}
	}
	sort.Strings(ids)
	blobs, err := s.cat.readMany(ids)
	if err != nil {
		return fmt.Errorf("reading staged files: %w", err)
	}
	s.mu.Lock()
	for i, id := range ids {
		s.blobs[id] = blobs[i]
	}
	s.mu.Unlock()
	return nil
}

// Blob returns the staged content of the file at slash path p.
func (s *Staged) Blob(p string) ([]byte, error) {
	e, ok := s.Entries[p]
	if !ok {
		return nil, &fs.PathError{Op: "read", Path: p, Err: fs.ErrNotExist}
	}
	return s.read(e.ID)
}

// Close ends the git process that reads blobs.
func (s *Staged) Close() error { return s.cat.close() }
