package hooks

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"slices"
	"strings"
	"testing/fstest"

	"cleave/notebook/calcblock"
	"cleave/notebook/compute"
	"cleave/notebook/mdsrc"
)

// The merge driver (`cleave hooks merge %O %A %B %L %P`, registered by Install) merges one
// Markdown file three ways when both sides changed it:
//
//  1. `git merge-file` does the real merge of the whole file, with the conflict-marker size
//     git asks for and the conflict style the repository is configured with;
//  2. a conflict whose two sides differ only inside result regions of calc lines (the same
//     code, other results: both sides recomputed after different changes) is resolved by
//     recomputing the merged file, in the context of the notebook in the work tree (git merges
//     in memory and writes the work tree afterwards, so that is the current side);
//  3. every other conflict keeps its markers, and the driver reports a conflict; the engine
//     refuses to evaluate a file with markers, so nothing downstream reads half a merge.
//
// The driver never writes the index or runs a git command that takes its lock. Cross-file
// staleness after a clean merge (one side changed a mask, the other added a device that reads
// it) is not its business: the pre-merge-commit and pre-commit hooks recompute the merged index,
// and `cleave check` in CI is the backstop for merges no hook sees (a rebase, a merge on a git
// host's server).

// MergeResult says what the merge driver did.
type MergeResult struct {
	Conflicts  int  // conflicts left with markers
	Resolved   int  // conflicts inside result regions, resolved
	Recomputed bool // the merged file was evaluated and its results brought up to date
	Note       string
}

// Merge labels for the conflict markers: %A is the current side (in a rebase, the commit
// being built on), %B the other.
const (
	labelCurrent = "current"
	labelBase    = "base"
	labelOther   = "other"
)

// MergeDriver merges other into current with ancestor as the common base, for the file at
// slash path pathname of the notebook whose work tree is at root ("" when there is none: a
// conflict inside result regions then keeps the current side's results), and writes the
// result into current. markerSize is the length of conflict markers. It returns an error only
// when it could write nothing into current.
func MergeDriver(root, ancestor, current, other string, markerSize int, pathname string) (*MergeResult, error) {
	if markerSize <= 0 {
		markerSize = 7
	}
	cur, err := os.ReadFile(current)
	if err != nil {
		return nil, err
	}
	mergeFile := func(style ...string) ([]byte, int, error) {
		args := append([]string{"merge-file", "-p", fmt.Sprintf("--marker-size=%d", markerSize)}, style...)
		args = append(args, "-L", labelCurrent, "-L", labelBase, "-L", labelOther, current, ancestor, other)
		out, err := gitCmd{}.run(nil, args...)
		if err == nil {
			return out, 0, nil
		}
		// git merge-file exits with the number of conflicts; anything else is a failure.
		if n := exitCode(err); n > 0 && n <= 127 {
			return out, n, nil
		}
		return nil, 0, fmt.Errorf("git merge-file: %w", err)
	}

	// First pass: the merge with each conflict's base section, to see whether every conflict
	// can be settled line by line.
	merged, n, err := mergeFile("--diff3")
	if err != nil {
		return nil, err
	}
	res := &MergeResult{}
	hunks, ok := conflictHunks(merged, markerSize)
	if n == 0 || !ok || len(hunks) == 0 {
		// Clean, or markers we cannot pair (a file that held marker-like lines already):
		// git's merge as it is, in the configured style.
		if n > 0 {
			if merged, n, err = mergeFile(); err != nil {
				return nil, err
			}
			res.Conflicts = max(n, 1)
		}
		return res, calcblock.WriteAtomic(current, merged, cur)
	}
	if text, settled := settleLines(merged, hunks); settled {
		res.Resolved = len(hunks)
		if out, note, ok := recomputeMerged(root, pathname, text); ok {
			text, res.Recomputed = out, true
		} else {
			res.Note = note
		}
		return res, calcblock.WriteAtomic(current, text, cur)
	}

	// Second pass: a real conflict remains. The merge in the style the repository is
	// configured with; conflicts whose sides differ only in result regions take the current
	// side (the results are recomputed once the person has resolved the rest), every other
	// conflict keeps its markers.
	if merged, _, err = mergeFile(); err != nil {
		return nil, err
	}
	if hunks, ok = conflictHunks(merged, markerSize); !ok {
		res.Conflicts = max(n, 1)
		return res, calcblock.WriteAtomic(current, merged, cur)
	}
	oursText, places := resolveWith(merged, hunks, func(h conflictHunk) []string { return append([]string{}, h.ours...) })
	code := calcCodeLines(oursText)
	resultsOnly := func(h conflictHunk) []string {
		if len(h.ours) != len(h.other) || len(h.ours) == 0 {
			return nil
		}
		for i := range h.ours {
			if regionFree(h.ours[i]) != regionFree(h.other[i]) || !code[places[h.index]+i] {
				return nil
			}
		}
		return h.ours
	}
	for _, h := range hunks {
		if resultsOnly(h) != nil {
			res.Resolved++
		} else {
			res.Conflicts++
		}
	}
	text, _ := resolveWith(merged, hunks, resultsOnly)
	return res, calcblock.WriteAtomic(current, text, cur)
}

// settleLines tries to settle every conflict of a diff3-style merge line by line: each side and
// the base have the same number of lines, and on each line the part a person owns (everything
// before the result region) was changed by at most one side, or by both the same way. Every
// settled line must be a code line of a calc block; its result region is recomputed later.
// It returns the settled text, or false when some conflict is a real one.
func settleLines(merged []byte, hunks []conflictHunk) ([]byte, bool) {
	settled := map[int][]string{}
	for _, h := range hunks {
		if !h.hasBase || len(h.ours) != len(h.other) || len(h.ours) != len(h.base) || len(h.ours) == 0 {
			return nil, false
		}
		lines := make([]string, len(h.ours))
		for i := range h.ours {
			o, b, t := regionFree(h.ours[i]), regionFree(h.base[i]), regionFree(h.other[i])
			switch {
			case o == t || t == b:
				lines[i] = h.ours[i]
			case o == b:
				lines[i] = h.other[i]
			default:
				return nil, false // both sides changed this line's code, differently
			}
		}
		settled[h.index] = lines
	}
	text, places := resolveWith(merged, hunks, func(h conflictHunk) []string { return settled[h.index] })
	code := calcCodeLines(text)
	for _, h := range hunks {
		for i := range settled[h.index] {
			if !code[places[h.index]+i] {
				return nil, false // a conflict outside calc code: prose, front matter, a fence
			}
		}
	}
	return text, true
}

// conflictHunk is one conflict of git merge-file's output: the lines (with their endings) of
// each side and of the base (diff3 styles), and where it starts and ends in the output.
type conflictHunk struct {
	index             int
	start, end        int // byte offsets of the first marker line and after the last one
	ours, base, other []string
	hasBase           bool
}

// conflictHunks finds the conflicts in a merged text: `<<<<<<<` (markerSize characters) opens
// one, `|||||||` starts the base section (diff3 and zdiff3 styles), `=======` the other side,
// `>>>>>>>` closes it. ok is false when the markers do not pair up.
func conflictHunks(merged []byte, markerSize int) ([]conflictHunk, bool) {
	marker := func(line []byte, c byte) bool {
		l := bytes.TrimRight(line, "\r\n")
		if len(l) < markerSize || !bytes.Equal(l[:markerSize], bytes.Repeat([]byte{c}, markerSize)) {
			return false
		}
		return len(l) == markerSize || (c != '=' && l[markerSize] == ' ')
	}
	var hunks []conflictHunk
	const (
		outside = iota
		inOurs
		inBase
		inOther
	)
	state := outside
	var h conflictHunk
	off := 0
	for _, line := range bytes.SplitAfter(merged, []byte("\n")) {
		switch {
		case state == outside && marker(line, '<'):
			h = conflictHunk{index: len(hunks), start: off}
			state = inOurs
		case state == inOurs && marker(line, '|'):
			state, h.hasBase = inBase, true
		case (state == inOurs || state == inBase) && marker(line, '='):
			state = inOther
		case state == inOther && marker(line, '>'):
			h.end = off + len(line)
			hunks = append(hunks, h)
			state = outside
		case state == inOurs:
			h.ours = append(h.ours, string(line))
		case state == inOther:
			h.other = append(h.other, string(line))
		case state == inBase:
			h.base = append(h.base, string(line))
		case state != outside && (marker(line, '<') || marker(line, '>')):
			return nil, false
		}
		off += len(line)
	}
	return hunks, state == outside
}

// resolveWith replaces each conflict for which take returns lines by those lines, and returns
// the text with, for each hunk index, the 1-based line where its replacement (or its markers,
// when it is kept) starts.
func resolveWith(merged []byte, hunks []conflictHunk, take func(conflictHunk) []string) ([]byte, map[int]int) {
	var out []byte
	places := map[int]int{}
	prev := 0
	line := 1
	for _, h := range hunks {
		out = append(out, merged[prev:h.start]...)
		line += bytes.Count(merged[prev:h.start], []byte("\n"))
		places[h.index] = line
		if lines := take(h); lines != nil {
			for _, l := range lines {
				out = append(out, l...)
			}
			line += len(lines)
		} else {
			out = append(out, merged[h.start:h.end]...)
			line += bytes.Count(merged[h.start:h.end], []byte("\n"))
		}
		prev = h.end
	}
	return append(out, merged[prev:]...), places
}

// regionFree is a line without its result region and line ending: what a person owns.
func regionFree(line string) string {
	line = strings.TrimRight(line, "\r\n")
	if i := strings.Index(line, calcblock.Marker); i >= 0 {
		line = line[:i]
	}
	return strings.TrimRight(line, " \t")
}

// calcCodeLines is the set of 1-based line numbers of code lines in writable calc blocks.
func calcCodeLines(src []byte) map[int]bool {
	s, err := mdsrc.Parse(src)
	if err != nil {
		return nil
	}
	blocks, err := calcblock.Find(s)
	if err != nil {
		return nil
	}
	out := map[int]bool{}
	for _, b := range blocks {
		if b.ReadOnly {
			continue
		}
		for _, l := range b.Lines {
			if l.Kind() == calcblock.Code {
				out[l.LineNo] = true
			}
		}
	}
	return out
}

// recomputeMerged evaluates the merged file in the context of the notebook in the work tree at
// root and returns it with its results up to date. ok is false, with the reason, when there is
// no work tree or the file cannot be evaluated; the merged text then keeps the current side's
// results, and the hooks or CI recompute them.
func recomputeMerged(root, pathname string, text []byte) ([]byte, string, bool) {
	if root == "" || !fs.ValidPath(pathname) {
		return nil, "no work tree to evaluate the merged file in; its results are the current side's until the next recompute", false
	}
	wt := compute.WorkTree{Root: root}
	fsys := overlayFS{FS: wt.FS(), name: pathname, data: text}
	rep, err := compute.Run(fsys, nil, compute.Options{Paths: []string{pathname}})
	if err != nil {
		return nil, err.Error(), false
	}
	if len(rep.Failures) > 0 {
		return nil, errors.Join(rep.Failures...).Error(), false
	}
	for _, f := range rep.Files {
		if f.Path == pathname {
			return f.NewBytes, "", true
		}
	}
	return nil, "the merged file has no calc block the engine could evaluate", false
}

// overlayFS is a notebook's file system with one file replaced (or added).
type overlayFS struct {
	fs.FS
	name string
	data []byte
}

func (o overlayFS) mem() fstest.MapFS {
	return fstest.MapFS{o.name: {Data: o.data, Mode: 0o644}}
}

func (o overlayFS) Open(name string) (fs.File, error) {
	if name == o.name {
		return o.mem().Open(name)
	}
	return o.FS.Open(name)
}

func (o overlayFS) ReadFile(name string) ([]byte, error) {
	if name == o.name {
		return bytes.Clone(o.data), nil
	}
	return fs.ReadFile(o.FS, name)
}

func (o overlayFS) Stat(name string) (fs.FileInfo, error) {
	if name == o.name {
		return o.mem().Stat(name)
	}
	return fs.Stat(o.FS, name)
}

func (o overlayFS) Lstat(name string) (fs.FileInfo, error) {
	if name == o.name {
		return o.mem().Stat(name)
	}
	return fs.Lstat(o.FS, name)
}

func (o overlayFS) ReadLink(name string) (string, error) {
	if name == o.name {
		return "", &fs.PathError{Op: "readlink", Path: name, Err: fs.ErrInvalid}
	}
	return fs.ReadLink(o.FS, name)
}

func (o overlayFS) ReadDir(name string) ([]fs.DirEntry, error) {
	entries, err := fs.ReadDir(o.FS, name)
	dir, base := path.Split(o.name)
	if path.Clean(dir) != name {
		return entries, err
	}
	for _, e := range entries {
		if e.Name() == base {
			return entries, nil
		}
	}
	fi, _ := o.mem().Stat(o.name)
	entries = append(entries, fs.FileInfoToDirEntry(fi))
	slices.SortFunc(entries, func(a, b fs.DirEntry) int { return strings.Compare(a.Name(), b.Name()) })
	return entries, nil
}
