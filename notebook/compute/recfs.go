package compute

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"testing/fstest"

	"cleave/calc"
)

// recFS is the notebook's file system as one evaluation's calc environment sees it (data files,
// the links on their way): every read is recorded in rec with what it returned, so a cached
// result is keyed by the bytes the evaluation really read, not by what the file holds by the
// time the cache entry is written.
type recFS struct {
	fsys fs.FS
	rec  deps
}

// ReadFile implements fs.ReadFileFS. Only regular files are read: a FIFO or a device would
// block or never end, and a directory is no data file.
func (r recFS) ReadFile(name string) ([]byte, error) {
	b, err := readRegular(r.fsys, name)
	r.rec["read:"+name] = readValue(b, err)
	if afterRead != nil {
		afterRead(name)
	}
	return b, err
}

// afterRead, when set (by tests), runs after each data read of an evaluation: a test replaces
// the file there, as if it were swapped while the evaluation went on.
var afterRead func(name string)

// Open implements fs.FS for whatever reads through Open: the file is read whole (and recorded)
// and served from memory.
func (r recFS) Open(name string) (fs.File, error) {
	b, err := r.ReadFile(name)
	if err != nil {
		return nil, err
	}
	return fstest.MapFS{name: {Data: b, Mode: 0o444}}.Open(name)
}

// Lstat implements fs.ReadLinkFS.
func (r recFS) Lstat(name string) (fs.FileInfo, error) {
	fi, err := fs.Lstat(r.fsys, name)
	r.rec["lstat:"+name] = lstatValue(fi, err)
	return fi, err
}

// ReadLink implements fs.ReadLinkFS.
func (r recFS) ReadLink(name string) (string, error) {
	t, err := fs.ReadLink(r.fsys, name)
	r.rec["link:"+name] = linkValue(t, err)
	return t, err
}

// errNotRegular is the error for a data path that is not a regular file.
var errNotRegular = errors.New("not a regular file")

// readRegular reads name if it is a regular file (after links) of at most calc.MaxDataBytes.
func readRegular(fsys fs.FS, name string) ([]byte, error) {
	fi, err := fs.Stat(fsys, name)
	if err != nil {
		return nil, err
	}
	if !fi.Mode().IsRegular() {
		what := "a special file"
		if fi.IsDir() {
			what = "a folder"
		}
		return nil, &fs.PathError{Op: "read", Path: name, Err: fmt.Errorf("%w (it is %s)", errNotRegular, what)}
	}
	if fi.Size() > calc.MaxDataBytes {
		return nil, &fs.PathError{Op: "read", Path: name, Err: calc.DataSizeError(fi.Size())}
	}
	return fs.ReadFile(fsys, name)
}

// The values recorded for file-system reads; currentValue computes them again the same way.

func readValue(b []byte, err error) string {
	if err != nil {
		return "error: " + errClass(err)
	}
	sum := sha256.Sum256(b)
	return "sha256:" + hex.EncodeToString(sum[:])
}

func lstatValue(fi fs.FileInfo, err error) string {
	if err != nil {
		return "error: " + errClass(err)
	}
	return fi.Mode().Type().String()
}

func linkValue(t string, err error) string {
	if err != nil {
		return "error: " + errClass(err)
	}
	return "-> " + t
}

// errClass names an error by what it means for the evaluation (its message may carry
// details that differ between file systems).
func errClass(err error) string {
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return "not exist"
	case errors.Is(err, fs.ErrPermission):
		return "permission"
	case errors.Is(err, errNotRegular):
		return err.Error()
	}
	return err.Error()
}
