package notebook

import (
	"fmt"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"
)

// Bounds on front matter. A yaml.Node keeps aliases as references, so decoding a small
// document costs little; but everything that reads the entry (its fields as calc values, the
// lineage, the templates' checks) follows the aliases, and a few hundred bytes of nested
// aliases expand to billions of nodes (issue 13: 359 bytes grew a check to 5.8 GB). A real
// entry has a few hundred nodes nested a few levels deep.
const (
	// MaxFrontMatterNodes is the largest number of YAML nodes front matter may hold once
	// every alias is expanded.
	MaxFrontMatterNodes = 50_000
	// MaxFrontMatterDepth is the deepest nesting of maps and lists, aliases expanded.
	MaxFrontMatterDepth = 64
)

// DecodeFrontMatter decodes front matter text (between the --- lines) as the loader does,
// within the same bounds (MaxFrontMatterNodes, MaxFrontMatterDepth, no alias loops, UTF-8),
// and returns its top node: nil for a document without content. For readers of a file that
// is not an entry (its front matter lacks a valid id) yet whose fields they show; an entry's
// are [Entry.Front].
func DecodeFrontMatter(b []byte) (*yaml.Node, error) {
	var doc yaml.Node
	if err := decodeYAML(b, &doc); err != nil {
		return nil, err
	}
	if len(doc.Content) == 0 {
		return nil, nil
	}
	return doc.Content[0], nil
}

// frontMatterError is a problem with front matter found before or after the YAML library
// decoded it, with its position in the YAML text (1-based line and column).
type frontMatterError struct {
	Line, Col int
	Msg       string
}

func (e *frontMatterError) Error() string {
	return fmt.Sprintf("front matter line %d, column %d: %s", e.Line, e.Col, e.Msg)
}

// checkYAMLText finds the first byte of b that is not UTF-8 (the YAML library names no line
// for it).
func checkYAMLText(b []byte) error {
	if utf8.Valid(b) {
		return nil
	}
	line, start := 1, 0
	for i := 0; i < len(b); {
		r, n := utf8.DecodeRune(b[i:])
		if r == utf8.RuneError && n <= 1 {
			return &frontMatterError{Line: line, Col: utf8.RuneCount(b[start:i]) + 1,
				Msg: fmt.Sprintf("byte 0x%02X is not UTF-8 text: save the file as UTF-8", b[i])}
		}
		if r == '\n' {
			line, start = line+1, i+1
		}
		i += n
	}
	return nil
}

// checkYAMLTree bounds the decoded document: no alias that refers to a node containing it
// (a loop every reader would follow forever), at most MaxFrontMatterNodes nodes and
// MaxFrontMatterDepth levels with every alias expanded. The walk visits each node once
// (expanded sizes are remembered), so checking costs as much as decoding.
func checkYAMLTree(doc *yaml.Node) error {
	count := 0
	if plain, err := plainTree(doc, 0, &count); plain || err != nil {
		return err
	}
	w := yamlWalk{done: map[*yaml.Node]expanded{}, open: map[*yaml.Node]bool{}}
	_, err := w.expand(doc, nil)
	return err
}

// plainTree checks a document without aliases (nearly every one), allocating nothing; count
// is the number of nodes seen so far. It reports false, and nothing checked, when it meets an
// alias.
func plainTree(n *yaml.Node, depth int, count *int) (plain bool, err error) {
	if n.Kind == yaml.AliasNode {
		return false, nil
	}
	*count++
	switch {
	case depth > MaxFrontMatterDepth:
		return true, errTooDeep(n)
	case *count > MaxFrontMatterNodes:
		return true, errTooMany(n)
	}
	for _, c := range n.Content {
		if plain, err := plainTree(c, depth+1, count); !plain || err != nil {
			return plain, err
		}
	}
	return true, nil
}

func errTooDeep(at *yaml.Node) error {
	return &frontMatterError{Line: at.Line, Col: at.Column,
		Msg: fmt.Sprintf("nested more than %d levels deep (aliases expanded)", MaxFrontMatterDepth)}
}

func errTooMany(at *yaml.Node) error {
	return &frontMatterError{Line: at.Line, Col: at.Column,
		Msg: fmt.Sprintf("more than %d values once its aliases are expanded (an alias that repeats other aliases multiplies them): write the values out or use fewer aliases", MaxFrontMatterNodes)}
}

// expanded is what a node stands for with its aliases expanded: how many nodes (capped just
// above the limit) and how many levels.
type expanded struct{ size, height int }

type yamlWalk struct {
	done map[*yaml.Node]expanded
	open map[*yaml.Node]bool // nodes on the current path
}

// expand measures n; via is the alias through which n was reached (the position an error
// names), nil otherwise.
func (w yamlWalk) expand(n *yaml.Node, via *yaml.Node) (expanded, error) {
	if n == nil {
		return expanded{}, nil
	}
	if x, ok := w.done[n]; ok {
		return x, nil
	}
	at := n
	if via != nil {
		at = via
	}
	if w.open[n] {
		return expanded{}, &frontMatterError{Line: at.Line, Col: at.Column,
			Msg: fmt.Sprintf("alias *%s refers to a node that contains it: it would repeat without end", at.Value)}
	}
	if len(w.open) > MaxFrontMatterDepth {
		return expanded{}, errTooDeep(at)
	}
	w.open[n] = true
	defer delete(w.open, n)
	children, alias := n.Content, (*yaml.Node)(nil)
	if n.Kind == yaml.AliasNode {
		children, alias = []*yaml.Node{n.Alias}, n
	}
	x := expanded{size: 1}
	for _, c := range children {
		cx, err := w.expand(c, alias)
		if err != nil {
			return expanded{}, err
		}
		pos := c
		if alias != nil {
			pos = alias
		}
		x.size += cx.size
		x.height = max(x.height, cx.height+1)
		switch {
		case x.size > MaxFrontMatterNodes:
			return expanded{}, errTooMany(pos)
		case len(w.open)+cx.height > MaxFrontMatterDepth:
			return expanded{}, errTooDeep(pos)
		}
	}
	w.done[n] = x
	return x, nil
}
