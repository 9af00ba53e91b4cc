package hooks

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"cleave/notebook"

	"github.com/go-git/go-git/v5"
)

// Folders are the conventional folders of a notebook, one per entry kind (from the kind
// table), plus data and the notebook's own template overrides. They are a convention, never
// a requirement.
func Folders() []string {
	var fs []string
	for _, ki := range notebook.KindTable() {
		fs = append(fs, ki.Folder)
	}
	return append(fs, "data", "templates")
}

// InitNotebook makes dir a notebook: a git repository (created with go-git when dir is not
// inside one yet), the conventional folders (each kept in git by a .gitkeep file), and a
// README.md written from readme unless one exists. It returns the list of paths it created,
// relative to dir. Nothing it writes is state a later command could not rebuild.
func InitNotebook(dir string, readme []byte) ([]string, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil, err
	}
	if err := os.MkdirAll(abs, 0o755); err != nil {
		return nil, fmt.Errorf("init: %w", err)
	}
	var created []string
	if _, err := git.PlainOpenWithOptions(abs, &git.PlainOpenOptions{DetectDotGit: true}); err != nil {
		if !errors.Is(err, git.ErrRepositoryNotExists) {
			return nil, fmt.Errorf("init: %s: %w", abs, err)
		}
		if _, err := git.PlainInit(abs, false); err != nil {
			return nil, fmt.Errorf("init: creating the git repository: %w", err)
		}
		created = append(created, ".git/")
	}
	for _, f := range Folders() {
		p := filepath.Join(abs, f)
		if _, err := os.Stat(p); err == nil {
			continue
		}
		if err := os.MkdirAll(p, 0o755); err != nil {
			return created, fmt.Errorf("init: %w", err)
		}
		if err := os.WriteFile(filepath.Join(p, ".gitkeep"), nil, 0o644); err != nil {
			return created, fmt.Errorf("init: %w", err)
		}
		created = append(created, f+"/")
	}
	rp := filepath.Join(abs, "README.md")
	if _, err := os.Stat(rp); errors.Is(err, os.ErrNotExist) {
		if err := os.WriteFile(rp, readme, 0o644); err != nil {
			return created, fmt.Errorf("init: %w", err)
		}
		created = append(created, "README.md")
	}
	return created, nil
}
