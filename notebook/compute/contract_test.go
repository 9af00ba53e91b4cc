package compute

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"
	"time"
)

// contractTree is a small notebook in memory: a mask, a device reading its geometry, a
// cooldown reading a data file, and a note that reads nothing.
func contractTree() fstest.MapFS {
	return fstest.MapFS{
		"masks/M1.md": {Data: []byte("---\nid: M1\nkind: mask\nwidth: 100 um\nnotes: first draft\nprobes:\n" +
			"  - {name: \"2\", position: 250 um, side: top}\n  - {name: \"4\", position: 750 um, side: top}\n---\n")},
		"pieces/P1.md": {Data: []byte("---\nid: P1\nkind: piece\nfrom: W1\n---\n")},
		"wafers/W1.md": {Data: []byte("---\nid: W1\nkind: wafer\n---\n")},
		"devices/D1.md": {Data: []byte("---\nid: D1\nkind: device\nfrom: P1\nmask: M1\n---\n" +
			"```cleave\nsq = squares(\"2\", \"4\")\n```\n")},
		"cooldowns/C1.md": {Data: []byte("---\nid: C1\nkind: cooldown\ndevices: [D1]\n---\n" +
			"```cleave\nd = data(\"data/r.csv\")\n```\n")},
		"cooldowns/data/r.csv": {Data: []byte("B (T),Rxx (Ohm)\n0,10\n1,11\n")},
		"note.md":              {Data: []byte("```cleave\nx = 2 T\n```\n")},
	}
}

// evaluatedFiles runs the engine with the cache and lists the files it evaluated (not
// answered from the cache).
func evaluatedFiles(t *testing.T, tree fstest.MapFS, cache *Cache, salt string) []string {
	t.Helper()
	rep, err := Run(tree, nil, Options{Cache: cache, Salt: salt})
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, f := range rep.Files {
		if !f.FromCache {
			out = append(out, f.Path)
		}
	}
	return out
}

// TestCacheKeyedByEngine: results cached by one engine are never reused by another (after an
// upgrade that fixes a formula, check must not certify the old numbers); the same engine
// reuses them.
func TestCacheKeyedByEngine(t *testing.T) {
	tree, cache := contractTree(), OpenCache(t.TempDir())
	if got := evaluatedFiles(t, tree, cache, "engine A"); len(got) != 3 {
		t.Fatalf("first run evaluated %v, want all three files with blocks", got)
	}
	if got := evaluatedFiles(t, tree, cache, "engine A"); len(got) != 0 {
		t.Errorf("same engine evaluated %v again", got)
	}
	if got := evaluatedFiles(t, tree, cache, "engine B"); len(got) != 3 {
		t.Errorf("a new engine evaluated %v, want every file", got)
	}
}

// TestFrontMatterEditReevaluates: an edit of the front matter alone (a field no line names)
// re-evaluates the file itself and every file that read the entry: the device reads the
// mask's geometry; the note and the cooldown read nothing of the mask.
func TestFrontMatterEditReevaluates(t *testing.T) {
	tree, cache := contractTree(), OpenCache(t.TempDir())
	evaluatedFiles(t, tree, cache, "s")
	m := tree["masks/M1.md"]
	tree["masks/M1.md"] = &fstest.MapFile{Data: []byte(strings.Replace(string(m.Data), "first draft", "second draft", 1))}
	if got := strings.Join(evaluatedFiles(t, tree, cache, "s"), " "); got != "devices/D1.md" {
		t.Errorf("after a front-matter edit of the mask, evaluated %q, want the device that reads it", got)
	}
	d := tree["devices/D1.md"]
	tree["devices/D1.md"] = &fstest.MapFile{Data: []byte(strings.Replace(string(d.Data), "kind: device\n", "kind: device\nby: JM\n", 1))}
	if got := strings.Join(evaluatedFiles(t, tree, cache, "s"), " "); got != "devices/D1.md" {
		t.Errorf("after a front-matter edit of the device, evaluated %q, want the device", got)
	}
}

// TestDataBytesAreADependency: a data file's content, not its name or size, is what a line
// depends on: the same number of bytes with one digit changed re-evaluates the cooldown and
// changes its result.
func TestDataBytesAreADependency(t *testing.T) {
	tree, cache := contractTree(), OpenCache(t.TempDir())
	rep1, _ := Run(tree, nil, Options{Cache: cache, Salt: "s"})
	tree["cooldowns/data/r.csv"] = &fstest.MapFile{Data: []byte("B (T),Rxx (Ohm)\n0,10\n1,12\n")}
	if got := strings.Join(evaluatedFiles(t, tree, cache, "s"), " "); got != "cooldowns/C1.md" {
		t.Errorf("after a same-size data edit, evaluated %q, want the cooldown", got)
	}
	rep2, _ := Run(tree, nil, Options{Cache: cache, Salt: "s"})
	line := func(r *Report) string {
		for _, f := range r.Files {
			if f.Path == "cooldowns/C1.md" {
				return f.Stale[0].New
			}
		}
		return ""
	}
	if line(rep1) == line(rep2) {
		t.Errorf("the data line shows %q before and after the edit", line(rep1))
	}
}

// TestGoodCheckDigestPromise pins what the shortcut for an unchanged notebook promises: any
// change of a file's size, mode or modification time, or a file added or removed, means a full
// check; a content change that keeps size and modification time (a tool that restores the
// time stamp) is not seen by the shortcut — git's index has the same blind spot — and a check
// without the cache (`check --no-cache`) sees it.
func TestGoodCheckDigestPromise(t *testing.T) {
	root := t.TempDir()
	w := WorkTree{Root: root, StateDir: filepath.Join(root, ".git", "cleave")}
	p := filepath.Join(root, "note.md")
	old := time.Now().Add(-time.Hour)
	write := func(s string, when time.Time) {
		t.Helper()
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.Chtimes(p, when, when); err != nil {
			t.Fatal(err)
		}
	}
	write("```cleave\nx = 2 T  #~ 2.0000 T\n```\n", old)
	if res, err := w.Check(CheckOptions{}); err != nil || res.Bad(false) != 0 {
		t.Fatalf("first check: %v %v", err, res.Lines())
	}
	if res, _ := w.Check(CheckOptions{}); !res.Unchanged {
		t.Fatal("an unchanged notebook was checked again")
	}
	// Same size, new time stamp: seen.
	write("```cleave\nx = 3 T  #~ 2.0000 T\n```\n", old.Add(time.Minute))
	res, _ := w.Check(CheckOptions{})
	if res.Unchanged || res.Bad(false) != 1 {
		t.Fatalf("a same-size edit with a new time stamp: unchanged %v, %d problems", res.Unchanged, res.Bad(false))
	}
	write("```cleave\nx = 2 T  #~ 2.0000 T\n```\n", old.Add(2*time.Minute))
	if res, _ := w.Check(CheckOptions{}); res.Unchanged || res.Bad(false) != 0 {
		t.Fatal("the restored file was not checked again")
	}
	// Same size and the time stamp restored: the documented blind spot of the shortcut.
	write("```cleave\nx = 3 T  #~ 2.0000 T\n```\n", old.Add(2*time.Minute))
	if res, _ := w.Check(CheckOptions{}); !res.Unchanged {
		t.Errorf("the shortcut saw a change with size and time stamp kept; update the documented promise")
	}
	if res, _ := w.Check(CheckOptions{NoCache: true}); res.Bad(false) != 1 {
		t.Errorf("check without the cache missed the stale line: %v", res.Lines())
	}
}
