package compute

import "path/filepath"

// runTree runs the engine over the notebook folder root as `cleave check` (or with Write,
// `cleave calc`) does, with its cache in root/.git/cleave, without the shortcut for an
// unchanged notebook.
func runTree(root string, opt CheckOptions) (*CheckResult, error) {
	w := WorkTree{Root: root, StateDir: filepath.Join(root, ".git", "cleave")}
	sc, err := w.Scan()
	if err != nil {
		return nil, err
	}
	return w.run(opt, sc)
}
