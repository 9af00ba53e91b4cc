package hooks

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"cleave/notebook/compute"
)

const mergeMask = `---
id: M1
kind: mask
width: 100 um
length: 1000 um
probes:
  - {name: "2", position: 250 um, arm_width: 10 um, side: top}
  - {name: "3", position: 500 um, arm_width: 10 um, side: top}
  - {name: "4", position: 750 um, arm_width: 10 um, side: top}
---
# M1

` + "```cleave" + `
W = mask.width
sq = squares("2", "4")
sq_23 = squares("2", "3")
` + "```" + `
`

// upToDate is the mask text with every result written by the engine: the oracle for what a
// merge must give.
func upToDate(t *testing.T, mask string) string {
	t.Helper()
	fsys := fstest.MapFS{"masks/M1.md": {Data: []byte(mask)}}
	rep, err := compute.Run(fsys, nil, compute.Options{})
	if err != nil || len(rep.Files) != 1 {
		t.Fatalf("evaluating the mask: %v %v", rep, err)
	}
	return string(rep.Files[0].NewBytes)
}

// mergeFiles writes the three versions of a file for the driver and returns their paths.
func mergeFiles(t *testing.T, base, current, other string) (string, string, string) {
	t.Helper()
	dir := t.TempDir()
	paths := []string{filepath.Join(dir, "base"), filepath.Join(dir, "current"), filepath.Join(dir, "other")}
	for i, body := range []string{base, current, other} {
		if err := os.WriteFile(paths[i], []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return paths[0], paths[1], paths[2]
}

// maskRoot is a notebook folder holding the mask at masks/M1.md, for the driver to evaluate
// the merged file in.
func maskRoot(t *testing.T, mask string) string {
	t.Helper()
	root := t.TempDir()
	writeFiles(t, root, map[string]string{"masks/M1.md": mask})
	return root
}

var (
	probe2 = strings.NewReplacer(`"2", position: 250 um`, `"2", position: 240 um`)
	probe4 = strings.NewReplacer(`"4", position: 750 um`, `"4", position: 770 um`)
)

func TestMergeDriver(t *testing.T) {
	needGit(t)
	base := upToDate(t, mergeMask)
	tests := []struct {
		name             string
		current, other   string // the two sides, each recomputed
		want             string // the merged file ("" to skip)
		conflicts, fixed int
		recomputed       bool
	}{
		// Each side moved another probe: the inputs merge cleanly, the results conflict.
		{"results only", upToDate(t, probe2.Replace(mergeMask)), upToDate(t, probe4.Replace(mergeMask)),
			upToDate(t, probe4.Replace(probe2.Replace(mergeMask))), 0, 1, true},
		// The same, but the current side changed a code line that sits in the conflict: it
		// is settled line by line (only one side changed that line's code).
		{"code on one side", upToDate(t, strings.Replace(probe2.Replace(mergeMask), `sq_23 = squares("2", "3")`, `sq_23 = squares("3", "2")`, 1)),
			upToDate(t, probe4.Replace(mergeMask)),
			upToDate(t, strings.Replace(probe4.Replace(probe2.Replace(mergeMask)), `sq_23 = squares("2", "3")`, `sq_23 = squares("3", "2")`, 1)), 0, 1, true},
		// Both sides changed the width: a real conflict.
		{"same input, two values", upToDate(t, strings.Replace(mergeMask, "width: 100 um", "width: 50 um", 1)),
			upToDate(t, strings.Replace(mergeMask, "width: 100 um", "width: 80 um", 1)), "", 1, 1, false},
		// Prose that mentions the marker is not a result region.
		{"prose", base + "\nNote #~ two.\n", base + "\nNote #~ three.\n", "", 1, 0, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			o, a, b := mergeFiles(t, base, tc.current, tc.other)
			res, err := MergeDriver(maskRoot(t, tc.current), o, a, b, 7, "masks/M1.md")
			if err != nil {
				t.Fatal(err)
			}
			if res.Conflicts != tc.conflicts || res.Resolved != tc.fixed || res.Recomputed != tc.recomputed {
				t.Errorf("result %+v, want %d conflicts, %d resolved, recomputed %v", res, tc.conflicts, tc.fixed, tc.recomputed)
			}
			got := readFile(t, a)
			if tc.want != "" && got != tc.want {
				t.Errorf("merged:\n%s\nwant:\n%s", got, tc.want)
			}
			if tc.conflicts > 0 && strings.Count(got, "<<<<<<< current\n") != tc.conflicts {
				t.Errorf("merged file should keep %d conflict(s):\n%s", tc.conflicts, got)
			}
		})
	}
}

// Both sides changed the width: that conflict keeps markers of the size git asks for, in the
// style the repository is configured with; the result conflict below it takes the current
// side until the person resolves the width and the hook recomputes.
func TestMergeDriverKeepsRealConflict(t *testing.T) {
	needGit(t)
	base := upToDate(t, mergeMask)
	current := upToDate(t, strings.Replace(mergeMask, "width: 100 um", "width: 50 um", 1))
	other := upToDate(t, strings.Replace(mergeMask, "width: 100 um", "width: 80 um", 1))
	o, a, b := mergeFiles(t, base, current, other)
	if _, err := MergeDriver(maskRoot(t, current), o, a, b, 9, "masks/M1.md"); err != nil {
		t.Fatal(err)
	}
	got := readFile(t, a)
	want := "<<<<<<<<< current\nwidth: 50 um\n=========\nwidth: 80 um\n>>>>>>>>> other\n"
	if !strings.Contains(got, want) || strings.Contains(got, "|||||||||") {
		t.Errorf("merged file lacks the conflict in merge style %q:\n%s", want, got)
	}
	if strings.Count(got, "<<<<<<<<<") != 1 || stripped(got, "W = mask.width") != stripped(current, "W = mask.width") {
		t.Errorf("the result conflict was not settled with the current side:\n%s", got)
	}
}

// stripped returns the line of text that starts with prefix.
func stripped(text, prefix string) string {
	for _, l := range strings.Split(text, "\n") {
		if strings.HasPrefix(l, prefix) {
			return l
		}
	}
	return ""
}

// Without a work tree a results-only conflict is still settled, with the current side's
// results, and the driver says so.
func TestMergeDriverNoWorkTree(t *testing.T) {
	needGit(t)
	base := upToDate(t, mergeMask)
	current := upToDate(t, probe2.Replace(mergeMask))
	o, a, b := mergeFiles(t, base, current, upToDate(t, probe4.Replace(mergeMask)))
	res, err := MergeDriver("", o, a, b, 7, "masks/M1.md")
	if err != nil || res.Conflicts != 0 || res.Recomputed || res.Note == "" {
		t.Fatalf("result %+v, %v", res, err)
	}
	got := readFile(t, a)
	if stripped(got, "sq = ") != stripped(current, "sq = ") || !strings.Contains(got, "position: 770 um") {
		t.Errorf("merged without a work tree:\n%s", got)
	}
}

func TestConflictHunks(t *testing.T) {
	merged := "a\n<<<<<<<<< current\nx = 1  #~ 1\n||||||||| base\nx = 1  #~ 0\n=========\nx = 1  #~ 2\n>>>>>>>>> other\nb\n"
	hunks, ok := conflictHunks([]byte(merged), 9)
	if !ok || len(hunks) != 1 {
		t.Fatalf("%v %v", hunks, ok)
	}
	h := hunks[0]
	if !h.hasBase || len(h.ours) != 1 || h.ours[0] != "x = 1  #~ 1\n" || len(h.other) != 1 || h.other[0] != "x = 1  #~ 2\n" || h.base[0] != "x = 1  #~ 0\n" {
		t.Errorf("hunk %+v", h)
	}
	text, places := resolveWith([]byte(merged), hunks, func(h conflictHunk) []string { return h.ours })
	if string(text) != "a\nx = 1  #~ 1\nb\n" || places[0] != 2 {
		t.Errorf("resolved %q, places %v", text, places)
	}
	// Seven-character markers do not count when git was asked for nine.
	if hunks, ok := conflictHunks([]byte("<<<<<<< x\n=======\n>>>>>>> y\n"), 9); !ok || len(hunks) != 0 {
		t.Errorf("short markers read as a conflict: %v", hunks)
	}
	if _, ok := conflictHunks([]byte("<<<<<<< x\na\n"), 7); ok {
		t.Error("an unclosed conflict was accepted")
	}
}
