package notebook

import (
	"fmt"
	"strconv"

	"cleave/calc/quantity"
	"cleave/notebook/mdsrc"

	"go.yaml.in/yaml/v3"
)

// File is one Markdown file of the notebook. Entry is nil for a note (a file
// without front matter) and for a file whose front matter could not be made
// into an entry (its problems are in Notebook.Problems).
type File struct {
	Path  string // slash path relative to the notebook root
	Src   *mdsrc.Source
	Entry *Entry
}

// Entry is a Markdown file whose front matter has an id and a kind.
type Entry struct {
	ID   string
	Kind Kind   // may be an unknown kind; Validate reports it
	Path string // slash path relative to the notebook root
	Src  *mdsrc.Source
	// Meta is the front-matter mapping node. Its Line and Column fields, and
	// those of every node below it, are relative to the front matter; use
	// [Entry.Pos] for file positions.
	Meta *yaml.Node
	// Layers is a wafer's layer table, surface first; nil when it has none.
	Layers []LayerRow
	// LayerTableLine is the file line of the layer table (0 when there is none).
	LayerTableLine int
}

// Link is one link from an entry to another, by id.
type Link struct {
	Field     string // the front-matter field: from, mask, process, pieces, devices
	ID        string // the linked id
	Line, Col int    // file position of the id
}

// Pos returns the file position (1-based line and column in characters) of a
// node of e.Meta.
func (e *Entry) Pos(n *yaml.Node) (line, col int) {
	if n == nil || e.Src == nil {
		return 1, 1
	}
	return n.Line + e.Src.FrontMatterLine - 1, max(n.Column, 1)
}

// Field returns the node at a path of keys below the front matter, e.g.
// Field("magnet", "max_field"). A path element indexes a list when the node
// there is a sequence ("probes", "0", "name"). It reports false when the path
// does not exist or leads to an empty (null) value.
func (e *Entry) Field(path ...string) (*yaml.Node, bool) {
	n := e.Meta
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
		return quantity.Quantity{}, &Problem{Path: e.Path, Line: line, Col: col, Msg: fmt.Sprintf("%s: %v", joinPath(path), err)}
	}
	return qv, nil
}

// Links returns the entry's links in schema order (from, mask, process,
// pieces, devices), each list in written order.
func (e *Entry) Links() []Link {
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
