package compute

import (
	"fmt"
	"path/filepath"
)

// throughLink refuses a command-line path p (rel: its slash path relative to root) that
// reaches its file through a symbolic link. The notebook is read without following links
// (a linked file or folder is not part of it), so such a path would select nothing and the
// run would say nothing about it; instead the error names where the link leads: outside the
// notebook, or the notebook path to name instead.
func throughLink(root, p, rel string) error {
	real, err := filepath.EvalSymlinks(p)
	if err != nil {
		return nil // a missing path is reported by the caller
	}
	realRoot, err := filepath.EvalSymlinks(root)
	if err != nil {
		return nil
	}
	realRel, err := filepath.Rel(realRoot, real)
	switch {
	case err != nil || !filepath.IsLocal(realRel) && realRel != ".":
		return fmt.Errorf("%s: a symbolic link to %s, which is outside the notebook at %s: cleave reads only the notebook's own files", p, real, root)
	case filepath.ToSlash(realRel) != rel:
		return fmt.Errorf("%s: reached through a symbolic link, and cleave does not follow links inside the notebook: name %s instead", p, filepath.ToSlash(realRel))
	}
	return nil
}
