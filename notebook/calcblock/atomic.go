package calcblock

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"syscall"
)

// ErrChangedOnDisk is returned by [WriteAtomic] when the file no longer
// holds the bytes it was read with (an editor saved it meanwhile).
var ErrChangedOnDisk = errors.New("file changed on disk since it was read")

// ErrNotRegular is returned by [WriteAtomic] for a symbolic link or any other
// file that is not a regular file: renaming over it would replace the link
// itself.
var ErrNotRegular = errors.New("not a regular file")

// ErrReadOnly is returned by [WriteAtomic] for a file its owner may not write:
// someone made it read-only, and replacing it (which the folder's permissions
// would allow) would overrule that.
var ErrReadOnly = errors.New("file is read-only")

// WriteAtomic replaces the file at path with data, provided the file still
// holds exactly original (a nil original means the file must not exist).
// It writes a temporary file in the same directory, gives it the original
// file's permission bits, syncs it, and swaps it in:
//
//   - On Linux the swap is one renameat2(RENAME_EXCHANGE) call: the new file
//     takes the name and the file it displaced comes out under the temporary
//     name, where it is checked. If it no longer holds original (a save landed
//     between the check and the swap), the two are swapped back, so that save
//     stays, and the write is refused with [ErrChangedOnDisk]. A new file is
//     put in place with RENAME_NOREPLACE, which fails if one appeared.
//   - Elsewhere, or on a file system without those flags, the file is compared
//     with original, then its stat data is compared once more immediately
//     before an ordinary rename, which leaves only that short window open.
//
// The directory is synced afterwards (except on Windows). On any failure the
// target is left as it was (or as the concurrent save left it) and the
// temporary file is removed. While it exists, the temporary file is locked
// (see [RemoveStaleTemps]), and its name matches [IsTempName].
func WriteAtomic(path string, data []byte, original []byte) error {
	cur, err := checkUnchanged(path, original)
	if err != nil {
		return err
	}
	mode := fs.FileMode(0o644)
	if cur != nil {
		mode = cur.Mode().Perm()
		if mode&0o200 == 0 {
			return fmt.Errorf("writing %s: %w (mode %v): make it writable (chmod u+w) to let its results be updated", path, ErrReadOnly, mode)
		}
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+tempInfix+"*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	defer f.Close() // holds the lock until the end
	lockTemp(f)
	tmp := f.Name()
	fail := func(err error) error {
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
	if err := swapIn(f, tmp, path, original, cur); err != nil {
		return err
	}
	if runtime.GOOS != "windows" {
		if err := syncDir(dir); err != nil {
			return fmt.Errorf("writing %s: syncing directory: %w", path, err)
		}
	}
	return nil
}

// beforeSwap, when set (by tests), runs between the last check of the target
// and the swap: a save it makes lands in the window the swap must cover.
var beforeSwap func(path string)

// swapIn puts the temporary file tmp (open as f) in place of path, which held
// original (its stat data cur, nil when it must not exist). It removes tmp on
// failure, and what path held before on success.
func swapIn(f *os.File, tmp, path string, original []byte, cur fs.FileInfo) error {
	if done, err := exchange(f, tmp, path, original); done {
		return err
	}
	return renameChecked(tmp, path, original, cur)
}

// renameChecked is the portable swap: compare the target's stat data with what
// was checked (a changed file has another inode, size or modification time),
// then rename over it.
func renameChecked(tmp, path string, original []byte, cur fs.FileInfo) error {
	fi, err := os.Lstat(path)
	switch {
	case original == nil && !errors.Is(err, fs.ErrNotExist):
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w (it was created)", path, ErrChangedOnDisk)
	case original != nil && (err != nil || !sameFile(fi, cur)):
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", path, ErrChangedOnDisk)
	}
	if beforeSwap != nil {
		beforeSwap(path)
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// sameFile reports whether a and b describe the same file with the same size
// and modification time.
func sameFile(a, b fs.FileInfo) bool {
	return os.SameFile(a, b) && a.Size() == b.Size() && a.ModTime().Equal(b.ModTime()) && a.Mode() == b.Mode()
}

// checkUnchanged checks that path holds original (or does not exist when
// original is nil) and returns its stat data (nil when it does not exist).
func checkUnchanged(path string, original []byte) (fs.FileInfo, error) {
	fi, err := os.Lstat(path)
	if errors.Is(err, fs.ErrNotExist) {
		if original == nil {
			return nil, nil
		}
		return nil, fmt.Errorf("writing %s: %w (it was removed)", path, ErrChangedOnDisk)
	}
	if err != nil {
		return nil, fmt.Errorf("writing %s: %w", path, err)
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("writing %s: %w", path, ErrNotRegular)
	}
	if original == nil {
		return nil, fmt.Errorf("writing %s: %w (it was created)", path, ErrChangedOnDisk)
	}
	cur, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("writing %s: %w", path, err)
	}
	if !bytes.Equal(cur, original) {
		return nil, fmt.Errorf("writing %s: %w", path, ErrChangedOnDisk)
	}
	// The stat data after the read: a save during the read changed it.
	after, err := os.Lstat(path)
	if err != nil || !sameFile(fi, after) {
		return nil, fmt.Errorf("writing %s: %w", path, ErrChangedOnDisk)
	}
	return fi, nil
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

// tempInfix is what the names of WriteAtomic's temporary files carry after the
// name of the file they replace: ".NAME.md.tmp-RANDOM".
const tempInfix = ".tmp-"

// IsTempName reports whether a file name (not a path) is one WriteAtomic gives
// its temporary files.
func IsTempName(name string) bool {
	i := strings.LastIndex(name, tempInfix)
	return strings.HasPrefix(name, ".") && i > 1 && i+len(tempInfix) < len(name) &&
		!strings.ContainsAny(name[i+len(tempInfix):], "./")
}

// RemoveStaleTemps removes the temporary files, given as OS paths, that
// WriteAtomic left behind when it was killed (a kill -9 or a power cut between
// creating one and renaming it). A temporary file a running WriteAtomic still
// holds is locked and left alone (on systems without file locks, only files
// older than an hour are removed). It returns the paths it removed.
func RemoveStaleTemps(paths []string) []string {
	var removed []string
	for _, p := range paths {
		if !IsTempName(filepath.Base(p)) || !staleTemp(p) {
			continue
		}
		if err := os.Remove(p); err == nil {
			removed = append(removed, p)
		}
	}
	return removed
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
