package plotfiles

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestStateOfOddPlotFiles (issue 13): where a plot file should be, a folder or a symbolic
// link is reported as no plot the tool wrote, without reading it (a FIFO there blocked check
// for ever; the reliability suite at the top of the repository makes one).
func TestStateOfOddPlotFiles(t *testing.T) {
	root := t.TempDir()
	dir := filepath.Join(root, "plots", "n")
	if err := os.MkdirAll(filepath.Join(dir, "folder.svg"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink("/etc/hostname", filepath.Join(dir, "link.svg")); err != nil {
		t.Skip("symlinks unavailable:", err)
	}
	for _, name := range []string{"folder.svg", "link.svg"} {
		msg := state(root, Ref{Path: "plots/n/" + name, Hash: "0123456789ab"})
		if !strings.Contains(msg, "is not a regular file") {
			t.Errorf("%s: %q", name, msg)
		}
	}
	if msg := state(root, Ref{Path: "plots/n/missing.svg"}); !strings.Contains(msg, "is missing") {
		t.Errorf("missing: %q", msg)
	}
}
