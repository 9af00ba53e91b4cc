package calc

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"path"
	"strings"
)

// DataLoader turns the bytes of a data file into a value (a data set); name is the file's
// slash path inside the notebook. Its errors must name the file and the position in it
// ("name:line:col: message"); they are shown as they are. An Env gets one with
// [WithDataLoader]; without one, [Env.OpenData] returns a *DataFile.
type DataLoader func(name string, r io.Reader) (Value, error)

// MaxDataBytes is the largest data file read: a data file is read whole (and hashed) before
// it is parsed, so this bounds the memory one data("...") takes, with room for ten million
// rows of three columns. A larger file fails at the call with [ErrDataTooLarge].
const MaxDataBytes = 512 << 20

// ErrDataTooLarge is wrapped by the error of a data file larger than [MaxDataBytes].
var ErrDataTooLarge = errors.New("data file too large")

// DataSizeError is the error for a data file of Size bytes, larger than [MaxDataBytes].
func DataSizeError(size int64) error {
	return fmt.Errorf("%w: %.1f MiB, and data files are read up to %d MiB; split it, or keep only the sweeps the notebook analyses", ErrDataTooLarge, float64(size)/(1<<20), MaxDataBytes>>20)
}

// maxLinkHops bounds how many symbolic links one data path may pass through.
const maxLinkHops = 40

// OpenData resolves p (slash-separated, relative to the entry's directory) inside the
// notebook FS, reads it, records the dependency "file:<path>" with its SHA-256, and returns
// the value of the Env's DataLoader (a *DataFile when it has none).
//
// Refused, with ErrPath: absolute paths (leading '/', '\' or a drive letter), paths with
// backslashes, paths that leave the notebook root after cleaning "..", and symbolic links
// whose target is absolute or leaves the root. Links are checked with fs.ReadLink, so the
// check needs an FS that implements fs.ReadLinkFS (os.DirFS and fstest.MapFS do); an FS
// without it is trusted not to follow links out of its root (an os.Root's FS never does).
func (e *Env) OpenData(p string) (Value, error) {
	name, b, err := e.ReadDataFile(p)
	if err != nil {
		return nil, err
	}
	sum := sha256.Sum256(b)
	hash := "sha256:" + hex.EncodeToString(sum[:])
	if e.loader != nil {
		v, err := e.loader(name, bytes.NewReader(b))
		if err != nil {
			return nil, err // a DataLoader's errors name the file and the position in it
		}
		return v, nil
	}
	return &DataFile{Path: name, Hash: hash, Size: len(b)}, nil
}

// ReadDataFile reads the data file at p (relative to the entry's directory, with the
// rules of [Env.OpenData]), records the dependency "file:<path>" with its SHA-256, and
// returns its notebook path and bytes. Functions that read a data file in a way of
// their own (with a layout) use it.
func (e *Env) ReadDataFile(p string) (string, []byte, error) {
	return e.readFile(p, e.dir, "data file")
}

// ReadNotebookFile reads the file at p, a slash path relative to the notebook's root
// (not the entry's folder), with the rules of data paths, records the dependency
// "file:<path>" with its SHA-256, and returns its notebook path and bytes. what names
// the file in errors ("layout").
func (e *Env) ReadNotebookFile(p, what string) (string, []byte, error) {
	return e.readFile(p, ".", what)
}

func (e *Env) readFile(p, dir, what string) (string, []byte, error) {
	if e.fsys == nil {
		if err := checkDataPath(p); err != nil {
			return "", nil, err // a bad path is the first thing to say
		}
		if what == "data file" {
			return "", nil, fmt.Errorf("no notebook folder is open, so data(%s) cannot be read", quoteString(p))
		}
		return "", nil, fmt.Errorf("no notebook folder is open, so the %s %s cannot be read", what, quoteString(p))
	}
	name, real, err := ResolveDataPath(e.fsys, dir, p)
	if err != nil {
		return "", nil, err
	}
	b, err := fs.ReadFile(e.fsys, real)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return "", nil, fmt.Errorf("%s %s does not exist", what, name)
		}
		return "", nil, fmt.Errorf("reading %s %s: %w", what, name, err)
	}
	return name, b, nil
}

// ResolveDataPath applies the rule every data path of a notebook follows (data("...") in calc
// blocks, a cooldown's `data:` list): p is a slash path relative to dir (a slash path inside
// fsys, "" or "." for the root); it may not be absolute, use backslashes, or leave the root
// after cleaning "..", and symbolic links on the way may not point outside (checked when
// fsys implements fs.ReadLinkFS). It returns the cleaned path and the path with links
// resolved; errors wrap ErrPath and say what was expected. The file need not exist.
func ResolveDataPath(fsys fs.FS, dir, p string) (name, real string, err error) {
	if err := checkDataPath(p); err != nil {
		return "", "", err
	}
	if dir == "" {
		dir = "."
	}
	name = path.Clean(path.Join(dir, p))
	if !inside(name) {
		return "", "", fmt.Errorf("%w: %q leaves the notebook folder", ErrPath, p)
	}
	real, err = followLinks(fsys, name, p)
	return name, real, err
}

// checkDataPath refuses paths that cannot be relative slash paths.
func checkDataPath(p string) error {
	switch {
	case p == "":
		return fmt.Errorf("%w: empty path", ErrPath)
	case strings.HasPrefix(p, "/") || strings.HasPrefix(p, `\`) || len(p) >= 2 && p[1] == ':':
		return fmt.Errorf("%w: %q is absolute; write a path relative to the entry", ErrPath, p)
	case strings.Contains(p, `\`):
		return fmt.Errorf("%w: %q contains a backslash; use / between folders", ErrPath, p)
	case strings.ContainsRune(p, 0):
		return fmt.Errorf("%w: %q contains a NUL byte", ErrPath, p)
	}
	return nil
}

func inside(name string) bool {
	return name != ".." && !strings.HasPrefix(name, "../") && !path.IsAbs(name)
}

// followLinks walks name component by component, replacing symbolic links by their
// targets, and fails if a target is absolute or leaves the root.
func followLinks(fsys fs.FS, name, orig string) (string, error) {
	if _, ok := fsys.(fs.ReadLinkFS); !ok || name == "." {
		return name, nil
	}
	hops := 0
	parts := strings.Split(name, "/")
	done := "."
	for len(parts) > 0 {
		cur := path.Join(done, parts[0])
		parts = parts[1:]
		fi, err := fs.Lstat(fsys, cur)
		if err != nil || fi.Mode()&fs.ModeSymlink == 0 {
			done = cur // missing files are reported when they are read
			continue
		}
		hops++
		if hops > maxLinkHops {
			return "", fmt.Errorf("%w: %q passes through more than %d symbolic links", ErrPath, orig, maxLinkHops)
		}
		target, err := fs.ReadLink(fsys, cur)
		if err != nil {
			return "", fmt.Errorf("reading link %s: %w", cur, err)
		}
		if path.IsAbs(target) || strings.HasPrefix(target, `\`) || len(target) >= 2 && target[1] == ':' {
			return "", fmt.Errorf("%w: %q is a symbolic link to an absolute path, outside the notebook", ErrPath, cur)
		}
		next := path.Clean(path.Join(done, target))
		if !inside(next) {
			return "", fmt.Errorf("%w: %q is a symbolic link that leaves the notebook folder", ErrPath, cur)
		}
		// restart from the root with the link replaced by its target
		parts = append(strings.Split(next, "/"), parts...)
		done = "."
	}
	return done, nil
}
