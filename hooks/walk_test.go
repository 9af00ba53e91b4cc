package hooks

import (
	"fmt"
	"slices"
	"strings"
	"testing"
)

// gitLogCommits is the oracle: the commits `git log -- PATH...` shows, as a sorted list.
func gitLogCommits(t *testing.T, dir, rev string, paths []string) []string {
	t.Helper()
	out := gitT(t, dir, append([]string{"log", "--format=%H", rev, "--"}, paths...)...)
	ids := strings.Fields(out)
	slices.Sort(ids)
	return ids
}

func walkCommits(t *testing.T, dir, rev string, paths []string) []string {
	t.Helper()
	repo, objs := openObjects(t, dir)
	h, err := repo.Resolve(rev)
	if err != nil {
		t.Fatal(err)
	}
	changes, err := newPathWalker(objs, paths).walk(h)
	if err != nil {
		t.Fatal(err)
	}
	var ids []string
	for _, c := range changes {
		ids = append(ids, c.commit.String())
	}
	slices.Sort(ids)
	return ids
}

// On a long linear history the walk finds exactly the commits git log finds, for paths in
// several folders, a folder-less path and a path that never existed.
func TestWalkMatchesGitLogLinear(t *testing.T) {
	dir := generatedRepo(t, 400)
	for _, paths := range [][]string{
		{"cooldowns/CD0007.md", "devices/W0007-A-HB1.md", "pieces/W0007-A.md", "wafers/W0007.md"},
		{"wafers/W0123.md"},
		{"pieces/W0001-B.md", "nowhere/none.md"},
	} {
		if got, want := walkCommits(t, dir, "HEAD", paths), gitLogCommits(t, dir, "HEAD", paths); !slices.Equal(got, want) {
			t.Errorf("%v: walk found %d commits, git log %d", paths, len(got), len(want))
		}
	}
}

// Across merges the walk simplifies history as git log does: a merge that takes one side's
// file as it is is not shown, and its other side is not followed; a merge that differs from
// both sides is shown; a file deleted and added back is followed through both.
func TestWalkMatchesGitLogMerges(t *testing.T) {
	dir := newRepo(t, map[string]string{"a/x.md": "x0\n", "a/y.md": "y0\n", "b/z.md": "z0\n"})
	commit := func(msg string, files map[string]string) {
		writeFiles(t, dir, files)
		gitT(t, dir, "add", "-A")
		gitT(t, dir, "commit", "-q", "-m", msg)
	}
	gitT(t, dir, "checkout", "-q", "-b", "side")
	commit("side x1", map[string]string{"a/x.md": "x1\n"})
	commit("side z1", map[string]string{"b/z.md": "z1\n"})
	gitT(t, dir, "checkout", "-q", "main")
	commit("main y1", map[string]string{"a/y.md": "y1\n"})
	// A merge that takes side's x as it is.
	gitT(t, dir, "merge", "-q", "--no-edit", "side")
	gitT(t, dir, "checkout", "-q", "-b", "other", "HEAD~1")
	commit("other x2", map[string]string{"a/x.md": "x2\n"})
	gitT(t, dir, "checkout", "-q", "main")
	commit("main x3", map[string]string{"a/x.md": "x3\n"})
	// A conflicted merge resolved to a third content: differs from both parents.
	if _, err := gitCmdOut(dir, "merge", "-q", "--no-edit", "other"); err == nil {
		t.Fatal("expected a conflict")
	}
	writeFiles(t, dir, map[string]string{"a/x.md": "x4 merged\n"})
	gitT(t, dir, "add", "a/x.md")
	gitT(t, dir, "commit", "-q", "--no-edit")
	gitT(t, dir, "rm", "-q", "a/y.md")
	gitT(t, dir, "commit", "-q", "-m", "drop y")
	commit("y back", map[string]string{"a/y.md": "y again\n"})

	for _, paths := range [][]string{{"a/x.md"}, {"a/y.md"}, {"b/z.md"}, {"a/x.md", "b/z.md"}, {"a/x.md", "a/y.md", "b/z.md"}} {
		for _, rev := range []string{"HEAD", "side", "HEAD~2"} {
			got, want := walkCommits(t, dir, rev, paths), gitLogCommits(t, dir, rev, paths)
			if !slices.Equal(got, want) {
				t.Errorf("%s %v: walk %v\ngit log %v", rev, paths, short(got), short(want))
			}
		}
	}
}

func short(ids []string) string {
	var b strings.Builder
	for _, id := range ids {
		fmt.Fprintf(&b, "%s ", id[:7])
	}
	return b.String()
}

// parseCommitInfo reads what the walk needs and ignores the rest of the header.
func TestParseCommitInfo(t *testing.T) {
	raw := "tree 4b825dc642cb6eb9a060e54bf8d69288fbee4904\nparent 1111111111111111111111111111111111111111\nparent 2222222222222222222222222222222222222222\n" +
		"author A. K. <ak@lab.invalid> 1710523200 +0100\ncommitter R. S. <rs@lab.invalid> 1710526800 -0500\ngpgsig -----BEGIN-----\n abc\n -----END-----\n\nmessage\n\nbody\n"
	c, err := parseCommitInfo([]byte(raw))
	if err != nil {
		t.Fatal(err)
	}
	if c.tree.String() != "4b825dc642cb6eb9a060e54bf8d69288fbee4904" || len(c.parents) != 2 || c.time != 1710526800 {
		t.Errorf("%+v", c)
	}
	if _, err := parseCommitInfo([]byte("author x\n\nmsg")); err == nil {
		t.Error("a commit without a tree was accepted")
	}
}
