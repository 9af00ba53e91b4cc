//go:build unix

package compute

import (
	"io/fs"
	"os"
	"syscall"

	"golang.org/x/sys/unix"
)

// statData is the part of a file's stat data a scan compares: enough to see a change, as
// git's index does.
type statData struct {
	mode  uint32 // the platform's mode bits, file type included
	size  int64
	mtime int64 // nanoseconds
	ino   uint64
}

// dirHandle is an open folder whose files a scan asks about by name: one system call per
// file that does not walk the path from the root again.
type dirHandle struct {
	f  *os.File
	fd int
}

func openDir(path string) (dirHandle, error) {
	f, err := os.Open(path)
	if err != nil {
		return dirHandle{}, err
	}
	return dirHandle{f, int(f.Fd())}, nil
}

func (d dirHandle) readDir() ([]fs.DirEntry, error) { return d.f.ReadDir(-1) }

func (d dirHandle) close() { d.f.Close() }

func (d dirHandle) lstat(name string, st *unix.Stat_t) (statData, error) {
	for {
		err := unix.Fstatat(d.fd, name, st, unix.AT_SYMLINK_NOFOLLOW)
		if err == syscall.EINTR {
			continue
		}
		if err != nil {
			return statData{}, &fs.PathError{Op: "lstat", Path: name, Err: err}
		}
		return statData{mode: st.Mode, size: st.Size, mtime: st.Mtim.Nano(), ino: st.Ino}, nil
	}
}

// statBuf is the buffer lstat fills: one per worker, so that no call allocates one.
type statBuf = unix.Stat_t

// inode is the file's inode number (0 when the platform does not say).
func inode(fi fs.FileInfo) uint64 {
	if st, ok := fi.Sys().(*syscall.Stat_t); ok {
		return uint64(st.Ino)
	}
	return 0
}

// regular reports whether the file is a regular file.
func (s statData) regular() bool { return s.mode&syscall.S_IFMT == syscall.S_IFREG }
