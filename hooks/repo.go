package hooks

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// GitDir returns the git directory of the work tree rooted at root: root/.git if that is a
// directory, or the directory named by its "gitdir: <path>" line if root/.git is a file
// (linked work trees, submodules).
func GitDir(root string) (string, error) {
	dotgit := filepath.Join(root, ".git")
	fi, err := os.Stat(dotgit)
	if err != nil {
		return "", fmt.Errorf("finding the git directory of %s: %w", root, err)
	}
	if fi.IsDir() {
		return dotgit, nil
	}
	data, err := os.ReadFile(dotgit)
	if err != nil {
		return "", fmt.Errorf("finding the git directory of %s: %w", root, err)
	}
	line, _, _ := strings.Cut(string(data), "\n")
	line = strings.TrimRight(line, "\r")
	target, ok := strings.CutPrefix(line, "gitdir:")
	if !ok {
		return "", fmt.Errorf("%s: line 1: expected \"gitdir: <path>\"", dotgit)
	}
	target = strings.TrimSpace(target)
	if !filepath.IsAbs(target) {
		target = filepath.Join(root, target)
	}
	return filepath.Clean(target), nil
}

// StateDir is the folder under the git directory of the work tree at root where cleave keeps
// its own files (the calc cache, the record of the last good check): never part of the
// notebook, never committed, safe to delete.
func StateDir(root string) (string, error) {
	gd, err := GitDir(root)
	if err != nil {
		return "", err
	}
	return filepath.Join(gd, "cleave"), nil
}
