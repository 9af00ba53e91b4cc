package compute

import (
	"path/filepath"
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
