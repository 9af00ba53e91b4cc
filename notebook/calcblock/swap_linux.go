//go:build linux

package calcblock

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"syscall"
	"time"

	"golang.org/x/sys/unix"
)

// exchange swaps the temporary file tmp (open as f) with path in one system
// call and checks what it displaced (see [WriteAtomic]). done is false when
// the file system cannot exchange, and nothing was done.
func exchange(f *os.File, tmp, path string, original []byte) (done bool, err error) {
	if beforeSwap != nil {
		beforeSwap(path)
	}
	if original == nil {
		err := unix.Renameat2(unix.AT_FDCWD, tmp, unix.AT_FDCWD, path, unix.RENAME_NOREPLACE)
		switch {
		case err == nil:
			return true, nil
		case unsupported(err):
			return false, nil
		}
		os.Remove(tmp)
		if errors.Is(err, unix.EEXIST) {
			return true, fmt.Errorf("writing %s: %w (it was created)", path, ErrChangedOnDisk)
		}
		return true, fmt.Errorf("writing %s: %w", path, err)
	}
	err = unix.Renameat2(unix.AT_FDCWD, tmp, unix.AT_FDCWD, path, unix.RENAME_EXCHANGE)
	switch {
	case err == nil:
	case unsupported(err):
		return false, nil
	case errors.Is(err, unix.ENOENT):
		os.Remove(tmp)
		return true, fmt.Errorf("writing %s: %w (it was removed)", path, ErrChangedOnDisk)
	default:
		os.Remove(tmp)
		return true, fmt.Errorf("writing %s: %w", path, err)
	}
	// What the swap displaced is now under the temporary name.
	if holds(tmp, original) {
		os.Remove(tmp)
		return true, nil
	}
	// A save landed between the check and the swap: put it back.
	if err := unix.Renameat2(unix.AT_FDCWD, tmp, unix.AT_FDCWD, path, unix.RENAME_EXCHANGE); err != nil {
		return true, fmt.Errorf("writing %s: %w, and the file saved meanwhile could not be put back (%v): it is kept as %s", path, ErrChangedOnDisk, err, tmp)
	}
	ours, err1 := f.Stat()
	back, err2 := os.Lstat(tmp)
	if err1 != nil || err2 != nil || !os.SameFile(ours, back) {
		// Yet another save replaced the file in between: keep whatever is there.
		return true, fmt.Errorf("writing %s: %w (saved again while it was put back; the intermediate version is kept as %s)", path, ErrChangedOnDisk, tmp)
	}
	os.Remove(tmp)
	return true, fmt.Errorf("writing %s: %w (a save landed while the results were being written; the save was kept)", path, ErrChangedOnDisk)
}

// holds reports whether the regular file at p holds exactly want.
func holds(p string, want []byte) bool {
	fi, err := os.Lstat(p)
	if err != nil || !fi.Mode().IsRegular() || fi.Size() != int64(len(want)) {
		return false
	}
	got, err := os.ReadFile(p)
	return err == nil && bytes.Equal(got, want)
}

// unsupported reports whether renameat2 failed because the kernel or the file
// system does not offer the flag.
func unsupported(err error) bool {
	return errors.Is(err, unix.EINVAL) || errors.Is(err, unix.ENOSYS) || errors.Is(err, unix.EOPNOTSUPP)
}

// changeTime is the inode change time: a rename or exchange sets it, so a
// temporary file the swap has just displaced counts as fresh.
func changeTime(fi os.FileInfo) time.Time {
	if st, ok := fi.Sys().(*syscall.Stat_t); ok {
		return time.Unix(st.Ctim.Sec, st.Ctim.Nsec)
	}
	return fi.ModTime()
}
