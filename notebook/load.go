package notebook

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"cleave/internal/parallel"
	"cleave/notebook/calcblock"
	"cleave/notebook/mdsrc"

	"go.yaml.in/yaml/v3"
)

// Notebook is a loaded notebook.
type Notebook struct {
	Files   []*File  // every *.md file, sorted by path
	Entries []*Entry // every entry, sorted by path
	// Problems lists what loading found: files that could not be read or parsed, front
	// matter that gives no entry, broken layer tables, fields that do not fit the schema.
	// [Notebook.Validate] adds the problems between entries.
	Problems []Problem
	byID     map[string]*Entry // first entry (in path order) for each id
	byPath   map[string]*File
	dups     map[string][]*Entry
	fsys     fs.FS // what Load read, for checks of files entries name
}

// FindRoot returns the top of the git work tree that contains dir: the
// nearest directory at or above dir holding a `.git` file or directory.
func FindRoot(dir string) (string, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return "", fmt.Errorf("notebook root: %w", err)
	}
	for d := abs; ; {
		if _, err := os.Lstat(filepath.Join(d, ".git")); err == nil {
			return d, nil
		}
		up := filepath.Dir(d)
		if up == d {
			return "", fmt.Errorf("notebook root: no git work tree (no .git) at or above %s", abs)
		}
		d = up
	}
}

// LoadDir loads the notebook in directory dir (see [Load]).
func LoadDir(dir string) (*Notebook, error) {
	return Load(os.DirFS(dir))
}

// LoadOptions tunes [LoadWith].
type LoadOptions struct {
	// Known returns the summary of the file at a slash path when the caller knows the file
	// has not changed since the summary was made (same stat data, same content hash). Such a
	// file is not read while loading; its identity, links and problems come from the summary,
	// and its contents are read when something asks for them.
	Known func(path string) (*Summary, bool)
	// Paths, when not nil, are the files to load (sorted slash paths of regular files,
	// filtered with [Loadable]) from a caller that has just listed the tree: the load then
	// does not walk it again.
	Paths []string
}

// Loadable reports whether the regular file at slash path p is one the notebook loads: a
// Markdown file (*.md) not hidden, not inside a hidden folder or the top-level `templates/`.
func Loadable(p string) bool {
	if !strings.HasSuffix(p, ".md") || strings.HasPrefix(p, "templates/") {
		return false
	}
	for part := range strings.SplitSeq(p, "/") {
		if strings.HasPrefix(part, ".") {
			return false
		}
	}
	return true
}

// Load reads every *.md file of fsys (see [LoadWith]).
func Load(fsys fs.FS) (*Notebook, error) { return LoadWith(fsys, LoadOptions{}) }

// LoadWith reads every *.md file of fsys (skipping hidden files and directories,
// `.git` and the top-level `templates/` folder), parses front matter and layer
// tables, checks each entry's fields against its kind's schema and builds the
// lineage graph. Problems in files do not stop it: they are collected in
// nb.Problems (see also [Notebook.Validate]). The error is non-nil only when the
// file system itself cannot be walked.
func LoadWith(fsys fs.FS, opt LoadOptions) (*Notebook, error) {
	paths := opt.Paths
	var walkProblems []Problem
	if paths == nil {
		err := fs.WalkDir(fsys, ".", func(p string, d fs.DirEntry, err error) error {
			if err != nil {
				if p == "." {
					return err
				}
				walkProblems = append(walkProblems, Problem{Path: p, Line: 1, Col: 1, Msg: "cannot read: " + errText(err)})
				return nil
			}
			if d.IsDir() {
				if p != "." && (strings.HasPrefix(d.Name(), ".") || p == "templates") {
					return fs.SkipDir
				}
				return nil
			}
			if d.Type().IsRegular() && Loadable(p) {
				paths = append(paths, p)
			}
			return nil
		})
		if err != nil {
			return nil, fmt.Errorf("load notebook: %w", err)
		}
		sort.Strings(paths)
	}

	// Parse files in parallel; each result lands in its own slot so the
	// outcome does not depend on scheduling.
	type result struct {
		file     *File
		problems []Problem
	}
	results := make([]result, len(paths))
	// Files known from their summaries are made in two slabs, one allocation each instead of
	// two per file (a check after one change makes ten thousand of them).
	var knownFiles []File
	var knownEntries []Entry
	if opt.Known != nil {
		knownFiles, knownEntries = make([]File, len(paths)), make([]Entry, len(paths))
	}
	parallel.For(len(paths), func(i int) {
		if opt.Known != nil {
			if sum, ok := opt.Known(paths[i]); ok && sum.Path == paths[i] {
				results[i] = result{knownFile(fsys, sum, &knownFiles[i], &knownEntries[i]), nil}
				return
			}
		}
		f, probs := loadFile(fsys, paths[i])
		results[i] = result{f, probs}
	})

	nb := &Notebook{Problems: walkProblems, fsys: fsys, Files: make([]*File, 0, len(results)), Entries: make([]*Entry, 0, len(results))}
	for _, r := range results {
		nb.Files = append(nb.Files, r.file)
		nb.Problems = append(nb.Problems, r.file.problems...)
		if r.file.Entry != nil {
			nb.Entries = append(nb.Entries, r.file.Entry)
		}
	}
	nb.index()
	sortProblems(nb.Problems)
	return nb, nil
}

func errText(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

// ValidID reports whether id is a valid entry id: letters, digits, '-', '_', '.', not
// starting with '.' (the file of such an entry would be hidden, and the loader skips it).
func ValidID(id string) bool {
	if id == "" || id[0] == '.' {
		return false
	}
	for i := 0; i < len(id); i++ {
		switch c := id[i]; {
		case 'A' <= c && c <= 'Z', 'a' <= c && c <= 'z', '0' <= c && c <= '9', c == '-', c == '_', c == '.':
		default:
			return false
		}
	}
	return true
}

// loadFile reads and parses one file. It never returns a nil *File. The
// problems found in the file alone are in f.problems (and returned).
func loadFile(fsys fs.FS, p string) (*File, []Problem) {
	f := &File{Path: p, fsys: fsys}
	f.once.Do(func() {}) // the source is set here, never read lazily
	raw, err := fs.ReadFile(fsys, p)
	if err != nil {
		f.src, _ = mdsrc.Parse(nil)
		f.problems = []Problem{{Path: p, Line: 1, Col: 1, Msg: "cannot read: " + errText(err)}}
		return f, f.problems
	}
	f.fence = bytes.Contains(raw, []byte(calcblock.InfoString))
	f.plots = bytes.Contains(raw, []byte(PlotMarker))
	src, err := mdsrc.Parse(raw)
	f.src = src
	var probs []Problem
	if err != nil {
		var pe *mdsrc.PosError
		if errors.As(err, &pe) {
			probs = append(probs, Problem{Path: p, Line: max(pe.Line, 1), Col: max(pe.Col, 1), Msg: pe.Msg})
		} else {
			probs = append(probs, Problem{Path: p, Line: 1, Col: 1, Msg: err.Error()})
		}
	}
	if src == nil {
		f.src, _ = mdsrc.Parse(nil)
		f.problems = probs
		return f, probs
	}
	if src.HasFrontMatter {
		e, eprobs := parseEntry(p, src)
		probs = append(probs, eprobs...)
		if e != nil {
			e.file = f
			e.once.Do(func() {}) // loaded now
			e.lk = e.readLinks()
			f.Entry = e
			if e.Kind == KindWafer {
				probs = append(probs, e.readLayers()...)
			}
			probs = append(probs, e.ownProblems()...)
			f.data = e.dataRefs()
			f.contacts = e.contactFacts()
		}
	}
	f.problems = probs
	return f, probs
}

// knownFile makes a file from its summary in f (and its entry in e), to be read when asked.
func knownFile(fsys fs.FS, s *Summary, f *File, e *Entry) *File {
	*f = File{Path: s.Path, fsys: fsys, fromSumm: true, problems: s.Problems, fence: s.Fence, plots: s.Plots, data: s.Data, contacts: s.Contacts}
	if s.Entry {
		*e = Entry{ID: s.ID, Kind: s.Kind, Path: s.Path, file: f, sum: s}
		f.Entry = e
	}
	return f
}

// yamlParserProblem lists the problems the YAML parser (as opposed to its
// scanner) reports; their line numbers are 0-based.
var yamlParserProblem = map[string]bool{
	"did not find expected <document start>": true,
	"did not find expected node content":     true,
	"did not find expected key":              true,
	"did not find expected '-' indicator":    true,
	"did not find expected ',' or ']'":       true,
	"did not find expected ',' or '}'":       true,
}

var yamlLineMsg = regexp.MustCompile(`^yaml: line (\d+): (.*)$`)

// parseEntry decodes the front matter. It returns nil (and problems) when the
// front matter cannot give an entry (syntax error, not a mapping, no valid id).
func parseEntry(p string, src *mdsrc.Source) (e *Entry, probs []Problem) {
	delimLine := max(src.FrontMatterLine-1, 1) // the opening --- line
	// The last line of the front matter text, used to keep YAML error
	// positions inside the file.
	lastLine, _ := src.Pos(src.FrontMatter.End)
	lastLine = max(lastLine, delimLine)
	prob := func(line, col int, format string, args ...any) {
		probs = append(probs, Problem{Path: p, Line: line, Col: max(col, 1), Msg: fmt.Sprintf(format, args...)})
	}
	var doc yaml.Node
	if err := decodeYAML(src.Raw[src.FrontMatter.Start:src.FrontMatter.End], &doc); err != nil {
		if fe, ok := err.(*frontMatterError); ok {
			prob(fe.Line+src.FrontMatterLine-1, fe.Col, "front matter: %s", fe.Msg)
			return nil, probs
		}
		line, msg := delimLine, err.Error()
		if m := yamlLineMsg.FindStringSubmatch(msg); m != nil {
			n, _ := strconv.Atoi(m[1])
			if yamlParserProblem[m[2]] {
				// yaml v3 numbers lines from 0 in parser (not scanner)
				// errors: decode.go adds 1 only for scanner errors.
				n++
			}
			line = min(n+src.FrontMatterLine-1, lastLine)
			msg = m[2]
		} else {
			msg = strings.TrimPrefix(msg, "yaml: ")
		}
		prob(line, 1, "front matter: YAML syntax error: %s", msg)
		return nil, probs
	}
	if doc.Kind == 0 || len(doc.Content) == 0 {
		prob(delimLine, 1, "front matter is empty: expected at least `id:` and `kind:`")
		return nil, probs
	}
	m := doc.Content[0]
	tmp := &Entry{Path: p, src: src, meta: m}
	if m.Kind != yaml.MappingNode {
		line, col := tmp.Pos(m)
		prob(line, col, "front matter must be a map of fields (`id: ...`, `kind: ...`), found a %s", nodeKindName(m))
		return nil, probs
	}
	// Repeated keys: YAML decoding into a node does not catch them.
	seen := map[string]int{}
	for i := 0; i+1 < len(m.Content); i += 2 {
		k := m.Content[i]
		if first, ok := seen[k.Value]; ok {
			line, col := tmp.Pos(k)
			prob(line, col, "front matter: key `%s` repeated (first at line %d)", k.Value, first+src.FrontMatterLine-1)
			continue
		}
		seen[k.Value] = k.Line
	}
	idNode, hasID := tmp.Field("id")
	kindNode, hasKind := tmp.Field("kind")
	if !hasKind {
		// Front matter without a kind (a page's title and tags, say) makes a note, not an entry.
		return nil, probs
	}
	ok := true
	switch {
	case !hasID:
		prob(delimLine, 1, "front matter: missing `id` (an entry needs `id:` and `kind:`)")
		ok = false
	case idNode.Kind != yaml.ScalarNode || !ValidID(idNode.Value):
		line, col := tmp.Pos(idNode)
		prob(line, col, "id: %q is not a valid id: %s", scalarOr(idNode), idRule)
		ok = false
	}
	switch {
	case kindNode.Kind != yaml.ScalarNode:
		line, col := tmp.Pos(kindNode)
		prob(line, col, "kind: expected one of %s, found a %s", kindList(), nodeKindName(kindNode))
		ok = false
	}
	if !ok {
		return nil, probs
	}
	tmp.ID = idNode.Value
	tmp.Kind = Kind(kindNode.Value)
	return tmp, probs
}

// decodeYAML decodes into a node, turning a panic inside the YAML library
// into an error so that bad input can never crash a load, within the bounds
// of yamlbound.go (a *frontMatterError). Plain front matter takes the fast
// path of yamlfast.go, which builds the same tree; anything else, and every
// error, comes from yaml v3.
func decodeYAML(b []byte, n *yaml.Node) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("yaml: cannot parse: %v", r)
		}
	}()
	if err := checkYAMLText(b); err != nil {
		return err
	}
	if !decodePlainYAML(b, n) {
		if err := yaml.Unmarshal(b, n); err != nil {
			return err
		}
	}
	return checkYAMLTree(n)
}

func scalarOr(n *yaml.Node) string {
	if n.Kind == yaml.ScalarNode {
		return n.Value
	}
	return nodeKindName(n)
}

func kindList() string {
	var s []string
	for _, k := range Kinds() {
		s = append(s, string(k))
	}
	return strings.Join(s, ", ")
}

// Entry returns the entry with the given id. When the id is used twice, it is
// the first in path order.
func (nb *Notebook) Entry(id string) (*Entry, bool) {
	e, ok := nb.byID[id]
	return e, ok
}

// File returns the file at a slash path.
func (nb *Notebook) File(p string) (*File, bool) {
	if f, ok := nb.byPath[p]; ok {
		return f, true
	}
	p = path.Clean(p)
	if f, ok := nb.byPath[p]; ok || nb.byPath != nil {
		return f, ok
	}
	i := sort.Search(len(nb.Files), func(i int) bool { return nb.Files[i].Path >= p })
	if i < len(nb.Files) && nb.Files[i].Path == p {
		return nb.Files[i], true
	}
	return nil, false
}
