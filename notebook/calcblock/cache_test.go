package calcblock

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const cacheDoc = "---\nid: D-07\nwidth: 20 um\n---\n```cleave\nw = @width\nl = 60\nsq = l + w\n```\n\n```cleave\nr = sq + 1 #~ 0\n```\n"

func resolverFor(fields map[string]string) func(string) (string, error) {
	return func(dep string) (string, error) {
		v, ok := fields[strings.TrimPrefix(dep, "@")]
		if !ok {
			return "", errors.New("unknown dependency " + dep)
		}
		return v, nil
	}
}

func TestCacheRecompute(t *testing.T) {
	gitDir := t.TempDir()
	c, err := OpenCache(gitDir)
	if err != nil {
		t.Fatal(err)
	}
	fields := map[string]string{"width": "20 um"}
	opt := Options{Cache: c, Resolve: resolverFor(fields), Salt: "engine-test"}
	raw := []byte(cacheDoc)

	run := func() (*FileReport, *sumEval) {
		t.Helper()
		ev := newSumEval(fields)
		rep, err := RecomputeWith("D-07.md", raw, ev, opt)
		if err != nil {
			t.Fatal(err)
		}
		return rep, ev
	}
	first, ev1 := run()
	if first.CacheHit || ev1.calls != 4 {
		t.Fatalf("first run: hit %v, %d evaluations; want a miss and 4", first.CacheHit, ev1.calls)
	}
	second, ev2 := run()
	if !second.CacheHit || ev2.calls != 0 || second.Evaluated != 0 {
		t.Fatalf("second run: hit %v, %d evaluations; want a hit and none", second.CacheHit, ev2.calls)
	}
	if !bytes.Equal(first.NewBytes, second.NewBytes) || reportText(first) != strings.Replace(reportText(second), "evaluated: 0", "evaluated: 4", 1) {
		t.Fatalf("cached run differs:\n%s\n%s", reportText(first), reportText(second))
	}

	// The output of the first run, checked again, is settled and (after one
	// miss for its new text) served from the cache.
	raw = first.NewBytes
	run()
	settled, ev3 := run()
	if !settled.CacheHit || ev3.calls != 0 || settled.Changed || len(settled.Stale) != 0 {
		t.Fatalf("settled file: hit %v, %d evaluations, changed %v", settled.CacheHit, ev3.calls, settled.Changed)
	}

	// A changed dependency value is a miss and gives the new result.
	fields["width"] = "30 um"
	changed, ev4 := run()
	if changed.CacheHit || ev4.calls != 4 || !bytes.Contains(changed.NewBytes, []byte("sq = l + w  #~ 90")) {
		t.Fatalf("after changing a field: hit %v, %d evaluations:\n%s", changed.CacheHit, ev4.calls, changed.NewBytes)
	}

	// Deleting the cache changes no result.
	if err := os.RemoveAll(c.Dir()); err != nil {
		t.Fatal(err)
	}
	c2, err := OpenCache(gitDir)
	if err != nil {
		t.Fatal(err)
	}
	opt.Cache = c2
	fresh, _ := run()
	if fresh.CacheHit || !bytes.Equal(fresh.NewBytes, changed.NewBytes) {
		t.Fatalf("after deleting the cache: hit %v, bytes differ %v", fresh.CacheHit, !bytes.Equal(fresh.NewBytes, changed.NewBytes))
	}

	// Corrupt every entry: each is ignored and the results are the same.
	err = filepath.WalkDir(c2.Dir(), func(p string, d os.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		data, _ := os.ReadFile(p)
		return os.WriteFile(p, append(data[:len(data)-2], "]x"...), 0o644)
	})
	if err != nil {
		t.Fatal(err)
	}
	corrupt, ev5 := run()
	if corrupt.CacheHit || ev5.calls != 4 || !bytes.Equal(corrupt.NewBytes, changed.NewBytes) {
		t.Fatalf("corrupt cache: hit %v, %d evaluations", corrupt.CacheHit, ev5.calls)
	}

	// An unresolvable dependency is a miss every time.
	opt.Resolve = func(string) (string, error) { return "", errors.New("data file missing") }
	r1, _ := run()
	r2, _ := run()
	if r1.CacheHit || r2.CacheHit {
		t.Fatal("unresolvable dependency gave a cache hit")
	}
}

func TestCacheGetPut(t *testing.T) {
	c, err := OpenCache(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	key := strings.Repeat("ab", 32)
	if _, ok := c.Get(key); ok {
		t.Fatal("hit in an empty cache")
	}
	want := []string{"=3.1e11 cm^-2", "!undefined: x", ""}
	if err := c.Put(key, want); err != nil {
		t.Fatal(err)
	}
	got, ok := c.Get(key)
	if !ok || strings.Join(got, "|") != strings.Join(want, "|") {
		t.Fatalf("Get = %q, %v; want %q", got, ok, want)
	}
	if err := c.Put("../../escape", want); err == nil {
		t.Error("Put accepted a key that is not a hash")
	}
	if _, ok := c.Get("../../escape"); ok {
		t.Error("Get accepted a key that is not a hash")
	}
	// An entry copied under another key fails its checksum.
	other := strings.Repeat("cd", 32)
	data, _ := os.ReadFile(c.path(key))
	os.MkdirAll(filepath.Dir(c.path(other)), 0o755)
	os.WriteFile(c.path(other), data, 0o644)
	if _, ok := c.Get(other); ok {
		t.Error("a misplaced entry was accepted")
	}
}

func TestGitDir(t *testing.T) {
	root := t.TempDir()
	if err := os.Mkdir(filepath.Join(root, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	if got, err := GitDir(root); err != nil || got != filepath.Join(root, ".git") {
		t.Errorf("GitDir = %q, %v", got, err)
	}

	wt := t.TempDir()
	target := filepath.Join(root, ".git", "worktrees", "wt")
	os.WriteFile(filepath.Join(wt, ".git"), []byte("gitdir: "+target+"\r\n"), 0o644)
	if got, err := GitDir(wt); err != nil || got != target {
		t.Errorf("GitDir(linked) = %q, %v; want %q", got, err, target)
	}

	rel := t.TempDir()
	os.WriteFile(filepath.Join(rel, ".git"), []byte("gitdir: ../elsewhere/.git\n"), 0o644)
	if got, err := GitDir(rel); err != nil || got != filepath.Join(filepath.Dir(rel), "elsewhere", ".git") {
		t.Errorf("GitDir(relative) = %q, %v", got, err)
	}

	bad := t.TempDir()
	os.WriteFile(filepath.Join(bad, ".git"), []byte("nonsense\n"), 0o644)
	if _, err := GitDir(bad); err == nil || !strings.Contains(err.Error(), "line 1") {
		t.Errorf("GitDir(bad) error = %v, want a line-1 error", err)
	}
	if _, err := GitDir(t.TempDir()); err == nil {
		t.Error("GitDir without .git: want an error")
	}
}

// TestCachePack checks that the entries a session used come back from the pack alone, that
// a damaged pack or packed entry falls back to the entry files, and that a session using
// fewer entries writes a smaller pack.
func TestCachePack(t *testing.T) {
	gitDir := t.TempDir()
	c, err := OpenCache(gitDir)
	if err != nil {
		t.Fatal(err)
	}
	keys := []string{strings.Repeat("a1", 32), strings.Repeat("b2", 32), strings.Repeat("c3", 32)}
	for i, k := range keys {
		if err := c.Put(k, []string{"=" + strings.Repeat("x", i)}); err != nil {
			t.Fatal(err)
		}
	}
	if err := c.Flush(); err != nil {
		t.Fatal(err)
	}
	packPath := filepath.Join(c.Dir(), packName)
	packed, err := os.ReadFile(packPath)
	if err != nil {
		t.Fatal(err)
	}
	// Without the entry files, a new session reads every entry from the pack.
	for _, k := range keys {
		if err := os.Remove(c.path(k)); err != nil {
			t.Fatal(err)
		}
	}
	c2, _ := OpenCache(gitDir)
	for i, k := range keys {
		got, ok := c2.Get(k)
		if !ok || len(got) != 1 || got[0] != "="+strings.Repeat("x", i) {
			t.Fatalf("Get(%s) from the pack = %q, %v", k[:4], got, ok)
		}
	}
	// Nothing changed: Flush leaves the pack as it was.
	if err := c2.Flush(); err != nil {
		t.Fatal(err)
	}
	if again, _ := os.ReadFile(packPath); !bytes.Equal(again, packed) {
		t.Error("an unchanged session rewrote the pack")
	}
	// A session that uses one entry keeps only that one.
	c3, _ := OpenCache(gitDir)
	if _, ok := c3.Get(keys[1]); !ok {
		t.Fatal("miss after reopening")
	}
	if err := c3.Flush(); err != nil {
		t.Fatal(err)
	}
	c4, _ := OpenCache(gitDir)
	if _, ok := c4.Get(keys[0]); ok {
		t.Error("an entry the last session did not use is still packed")
	}
	if _, ok := c4.Get(keys[1]); !ok {
		t.Error("the entry the last session used is not packed")
	}

	// Damage: a flipped byte inside a packed entry fails its checksum, and the entry's own
	// file answers; a truncated or foreign pack is read up to the damage; none panics.
	if err := c.Put(keys[2], []string{"=file"}); err != nil {
		t.Fatal(err)
	}
	bad := bytes.Replace(packed, []byte(`["=xx"]`), []byte(`["=yy"]`), 1)
	if bytes.Equal(bad, packed) {
		t.Fatal("test pack does not hold the expected entry")
	}
	for _, p := range [][]byte{bad, packed[:len(packed)/2], []byte("not a pack"), nil} {
		if err := os.WriteFile(packPath, p, 0o644); err != nil {
			t.Fatal(err)
		}
		c5, _ := OpenCache(gitDir)
		if got, ok := c5.Get(keys[2]); !ok || got[0] != "=file" {
			t.Errorf("damaged pack %q...: Get = %q, %v; want the file's entry", firstBytes(p), got, ok)
		}
	}
}

func firstBytes(b []byte) []byte { return b[:min(len(b), 20)] }

// TestReadFile compares ReadFile with os.ReadFile on files around the sizes where its buffer
// grows, and on a missing file.
func TestReadFile(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []int{0, 1, 4095, 4096, 4097, 8192, 100000, 1 << 20} {
		p := filepath.Join(dir, "f")
		want := bytes.Repeat([]byte("0123456789abcdef"), n/16+1)[:n]
		if err := os.WriteFile(p, want, 0o644); err != nil {
			t.Fatal(err)
		}
		got, err := ReadFile(p)
		if err != nil || !bytes.Equal(got, want) {
			t.Errorf("size %d: got %d bytes, %v", n, len(got), err)
		}
	}
	if _, err := ReadFile(filepath.Join(dir, "missing")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v, want not exist", err)
	}
}
