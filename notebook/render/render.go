// Package render is a goldmark extension for cleave's calc blocks: a fenced block whose info
// string starts with `cleave` is shown as a table of its lines, each line's input beside its
// result (the text after `#~`), with the number, its uncertainty and its unit marked up, failed
// lines and warnings marked, and a plot(...) result shown as its picture.
//
// Any Go program that renders Markdown with goldmark shows calc blocks this way by adding one
// extension:
//
//	md := goldmark.New(goldmark.WithExtensions(render.Blocks()))
//
// The extension writes no raw HTML from the document: every piece of text is escaped, and a
// picture's address is only ever a plot path of the form plots/<entry>/<name>.svg (see
// calc/plot), optionally mapped by [WithImageURL].
package render

import (
	"strings"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/parser"
	"github.com/yuin/goldmark/renderer"
	"github.com/yuin/goldmark/text"
	"github.com/yuin/goldmark/util"

	"cleave/notebook/calcblock"
)

// KindBlock is the node kind of a calc block.
var KindBlock = ast.NewNodeKind("CleaveBlock")

// Block is a calc block in goldmark's tree.
type Block struct {
	ast.BaseBlock
	Calc []Line // the lines, in order
}

// Line is one line of a calc block.
type Line struct {
	Input  string // the code, without the result region and trailing blanks
	Result string // the text after `#~`, trimmed; "" when none
	HasRes bool   // the line has a result region
	Kind   calcblock.LineKind
}

// Failed reports whether the result is an error.
func (l Line) Failed() bool { return calcblock.IsError(l.Result) }

// Kind implements ast.Node.
func (*Block) Kind() ast.NodeKind { return KindBlock }

// Dump implements ast.Node.
func (b *Block) Dump(source []byte, level int) {
	m := map[string]string{}
	for i, l := range b.Calc {
		m["line"+strings.Repeat("0", 3-len(itoa(i)))+itoa(i)] = l.Input + " #~ " + l.Result
	}
	ast.DumpHelper(b, source, level, m, nil)
}

func itoa(i int) string {
	const d = "0123456789"
	if i < 10 {
		return d[i : i+1]
	}
	return itoa(i/10) + d[i%10:i%10+1]
}

// config holds the extension's options.
type config struct {
	imageURL func(plotPath string) (string, bool)
}

// Option tunes the extension.
type Option func(*config)

// WithImageURL maps the path a plot line names (plots/<entry>/<name>.svg, relative to the
// entry's folder) to the address the page should load; ok false shows the path as text
// without a picture. By default the path is used as it is (relative to the page).
func WithImageURL(f func(plotPath string) (url string, ok bool)) Option {
	return func(c *config) { c.imageURL = f }
}

type extension struct{ cfg *config }

// Blocks is the extension: a parser step that turns calc blocks into [Block] nodes and a
// renderer for them.
func Blocks(opts ...Option) goldmark.Extender {
	cfg := &config{imageURL: func(p string) (string, bool) { return p, true }}
	for _, o := range opts {
		o(cfg)
	}
	return &extension{cfg: cfg}
}

// Extend implements goldmark.Extender.
func (e *extension) Extend(m goldmark.Markdown) {
	m.Parser().AddOptions(parser.WithASTTransformers(util.Prioritized(transformer{}, 500)))
	m.Renderer().AddOptions(renderer.WithNodeRenderers(util.Prioritized(&blockRenderer{cfg: e.cfg}, 500)))
}

// transformer replaces each fenced code block whose info string's first word is `cleave` by a
// Block holding its lines.
type transformer struct{}

// Transform implements parser.ASTTransformer.
func (transformer) Transform(doc *ast.Document, reader text.Reader, _ parser.Context) {
	src := reader.Source()
	var found []*ast.FencedCodeBlock
	_ = ast.Walk(doc, func(n ast.Node, entering bool) (ast.WalkStatus, error) {
		if !entering {
			return ast.WalkContinue, nil
		}
		if fc, ok := n.(*ast.FencedCodeBlock); ok {
			if fc.Info != nil {
				info := strings.Fields(string(fc.Info.Segment.Value(src)))
				if len(info) > 0 && info[0] == calcblock.InfoString {
					found = append(found, fc)
				}
			}
			return ast.WalkSkipChildren, nil
		}
		return ast.WalkContinue, nil
	})
	for _, fc := range found {
		b := &Block{}
		lines := fc.Lines()
		for i := 0; i < lines.Len(); i++ {
			seg := lines.At(i)
			raw := strings.TrimRight(string(seg.Value(src)), "\r\n")
			b.Calc = append(b.Calc, splitLine(raw))
		}
		if p := fc.Parent(); p != nil {
			p.ReplaceChild(p, fc, b)
		}
	}
}

// splitLine splits a calc line at its result region, as calcblock does for a file.
func splitLine(raw string) Line {
	code, res, has := raw, "", false
	if i := strings.Index(raw, calcblock.Marker); i >= 0 {
		code, res, has = raw[:i], raw[i+len(calcblock.Marker):], true
	}
	l := Line{Input: strings.TrimRight(code, " \t"), Result: strings.TrimSpace(res), HasRes: has}
	c := strings.TrimSpace(code)
	switch {
	case c == "":
		l.Kind = calcblock.Blank
	case c[0] == '#':
		l.Kind = calcblock.Comment
	default:
		l.Kind = calcblock.Code
	}
	return l
}
