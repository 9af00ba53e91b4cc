package compute

import (
	"io/fs"
	"os"
	"strings"
	"testing"
	"testing/fstest"
)

// TestRunOnMemoryTree: the engine needs no folder on disk. The test notebook copied into an
// in-memory tree gives exactly the report it gives on disk, and with a cache the second run
// answers every file from it.
func TestRunOnMemoryTree(t *testing.T) {
	root := testNotebook(t)
	mem := fstest.MapFS{}
	err := fs.WalkDir(os.DirFS(root), ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(root + "/" + p)
		mem[p] = &fstest.MapFile{Data: b, Mode: 0o644}
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	disk, err := runTree(root, CheckOptions{NoCache: true})
	if err != nil {
		t.Fatal(err)
	}
	cache := OpenCache(t.TempDir())
	first, err := Run(mem, nil, Options{Cache: cache})
	if err != nil {
		t.Fatal(err)
	}
	if got, want := strings.Join(first.Lines(), "\n"), strings.Join(disk.Lines(), "\n"); got != want {
		t.Errorf("in memory:\n%s\non disk:\n%s", got, want)
	}
	if len(first.Files) == 0 || first.Evaluated == 0 {
		t.Fatalf("nothing evaluated: %+v", first)
	}
	second, err := Run(mem, nil, Options{Cache: cache})
	if err != nil {
		t.Fatal(err)
	}
	if second.Evaluated != 0 || second.CacheHits != len(second.Files) {
		t.Errorf("second run: %d lines evaluated, %d of %d files from the cache", second.Evaluated, second.CacheHits, len(second.Files))
	}
	if got, want := strings.Join(second.Lines(), "\n"), strings.Join(disk.Lines(), "\n"); got != want {
		t.Errorf("from the cache:\n%s\nwant:\n%s", got, want)
	}
}
