package main

import (
	"io/fs"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// copyDemo copies the demo notebook (with its .git folder and cache) into a fresh folder.
func copyDemo(t *testing.T) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "copy")
	if err := os.CopyFS(dir, os.DirFS(demoNotebook(t))); err != nil {
		t.Fatal(err)
	}
	return dir
}

// entryFiles returns the content of every Markdown file of the notebook outside .git.
func entryFiles(t *testing.T, root string) map[string]string {
	t.Helper()
	out := map[string]string{}
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		if !d.IsDir() && strings.HasSuffix(p, ".md") {
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			rel, _ := filepath.Rel(root, p)
			out[filepath.ToSlash(rel)] = string(b)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

var evaluatedRe = regexp.MustCompile(`(\d+) line\(s\) evaluated`)

// evaluated reads the number of evaluated lines from the summary a check or calc prints on
// stderr; a check answered by the notebook digest alone evaluated nothing.
func evaluated(t *testing.T, errs string) int {
	t.Helper()
	if strings.Contains(errs, "nothing changed since the last check") {
		return 0
	}
	m := evaluatedRe.FindStringSubmatch(errs)
	if m == nil {
		t.Fatalf("no count of evaluated lines in %q", errs)
	}
	n, _ := strconv.Atoi(m[1])
	return n
}

// TestCacheIsOnlyACache: a second check of an unchanged notebook evaluates nothing, and
// deleting the cache under .git/cleave makes the next run evaluate every line again but
// changes no result: calc leaves every file byte for byte as it was.
func TestCacheIsOnlyACache(t *testing.T) {
	dir := copyDemo(t)
	before := entryFiles(t, dir)
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 {
		t.Fatalf("first check: exit %d\n%s%s", code, out, errs)
	}
	code, out, errs := cleave(t, "-C", dir, "check")
	if code != 0 || evaluated(t, errs) != 0 {
		t.Fatalf("second check of an unchanged notebook: exit %d, want 0 and nothing evaluated\n%s%s", code, out, errs)
	}
	if err := os.RemoveAll(filepath.Join(dir, ".git", "cleave")); err != nil {
		t.Fatal(err)
	}
	code, out, errs = cleave(t, "-C", dir, "calc")
	if code != 0 || evaluated(t, errs) == 0 {
		t.Fatalf("calc without a cache: exit %d, want 0 and every line evaluated\n%s%s", code, out, errs)
	}
	after := entryFiles(t, dir)
	if len(after) != len(before) {
		t.Fatalf("calc changed the set of files: %d before, %d after", len(before), len(after))
	}
	for p, b := range before {
		if after[p] != b {
			t.Errorf("%s: deleting the cache changed a result", p)
		}
	}
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 || evaluated(t, errs) != 0 {
		t.Errorf("check after the rebuild: exit %d, want 0 and nothing evaluated\n%s%s", code, out, errs)
	}
}

// staleRe is one line of check's report: path:line: old → new.
var staleRe = regexp.MustCompile(`^[a-z]+/[A-Za-z0-9._-]+\.md:[0-9]+: .+ → .+$`)

// TestCheckLineFormat: every line check prints for a stale result has the form
// path:line: old → new, with the path relative to the notebook and the line of the result.
func TestCheckLineFormat(t *testing.T) {
	dir := copyDemo(t)
	mask := filepath.Join(dir, "masks", "HB100.md")
	b, err := os.ReadFile(mask)
	if err != nil {
		t.Fatal(err)
	}
	edited := strings.Replace(string(b), "width: 100 um", "width: 50 um", 1)
	if edited == string(b) {
		t.Fatal("the demo mask has no `width: 100 um` to edit")
	}
	if err := os.WriteFile(mask, []byte(edited), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := cleave(t, "-C", dir, "check")
	if code != 1 {
		t.Fatalf("check after editing the mask: exit %d, want 1\n%s", code, out)
	}
	lines := strings.Split(strings.TrimRight(out, "\n"), "\n")
	if len(lines) == 0 || lines[0] == "" {
		t.Fatal("check printed nothing")
	}
	src := strings.Split(edited, "\n")
	for _, l := range lines {
		if !staleRe.MatchString(l) {
			t.Errorf("not path:line: old → new: %q", l)
			continue
		}
		if !strings.HasPrefix(l, "masks/HB100.md:") {
			continue
		}
		// The line number points at the result's own line in the file.
		n, _ := strconv.Atoi(strings.SplitN(l, ":", 3)[1])
		if n < 1 || n > len(src) || !strings.Contains(src[n-1], "#~") {
			t.Errorf("%q: line %d of the mask holds no result", l, n)
		}
	}
}

// TestNewUsesNotebookTemplate: a notebook's own templates/KIND.md replaces the built-in
// template of that kind for `cleave new`; other kinds keep the built-in one.
func TestNewUsesNotebookTemplate(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "lab")
	if code, out, errs := cleave(t, "init", dir); code != 0 {
		t.Fatalf("init: exit %d\n%s%s", code, out, errs)
	}
	own := "---\nid: {{.ID}}\nkind: wafer\nsubstrate: semi-insulating GaAs (our own template)\n---\n# {{.ID}}\n"
	if err := os.WriteFile(filepath.Join(dir, "templates", "wafer.md"), []byte(own), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, out, errs := cleave(t, "-C", dir, "new", "wafer", "W7"); code != 0 {
		t.Fatalf("new wafer: exit %d\n%s%s", code, out, errs)
	}
	got, _ := os.ReadFile(filepath.Join(dir, "wafers", "W7.md"))
	want := "---\nid: W7\nkind: wafer\nsubstrate: semi-insulating GaAs (our own template)\n---\n# W7\n"
	if string(got) != want {
		t.Errorf("wafers/W7.md = %q, want the notebook's template rendered: %q", got, want)
	}
	if code, out, errs := cleave(t, "-C", dir, "new", "mask", "M7"); code != 0 {
		t.Fatalf("new mask: exit %d\n%s%s", code, out, errs)
	}
	m, _ := os.ReadFile(filepath.Join(dir, "masks", "M7.md"))
	if !strings.Contains(string(m), "probes:") {
		t.Errorf("a kind without a notebook template should use the built-in one:\n%s", m)
	}
	// A broken notebook template is an error naming the file, and nothing is written.
	if err := os.WriteFile(filepath.Join(dir, "templates", "piece.md"), []byte("---\nid: {{.ID\n---\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs := cleave(t, "-C", dir, "new", "piece", "W7-a", "--from", "W7")
	if code != 1 || !strings.Contains(errs, "piece.md") {
		t.Errorf("broken notebook template: exit %d, stderr %q; want 1 naming piece.md", code, errs)
	}
	if _, err := os.Stat(filepath.Join(dir, "pieces", "W7-a.md")); !os.IsNotExist(err) {
		t.Errorf("a piece was written from a broken template (stat: %v)", err)
	}
	if code, out, errs := cleave(t, "-C", dir, "validate"); code != 0 {
		t.Errorf("validate: exit %d\n%s%s", code, out, errs)
	}
}

// TestValidateBrokenNotebooks runs `cleave validate` on each broken notebook under
// notebook/testdata/broken: it exits 1 and prints exactly the problems the notebook
// package's golden file lists, one `path:line:col: message` a line.
func TestValidateBrokenNotebooks(t *testing.T) {
	cases, err := filepath.Glob(filepath.Join("notebook", "testdata", "broken", "*"))
	if err != nil || len(cases) == 0 {
		t.Fatalf("no broken notebooks found (%v)", err)
	}
	for _, c := range cases {
		t.Run(filepath.Base(c), func(t *testing.T) {
			want, err := os.ReadFile(filepath.Join(c, "problems.golden"))
			if err != nil {
				t.Fatal(err)
			}
			dir := filepath.Join(t.TempDir(), "nb")
			if err := os.CopyFS(dir, os.DirFS(c)); err != nil {
				t.Fatal(err)
			}
			if err := os.Remove(filepath.Join(dir, "problems.golden")); err != nil {
				t.Fatal(err)
			}
			if err := os.Mkdir(filepath.Join(dir, ".git"), 0o755); err != nil {
				t.Fatal(err)
			}
			code, out, errs := cleave(t, "-C", dir, "validate")
			if code != 1 {
				t.Errorf("exit %d, want 1\n%s%s", code, out, errs)
			}
			if out != string(want) {
				t.Errorf("problems differ from %s:\n--- got ---\n%s--- want ---\n%s", c, out, want)
			}
		})
	}
}
