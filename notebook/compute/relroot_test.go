package compute

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestRelToRoot(t *testing.T) {
	root := t.TempDir()
	tests := []struct {
		p, rel string
		inside bool
	}{
		{root, ".", true},
		{filepath.Join(root, "wafers", "G1.md"), "wafers/G1.md", true},
		{filepath.Join(root, "..notes.md"), "..notes.md", true}, // a name starting with two dots stays inside
		{filepath.Join(root, "a", "..", "b"), "b", true},
		{filepath.Dir(root), "", false},
		{filepath.Join(root, "..", "other"), "", false},
	}
	for _, tc := range tests {
		rel, inside, err := relToRoot(root, tc.p)
		if err != nil || rel != tc.rel || inside != tc.inside {
			t.Errorf("relToRoot(%q) = %q, %v, %v; want %q, %v", tc.p, rel, inside, err, tc.rel, tc.inside)
		}
	}
}

// TestRelRefusesLinks (issue 13): a command-line path that is, or goes through, a symbolic
// link is refused with where it leads; it used to select nothing, silently.
func TestRelRefusesLinks(t *testing.T) {
	base := t.TempDir()
	root, outside := filepath.Join(base, "nb"), filepath.Join(base, "elsewhere")
	for _, d := range []string{filepath.Join(root, "cooldowns"), outside} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	for _, f := range []string{filepath.Join(root, "cooldowns", "C1.md"), filepath.Join(outside, "X.md")} {
		if err := os.WriteFile(f, []byte("# x\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	links := map[string]string{
		filepath.Join(root, "out.md"):     filepath.Join(outside, "X.md"),
		filepath.Join(root, "outdir"):     outside,
		filepath.Join(root, "in.md"):      filepath.Join(root, "cooldowns", "C1.md"),
		filepath.Join(base, "nb-link"):    root, // the notebook itself reached through a link
		filepath.Join(root, "cooldowns2"): filepath.Join(root, "cooldowns"),
	}
	for l, target := range links {
		if err := os.Symlink(target, l); err != nil {
			t.Skip("symlinks unavailable:", err)
		}
	}
	w := WorkTree{Root: root}
	tests := []struct {
		p, want string // want: the error's text, "" for none
	}{
		{filepath.Join(root, "cooldowns", "C1.md"), ""},
		{filepath.Join(root, "out.md"), "outside the notebook"},
		{filepath.Join(root, "outdir", "X.md"), "outside the notebook"},
		{filepath.Join(root, "in.md"), "name cooldowns/C1.md instead"},
		{filepath.Join(root, "cooldowns2", "C1.md"), "name cooldowns/C1.md instead"},
	}
	for _, tc := range tests {
		_, err := w.Rel([]string{tc.p})
		switch {
		case tc.want == "" && err != nil:
			t.Errorf("Rel(%s): %v", tc.p, err)
		case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
			t.Errorf("Rel(%s) = %v, want an error saying %q", tc.p, err, tc.want)
		}
	}
	// A notebook whose root is itself reached through a link works as usual.
	lw := WorkTree{Root: filepath.Join(base, "nb-link")}
	if rel, err := lw.Rel([]string{filepath.Join(base, "nb-link", "cooldowns", "C1.md")}); err != nil || rel[0] != "cooldowns/C1.md" {
		t.Errorf("through a linked root: %v, %v", rel, err)
	}
}
