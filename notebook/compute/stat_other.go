//go:build !unix

package compute

import (
	"io/fs"
	"os"
	"path/filepath"
)

// statData is the part of a file's stat data a scan compares.
type statData struct {
	mode  uint32
	size  int64
	mtime int64 // nanoseconds
	ino   uint64
}

// dirHandle is a folder whose files a scan asks about by name.
type dirHandle struct{ path string }

func openDir(path string) (dirHandle, error) {
	_, err := os.Stat(path)
	return dirHandle{path}, err
}

func (d dirHandle) readDir() ([]fs.DirEntry, error) { return os.ReadDir(d.path) }

func (d dirHandle) close() {}

// statBuf is unused where os.Lstat gives the stat data.
type statBuf struct{}

func (d dirHandle) lstat(name string, _ *statBuf) (statData, error) {
	fi, err := os.Lstat(filepath.Join(d.path, name))
	if err != nil {
		return statData{}, err
	}
	return statData{mode: uint32(fi.Mode()), size: fi.Size(), mtime: fi.ModTime().UnixNano()}, nil
}

// inode is 0 where the platform does not give inode numbers.
func inode(fs.FileInfo) uint64 { return 0 }

// regular reports whether the file is a regular file.
func (s statData) regular() bool { return fs.FileMode(s.mode).IsRegular() }
