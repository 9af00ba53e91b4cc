//go:build unix

package compute

import (
	"io/fs"
	"syscall"
)

// inode is the file's inode number (0 when the platform does not say).
func inode(fi fs.FileInfo) uint64 {
	if st, ok := fi.Sys().(*syscall.Stat_t); ok {
		return uint64(st.Ino)
	}
	return 0
}
