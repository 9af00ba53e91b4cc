package compute

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"cleave/notebook/calcblock"
)

// The notebook digest lets a check of an unchanged notebook finish without loading it: it
// hashes every file's path, mode, size and modification time in nanoseconds (the stat data
// git's index relies on), with the engine version. When it equals the digest stored after the
// last check that found nothing wrong, nothing can have become stale or invalid, because the
// check is a pure function of those files. Any change, anywhere, means a full check (which
// still answers unchanged files from the per-file cache).

const digestFile = "last-good-check"

// Digest hashes the notebook rooted at root (everything but the .git folder).
func Digest(root string) (string, error) {
	type item struct{ path, sum string }
	var items []item
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() && d.Name() == ".git" {
			return filepath.SkipDir
		}
		if d.IsDir() {
			return nil
		}
		rel, _ := filepath.Rel(root, p)
		rel = filepath.ToSlash(rel)
		info, err := d.Info()
		if err != nil {
			return err
		}
		items = append(items, item{rel, fmt.Sprintf("%s %d %d", info.Mode(), info.Size(), info.ModTime().UnixNano())})
		return nil
	})
	if err != nil {
		return "", err
	}
	sort.Slice(items, func(i, j int) bool { return items[i].path < items[j].path })
	h := sha256.New()
	fmt.Fprintf(h, "%s\n", engineSalt())
	for _, it := range items {
		fmt.Fprintf(h, "%s\x00%s\n", it.path, it.sum)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// UnchangedSinceGoodCheck reports whether the notebook is byte-for-byte what the last check
// that found no problem saw.
func UnchangedSinceGoodCheck(root string) bool {
	gd, err := calcblock.GitDir(root)
	if err != nil {
		return false
	}
	b, err := os.ReadFile(filepath.Join(gd, "cleave", digestFile))
	if err != nil {
		return false
	}
	d, err := Digest(root)
	return err == nil && strings.TrimSpace(string(b)) == d
}

// RememberGoodCheck stores the notebook's digest after a check that found nothing wrong.
func RememberGoodCheck(root string) error {
	gd, err := calcblock.GitDir(root)
	if err != nil {
		return err
	}
	d, err := Digest(root)
	if err != nil {
		return err
	}
	dir := filepath.Join(gd, "cleave")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	return calcblock.ReplaceFile(filepath.Join(dir, digestFile), []byte(d+"\n"))
}

// ForgetGoodCheck removes the stored digest (after a check that found problems).
func ForgetGoodCheck(root string) {
	if gd, err := calcblock.GitDir(root); err == nil {
		os.Remove(filepath.Join(gd, "cleave", digestFile))
	}
}
