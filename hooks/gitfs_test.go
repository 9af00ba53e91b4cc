package hooks

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"github.com/go-git/go-git/v5"
)

// The index and a commit, read as file systems, pass the standard library's file-system
// checks and hold exactly the staged or committed bytes (not the work tree's).
func TestGitFS(t *testing.T) {
	dir := newRepo(t, map[string]string{
		"a.md":           "# a\n",
		"sub/b.md":       "# b\n",
		"sub/deep/c.csv": "B (T),Rxx (Ohm)\n0,1\n",
		"empty.md":       "",
	})
	if err := os.Symlink("sub/deep/c.csv", filepath.Join(dir, "link.csv")); err != nil {
		t.Fatal(err)
	}
	gitT(t, dir, "add", "link.csv")
	gitT(t, dir, "commit", "-q", "-m", "link")
	// Staged but not committed, and a work-tree edit that is neither.
	writeFiles(t, dir, map[string]string{"sub/b.md": "# b staged\n"})
	gitT(t, dir, "add", "sub/b.md")
	writeFiles(t, dir, map[string]string{"sub/b.md": "# b in the work tree only\n"})

	repo := locate(t, dir)
	st := readIndex(t, dir)
	want := []string{"a.md", "sub/b.md", "sub/deep/c.csv", "empty.md", "link.csv"}
	if err := fstest.TestFS(st, want...); err != nil {
		t.Fatal(err)
	}
	expectFile(t, st, "sub/b.md", "# b staged\n")
	expectFile(t, st, "link.csv", "B (T),Rxx (Ohm)\n0,1\n") // through the link
	if target, err := fs.ReadLink(st, "link.csv"); err != nil || target != "sub/deep/c.csv" {
		t.Errorf("ReadLink = %q, %v", target, err)
	}
	if fi, err := fs.Lstat(st, "link.csv"); err != nil || fi.Mode()&fs.ModeSymlink == 0 {
		t.Errorf("Lstat: %v, %v", fi, err)
	}

	head, id, closeFS, err := repo.RevFS("HEAD")
	if err != nil {
		t.Fatal(err)
	}
	defer closeFS()
	if len(id) != 40 {
		t.Errorf("commit id %q", id)
	}
	if err := fstest.TestFS(head, want...); err != nil {
		t.Fatal(err)
	}
	expectFile(t, head, "sub/b.md", "# b\n")
	if _, err := fs.ReadFile(head, "nope/x.md"); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
	first, _, closeFirst, err := repo.RevFS("HEAD~1")
	if err != nil {
		t.Fatal(err)
	}
	defer closeFirst()
	if _, err := fs.Stat(first, "link.csv"); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("HEAD~1 has link.csv: %v", err)
	}
	if _, _, _, err := repo.RevFS("no-such-branch"); err == nil || !strings.Contains(err.Error(), "no such commit") {
		t.Errorf("unknown revision: %v", err)
	}
}

// A link that leaves the tree is not followed.
func TestGitFSLinkOutside(t *testing.T) {
	dir := newRepo(t, map[string]string{"a.md": "# a\n"})
	if err := os.Symlink("../../etc/passwd", filepath.Join(dir, "out.csv")); err != nil {
		t.Fatal(err)
	}
	gitT(t, dir, "add", "out.csv")
	st := readIndex(t, dir)
	if _, err := fs.ReadFile(st, "out.csv"); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("reading a link out of the tree: %v", err)
	}
}

// A repository with SHA-256 object names cannot be read by go-git; RevFS reads it through the
// git binary instead.
func TestRevFSSHA256(t *testing.T) {
	needGit(t)
	dir := t.TempDir()
	if out, err := gitCmdOut(dir, "init", "-q", "--object-format=sha256"); err != nil {
		t.Skipf("this git cannot make a SHA-256 repository: %v %s", err, out)
	}
	gitT(t, dir, "config", "user.name", "T. S.")
	gitT(t, dir, "config", "user.email", "ts@lab.invalid")
	writeFiles(t, dir, map[string]string{"x/a.md": "# sha256\n"})
	gitT(t, dir, "add", "-A")
	gitT(t, dir, "commit", "-q", "-m", "first")
	repo := locate(t, dir)
	if _, err := repo.OpenObjects(); !errors.Is(err, ErrObjectFormat) {
		t.Fatalf("OpenObjects on a SHA-256 repository: %v", err)
	}
	fsys, id, closeFS, err := repo.RevFS("HEAD")
	if err != nil {
		t.Fatal(err)
	}
	defer closeFS()
	if len(id) != 64 {
		t.Errorf("commit id %q", id)
	}
	expectFile(t, fsys, "x/a.md", "# sha256\n")
}

func gitCmdOut(dir string, args ...string) ([]byte, error) {
	return gitCmd{dir: dir}.run(nil, args...)
}

func expectFile(t *testing.T, fsys fs.FS, name, want string) {
	t.Helper()
	b, err := fs.ReadFile(fsys, name)
	if err != nil {
		t.Errorf("%s: %v", name, err)
		return
	}
	if string(b) != want {
		t.Errorf("%s = %q, want %q", name, b, want)
	}
}

// A repository with settings go-git's own opening refuses (extensions.worktreeConfig in a
// format-1 repository, as `git sparse-checkout` leaves it) is read all the same: the object
// store is opened on the directories git reported.
func TestObjectsWithExtensions(t *testing.T) {
	dir := newRepo(t, map[string]string{"wafers/W1.md": "---\nid: W1\nkind: wafer\n---\n# W1\n"})
	gitT(t, dir, "config", "core.repositoryformatversion", "1")
	gitT(t, dir, "config", "extensions.worktreeConfig", "true")
	gitT(t, dir, "config", "extensions.preciousObjects", "true")
	if _, err := git.PlainOpen(dir); err == nil {
		t.Log("go-git opened the repository itself; the test still checks ours")
	}
	repo := locate(t, dir)
	rep, id, err := repo.CheckRev("HEAD", nil)
	if err != nil || len(id) != 40 || !rep.OK() {
		t.Fatalf("check --rev: %v %v", rep, err)
	}
	h, err := repo.SampleHistory("W1", "")
	if err != nil || len(h.Commits) != 1 {
		t.Fatalf("history: %+v %v", h, err)
	}
}
