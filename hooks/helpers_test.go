package hooks

import (
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

func TestMain(m *testing.M) {
	// The tests' git commands read no configuration of the machine or the user.
	os.Setenv("GIT_CONFIG_NOSYSTEM", "1")
	os.Setenv("GIT_CONFIG_GLOBAL", os.DevNull)
	code := m.Run()
	if historyRepos.root != "" {
		os.RemoveAll(historyRepos.root)
	}
	os.Exit(code)
}

// needGit skips a test when the git binary is missing.
func needGit(t testing.TB) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not on PATH")
	}
}

// gitT runs git in dir and returns its output; a failure ends the test.
func gitT(t testing.TB, dir string, args ...string) string {
	t.Helper()
	cmd := exec.Command("git", args...)
	if dir != "" {
		cmd.Dir = dir
	}
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("git %s: %v\n%s", strings.Join(args, " "), err, out)
	}
	return string(out)
}

// writeFiles writes files (slash paths relative to dir) with their contents.
func writeFiles(t testing.TB, dir string, files map[string]string) {
	t.Helper()
	for p, body := range files {
		full := filepath.Join(dir, filepath.FromSlash(p))
		if err := os.MkdirAll(filepath.Dir(full), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(full, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func readFile(t testing.TB, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// newRepo makes a git repository in a new folder with an invented author, holding files in
// one first commit.
func newRepo(t testing.TB, files map[string]string) string {
	t.Helper()
	needGit(t)
	dir := t.TempDir()
	gitT(t, dir, "init", "-q", "-b", "main")
	gitT(t, dir, "config", "user.name", "T. S.")
	gitT(t, dir, "config", "user.email", "ts@lab.invalid")
	writeFiles(t, dir, files)
	gitT(t, dir, "add", "-A")
	gitT(t, dir, "commit", "-q", "--no-verify", "-m", "first")
	return dir
}

// tinyNotebook is the notebook of ../testdata/tiny (a mask, a wafer, a piece, two devices and
// two cooldowns whose blocks evaluate in milliseconds), without results: a test that needs them
// lets the engine write them.
func tinyNotebook(t testing.TB) map[string]string {
	t.Helper()
	files := map[string]string{}
	root := filepath.Join("..", "testdata", "tiny")
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(p)
		rel, _ := filepath.Rel(root, p)
		files[filepath.ToSlash(rel)] = string(b)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

// locate is Locate for a test.
func locate(t testing.TB, dir string) *Repo {
	t.Helper()
	repo, err := Locate(dir)
	if err != nil {
		t.Fatal(err)
	}
	return repo
}

// readIndex reads the index of the repository at dir, closed when the test ends.
func readIndex(t testing.TB, dir string) *Staged {
	t.Helper()
	st, err := locate(t, dir).ReadIndex()
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	return st
}

// openObjects opens the object store of the repository at dir, closed when the test ends.
func openObjects(t testing.TB, dir string) (*Repo, *Objects) {
	t.Helper()
	repo := locate(t, dir)
	objs, err := repo.OpenObjects()
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { objs.Close() })
	return repo, objs
}
