//go:build !linux

package calcblock

import (
	"os"
	"time"
)

// exchange is Linux only; elsewhere WriteAtomic uses the checked rename.
func exchange(f *os.File, tmp, path string, original []byte) (bool, error) { return false, nil }

// changeTime is the modification time where no exchange can displace a file.
func changeTime(fi os.FileInfo) time.Time { return fi.ModTime() }
