package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// demoRepo copies the demo notebook with its git history into a new folder, with an author
// for new commits.
func demoRepo(t *testing.T) string {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git binary not on PATH")
	}
	dir := copyDemo(t)
	gitOut(t, dir, "config", "user.name", "T. S.")
	gitOut(t, dir, "config", "user.email", "ts@lab.invalid")
	return dir
}

// check --staged reads the index, not the work tree; check --rev reads a commit.
func TestCheckStagedAndRev(t *testing.T) {
	dir := demoRepo(t)
	for _, rev := range []string{"HEAD", "HEAD~6", "HEAD~3"} {
		if code, out, errs := cleave(t, "-C", dir, "check", "--rev", rev); code != 0 {
			t.Errorf("check --rev %s: exit %d\n%s%s", rev, code, out, errs)
		}
	}
	mask := filepath.Join(dir, "masks", "HB100.md")
	orig, err := os.ReadFile(mask)
	if err != nil {
		t.Fatal(err)
	}
	// Stage a narrower channel, then put the work tree back as it was: only the index differs.
	if err := os.WriteFile(mask, []byte(strings.Replace(string(orig), "width: 100 um", "width: 50 um", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	gitOut(t, dir, "add", "masks/HB100.md")
	if err := os.WriteFile(mask, orig, 0o644); err != nil {
		t.Fatal(err)
	}
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 {
		t.Errorf("check of the unchanged work tree: exit %d\n%s%s", code, out, errs)
	}
	code, out, errs := cleave(t, "-C", dir, "check", "--staged")
	if code != 1 {
		t.Fatalf("check --staged: exit %d, want 1\n%s%s", code, out, errs)
	}
	for _, want := range []string{"masks/HB100.md:38: 5.0000 → 10.000", "cooldowns/CD24-003.md:"} {
		if !strings.Contains(out, want) {
			t.Errorf("check --staged does not list %q:\n%s", want, out)
		}
	}
	if !strings.Contains(errs, "the index") {
		t.Errorf("check --staged does not say what it checked: %q", errs)
	}
	// A path limits the report; it need not exist in the work tree.
	code, out, _ = cleave(t, "-C", dir, "check", "--staged", filepath.Join(dir, "cooldowns", "CD24-003.md"))
	if code != 1 || strings.Contains(out, "masks/") || !strings.Contains(out, "cooldowns/CD24-003.md:") {
		t.Errorf("check --staged cooldowns/CD24-003.md: exit %d\n%s", code, out)
	}
	// The work tree and HEAD are untouched by all this.
	if b, _ := os.ReadFile(mask); string(b) != string(orig) {
		t.Error("check --staged changed the work tree")
	}
	if code, _, errs := cleave(t, "-C", dir, "check", "--rev", "no-such-branch"); code != 1 || !strings.Contains(errs, "no such commit") {
		t.Errorf("check --rev no-such-branch: exit %d, %q", code, errs)
	}
	if code, _, errs := cleave(t, "-C", dir, "check", "--staged", "--rev", "HEAD"); code != 2 || !strings.Contains(errs, "usage:") {
		t.Errorf("check --staged --rev: exit %d, %q", code, errs)
	}
}
