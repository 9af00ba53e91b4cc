package hooks

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

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
// inside one yet), the conventional folders (each kept in git by a .gitkeep file), a
// .gitignore line for the tool's temporary files ([TempPattern]), and a README.md written
// from readme unless one exists. It returns the list of paths it created,
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
	switch added, err := ignoreTemps(abs); {
	case err != nil:
		return created, fmt.Errorf("init: %w", err)
	case added:
		created = append(created, ".gitignore")
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

// TempPattern is the .gitignore pattern of the temporary files calc writes beside an entry
// while it updates its results (see calcblock.IsTempName): a run killed at the wrong moment
// leaves one, the next calc or check removes it, and meanwhile `git add -A` must not take it.
const TempPattern = ".*.tmp-*"

// ignoreTemps adds TempPattern to dir's .gitignore (made if missing) unless a line already
// says it, and reports whether it changed the file.
func ignoreTemps(dir string) (bool, error) {
	p := filepath.Join(dir, ".gitignore")
	old, err := os.ReadFile(p)
	if err != nil && !errors.Is(err, os.ErrNotExist) {
		return false, err
	}
	for _, l := range strings.Split(string(old), "\n") {
		if strings.TrimSpace(l) == TempPattern {
			return false, nil
		}
	}
	add := "# temporary files of an interrupted `cleave calc` (the next run removes them)\n" + TempPattern + "\n"
	if len(old) > 0 && !strings.HasSuffix(string(old), "\n") {
		add = "\n" + add
	}
	f, err := os.OpenFile(p, os.O_WRONLY|os.O_APPEND|os.O_CREATE, 0o644)
	if err != nil {
		return false, err
	}
	_, werr := f.WriteString(add)
	return true, errors.Join(werr, f.Close())
}
