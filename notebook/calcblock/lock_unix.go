//go:build unix

package calcblock

import (
	"os"
	"syscall"
	"time"
)

// lockTemp takes an advisory lock on a temporary file for as long as f is
// open, so that [RemoveStaleTemps] in another process leaves it alone.
func lockTemp(f *os.File) { _ = syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB) }

// staleTemp reports whether the temporary file at p was left by a writer that
// is gone: nobody holds its lock, and it was neither written nor renamed in
// the last staleAge (which covers a writer between creating and locking it).
func staleTemp(p string) bool {
	fi, err := os.Lstat(p)
	if err != nil || !fi.Mode().IsRegular() {
		return false
	}
	if since := time.Since(changeTime(fi)); since < staleAge || time.Since(fi.ModTime()) < staleAge {
		return false
	}
	f, err := os.Open(p)
	if err != nil {
		return false
	}
	defer f.Close()
	return syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB) == nil
}

// staleAge is how old an unlocked temporary file must be to be removed.
var staleAge = 2 * time.Second
