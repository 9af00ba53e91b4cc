package compute

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"

	"cleave/notebook/calcblock"
)

// dirFS is os.DirFS(dir) whose ReadFile takes fewer system calls (see calcblock.ReadFile):
// loading a notebook reads every Markdown file, and on a virtual machine the extra calls
// os.ReadFile makes cost more than the reading. Every other method is os.DirFS's.
type dirFS struct {
	fs.FS
	dir string
}

func newDirFS(dir string) dirFS { return dirFS{os.DirFS(dir), dir} }

// ReadFile implements fs.ReadFileFS.
func (d dirFS) ReadFile(name string) ([]byte, error) {
	if !fs.ValidPath(name) || runtime.GOOS == "windows" {
		return fs.ReadFile(d.FS, name)
	}
	b, err := calcblock.ReadFile(filepath.Join(d.dir, filepath.FromSlash(name)))
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			pe.Path = name
		}
		return nil, err
	}
	return b, nil
}

// ReadDir implements fs.ReadDirFS.
func (d dirFS) ReadDir(name string) ([]fs.DirEntry, error) { return fs.ReadDir(d.FS, name) }

// Stat implements fs.StatFS.
func (d dirFS) Stat(name string) (fs.FileInfo, error) { return fs.Stat(d.FS, name) }

// ReadLink implements fs.ReadLinkFS.
func (d dirFS) ReadLink(name string) (string, error) { return fs.ReadLink(d.FS, name) }

// Lstat implements fs.ReadLinkFS.
func (d dirFS) Lstat(name string) (fs.FileInfo, error) { return fs.Lstat(d.FS, name) }
