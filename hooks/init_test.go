package hooks

import (
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"
)

func TestInitNotebook(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "lab")
	created, err := InitNotebook(dir, []byte("# lab\n"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range append([]string{".git/", "README.md"}, "wafers/", "cooldowns/", "templates/") {
		if !slices.Contains(created, want) {
			t.Errorf("created %v, missing %s", created, want)
		}
	}
	// The tool's temporary files are ignored by git.
	if b, _ := os.ReadFile(filepath.Join(dir, ".gitignore")); !strings.Contains(string(b), "\n"+TempPattern+"\n") {
		t.Errorf(".gitignore = %q, want a line %s", b, TempPattern)
	}
	// A second run changes nothing and keeps the README a person may have edited.
	if err := os.WriteFile(filepath.Join(dir, "README.md"), []byte("# mine\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	again, err := InitNotebook(dir, []byte("# lab\n"))
	if err != nil || len(again) != 0 {
		t.Errorf("second init created %v (err %v), want nothing", again, err)
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "README.md")); string(b) != "# mine\n" {
		t.Errorf("README overwritten: %q", b)
	}
}

// A folder inside an existing repository becomes a notebook without a nested repository.
func TestInitInsideRepository(t *testing.T) {
	top := t.TempDir()
	if _, err := InitNotebook(top, nil); err != nil {
		t.Fatal(err)
	}
	sub := filepath.Join(top, "notes")
	created, err := InitNotebook(sub, nil)
	if err != nil {
		t.Fatal(err)
	}
	if slices.Contains(created, ".git/") {
		t.Errorf("created a nested repository: %v", created)
	}
}

// CommitAll makes a commit the git binary reads back.
func TestCommitAll(t *testing.T) {
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not on PATH")
	}
	dir := t.TempDir()
	if _, err := InitNotebook(dir, []byte("# lab\n")); err != nil {
		t.Fatal(err)
	}
	when := time.Date(2024, 3, 15, 17, 20, 0, 0, time.UTC)
	if _, err := CommitAll(dir, "first", Author{Name: "A. K.", Email: "ak@lab.invalid", When: when}); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command("git", "log", "--format=%an|%ae|%aI|%s", "--name-only")
	cmd.Dir = dir
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("git log: %v\n%s", err, out)
	}
	s := string(out)
	if !strings.Contains(s, "A. K.|ak@lab.invalid|2024-03-15T17:20:00+00:00|first") || !strings.Contains(s, "wafers/.gitkeep") {
		t.Errorf("git log:\n%s", s)
	}
}

// An existing .gitignore keeps its lines and gains the pattern once.
func TestInitKeepsGitignore(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, ".gitignore"), []byte("*.bak"), 0o644); err != nil {
		t.Fatal(err)
	}
	for range 2 {
		if _, err := InitNotebook(dir, nil); err != nil {
			t.Fatal(err)
		}
	}
	b, _ := os.ReadFile(filepath.Join(dir, ".gitignore"))
	if !strings.HasPrefix(string(b), "*.bak\n") || strings.Count(string(b), TempPattern) != 1 {
		t.Errorf(".gitignore = %q", b)
	}
}

// git itself ignores a temporary file named as calcblock names them.
func TestGitIgnoresTemps(t *testing.T) {
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git not on PATH")
	}
	dir := t.TempDir()
	if _, err := InitNotebook(dir, nil); err != nil {
		t.Fatal(err)
	}
	tmp := filepath.Join("cooldowns", ".CD24-001.md.tmp-2840193")
	if err := os.WriteFile(filepath.Join(dir, tmp), []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command("git", "check-ignore", "-q", filepath.ToSlash(tmp))
	cmd.Dir = dir
	if err := cmd.Run(); err != nil {
		t.Errorf("git check-ignore %s: %v (not ignored)", tmp, err)
	}
}
