//go:build !unix

package calcblock

import (
	"os"
	"time"
)

// lockTemp does nothing where there are no advisory locks.
func lockTemp(f *os.File) {}

// staleTemp, without locks, takes a temporary file untouched for staleAge as
// abandoned: no write lasts that long.
func staleTemp(p string) bool {
	fi, err := os.Lstat(p)
	return err == nil && fi.Mode().IsRegular() && time.Since(fi.ModTime()) > staleAge
}

// staleAge is how old a temporary file must be to be removed.
var staleAge = time.Hour
