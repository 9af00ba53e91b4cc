package calcblock

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"testing"
	"time"
)

// saveKinds are the two ways an editor saves: writing the file in place, or writing a new
// file and renaming it over the old one.
var saveKinds = map[string]func(t *testing.T, path string, data []byte){
	"in place": func(t *testing.T, path string, data []byte) {
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Error(err)
		}
	},
	"rename over": func(t *testing.T, path string, data []byte) {
		tmp := path + "~"
		if err := os.WriteFile(tmp, data, 0o644); err != nil {
			t.Error(err)
		}
		if err := os.Rename(tmp, path); err != nil {
			t.Error(err)
		}
	},
}

// leftovers lists the files of dir other than want.
func leftovers(t *testing.T, dir string, want ...string) []string {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range ents {
		if !strings.HasSuffix(e.Name(), "~") && !contains(want, e.Name()) {
			out = append(out, e.Name())
		}
	}
	return out
}

func contains(l []string, s string) bool {
	for _, x := range l {
		if x == s {
			return true
		}
	}
	return false
}

// TestSaveDuringSwapIsKept (issue 13): a save that lands after WriteAtomic compared the file
// with what it read, and before the new file takes its place, is never overwritten. The hook
// saves in exactly that window. On Linux the exchange catches every such save; the portable
// path's last stat comparison catches a save made before it (TestRenameCheckedNarrowsWindow).
func TestSaveDuringSwapIsKept(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("the swap that closes the window is Linux's renameat2")
	}
	orig := []byte("```cleave\na = 1\n```\n")
	next := []byte("```cleave\na = 1  #~ 1.0000\n```\n")
	saved := []byte("```cleave\na = 2\n```\nA sentence the user just typed.\n")
	for name, save := range saveKinds {
		t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			p := filepath.Join(dir, "entry.md")
			if err := os.WriteFile(p, orig, 0o644); err != nil {
				t.Fatal(err)
			}
			beforeSwap = func(path string) { save(t, path, saved) }
			defer func() { beforeSwap = nil }()
			err := WriteAtomic(p, next, orig)
			if !errors.Is(err, ErrChangedOnDisk) {
				t.Fatalf("err = %v, want ErrChangedOnDisk", err)
			}
			if got, _ := os.ReadFile(p); !bytes.Equal(got, saved) {
				t.Errorf("the save was lost: file holds %q", got)
			}
			if l := leftovers(t, dir, "entry.md"); len(l) > 0 {
				t.Errorf("files left behind: %v", l)
			}
		})
	}
	t.Run("a file created meanwhile", func(t *testing.T) {
		dir := t.TempDir()
		p := filepath.Join(dir, "new.md")
		beforeSwap = func(path string) { saveKinds["in place"](t, path, saved) }
		defer func() { beforeSwap = nil }()
		if err := WriteAtomic(p, next, nil); !errors.Is(err, ErrChangedOnDisk) {
			t.Fatalf("err = %v, want ErrChangedOnDisk", err)
		}
		if got, _ := os.ReadFile(p); !bytes.Equal(got, saved) {
			t.Errorf("the new file was replaced: %q", got)
		}
	})
}

// TestSaveDuringDelayedWrite: the reproduction, a 3 s delay injected before the swap
// (here 300 ms) while an editor saves from another goroutine. The save stays; a write that
// nothing disturbs goes through.
func TestSaveDuringDelayedWrite(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("the swap that closes the window is Linux's renameat2")
	}
	dir := t.TempDir()
	p := filepath.Join(dir, "entry.md")
	orig, next, saved := []byte("a\n"), []byte("a  #~ 1\n"), []byte("b\n")
	if err := os.WriteFile(p, orig, 0o644); err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	beforeSwap = func(string) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			saveKinds["rename over"](t, p, saved)
		}()
		time.Sleep(300 * time.Millisecond)
	}
	defer func() { beforeSwap = nil }()
	err := WriteAtomic(p, next, orig)
	wg.Wait()
	if !errors.Is(err, ErrChangedOnDisk) {
		t.Fatalf("err = %v, want ErrChangedOnDisk", err)
	}
	if got, _ := os.ReadFile(p); !bytes.Equal(got, saved) {
		t.Errorf("the save was lost: %q", got)
	}
	beforeSwap = func(string) { time.Sleep(300 * time.Millisecond) }
	if err := WriteAtomic(p, next, saved); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(p); !bytes.Equal(got, next) {
		t.Errorf("file holds %q, want %q", got, next)
	}
}

// TestExchangeSupported: on Linux the temporary folder's file system offers the exchange, so
// the tests above exercise it (and not the fallback).
func TestExchangeSupported(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("Linux only")
	}
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	os.WriteFile(a, []byte("A"), 0o644)
	os.WriteFile(b, []byte("B"), 0o644)
	f, err := os.Open(a)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	done, err := exchange(f, a, b, []byte("B"))
	if !done {
		t.Skip("this file system cannot exchange; WriteAtomic falls back to the checked rename")
	}
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(b); string(got) != "A" {
		t.Errorf("b holds %q after the exchange, want A", got)
	}
	if _, err := os.Stat(a); !os.IsNotExist(err) {
		t.Errorf("the displaced file was not removed: %v", err)
	}
}

// TestRenameCheckedNarrowsWindow: the portable path compares the stat data once more just
// before the rename, so a save between the content check and that moment is refused.
func TestRenameCheckedNarrowsWindow(t *testing.T) {
	for name, save := range saveKinds {
		t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			p := filepath.Join(dir, "entry.md")
			orig, next := []byte("a = 1\n"), []byte("a = 1  #~ 1\n")
			saved := []byte("a = 9\n") // same size: only the inode or the time stamp tells
			if err := os.WriteFile(p, orig, 0o644); err != nil {
				t.Fatal(err)
			}
			cur, err := checkUnchanged(p, orig)
			if err != nil {
				t.Fatal(err)
			}
			tmp := filepath.Join(dir, ".entry.md.tmp-1")
			if err := os.WriteFile(tmp, next, 0o644); err != nil {
				t.Fatal(err)
			}
			time.Sleep(10 * time.Millisecond) // a new modification time even on coarse clocks
			save(t, p, saved)
			if err := renameChecked(tmp, p, orig, cur); !errors.Is(err, ErrChangedOnDisk) {
				t.Fatalf("err = %v, want ErrChangedOnDisk", err)
			}
			if got, _ := os.ReadFile(p); !bytes.Equal(got, saved) {
				t.Errorf("the save was lost: %q", got)
			}
			if l := leftovers(t, dir, "entry.md"); len(l) > 0 {
				t.Errorf("files left behind: %v", l)
			}
		})
	}
}

// TestReadOnlyEntryRefused (issue 13): a file its owner cannot write is not replaced behind
// their back.
func TestReadOnlyEntryRefused(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "entry.md")
	orig := []byte("a = 1\n")
	if err := os.WriteFile(p, orig, 0o444); err != nil {
		t.Fatal(err)
	}
	err := WriteAtomic(p, []byte("a = 1  #~ 1\n"), orig)
	if !errors.Is(err, ErrReadOnly) || !strings.Contains(err.Error(), "chmod u+w") {
		t.Fatalf("err = %v, want ErrReadOnly with advice", err)
	}
	if got, _ := os.ReadFile(p); !bytes.Equal(got, orig) {
		t.Errorf("file changed: %q", got)
	}
	if l := leftovers(t, dir, "entry.md"); len(l) > 0 {
		t.Errorf("files left behind: %v", l)
	}
}

func TestIsTempName(t *testing.T) {
	tests := map[string]bool{
		".CD24-001.md.tmp-123456": true,
		".a.md.tmp-9":             true,
		"CD24-001.md.tmp-1":       false, // not hidden
		".md.tmp-":                false,
		".x.tmp-":                 false, // no random part
		".tmp-123":                false, // ReplaceFile's, under .git only
		".CD24-001.md":            false,
		".x.md.tmp-1.md":          false,
	}
	for name, want := range tests {
		if got := IsTempName(name); got != want {
			t.Errorf("IsTempName(%q) = %v, want %v", name, got, want)
		}
	}
}

// TestRemoveStaleTemps (issue 13: kill -9 left hidden copies that `git add -A` would commit):
// temporary files nobody holds are removed; one a writer holds (locked) is not, nor is any
// other file.
func TestRemoveStaleTemps(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no advisory locks")
	}
	old := staleAge
	staleAge = 0
	defer func() { staleAge = old }()
	dir := t.TempDir()
	held, err := os.CreateTemp(dir, ".held.md"+tempInfix+"*")
	if err != nil {
		t.Fatal(err)
	}
	defer held.Close()
	lockTemp(held)
	dead := filepath.Join(dir, ".dead.md.tmp-42")
	other := filepath.Join(dir, ".notes.md")
	for _, p := range []string{dead, other} {
		if err := os.WriteFile(p, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	removed := RemoveStaleTemps([]string{held.Name(), dead, other})
	if len(removed) != 1 || removed[0] != dead {
		t.Errorf("removed %v, want only %s", removed, dead)
	}
	for _, p := range []string{held.Name(), other} {
		if _, err := os.Stat(p); err != nil {
			t.Errorf("%s: %v", p, err)
		}
	}
	// A fresh temporary file is left alone even when unlocked (its writer may not have
	// locked it yet).
	staleAge = time.Hour
	if removed := RemoveStaleTemps([]string{held.Name()}); len(removed) != 0 {
		t.Errorf("removed a fresh file: %v", removed)
	}
}

// TestReadFileDoesNotBlockOnFIFO: a FIFO where a file was expected (swapped in after a check
// that it was a regular file) reads as empty instead of blocking forever.
func TestReadFileDoesNotBlockOnFIFO(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("no FIFOs")
	}
	p := filepath.Join(t.TempDir(), "pipe.csv")
	if err := mkfifo(p); err != nil {
		t.Skip("mkfifo:", err)
	}
	done := make(chan error, 1)
	go func() {
		_, err := ReadFile(p)
		done <- err
	}()
	select {
	case <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("ReadFile blocked on a FIFO")
	}
}
