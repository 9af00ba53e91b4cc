package hooks

import (
	"path/filepath"
	"strings"
	"testing"
	"time"
)

const patchFile = `---
id: C9
kind: cooldown
devices: [D1]
---
# C9

` + "```cleave" + `
a = 1 m  #~ OLD-a
b = a * 2  #~ OLD-b
c = b + 1 m  #~ OLD-c
` + "```" + `

Prose.
`

// recomputedFile is patchFile with every result up to date.
var recomputedFile = strings.NewReplacer("OLD-a", "NEW-a", "OLD-b", "NEW-b", "OLD-c", "NEW-c").Replace(patchFile)

func TestCarryResults(t *testing.T) {
	tests := []struct {
		name          string
		work          string // the work-tree file
		want          string // the work-tree file afterwards
		carried, left int
	}{
		{"same as staged", patchFile, recomputedFile, 3, 0},
		{"unstaged prose", strings.Replace(patchFile, "Prose.", "Prose, and more.", 1),
			strings.Replace(recomputedFile, "Prose.", "Prose, and more.", 1), 3, 0},
		{"unstaged code on the second line", strings.Replace(patchFile, "b = a * 2", "b = a * 3", 1),
			strings.NewReplacer("OLD-a", "NEW-a", "a * 2", "a * 3").Replace(patchFile), 1, 2},
		{"unstaged front matter", strings.Replace(patchFile, "devices: [D1]", "devices: [D2]", 1),
			strings.Replace(patchFile, "devices: [D1]", "devices: [D2]", 1), 0, 3},
		{"a result edited in the work tree", strings.Replace(patchFile, "OLD-b", "typed by hand", 1),
			strings.NewReplacer("OLD-a", "NEW-a", "OLD-b", "typed by hand", "OLD-c", "NEW-c").Replace(patchFile), 2, 1},
		{"CRLF in the work tree", strings.ReplaceAll(patchFile, "\n", "\r\n"),
			strings.ReplaceAll(recomputedFile, "\n", "\r\n"), 3, 0},
		{"a line added at the end", patchFile + "\n```cleave\nd = 2 m\n```\n",
			recomputedFile + "\n```cleave\nd = 2 m\n```\n", 3, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out, carried, left := carryResults("cooldowns/C9.md", []byte(patchFile), []byte(recomputedFile), []byte(tc.work))
			if string(out) != tc.want {
				t.Errorf("work tree:\n%s\nwant:\n%s", out, tc.want)
			}
			if carried != tc.carried || left != tc.left {
				t.Errorf("carried %d, left %d; want %d, %d", carried, left, tc.carried, tc.left)
			}
		})
	}
}

// A wafer whose layer table has unstaged changes keeps its old results: the table is an
// input (wafer.layers).
func TestCarryResultsLayerTable(t *testing.T) {
	wafer := "---\nid: W9\nkind: wafer\n---\n# W9\n\n## Layers\n\n| layer | material | thickness |\n| --- | --- | --- |\n| cap | GaAs | 10 nm |\n| channel | GaAs | 1 um |\n\n```cleave\nn = 1  #~ OLD\n```\n"
	recomputed := strings.Replace(wafer, "#~ OLD", "#~ NEW", 1)
	work := strings.Replace(wafer, "| 10 nm |", "| 12 nm |", 1)
	out, carried, left := carryResults("wafers/W9.md", []byte(wafer), []byte(recomputed), []byte(work))
	if string(out) != work || carried != 0 || left != 1 {
		t.Errorf("carried %d, left %d:\n%s", carried, left, out)
	}
	// Prose around the table is not an input.
	work = strings.Replace(wafer, "## Layers\n", "## Layers\n\nAs grown.\n", 1)
	out, carried, _ = carryResults("wafers/W9.md", []byte(wafer), []byte(recomputed), []byte(work))
	if carried != 1 || !strings.Contains(string(out), "As grown.") || !strings.Contains(string(out), "#~ NEW") {
		t.Errorf("carried %d:\n%s", carried, out)
	}
}

// A second lock on the same file waits for the first and is refused when the wait runs out,
// naming the holder.
func TestLock(t *testing.T) {
	p := filepath.Join(t.TempDir(), "sub", "hook.lock")
	first, err := acquireLock(p, time.Second)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := acquireLock(p, 50*time.Millisecond); err == nil || !strings.Contains(err.Error(), "process") {
		t.Fatalf("second lock while the first is held: %v", err)
	}
	done := make(chan error)
	go func() {
		second, err := acquireLock(p, 10*time.Second)
		if err == nil {
			err = second.release()
		}
		done <- err
	}()
	if err := first.release(); err != nil {
		t.Fatal(err)
	}
	if err := <-done; err != nil {
		t.Fatalf("second lock after the first was released: %v", err)
	}
}
