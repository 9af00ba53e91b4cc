package compute

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestWarmCheckAfterAncestorEdit fills the cache, edits one piece's width and checks that the
// next run evaluates exactly the files that read it (the piece and the devices cut from it),
// answers every other file from the cache, and reports what a run without the cache reports.
func TestWarmCheckAfterAncestorEdit(t *testing.T) {
	root := t.TempDir()
	if err := os.MkdirAll(filepath.Join(root, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	write := func(rel, s string) {
		t.Helper()
		p := filepath.Join(root, rel)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	piece := func(id, width string) string {
		return "---\nid: " + id + "\nkind: piece\nfrom: W1\nwidth: " + width + "\n---\n```cleave\nw = width\nA = w * w\n```\n"
	}
	write("wafers/W1.md", "---\nid: W1\nkind: wafer\ndensity: 3e11 cm^-2\n---\n```cleave\nn = density\nnu = filling_factor(n, 5 T)\n```\n")
	write("masks/M1.md", "---\nid: M1\nkind: mask\nwidth: 100 um\nprobes:\n  - {name: \"2\", position: 250 um, side: top}\n  - {name: \"4\", position: 750 um, side: top}\n---\n")
	write("pieces/P0.md", piece("P0", "4 mm"))
	write("pieces/P1.md", piece("P1", "5 mm"))
	for i, p := range []string{"P0", "P1", "P0", "P1", "P1"} {
		id := "D" + string(rune('0'+i))
		write("devices/"+id+".md", "---\nid: "+id+"\nkind: device\nfrom: "+p+"\nmask: M1\n---\n```cleave\npw = piece.width\nsq = squares(\"2\", \"4\")\nn = wafer.density\n```\n")
	}
	if _, err := runTree(root, CheckOptions{Write: true}); err != nil {
		t.Fatal(err)
	}
	warm, err := runTree(root, CheckOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if warm.Evaluated != 0 || warm.CacheHits != len(warm.Files) || len(warm.Files) != 8 || !warm.OK() {
		t.Fatalf("warm run: %d lines evaluated, %d of %d files from the cache, ok %v: %v",
			warm.Evaluated, warm.CacheHits, len(warm.Files), warm.OK(), warm.Lines())
	}

	p0, err := os.ReadFile(filepath.Join(root, "pieces", "P0.md"))
	if err != nil {
		t.Fatal(err)
	}
	write("pieces/P0.md", strings.Replace(string(p0), "width: 4 mm", "width: 6 mm", 1))
	edited, err := runTree(root, CheckOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var evaluated []string
	for _, f := range edited.Files {
		if !f.FromCache {
			evaluated = append(evaluated, f.Path)
		}
	}
	want := []string{"devices/D0.md", "devices/D2.md", "pieces/P0.md"}
	if !slices.Equal(evaluated, want) {
		t.Errorf("after editing P0's width, evaluated %v; want %v", evaluated, want)
	}
	cold, err := runTree(root, CheckOptions{NoCache: true})
	if err != nil {
		t.Fatal(err)
	}
	if got, exp := strings.Join(edited.Lines(), "\n"), strings.Join(cold.Lines(), "\n"); got != exp {
		t.Errorf("cached run reports\n%s\nwithout the cache\n%s", got, exp)
	}
	// The stale results are the new width (the piece's own line and its two devices') and
	// the piece's area.
	want = []string{
		"devices/D0.md:8: 4.0000 mm → 6.0000 mm",
		"devices/D2.md:8: 4.0000 mm → 6.0000 mm",
		"pieces/P0.md:8: 4.0000 mm → 6.0000 mm",
		"pieces/P0.md:9: 16.000 mm^2 → 36.000 mm^2",
	}
	if got := edited.Lines(); !slices.Equal(got, want) {
		t.Errorf("after the edit the check reports\n%s\nwant\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
}
