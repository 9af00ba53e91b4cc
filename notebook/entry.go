package notebook

import (
	"fmt"
	"io/fs"
	"slices"
	"strconv"
	"sync"

	"cleave/calc/quantity"
	"cleave/notebook/mdsrc"

	"go.yaml.in/yaml/v3"
)

// File is one Markdown file of the notebook. Entry is nil for a note (a file
// without front matter) and for a file whose front matter could not be made
// into an entry (its problems are in Notebook.Problems).
//
// A file loaded with a [Summary] (see [LoadOptions]) is read only when
// something asks for its contents ([File.Source], an entry's fields); its
// identity, links and problems come from the summary.
type File struct {
	Path  string // slash path relative to the notebook root
	Entry *Entry

	problems []Problem     // found in this file alone (see Summary.Problems)
	fence    bool          // may hold a calc block
	plots    bool          // may hold the result of a plot line
	contacts *ContactFacts // what the contact checks need of its entry
	data     []DataRef     // the data files a cooldown lists

	fsys     fs.FS
	once     sync.Once
	src      *mdsrc.Source
	fromSumm bool
}

// Source is the parsed file (read now if it was known from a summary; a file that can no
// longer be read gives an empty source).
func (f *File) Source() *mdsrc.Source {
	f.once.Do(func() {
		if f.src != nil {
			return
		}
		raw, err := fs.ReadFile(f.fsys, f.Path)
		if err == nil {
			f.src, _ = mdsrc.Parse(raw)
		}
		if f.src == nil {
			f.src, _ = mdsrc.Parse(nil)
		}
	})
	return f.src
}

// MayHoldBlock reports whether the file contains the word that opens a calc block's fence
// (a cheap test: false means it has none).
func (f *File) MayHoldBlock() bool { return f.fence }

// PlotMarker begins the result text of a plot(...) line (package calc/plot writes it; package
// plotfiles checks the files): a file without it draws no plot.
const PlotMarker = "plot plots/"

// MayHoldPlot reports whether the file contains PlotMarker (a cheap test: false means it draws
// no plot).
func (f *File) MayHoldPlot() bool { return f.plots }

// Known reports whether the file was known from a summary and has not been read.
func (f *File) Known() bool { return f.fromSumm }

// Entry is a Markdown file whose front matter has an id and a kind.
type Entry struct {
	ID   string
	Kind Kind   // may be an unknown kind; Validate reports it
	Path string // slash path relative to the notebook root
	// LayerTableLine is the file line of the layer table (0 when there is none).
	LayerTableLine int

	file *File
	sum  *Summary // set when the entry was known from a summary: links and positions come from it

	once   sync.Once
	src    *mdsrc.Source
	meta   *yaml.Node // the front-matter mapping node
	layers []LayerRow
	lk     []Link // the links, read at load (nil for an entry known from a summary)
	// The lineage edges, set by the notebook's index: existing link targets in link order
	// without repeats (up), and the entries linking here sorted for display (down).
	up, down []*Entry
}

// load fills the front matter and the layer table of an entry known from a summary.
func (e *Entry) load() {
	e.once.Do(func() {
		if e.meta != nil || e.file == nil {
			return
		}
		src := e.file.Source()
		if !src.HasFrontMatter {
			e.src = src
			return
		}
		tmp, _ := parseEntry(e.Path, src)
		if tmp == nil {
			e.src = src
			return
		}
		if e.Kind == KindWafer {
			tmp.readLayers()
		}
		e.src, e.meta, e.layers, e.LayerTableLine = src, tmp.meta, tmp.layers, tmp.LayerTableLine
	})
}

// Front is the front-matter mapping node. Its Line and Column fields, and those of every
// node below it, are relative to the front matter; use [Entry.Pos] for file positions.
func (e *Entry) Front() *yaml.Node {
	e.load()
	return e.meta
}

// LayerRows is a wafer's layer table, surface first; nil when it has none.
func (e *Entry) LayerRows() []LayerRow {
	e.load()
	return e.layers
}

// File is the file that holds the entry.
func (e *Entry) File() *File { return e.file }

// Link is one link from an entry to another, by id.
type Link struct {
	Field     string // the front-matter field: from, mask, process, pieces, devices
	ID        string // the linked id
	Line, Col int    // file position of the id
}

// Pos returns the file position (1-based line and column in characters) of a
// node of e.Front().
func (e *Entry) Pos(n *yaml.Node) (line, col int) {
	e.load()
	if n == nil || e.src == nil {
		return 1, 1
	}
	return n.Line + e.src.FrontMatterLine - 1, max(n.Column, 1)
}

// Field returns the node at a path of keys below the front matter, e.g.
// Field("magnet", "max_field"). A path element indexes a list when the node
// there is a sequence ("probes", "0", "name"). It reports false when the path
// does not exist or leads to an empty (null) value.
func (e *Entry) Field(path ...string) (*yaml.Node, bool) {
	n := e.Front()
	for _, p := range path {
		n = deref(n)
		if n == nil {
			return nil, false
		}
		switch n.Kind {
		case yaml.MappingNode:
			n = mapValue(n, p)
		case yaml.SequenceNode:
			i, err := strconv.Atoi(p)
			if err != nil || i < 0 || i >= len(n.Content) {
				return nil, false
			}
			n = n.Content[i]
		default:
			return nil, false
		}
	}
	n = deref(n)
	if n == nil || isNull(n) {
		return nil, false
	}
	return n, true
}

// deref follows YAML aliases (with a bound, so alias loops cannot hang).
func deref(n *yaml.Node) *yaml.Node {
	for i := 0; n != nil && n.Kind == yaml.AliasNode && i < 100; i++ {
		n = n.Alias
	}
	if n != nil && n.Kind == yaml.AliasNode {
		return nil
	}
	return n
}

// Text returns the scalar text at a path (see [Entry.Field]); false when the
// path is missing or the value is not a scalar.
func (e *Entry) Text(path ...string) (string, bool) {
	n, ok := e.Field(path...)
	if !ok || n.Kind != yaml.ScalarNode {
		return "", false
	}
	return n.Value, true
}

// Quantity parses the scalar at a path as a quantity. The error is a
// *Problem carrying the file position (the front matter start when the field
// is missing). It does not check the dimension; Validate does that.
func (e *Entry) Quantity(path ...string) (quantity.Quantity, error) {
	n, ok := e.Field(path...)
	if !ok {
		return quantity.Quantity{}, &Problem{Path: e.Path, Line: 1, Col: 1, Msg: fmt.Sprintf("%s has no field %s", e.ID, joinPath(path))}
	}
	line, col := e.Pos(n)
	if n.Kind != yaml.ScalarNode {
		return quantity.Quantity{}, &Problem{Path: e.Path, Line: line, Col: col, Msg: fmt.Sprintf("%s: expected a quantity with a unit, found a %s", joinPath(path), nodeKindName(n))}
	}
	qv, err := quantity.ParseQuantity(n.Value)
	if err != nil {
		return quantity.Quantity{}, &Problem{Path: e.Path, Line: line, Col: col, Msg: fmt.Sprintf("%s: %q: %s", joinPath(path), n.Value, quantity.Reason(err))}
	}
	return qv, nil
}

// Links returns the entry's links in schema order (from, mask, process,
// pieces, devices), each list in written order.
func (e *Entry) Links() []Link { return slices.Clone(e.links()) }

// links is Links without the copy, for the package's own reading.
func (e *Entry) links() []Link {
	if e.sum != nil {
		return e.sum.Links
	}
	return e.lk
}

// readLinks reads the links from the front matter (once, when the entry is loaded).
func (e *Entry) readLinks() []Link {
	var out []Link
	for _, f := range linkFields(e.Kind) {
		n, ok := e.Field(f.Name)
		if !ok {
			continue
		}
		switch n.Kind {
		case yaml.ScalarNode:
			out = append(out, e.link(f.Name, n))
		case yaml.SequenceNode:
			if f.Type != TypeLinks {
				continue // a list in a single-link field is a validation problem
			}
			for _, c := range n.Content {
				if c.Kind == yaml.ScalarNode && !isNull(c) {
					out = append(out, e.link(f.Name, c))
				}
			}
		}
	}
	return out
}

func (e *Entry) link(field string, n *yaml.Node) Link {
	line, col := e.Pos(n)
	return Link{Field: field, ID: n.Value, Line: line, Col: col}
}

// mapValue returns the value node of key k in mapping m (the first one if the
// key is repeated), or nil.
func mapValue(m *yaml.Node, k string) *yaml.Node {
	for i := 0; i+1 < len(m.Content); i += 2 {
		if m.Content[i].Value == k {
			return m.Content[i+1]
		}
	}
	return nil
}

func isNull(n *yaml.Node) bool {
	return n.Kind == yaml.ScalarNode && n.Tag == "!!null"
}

func nodeKindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "map"
	case yaml.SequenceNode:
		return "list"
	case yaml.AliasNode:
		return "alias"
	case yaml.DocumentNode:
		return "document"
	}
	return "text"
}

func joinPath(path []string) string {
	s := ""
	for i, p := range path {
		if i > 0 {
			s += "."
		}
		s += p
	}
	return s
}
