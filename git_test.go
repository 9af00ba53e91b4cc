package main

import (
	"encoding/json"
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"
	"testing"

	"go.yaml.in/yaml/v3"
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
	t.Parallel()
	dir := tinyRepo(t)
	gitOut(t, dir, "commit", "-q", "--allow-empty", "-m", "second")
	for _, rev := range []string{"HEAD", "HEAD~1", "master"} {
		if code, out, errs := cleave(t, "-C", dir, "check", "--rev", rev); code != 0 {
			t.Errorf("check --rev %s: exit %d\n%s%s", rev, code, out, errs)
		}
	}
	orig := readFile(t, filepath.Join(dir, mask))
	// Stage a narrower channel, then put the work tree back as it was: only the index differs.
	editFile(t, dir, mask, maskWidth, maskWidth50)
	gitOut(t, dir, "add", mask)
	if err := os.WriteFile(filepath.Join(dir, mask), []byte(orig), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, out, errs := cleave(t, "-C", dir, "check"); code != 0 {
		t.Errorf("check of the unchanged work tree: exit %d\n%s%s", code, out, errs)
	}
	code, out, errs := cleave(t, "-C", dir, "check", "--staged")
	if code != 1 {
		t.Fatalf("check --staged: exit %d, want 1\n%s%s", code, out, errs)
	}
	// The width and the squares of the mask, the devices and the cooldowns all change.
	for _, want := range []string{mask + ":16: 100.00 um → 50.000 um", "devices/D1.md:", c1 + ":", "cooldowns/C2.md:"} {
		if !strings.Contains(out, want) {
			t.Errorf("check --staged does not list %q:\n%s", want, out)
		}
	}
	if !strings.Contains(errs, "the index") {
		t.Errorf("check --staged does not say what it checked: %q", errs)
	}
	// A path limits the report; it need not exist in the work tree.
	if err := os.Remove(filepath.Join(dir, c1)); err != nil {
		t.Fatal(err)
	}
	code, out, _ = cleave(t, "-C", dir, "check", "--staged", filepath.Join(dir, c1))
	if code != 1 || strings.Contains(out, "masks/") || !strings.Contains(out, c1+":") {
		t.Errorf("check --staged %s: exit %d\n%s", c1, code, out)
	}
	if code, _, errs := cleave(t, "-C", dir, "check", "--rev", "no-such-branch"); code != 1 || !strings.Contains(errs, "no such commit") {
		t.Errorf("check --rev no-such-branch: exit %d, %q", code, errs)
	}
	if code, _, errs := cleave(t, "-C", dir, "check", "--staged", "--rev", "HEAD"); code != 2 || !strings.Contains(errs, "usage:") {
		t.Errorf("check --staged --rev: exit %d, %q", code, errs)
	}
}

// repoState is what the hook tests compare to show that nothing was lost: every file of the
// work tree (outside .git) and every staged blob.
type repoState struct {
	files map[string]string
	index map[string]string
}

func capture(t *testing.T, dir string) repoState {
	t.Helper()
	st := repoState{files: map[string]string{}, index: map[string]string{}}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		if d.Type().IsRegular() {
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			rel, _ := filepath.Rel(dir, p)
			st.files[filepath.ToSlash(rel)] = string(b)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range strings.Split(strings.TrimRight(gitOut(t, dir, "ls-files", "-z"), "\x00"), "\x00") {
		if p != "" {
			st.index[p] = gitOut(t, dir, "show", ":"+p)
		}
	}
	return st
}

// sameExcept reports every difference between two states outside the listed paths.
func sameExcept(t *testing.T, what string, before, after repoState, except ...string) {
	t.Helper()
	skip := map[string]bool{}
	for _, p := range except {
		skip[p] = true
	}
	for _, side := range []struct {
		name string
		a, b map[string]string
	}{{"work tree", before.files, after.files}, {"index", before.index, after.index}} {
		for p, v := range side.a {
			if w, ok := side.b[p]; !skip[p] && (!ok || w != v) {
				t.Errorf("%s: %s of %s changed", what, side.name, p)
			}
		}
		for p := range side.b {
			if _, ok := side.a[p]; !skip[p] && !ok {
				t.Errorf("%s: %s gained %s", what, side.name, p)
			}
		}
	}
}

// gitTry runs git and returns its combined output and whether it succeeded.
func gitTry(dir string, args ...string) (string, bool) {
	cmd := exec.Command("git", args...)
	cmd.Dir = dir
	out, err := cmd.CombinedOutput()
	return string(out), err == nil
}

// tinyRepo is a git repository holding testdata/tiny (a notebook whose blocks evaluate in
// milliseconds) with its results written by `cleave calc`, the hooks installed and everything
// committed on the branch master.
func tinyRepo(t *testing.T) string {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git binary not on PATH")
	}
	dir := filepath.Join(t.TempDir(), "nb")
	if err := os.CopyFS(dir, os.DirFS(filepath.Join("testdata", "tiny"))); err != nil {
		t.Fatal(err)
	}
	gitOut(t, dir, "init", "-q", "-b", "master")
	gitOut(t, dir, "config", "user.name", "T. S.")
	gitOut(t, dir, "config", "user.email", "ts@lab.invalid")
	for _, args := range [][]string{{"calc"}, {"hooks", "install"}} {
		if code, out, errs := cleave(t, append([]string{"-C", dir}, args...)...); code != 0 {
			t.Fatalf("cleave %v: exit %d\n%s%s", args, code, out, errs)
		}
	}
	gitOut(t, dir, "add", "-A")
	gitOut(t, dir, "commit", "-q", "--no-verify", "-m", "a tiny notebook")
	return dir
}

// hookedDemo is a copy of the demo notebook, whose hooks the demo installed.
func hookedDemo(t *testing.T) string {
	t.Helper()
	dir := demoRepo(t)
	if _, err := os.Stat(filepath.Join(dir, ".git", "hooks", "pre-commit")); err != nil {
		t.Fatalf("the demo did not install its hooks: %v", err)
	}
	return dir
}

func editFile(t *testing.T, dir, rel, old, new string) string {
	t.Helper()
	p := filepath.Join(dir, filepath.FromSlash(rel))
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(b), old) {
		t.Fatalf("%s does not contain %q", rel, old)
	}
	s := strings.Replace(string(b), old, new, 1)
	if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
	return s
}

// The demo notebook's cooldown and the edits the partial-staging test makes to it.
const (
	cd1       = "cooldowns/CD24-001.md"
	hallRange = "hall = hall_density(d, 0.05 T .. 0.3 T)"
	cd1Prose  = "Cooled slowly (2 h from 77 K to 4 K) with all contacts grounded. No illumination."
)

// What the tests edit in testdata/tiny.
const (
	mask        = "masks/M1.md"
	c1          = "cooldowns/C1.md"
	c1Input     = "R = 50 Ohm"
	c1Input2    = "R = 45 Ohm"
	c1Prose     = "Cooled slowly with all contacts grounded. No illumination."
	maskWidth   = "width: 100 um"
	maskWidth50 = "width: 50 um"
)

// note adds a sentence after a paragraph of prose.
func note(prose string) string {
	return prose + "\nA second look at the wiring showed nothing loose (RS, later)."
}

// A file staged in part (`git apply --cached` of one hunk): the commit carries the staged
// hunk with recomputed results, the unstaged hunk stays in the work tree byte for byte, and
// the work tree gets the same results, so `git diff` shows only the unstaged hunk.
func TestHookPartiallyStagedFile(t *testing.T) {
	t.Parallel()
	dir := hookedDemo(t)
	before := capture(t, dir)
	staged := editFile(t, dir, cd1, hallRange, strings.Replace(hallRange, "0.3 T", "0.25 T", 1))
	patch := gitOut(t, dir, "diff", "--", cd1)
	work := editFile(t, dir, cd1, cd1Prose, note(cd1Prose))
	pf := filepath.Join(t.TempDir(), "hunk.patch")
	if err := os.WriteFile(pf, []byte(patch), 0o644); err != nil {
		t.Fatal(err)
	}
	gitOut(t, dir, "apply", "--cached", pf)
	if got := gitOut(t, dir, "show", ":"+cd1); got != staged {
		t.Fatal("git apply --cached did not stage exactly the first hunk")
	}

	out := gitOut(t, dir, "commit", "-m", "CD24-001: Hall fit up to 0.25 T")
	if !strings.Contains(out, "recomputed "+cd1+" (index and work tree)") {
		t.Errorf("the hook did not say what it recomputed:\n%s", out)
	}
	committed := gitOut(t, dir, "show", "HEAD:"+cd1)
	if stripResults(committed) != stripResults(staged) {
		t.Error("the commit holds other inputs than were staged")
	}
	if committed == staged {
		t.Error("the committed results were not recomputed")
	}
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the commit has stale results: %s%s", out, errs)
	}
	// The work tree is the commit plus the unstaged hunk, byte for byte.
	if got, want := readFile(t, filepath.Join(dir, cd1)), strings.Replace(committed, cd1Prose, note(cd1Prose), 1); got != want {
		t.Errorf("work tree after the commit:\n%s\nwant:\n%s", got, want)
	}
	if stripResults(readFile(t, filepath.Join(dir, cd1))) != stripResults(work) {
		t.Error("the unstaged hunk did not survive")
	}
	if got := gitOut(t, dir, "show", ":"+cd1); got != committed {
		t.Error("the index does not hold what was committed")
	}
	diff := gitOut(t, dir, "diff", "-U0", "--", cd1)
	if !strings.Contains(diff, "+A second look at the wiring") || strings.Contains(diff, "#~") {
		t.Errorf("git diff shows more than the unstaged hunk:\n%s", diff)
	}
	// The wafer's scorecard reads the cooldown's mobility: the hook recomputed it too, and
	// redrew its plot.
	sameExcept(t, "partial commit", before, capture(t, dir), cd1, "wafers/W24-031.md", "wafers/plots/W24-031/scorecard.svg")
}

// `git commit -a` hands the hook .git/index.lock as its index; the results land in the commit
// and the work tree stays clean.
func TestHookCommitAll(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	before := capture(t, dir)
	o4, n4 := probeEdit("4", "750 um", "760 um")
	edited := editFile(t, dir, mask, o4, n4)
	gitOut(t, dir, "commit", "-a", "-m", "M1: probe 4 at 760 um")
	if st := gitOut(t, dir, "status", "--porcelain"); st != "" {
		t.Errorf("work tree not clean after commit -a:\n%s", st)
	}
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the commit has stale results: %s%s", out, errs)
	}
	got := gitOut(t, dir, "show", "HEAD:"+mask)
	if stripResults(got) != stripResults(edited) || got == edited {
		t.Error("the committed mask is not the edit with recomputed results")
	}
	changed := strings.Fields(gitOut(t, dir, "show", "--format=", "--name-only", "HEAD"))
	for _, want := range []string{mask, "devices/D1.md", "devices/D2.md", c1, "cooldowns/C2.md"} {
		if !slices.Contains(changed, want) {
			t.Errorf("%s was not recomputed in the commit (it holds %v)", want, changed)
		}
	}
	sameExcept(t, "commit -a", before, capture(t, dir), changed...)
}

// `git commit PATH...` commits a temporary index: the hook only checks, stops the commit with
// the command to run, and changes nothing.
func TestHookCommitPaths(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	head := gitOut(t, dir, "rev-parse", "HEAD")
	editFile(t, dir, mask, maskWidth, maskWidth50)
	before := capture(t, dir)
	out, ok := gitTry(dir, "commit", "-m", "narrower", mask)
	if ok {
		t.Fatalf("commit of a path with stale results went through:\n%s", out)
	}
	for _, want := range []string{mask + ":16: 100.00 um → 50.000 um", "git add PATH... && git commit"} {
		if !strings.Contains(out, want) {
			t.Errorf("the hook's message lacks %q:\n%s", want, out)
		}
	}
	if gitOut(t, dir, "rev-parse", "HEAD") != head {
		t.Error("HEAD moved")
	}
	sameExcept(t, "refused partial commit", before, capture(t, dir))
	// What the message says works.
	gitOut(t, dir, "add", mask)
	gitOut(t, dir, "commit", "-q", "-m", "narrower")
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the commit has stale results: %s%s", out, errs)
	}
	// A path whose change touches no result commits as usual.
	editFile(t, dir, c1, c1Prose, note(c1Prose))
	if out, ok := gitTry(dir, "commit", "-m", "note", c1); !ok {
		t.Errorf("commit of a prose edit by path: %s", out)
	}
}

// `git commit --amend` runs the hook on the amended content: a commit made with --no-verify
// and stale results is put right, on the same parent.
func TestHookAmend(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	parent := gitOut(t, dir, "rev-parse", "HEAD")
	editFile(t, dir, mask, maskWidth, maskWidth50)
	gitOut(t, dir, "commit", "-q", "-a", "--no-verify", "-m", "narrower, results not recomputed")
	if code, _, _ := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 1 {
		t.Fatal("the --no-verify commit should have stale results")
	}
	before := capture(t, dir)
	gitOut(t, dir, "commit", "-q", "--amend", "--no-edit")
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the amended commit has stale results: %s%s", out, errs)
	}
	if got := gitOut(t, dir, "rev-parse", "HEAD~1"); got != parent {
		t.Error("the amended commit has another parent")
	}
	if st := gitOut(t, dir, "status", "--porcelain"); st != "" {
		t.Errorf("work tree not clean after the amend:\n%s", st)
	}
	changed := strings.Fields(gitOut(t, dir, "diff", "--name-only", "HEAD@{1}", "HEAD"))
	sameExcept(t, "amend", before, capture(t, dir), changed...)
}

// A pre-commit hook that was there before keeps running (first, with the same arguments), and
// can still stop the commit; uninstall puts it back byte for byte and removes all the rest.
func TestHookKeepsExistingHook(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	if code, _, errs := cleave(t, "-C", dir, "hooks", "uninstall"); code != 0 {
		t.Fatal(errs)
	}
	marker := filepath.Join(t.TempDir(), "ran")
	userHook := fmt.Sprintf("#!/bin/sh\n# the lab's own check\necho ran >> '%s'\n[ -f '%s.stop' ] && { echo 'lab check says no' >&2; exit 3; }\nexit 0\n", marker, marker)
	hookPath := filepath.Join(dir, ".git", "hooks", "pre-commit")
	if err := os.WriteFile(hookPath, []byte(userHook), 0o755); err != nil {
		t.Fatal(err)
	}
	attrs := "*.csv -diff\n"
	if err := os.WriteFile(filepath.Join(dir, ".gitattributes"), []byte(attrs), 0o644); err != nil {
		t.Fatal(err)
	}
	cfgBefore := gitOut(t, dir, "config", "--local", "--list")
	if code, out, errs := cleave(t, "-C", dir, "hooks", "install"); code != 0 || !strings.Contains(out, "pre-commit.before-cleave") {
		t.Fatalf("hooks install: exit %d\n%s%s", code, out, errs)
	}
	// Installing twice changes nothing more.
	if code, _, errs := cleave(t, "-C", dir, "hooks", "install"); code != 0 {
		t.Fatalf("second install: %s", errs)
	}
	if got := readFile(t, hookPath+".before-cleave"); got != userHook {
		t.Error("the user's hook was not kept as it was")
	}
	editFile(t, dir, mask, maskWidth, maskWidth50)
	gitOut(t, dir, "add", mask)
	gitOut(t, dir, "commit", "-q", "-m", "narrower")
	if got := readFile(t, marker); got != "ran\n" {
		t.Errorf("the user's hook ran %q times", got)
	}
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("our hook did not run after the user's: %s%s", out, errs)
	}
	// The user's hook can still stop a commit.
	if err := os.WriteFile(marker+".stop", nil, 0o644); err != nil {
		t.Fatal(err)
	}
	editFile(t, dir, c1, c1Prose, note(c1Prose))
	gitOut(t, dir, "add", c1)
	if out, ok := gitTry(dir, "commit", "-m", "note"); ok || !strings.Contains(out, "lab check says no") {
		t.Errorf("the user's hook could not stop the commit:\n%s", out)
	}

	if code, out, errs := cleave(t, "-C", dir, "hooks", "uninstall"); code != 0 {
		t.Fatalf("hooks uninstall: exit %d\n%s%s", code, out, errs)
	}
	if got := readFile(t, hookPath); got != userHook {
		t.Errorf("uninstall did not put the user's hook back:\n%s", got)
	}
	for _, gone := range []string{hookPath + ".before-cleave", filepath.Join(dir, ".git", "hooks", "pre-merge-commit")} {
		if _, err := os.Stat(gone); err == nil {
			t.Errorf("%s is still there", gone)
		}
	}
	if got := readFile(t, filepath.Join(dir, ".gitattributes")); got != attrs {
		t.Errorf(".gitattributes after uninstall: %q, want %q", got, attrs)
	}
	if got := gitOut(t, dir, "config", "--local", "--list"); got != cfgBefore {
		t.Errorf("configuration after uninstall:\n%s\nbefore:\n%s", got, cfgBefore)
	}
}

// core.hooksPath: install writes where git looks for hooks, and the hook runs from there.
func TestHookHooksPath(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	if code, _, errs := cleave(t, "-C", dir, "hooks", "uninstall"); code != 0 {
		t.Fatal(errs)
	}
	gitOut(t, dir, "config", "core.hooksPath", ".githooks")
	if code, _, errs := cleave(t, "-C", dir, "hooks", "install"); code != 0 {
		t.Fatalf("hooks install: %s", errs)
	}
	if _, err := os.Stat(filepath.Join(dir, ".githooks", "pre-commit")); err != nil {
		t.Fatalf("no hook in core.hooksPath: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, ".git", "hooks", "pre-commit")); err == nil {
		t.Error("a hook was written to .git/hooks, where git does not look")
	}
	editFile(t, dir, mask, maskWidth, maskWidth50)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "narrower")
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the hook in core.hooksPath did not run: %s%s", out, errs)
	}
}

// A linked work tree shares the hooks; a commit there is recomputed in its own index, and the
// main work tree is not touched.
func TestHookLinkedWorktree(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	side := filepath.Join(t.TempDir(), "side")
	gitOut(t, dir, "worktree", "add", "-q", "-b", "side", side)
	before := capture(t, dir)
	editFile(t, side, mask, maskWidth, maskWidth50)
	gitOut(t, side, "commit", "-q", "-a", "-m", "narrower, on the side")
	if code, out, errs := cleave(t, "-C", side, "check", "--rev", "side"); code != 0 {
		t.Errorf("the linked work tree's commit has stale results: %s%s", out, errs)
	}
	if st := gitOut(t, side, "status", "--porcelain"); st != "" {
		t.Errorf("linked work tree not clean:\n%s", st)
	}
	sameExcept(t, "main work tree", before, capture(t, dir))
	if _, err := os.Stat(filepath.Join(dir, ".git", "worktrees", "side", "cleave", "hook.lock")); err != nil {
		t.Errorf("the hook did not keep its lock in the linked work tree's git directory: %v", err)
	}
}

// Two hook runs at once: the lock makes one wait for the other, so exactly one of them
// recomputes and the index ends up right.
func TestHookConcurrentRuns(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	editFile(t, dir, mask, maskWidth, maskWidth50)
	gitOut(t, dir, "add", mask)
	outs := make([]string, 2)
	errs := make([]error, 2)
	var wg sync.WaitGroup
	for i := range outs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			cmd := exec.Command("cleave", "hooks", "pre-commit")
			cmd.Dir = dir
			b, err := cmd.CombinedOutput()
			outs[i], errs[i] = string(b), err
		}()
	}
	wg.Wait()
	n := 0
	for i := range outs {
		if errs[i] != nil {
			t.Errorf("run %d: %v\n%s", i, errs[i], outs[i])
		}
		if strings.Contains(outs[i], "recomputed "+mask) {
			n++
		}
	}
	if n != 1 {
		t.Errorf("%d runs recomputed the mask, want exactly 1:\n%s\n---\n%s", n, outs[0], outs[1])
	}
	if code, out, errs := cleave(t, "-C", dir, "check", "--staged"); code != 0 {
		t.Errorf("the index has stale results after two runs: %s%s", out, errs)
	}
}

// probeEdit moves a probe of the mask.
func probeEdit(name, from, to string) (string, string) {
	return fmt.Sprintf(`{name: "%s", position: %s`, name, from), fmt.Sprintf(`{name: "%s", position: %s`, name, to)
}

// Two branches move different probes of the mask and recompute: the inputs merge cleanly,
// every conflict lies in result regions and the driver resolves them. The pre-merge-commit
// hook recomputes what depends on the merged mask, stages it and stops the merge commit (git
// wrote its tree before the hook ran); `git commit` concludes the merge with those results.
func TestMergeResultsOnly(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	gitOut(t, dir, "checkout", "-q", "-b", "right")
	o4, n4 := probeEdit("4", "750 um", "770 um")
	editFile(t, dir, mask, o4, n4)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "probe 4 at 770 um")
	right := capture(t, dir)
	gitOut(t, dir, "checkout", "-q", "master")
	o2, n2 := probeEdit("2", "250 um", "240 um")
	editFile(t, dir, mask, o2, n2)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "probe 2 at 240 um")
	left := capture(t, dir)

	out, ok := gitTry(dir, "merge", "--no-edit", "right")
	if ok || !strings.Contains(out, "run `git commit` to conclude the merge") {
		t.Fatalf("the pre-merge-commit hook did not stop the merge with stale results:\n%s", out)
	}
	if !strings.Contains(out, "resolved by recomputing") {
		t.Errorf("the merge driver did not run:\n%s", out)
	}
	if code, out, errs := cleave(t, "-C", dir, "check", "--staged"); code != 0 {
		t.Errorf("the staged merge has stale results:\n%s%s", out, errs)
	}
	gitOut(t, dir, "commit", "-q", "--no-edit")
	if n := len(strings.Fields(gitOut(t, dir, "rev-list", "--parents", "-n1", "HEAD"))); n != 3 {
		t.Errorf("HEAD is not a merge commit")
	}
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the merge has stale results:\n%s%s", out, errs)
	}
	if st := gitOut(t, dir, "status", "--porcelain"); st != "" {
		t.Errorf("work tree not clean after the merge:\n%s", st)
	}
	got := gitOut(t, dir, "show", "HEAD:"+mask)
	if !strings.Contains(got, n2) || !strings.Contains(got, n4) {
		t.Errorf("the merged mask lost a side's edit:\n%s", got)
	}
	// Nothing either side wrote outside result regions was lost.
	for p, l := range left.index {
		merged := gitOut(t, dir, "show", "HEAD:"+p)
		if r := right.index[p]; stripResults(l) == stripResults(r) && stripResults(merged) != stripResults(l) {
			t.Errorf("%s: the merge changed inputs neither side changed", p)
		}
	}
}

// Both branches change the mask width: a real conflict keeps its markers, check refuses the
// file with its position, and committing the resolution recomputes everything.
func TestMergeRealConflict(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	gitOut(t, dir, "checkout", "-q", "-b", "right")
	editFile(t, dir, mask, maskWidth, "width: 80 um")
	gitOut(t, dir, "commit", "-q", "-a", "-m", "80 um")
	gitOut(t, dir, "checkout", "-q", "master")
	editFile(t, dir, mask, maskWidth, maskWidth50)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "50 um")

	out, ok := gitTry(dir, "merge", "--no-edit", "right")
	if ok {
		t.Fatalf("a real conflict merged by itself:\n%s", out)
	}
	conflict := "<<<<<<< current\nwidth: 50 um\n=======\nwidth: 80 um\n>>>>>>> other\n"
	m := readFile(t, filepath.Join(dir, mask))
	if !strings.Contains(m, conflict) {
		t.Errorf("conflicted mask lacks %q:\n%s", conflict, m)
	}
	code, cout, _ := cleave(t, "-C", dir, "check")
	if code != 1 || !strings.Contains(cout, mask+":5:1: unresolved merge conflict") {
		t.Errorf("check of the conflicted notebook: exit %d\n%s", code, cout)
	}
	// The person resolves the width; the commit that concludes the merge recomputes.
	resolved := strings.Replace(m, conflict, "width: 80 um\n", 1)
	if err := os.WriteFile(filepath.Join(dir, mask), []byte(resolved), 0o644); err != nil {
		t.Fatal(err)
	}
	// Before the resolution is staged, the hook refuses to run on unmerged paths.
	if out, ok := gitTry(dir, "commit", "--no-edit"); ok {
		t.Errorf("commit with unmerged paths went through:\n%s", out)
	}
	gitOut(t, dir, "add", mask)
	gitOut(t, dir, "commit", "-q", "--no-edit")
	if n := len(strings.Fields(gitOut(t, dir, "rev-list", "--parents", "-n1", "HEAD"))); n != 3 {
		t.Errorf("HEAD is not a merge commit")
	}
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the merge has stale results:\n%s%s", out, errs)
	}
	if got := gitOut(t, dir, "show", "HEAD:"+mask); stripResults(got) != stripResults(resolved) {
		t.Errorf("the committed mask is not the resolution:\n%s", got)
	}
}

// A rebase replays commits without running pre-commit; with `-x 'git commit --amend
// --no-edit'` every replayed commit goes through the hook. Conflicts the replay meets in calc
// blocks (an input changed on one side, results on both) are settled by the driver on the
// way, and every rebased commit passes check.
func TestRebaseThroughHook(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	base := gitOut(t, dir, "rev-parse", "HEAD")
	gitOut(t, dir, "checkout", "-q", "-b", "feature")
	editFile(t, dir, c1, c1Input, c1Input2)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "C1: 45 Ohm")
	editFile(t, dir, "cooldowns/C2.md", "A second device of the same piece.", note("A second device of the same piece."))
	gitOut(t, dir, "commit", "-q", "-a", "-m", "C2: a note")
	gitOut(t, dir, "checkout", "-q", "master")
	o4, n4 := probeEdit("4", "750 um", "760 um")
	editFile(t, dir, mask, o4, n4)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "probe 4 at 760 um")

	gitOut(t, dir, "checkout", "-q", "feature")
	out, ok := gitTry(dir, "rebase", "-x", "git commit --amend --no-edit", "master")
	if !ok {
		t.Fatalf("rebase stopped:\n%s", out)
	}
	if !strings.Contains(out, "resolved by recomputing") {
		t.Errorf("the replay met no conflict for the driver:\n%s", out)
	}
	revs := strings.Fields(gitOut(t, dir, "rev-list", "master..feature"))
	if len(revs) != 2 {
		t.Fatalf("%d rebased commits, want 2", len(revs))
	}
	for _, rev := range revs {
		if code, out, errs := cleave(t, "-C", dir, "check", "--rev", rev); code != 0 {
			t.Errorf("rebased commit %s has stale results:\n%s%s", rev[:8], out, errs)
		}
	}
	if st := gitOut(t, dir, "status", "--porcelain"); st != "" {
		t.Errorf("work tree not clean after the rebase:\n%s", st)
	}
	// Both lines of work are there: master's probe and the feature's input and note.
	for p, want := range map[string]string{mask: n4, c1: c1Input2, "cooldowns/C2.md": note("A second device of the same piece.")} {
		if got := gitOut(t, dir, "show", "feature:"+p); !strings.Contains(got, want) {
			t.Errorf("%s after the rebase lacks %q", p, want)
		}
	}
	if gitOut(t, dir, "merge-base", "master", "feature") == base {
		t.Error("feature was not rebased")
	}
}

func readFile(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// The manifest for the general-purpose hook framework: every hook is a golang hook whose entry
// is a command of ours, run once per commit (no file names, serially). Its cleave-calc entry
// leaves the index alone: it writes the results into the work tree and stops the commit, and
// passes once they are staged.
func TestFrameworkManifest(t *testing.T) {
	t.Parallel()
	var hooks []struct {
		ID, Name, Entry, Language string
		PassFilenames             *bool `yaml:"pass_filenames"`
		RequireSerial             bool  `yaml:"require_serial"`
		AlwaysRun                 bool  `yaml:"always_run"`
	}
	b, err := os.ReadFile(".pre-commit-hooks.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if err := yaml.Unmarshal(b, &hooks); err != nil {
		t.Fatal(err)
	}
	entries := map[string][]string{}
	for _, h := range hooks {
		args := strings.Fields(h.Entry)
		if h.ID == "" || h.Name == "" || h.Language != "golang" || len(args) == 0 || args[0] != "cleave" {
			t.Errorf("hook %+v", h)
		}
		if h.PassFilenames == nil || *h.PassFilenames || !h.RequireSerial || !h.AlwaysRun {
			t.Errorf("hook %s must run once, serially, on every commit: %+v", h.ID, h)
		}
		entries[h.ID] = args[1:]
	}
	if len(entries["cleave-calc"]) == 0 || len(entries["cleave-check"]) == 0 {
		t.Fatalf("manifest lacks cleave-calc or cleave-check: %v", entries)
	}

	dir := tinyRepo(t)
	edited := editFile(t, dir, mask, maskWidth, maskWidth50)
	gitOut(t, dir, "add", mask)
	if code, _, _ := cleave(t, append([]string{"-C", dir}, entries["cleave-check"]...)...); code != 1 {
		t.Errorf("cleave-check on stale results: exit %d", code)
	}
	code, out, errs := cleave(t, append([]string{"-C", dir}, entries["cleave-calc"]...)...)
	if code != 1 || !strings.Contains(errs, "review and stage them") {
		t.Errorf("cleave-calc on stale results: exit %d\n%s%s", code, out, errs)
	}
	if got := gitOut(t, dir, "show", ":"+mask); got != edited {
		t.Error("cleave-calc changed the index")
	}
	if got := readFile(t, filepath.Join(dir, mask)); got == edited || stripResults(got) != stripResults(edited) {
		t.Error("cleave-calc did not write the results into the work tree")
	}
	gitOut(t, dir, "add", "-A")
	for _, id := range []string{"cleave-calc", "cleave-check"} {
		if code, out, errs := cleave(t, append([]string{"-C", dir}, entries[id]...)...); code != 0 {
			t.Errorf("%s once the results are staged: exit %d\n%s%s", id, code, out, errs)
		}
	}
}

// The history of a demo device: its lineage, and the commits that changed its record, its
// ancestors' records and their data files, with fields and results old → new.
func TestHistoryGolden(t *testing.T) {
	dir := demoNotebook(t)
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git binary not on PATH")
	}
	code, out, errs := cleave(t, "-C", dir, "history", "W24-031-A-HB1")
	if code != 0 {
		t.Fatalf("history: exit %d\n%s", code, errs)
	}
	golden(t, "history-W24-031-A-HB1.golden", out)
	code, out, errs = cleave(t, "-C", dir, "history", "--json", "CD24-001")
	if code != 0 {
		t.Fatalf("history --json: exit %d\n%s", code, errs)
	}
	golden(t, "history-CD24-001.json.golden", out)
	var h struct {
		Sample  struct{ ID string }
		Tracked []struct{ Path, Role string }
		Commits []struct {
			Subject string
			Changes []struct {
				Path    string
				Fields  []struct{ Field, Old, New string }
				Results []struct{ Old, New string }
			}
		}
	}
	if err := json.Unmarshal([]byte(out), &h); err != nil {
		t.Fatal(err)
	}
	// The mask correction shows up as the probe's position old → new in the mask, and as the
	// cooldown's mobility old → new.
	found := false
	for _, c := range h.Commits {
		if !strings.HasPrefix(c.Subject, "HB100: probe 4") {
			continue
		}
		for _, ch := range c.Changes {
			for _, f := range ch.Fields {
				if ch.Path == "masks/HB100.md" && f.Field == "probes[4].position" && f.Old == "700 um" && f.New == "750 um" {
					found = true
				}
			}
		}
	}
	if !found || h.Sample.ID != "CD24-001" || len(h.Tracked) != 14 {
		t.Errorf("history --json: sample %q, %d tracked paths, mask correction found %v", h.Sample.ID, len(h.Tracked), found)
	}
	if code, _, errs := cleave(t, "-C", dir, "history", "NO-SUCH"); code != 1 || !strings.Contains(errs, `no entry with id "NO-SUCH"`) {
		t.Errorf("history of an unknown id: exit %d, %q", code, errs)
	}
	if code, _, _ := cleave(t, "-C", dir, "history"); code != 2 {
		t.Errorf("history without an id: exit %d, want 2", code)
	}
}

// The review of the demo's mask correction (text and Markdown) and of the commit that adds
// the edge piece's cooldown, where the Hall and SdH densities disagree.
func TestReviewGolden(t *testing.T) {
	dir := demoNotebook(t)
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git binary not on PATH")
	}
	for _, tc := range []struct {
		args   []string
		golden string
	}{
		{[]string{"HEAD~4..HEAD~3"}, "review-mask-correction.golden"},
		{[]string{"--markdown", "HEAD~4..HEAD~3"}, "review-mask-correction.md.golden"},
		{[]string{"HEAD~2..HEAD~1"}, "review-edge-piece.golden"},
	} {
		code, out, errs := cleave(t, append([]string{"-C", dir, "review"}, tc.args...)...)
		if code != 0 {
			t.Fatalf("review %v: exit %d\n%s", tc.args, code, errs)
		}
		golden(t, tc.golden, out)
	}
	code, out, errs := cleave(t, "-C", dir, "review", "--json", "HEAD~2..HEAD~1")
	if code != 0 {
		t.Fatalf("review --json: exit %d\n%s", code, errs)
	}
	var rv struct {
		Warnings []struct{ Kind, ID string }
		Data     []struct {
			Path   string
			ReadBy []string `json:"read_by"`
		}
	}
	if err := json.Unmarshal([]byte(out), &rv); err != nil {
		t.Fatal(err)
	}
	found := false
	for _, w := range rv.Warnings {
		found = found || w.Kind == "hall-sdh" && w.ID == "CD24-003"
	}
	if !found || len(rv.Data) != 2 || len(rv.Data[0].ReadBy) != 1 {
		t.Errorf("review --json: warnings %+v, data %+v", rv.Warnings, rv.Data)
	}
	for _, args := range [][]string{{"review"}, {"review", "--json", "--markdown", "HEAD~1.."}} {
		if code, _, _ := cleave(t, append([]string{"-C", dir}, args...)...); code != 2 {
			t.Errorf("cleave %v: exit %d, want 2", args, code)
		}
	}
	if code, _, errs := cleave(t, "-C", dir, "review", "nope..HEAD"); code != 1 || !strings.Contains(errs, "no such commit") {
		t.Errorf("review of an unknown base: exit %d, %q", code, errs)
	}
}

// An invalid entry or a failed line stops the commit with path:line:col and changes nothing,
// even where other results are stale; --no-verify still commits.
func TestHookBlocksProblems(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name, path, body, want string
	}{
		{"dangling link", "devices/D3.md", "---\nid: D3\nkind: device\nfrom: W1-A\nmask: NOPE\n---\n# D3\n", `devices/D3.md:5:7: `},
		{"failed line", "cooldowns/C3.md", "---\nid: C3\nkind: cooldown\ndevices: [D1]\n---\n```cleave\nx = 3 T + 2 m\n```\n", `cooldowns/C3.md:7:\d+: error: `},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := tinyRepo(t)
			head := gitOut(t, dir, "rev-parse", "HEAD")
			editFile(t, dir, mask, maskWidth, maskWidth50) // stale results elsewhere, too
			if err := os.WriteFile(filepath.Join(dir, filepath.FromSlash(tc.path)), []byte(tc.body), 0o644); err != nil {
				t.Fatal(err)
			}
			gitOut(t, dir, "add", "-A")
			before := capture(t, dir)
			out, ok := gitTry(dir, "commit", "-m", "broken")
			if ok || !regexp.MustCompile(tc.want).MatchString(out) || !strings.Contains(out, "--no-verify") {
				t.Fatalf("commit with %s: ok=%v\n%s", tc.name, ok, out)
			}
			if gitOut(t, dir, "rev-parse", "HEAD") != head {
				t.Error("HEAD moved")
			}
			sameExcept(t, tc.name, before, capture(t, dir))
			gitOut(t, dir, "commit", "-q", "--no-verify", "-m", "broken, on purpose")
			if code, _, _ := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 1 {
				t.Error("check --rev of the broken commit passed")
			}
		})
	}
}

// A cherry-pick runs no pre-commit hook: the driver settles the conflict in results, the pick
// completes without stopping, and an amend sends the picked commit through the hook.
func TestCherryPickThroughHook(t *testing.T) {
	t.Parallel()
	dir := tinyRepo(t)
	gitOut(t, dir, "checkout", "-q", "-b", "right")
	o4, n4 := probeEdit("4", "750 um", "770 um")
	editFile(t, dir, mask, o4, n4)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "probe 4 at 770 um")
	gitOut(t, dir, "checkout", "-q", "master")
	o2, n2 := probeEdit("2", "250 um", "240 um")
	editFile(t, dir, mask, o2, n2)
	gitOut(t, dir, "commit", "-q", "-a", "-m", "probe 2 at 240 um")
	if out, ok := gitTry(dir, "cherry-pick", "right"); !ok {
		t.Fatalf("cherry-pick stopped:\n%s", out)
	}
	if _, err := os.Stat(filepath.Join(dir, ".git", "CHERRY_PICK_HEAD")); err == nil {
		t.Error("the cherry-pick is still in progress")
	}
	gitOut(t, dir, "commit", "-q", "--amend", "--no-edit")
	if code, out, errs := cleave(t, "-C", dir, "check", "--rev", "HEAD"); code != 0 {
		t.Errorf("the picked commit has stale results after the amend:\n%s%s", out, errs)
	}
	if got := gitOut(t, dir, "show", "HEAD:"+mask); !strings.Contains(got, n2) || !strings.Contains(got, n4) {
		t.Errorf("the pick lost an edit:\n%s", got)
	}
	if st := gitOut(t, dir, "status", "--porcelain"); st != "" {
		t.Errorf("work tree not clean:\n%s", st)
	}
}
