//go:build unix

package site_test

import (
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"cleave/notebook/site"
)

// TestFIFOImage (issue 13): an image a page shows that is a FIFO is left out; it blocked the
// build for ever.
func TestFIFOImage(t *testing.T) {
	dir := notebookCopy(t, filepath.Join("testdata", "nb"))
	if err := os.WriteFile(filepath.Join(dir, "pipe-note.md"), []byte("# Pipe\n\n![trace](trace.png)\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := syscall.Mkfifo(filepath.Join(dir, "trace.png"), 0o644); err != nil {
		t.Skip("mkfifo:", err)
	}
	done := make(chan error, 1)
	go func() {
		_, err := site.Build(dir, site.Options{})
		done <- err
	}()
	select {
	case err := <-done:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(60 * time.Second):
		t.Fatal("the site build blocked on a FIFO")
	}
}
