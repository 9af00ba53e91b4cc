//go:build unix

package compute

import (
	"fmt"
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// A notebook with more folders than the process may have open files: the scan keeps a
// folder open only while its files wait for their stat data, so it succeeds under a limit of
// 100 open files with 500 folders, and lists every file.
func TestScanManyFolders(t *testing.T) {
	root := t.TempDir()
	for i := range 500 {
		dir := filepath.Join(root, "cooldowns", "data", fmt.Sprintf("CD%03d", i))
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, "sweep.csv"), []byte("B,R\n0,1\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	var old syscall.Rlimit
	if err := syscall.Getrlimit(syscall.RLIMIT_NOFILE, &old); err != nil {
		t.Skip(err)
	}
	low := old
	low.Cur = 100
	if err := syscall.Setrlimit(syscall.RLIMIT_NOFILE, &low); err != nil {
		t.Skip(err)
	}
	sc, err := WorkTree{Root: root}.Scan()
	syscall.Setrlimit(syscall.RLIMIT_NOFILE, &old)
	if err != nil {
		t.Fatalf("scan with 500 folders under 100 open files: %v", err)
	}
	if len(sc.Stamps) != 500 {
		t.Fatalf("scan listed %d files, want 500", len(sc.Stamps))
	}
}
