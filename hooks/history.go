package hooks

import (
	"fmt"
	"io"
	"io/fs"
	"path"
	"regexp"
	"sort"
	"strings"
	"time"

	"github.com/go-git/go-git/v5/plumbing"
	"go.yaml.in/yaml/v3"

	"cleave/calc"
	"cleave/notebook"
)

// History is the life of one sample: its lineage as a commit holds it and, commit by commit
// (oldest first), what changed in its own record, in its ancestors' records and in the data
// files they reference.
//
// The paths followed are those the entries and data files have at that commit; a file that
// was moved shows up as added where it got its present name.
type History struct {
	Rev         string          `json:"rev"` // the commit the lineage was read at
	Sample      LineageEntry    `json:"sample"`
	Ancestors   []LineageEntry  `json:"ancestors"`   // nearest first
	Descendants []LineageEntry  `json:"descendants"` // nearest first
	Tracked     []TrackedPath   `json:"tracked"`
	Commits     []HistoryCommit `json:"commits"` // oldest first
}

// LineageEntry is one entry of a lineage.
type LineageEntry struct {
	ID   string `json:"id"`
	Kind string `json:"kind"`
	Path string `json:"path"`
}

// TrackedPath is a file whose changes a history follows. Role is "sample", "ancestor" or
// "data"; ID is the entry the file holds, or for a data file the entry that reads it.
type TrackedPath struct {
	Path string `json:"path"`
	Role string `json:"role"`
	ID   string `json:"id"`
}

// HistoryCommit is one commit that changed a followed file.
type HistoryCommit struct {
	Hash    string       `json:"hash"`
	Author  string       `json:"author"`
	Email   string       `json:"email"`
	Date    time.Time    `json:"date"`
	Subject string       `json:"subject"`
	Changes []PathChange `json:"changes"`
}

// PathChange is what one commit changed in one followed file.
type PathChange struct {
	TrackedPath
	Status string `json:"status"` // added, modified or deleted
	FileDiff
	// For a data file: its size before and after, in bytes (-1 where it is not there).
	OldSize int64 `json:"old_size,omitempty"`
	NewSize int64 `json:"new_size,omitempty"`
}

// SampleHistory returns the history of the entry id as seen from the commit rev ("" for HEAD).
func (r *Repo) SampleHistory(id, rev string) (*History, error) {
	if rev == "" {
		rev = "HEAD"
	}
	objs, err := r.OpenObjects()
	if err != nil {
		return nil, err
	}
	defer objs.Close()
	head, err := r.Resolve(rev)
	if err != nil {
		return nil, err
	}
	fsys, err := objs.TreeFS(head)
	if err != nil {
		return nil, err
	}
	nb, err := notebook.Load(fsys)
	if err != nil {
		return nil, err
	}
	e, ok := nb.Entry(id)
	if !ok {
		return nil, fmt.Errorf("no entry with id %q at %s (%s)", id, rev, head.String()[:12])
	}
	h := &History{Rev: head.String(), Sample: lineageEntry(e), Ancestors: []LineageEntry{}, Descendants: []LineageEntry{}, Commits: []HistoryCommit{}}
	for _, a := range nb.Ancestors(id) {
		h.Ancestors = append(h.Ancestors, lineageEntry(a))
	}
	for _, d := range nb.Descendants(id) {
		h.Descendants = append(h.Descendants, lineageEntry(d))
	}
	h.Tracked = trackedPaths(fsys, nb, e)
	paths := make([]string, len(h.Tracked))
	for i, t := range h.Tracked {
		paths[i] = t.Path
	}
	changes, err := newPathWalker(objs, paths).walk(head)
	if err != nil {
		return nil, err
	}
	for i := len(changes) - 1; i >= 0; i-- { // oldest first
		hc, err := historyCommit(objs, changes[i], h.Tracked)
		if err != nil {
			return nil, err
		}
		h.Commits = append(h.Commits, hc)
	}
	return h, nil
}

func lineageEntry(e *notebook.Entry) LineageEntry {
	return LineageEntry{ID: e.ID, Kind: string(e.Kind), Path: e.Path}
}

// trackedPaths lists the files of the sample and its ancestors, and the data files each reads.
func trackedPaths(fsys fs.FS, nb *notebook.Notebook, e *notebook.Entry) []TrackedPath {
	var out []TrackedPath
	seen := map[string]bool{}
	add := func(t TrackedPath) {
		if !seen[t.Path] {
			seen[t.Path] = true
			out = append(out, t)
		}
	}
	for i, c := range nb.Context(e) {
		role := "ancestor"
		if i == 0 {
			role = "sample"
		}
		add(TrackedPath{Path: c.Path, Role: role, ID: c.ID})
	}
	for _, c := range nb.Context(e) {
		for _, p := range dataFiles(fsys, nb, c) {
			add(TrackedPath{Path: p, Role: "data", ID: c.ID})
		}
	}
	return out
}

var dataCall = regexp.MustCompile(`\bdata\(\s*"([^"]+)"`)

// dataFiles lists the data files an entry references: the files its `data:` list names and
// those its calc blocks read with data("…"), resolved as the engine resolves them (relative to
// the entry's folder, links followed), where they exist.
func dataFiles(fsys fs.FS, nb *notebook.Notebook, e *notebook.Entry) []string {
	var names []string
	if list, ok := e.Field("data"); ok && list.Kind == yaml.SequenceNode {
		for _, item := range list.Content {
			switch item.Kind {
			case yaml.ScalarNode:
				names = append(names, item.Value)
			case yaml.MappingNode:
				for i := 0; i+1 < len(item.Content); i += 2 {
					if item.Content[i].Value == "file" {
						names = append(names, item.Content[i+1].Value)
					}
				}
			}
		}
	}
	if f, ok := nb.File(e.Path); ok {
		for _, m := range dataCall.FindAllSubmatch(f.Source().Raw, -1) {
			names = append(names, string(m[1]))
		}
	}
	var out []string
	seen := map[string]bool{}
	for _, n := range names {
		_, real, err := calc.ResolveDataPath(fsys, path.Dir(e.Path), strings.TrimSpace(n))
		if err != nil || seen[real] {
			continue
		}
		if fi, err := fs.Stat(fsys, real); err == nil && fi.Mode().IsRegular() {
			seen[real] = true
			out = append(out, real)
		}
	}
	sort.Strings(out)
	return out
}

// historyCommit describes one commit of the walk.
func historyCommit(objs *Objects, ch pathChange, tracked []TrackedPath) (HistoryCommit, error) {
	c, err := objs.Commit(ch.commit)
	if err != nil {
		return HistoryCommit{}, err
	}
	hc := HistoryCommit{Hash: ch.commit.String(), Author: c.Author.Name, Email: c.Author.Email,
		Date: c.Author.When, Subject: subject(c.Message)}
	for _, i := range ch.changed {
		pc, err := pathChangeOf(objs, tracked[i], ch.old[i], ch.new[i])
		if err != nil {
			return HistoryCommit{}, err
		}
		hc.Changes = append(hc.Changes, pc)
	}
	return hc, nil
}

// pathChangeOf compares two versions of a followed file (a zero id: not there).
func pathChangeOf(objs *Objects, t TrackedPath, old, new plumbing.Hash) (PathChange, error) {
	pc := PathChange{TrackedPath: t, Status: "modified"}
	read := func(h plumbing.Hash) ([]byte, error) {
		if h.IsZero() {
			return nil, nil
		}
		b, err := objs.Blob(h)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", t.Path, err)
		}
		return b, nil
	}
	switch {
	case old.IsZero():
		pc.Status = "added"
	case new.IsZero():
		pc.Status = "deleted"
	}
	a, err := read(old)
	if err != nil {
		return pc, err
	}
	b, err := read(new)
	if err != nil {
		return pc, err
	}
	if t.Role == "data" {
		pc.OldSize, pc.NewSize = size(a, old), size(b, new)
		return pc, nil
	}
	if pc.Status == "modified" {
		pc.FileDiff = diffFiles(t.Path, a, b)
	}
	return pc, nil
}

func size(b []byte, h plumbing.Hash) int64 {
	if h.IsZero() {
		return -1
	}
	return int64(len(b))
}

// subject is the first line of a commit message.
func subject(msg string) string {
	s, _, _ := strings.Cut(strings.TrimLeft(msg, "\n"), "\n")
	return strings.TrimSpace(s)
}

// WriteText writes the history for a terminal.
func (h *History) WriteText(w io.Writer) {
	fmt.Fprintf(w, "%s %s (%s), at %s\n", h.Sample.Kind, h.Sample.ID, h.Sample.Path, h.Rev[:min(12, len(h.Rev))])
	if len(h.Ancestors) > 0 {
		fmt.Fprintln(w, "  from:")
		for _, a := range h.Ancestors {
			fmt.Fprintf(w, "    %s %s (%s)\n", a.Kind, a.ID, a.Path)
		}
	}
	if len(h.Descendants) > 0 {
		fmt.Fprintln(w, "  leads to:")
		for _, d := range h.Descendants {
			fmt.Fprintf(w, "    %s %s (%s)\n", d.Kind, d.ID, d.Path)
		}
	}
	records, data := 0, 0
	for _, t := range h.Tracked {
		if t.Role == "data" {
			data++
		} else {
			records++
		}
	}
	fmt.Fprintf(w, "  following %s and %s; %s changed them\n", plural(records, "record", "records"), plural(data, "data file", "data files"),
		plural(len(h.Commits), "commit", "commits"))
	for _, c := range h.Commits {
		fmt.Fprintf(w, "\n%s  %s  %s  %s\n", c.Date.UTC().Format("2006-01-02 15:04"), c.Hash[:min(7, len(c.Hash))], c.Author, c.Subject)
		for _, ch := range c.Changes {
			writeChange(w, ch)
		}
	}
}

func writeChange(w io.Writer, ch PathChange) {
	who := ch.Role
	if ch.Role == "data" {
		who = "data of " + ch.ID
	} else {
		who = ch.ID + ", " + ch.Role
	}
	switch {
	case ch.Role == "data" && ch.Status == "added":
		fmt.Fprintf(w, "  %s (%s): added, %d bytes\n", ch.Path, who, ch.NewSize)
	case ch.Role == "data" && ch.Status == "deleted":
		fmt.Fprintf(w, "  %s (%s): deleted\n", ch.Path, who)
	case ch.Role == "data":
		fmt.Fprintf(w, "  %s (%s): contents changed, %d → %d bytes\n", ch.Path, who, ch.OldSize, ch.NewSize)
	case ch.Status != "modified":
		fmt.Fprintf(w, "  %s (%s): %s\n", ch.Path, who, ch.Status)
	default:
		fmt.Fprintf(w, "  %s (%s)\n", ch.Path, who)
		writeDiff(w, "    ", ch.FileDiff)
	}
}

// writeDiff writes fields and results old → new, one a line.
func writeDiff(w io.Writer, indent string, d FileDiff) {
	for _, f := range d.Fields {
		fmt.Fprintf(w, "%s%s: %s → %s\n", indent, f.Field, orNone(f.Old), orNone(f.New))
	}
	for _, r := range d.Results {
		switch {
		case r.Added:
			fmt.Fprintf(w, "%sline %d added: %s  #~ %s\n", indent, r.Line, r.Code, r.New)
		case r.Removed:
			fmt.Fprintf(w, "%sline removed: %s  #~ %s\n", indent, r.Code, r.Old)
		default:
			fmt.Fprintf(w, "%sline %d %s: %s → %s\n", indent, r.Line, r.Code, orNone(r.Old), orNone(r.New))
		}
	}
	if d.Text {
		fmt.Fprintf(w, "%s(other text changed)\n", indent)
	}
}

func orNone(s string) string {
	if s == "" {
		return "(none)"
	}
	return s
}
