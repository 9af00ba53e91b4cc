package hooks

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Install then uninstall leaves the repository as it was: no hook, no configuration of ours,
// no .gitattributes where there was none; a second install changes nothing.
func TestInstallUninstall(t *testing.T) {
	dir := newRepo(t, map[string]string{"a.md": "# a\n"})
	cfg := gitT(t, dir, "config", "--local", "--list")
	done, err := Install(dir, "/opt/lab tools/cleave")
	if err != nil {
		t.Fatal(err)
	}
	if len(done) != 4 {
		t.Errorf("install did %q", done)
	}
	if h := readFile(t, filepath.Join(dir, ".git", "hooks", "pre-merge-commit")); !strings.Contains(h, "exec cleave hooks pre-merge-commit") {
		t.Errorf("pre-merge-commit hook:\n%s", h)
	}
	hook := readFile(t, filepath.Join(dir, ".git", "hooks", "pre-commit"))
	if !strings.HasPrefix(hook, "#!/bin/sh\n") || !strings.Contains(hook, `'/opt/lab tools/cleave' hooks pre-commit`) || strings.Contains(hook, "\r") {
		t.Errorf("hook script:\n%s", hook)
	}
	fi, err := os.Stat(filepath.Join(dir, ".git", "hooks", "pre-merge-commit"))
	if err != nil || fi.Mode().Perm()&0o111 == 0 {
		t.Errorf("pre-merge-commit hook: %v %v", fi, err)
	}
	driver := gitT(t, dir, "config", "merge.cleave.driver")
	if !strings.Contains(driver, "hooks merge %O %A %B %L %P") || !strings.Contains(driver, "git merge-file --marker-size=%L %A %O %B") {
		t.Errorf("driver: %s", driver)
	}
	attr := readFile(t, filepath.Join(dir, ".gitattributes"))
	if again, err := Install(dir, "/opt/lab tools/cleave"); err != nil || len(again) != 3 {
		t.Errorf("second install: %q, %v", again, err)
	}
	if got := readFile(t, filepath.Join(dir, ".gitattributes")); got != attr {
		t.Errorf("second install changed .gitattributes:\n%s", got)
	}
	if _, err := os.Stat(filepath.Join(dir, ".git", "hooks", "pre-commit"+chainedSuffix)); err == nil {
		t.Error("a second install chained our own hook")
	}
	if _, err := Uninstall(dir); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{".gitattributes", ".git/hooks/pre-commit", ".git/hooks/pre-merge-commit", ".git/cleave/installed.json"} {
		if _, err := os.Stat(filepath.Join(dir, p)); err == nil {
			t.Errorf("%s is still there after uninstall", p)
		}
	}
	if got := gitT(t, dir, "config", "--local", "--list"); got != cfg {
		t.Errorf("configuration after uninstall:\n%s\nwant:\n%s", got, cfg)
	}
}

// A .gitattributes without a final newline gets one only for our lines, and uninstall takes
// exactly those away.
func TestAttributesRoundTrip(t *testing.T) {
	dir := newRepo(t, map[string]string{".gitattributes": "*.csv -diff"})
	if _, err := Install(dir, ""); err != nil {
		t.Fatal(err)
	}
	if got := readFile(t, filepath.Join(dir, ".gitattributes")); !strings.HasPrefix(got, "*.csv -diff\n# cleave") || !hasLine([]byte(got), attributesLine) {
		t.Errorf(".gitattributes: %q", got)
	}
	if _, err := Uninstall(dir); err != nil {
		t.Fatal(err)
	}
	if got := readFile(t, filepath.Join(dir, ".gitattributes")); got != "*.csv -diff" {
		t.Errorf(".gitattributes after uninstall: %q", got)
	}
}
