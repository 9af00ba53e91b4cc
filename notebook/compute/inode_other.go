//go:build !unix

package compute

import "io/fs"

// inode is 0 where the platform does not give inode numbers.
func inode(fs.FileInfo) uint64 { return 0 }
