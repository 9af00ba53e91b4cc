package calcblock

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"syscall"
)

// ErrChangedOnDisk is returned by [WriteAtomic] when the file no longer
// holds the bytes it was read with (an editor saved it meanwhile).
var ErrChangedOnDisk = errors.New("file changed on disk since it was read")

// ErrNotRegular is returned by [WriteAtomic] for a symbolic link or any other
// file that is not a regular file: renaming over it would replace the link
// itself.
var ErrNotRegular = errors.New("not a regular file")

// WriteAtomic replaces the file at path with data, provided the file still
// holds exactly original (a nil original means the file must not exist).
// It writes a temporary file in the same directory, gives it the original
// file's permission bits, syncs it, checks the target once more, renames it
// over the target and syncs the directory (except on Windows). On any
// failure the temporary file is removed and the target is left as it was.
func WriteAtomic(path string, data []byte, original []byte) error {
	mode, err := checkUnchanged(path, original)
	if err != nil {
		return err
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	tmp := f.Name()
	fail := func(err error) error {
		f.Close()
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if _, err := f.Write(data); err != nil {
		return fail(err)
	}
	if err := f.Chmod(mode); err != nil {
		return fail(err)
	}
	if err := f.Sync(); err != nil {
		return fail(err)
	}
	if err := f.Close(); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	// Check again just before the rename, to narrow the window in which a
	// concurrent save could be overwritten.
	if _, err := checkUnchanged(path, original); err != nil {
		os.Remove(tmp)
		return err
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if runtime.GOOS != "windows" {
		if err := syncDir(dir); err != nil {
			return fmt.Errorf("writing %s: syncing directory: %w", path, err)
		}
	}
	return nil
}

// checkUnchanged returns the permission bits to give the new file.
func checkUnchanged(path string, original []byte) (fs.FileMode, error) {
	fi, err := os.Lstat(path)
	if errors.Is(err, fs.ErrNotExist) {
		if original == nil {
			return 0o644, nil
		}
		return 0, fmt.Errorf("writing %s: %w (it was removed)", path, ErrChangedOnDisk)
	}
	if err != nil {
		return 0, fmt.Errorf("writing %s: %w", path, err)
	}
	if !fi.Mode().IsRegular() {
		return 0, fmt.Errorf("writing %s: %w", path, ErrNotRegular)
	}
	if original == nil {
		return 0, fmt.Errorf("writing %s: %w (it was created)", path, ErrChangedOnDisk)
	}
	cur, err := os.ReadFile(path)
	if err != nil {
		return 0, fmt.Errorf("writing %s: %w", path, err)
	}
	if !bytes.Equal(cur, original) {
		return 0, fmt.Errorf("writing %s: %w", path, ErrChangedOnDisk)
	}
	return fi.Mode().Perm(), nil
}

func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	defer d.Close()
	if err := d.Sync(); err != nil && !errors.Is(err, syscall.EINVAL) && !errors.Is(err, syscall.ENOTSUP) {
		return err
	}
	return nil
}

// ReplaceFile writes data to a temporary file beside path and renames it over path, so a
// reader sees the old content or the new, never a part. It is for the tool's own files
// under the git directory (cache entries, the pack, the last good check's digest), where a
// lost write only costs time; notebook files go through WriteAtomic, which also fsyncs and
// refuses a file changed on disk.
func ReplaceFile(path string, data []byte) error {
	f, err := os.CreateTemp(filepath.Dir(path), ".tmp-*")
	if err != nil {
		return err
	}
	_, werr := f.Write(data)
	if err := errors.Join(werr, f.Close()); err != nil {
		os.Remove(f.Name())
		return err
	}
	if err := os.Rename(f.Name(), path); err != nil {
		os.Remove(f.Name())
		return err
	}
	return nil
}
