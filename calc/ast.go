package calc

import (
	"strings"
)

// Pos is a position in a calc block: 1-based line and 1-based column counted in
// characters (runes), not bytes.
type Pos struct {
	Line, Col int
}

// Node is an expression of the calc language. Every node records the position of the
// token that names it (an operator's position for a binary operation).
type Node interface {
	Position() Pos
	node()
}

// NumberLit is a number literal with its optional uncertainty and unit, as written.
type NumberLit struct {
	Pos     Pos
	Text    string // "3.1e11"
	Unc     string // "0.2", "(4)" for the concise form, or ""
	Unit    string // "cm^-2" or ""
	UncUnit string // unit written after the uncertainty in `12.5 um ± 0.2 um`, or ""
	// UncAfter is true when the uncertainty was written after the unit.
	UncAfter bool
	UnitPos  Pos
	UncPos   Pos
	UncUPos  Pos
}

// Ident is a name: a variable, constant, material, or a field provided by the notebook.
type Ident struct {
	Pos  Pos
	Name string
}

// StringLit is a "..." string.
type StringLit struct {
	Pos   Pos
	Value string
}

// Unary is -x or +x.
type Unary struct {
	Pos Pos
	Op  string
	X   Node
}

// Binary is x op y for op in + - * / ^.
type Binary struct {
	Pos  Pos // the operator
	Op   string
	X, Y Node
}

// RangeExpr is lo .. hi.
type RangeExpr struct {
	Pos    Pos // the ".." operator
	Lo, Hi Node
}

// ListExpr is [a, b, c].
type ListExpr struct {
	Pos   Pos
	Elems []Node
}

// FieldAccess is x.name: reading a field of a record or another value with fields.
type FieldAccess struct {
	Pos  Pos // the name after the dot
	X    Node
	Name string
}

// IndexExpr is x[i]: an item of a list by its 0-based index (negative counts from the end),
// or a field of a record by its name in quotes.
type IndexExpr struct {
	Pos   Pos // the "["
	X     Node
	Index Node
}

// Arg is one argument of a call; Name is "" for a positional argument.
type Arg struct {
	Pos   Pos // the argument's name, or its value when positional
	Name  string
	Value Node
}

// Call is name(args...).
type Call struct {
	Pos  Pos
	Func string
	Args []Arg
}

// Convert is a display-unit request x -> unit.
type Convert struct {
	Pos     Pos // the unit text
	X       Node
	Unit    string
	ArrowAt Pos
}

func (n *NumberLit) Position() Pos   { return n.Pos }
func (n *Ident) Position() Pos       { return n.Pos }
func (n *StringLit) Position() Pos   { return n.Pos }
func (n *Unary) Position() Pos       { return n.Pos }
func (n *Binary) Position() Pos      { return n.Pos }
func (n *RangeExpr) Position() Pos   { return n.Pos }
func (n *ListExpr) Position() Pos    { return n.Pos }
func (n *FieldAccess) Position() Pos { return n.Pos }
func (n *IndexExpr) Position() Pos   { return n.Pos }
func (n *Call) Position() Pos        { return n.Pos }
func (n *Convert) Position() Pos     { return n.Pos }

func (*NumberLit) node()   {}
func (*Ident) node()       {}
func (*StringLit) node()   {}
func (*Unary) node()       {}
func (*Binary) node()      {}
func (*RangeExpr) node()   {}
func (*ListExpr) node()    {}
func (*FieldAccess) node() {}
func (*IndexExpr) node()   {}
func (*Call) node()        {}
func (*Convert) node()     {}

// Statement is one parsed calc line.
type Statement struct {
	Kind    LineKind
	Name    string // for Assign
	NamePos Pos
	Expr    Node   // nil for Blank and Comment
	Comment string // text after '#', without the '#'
}

// FormatNode prints an expression back as calc source. Every operation is fully
// parenthesised, so parsing the output gives the same tree (the property FuzzParse checks).
func FormatNode(n Node) string {
	var b strings.Builder
	formatNode(&b, n)
	return b.String()
}

func formatNode(b *strings.Builder, n Node) {
	switch n := n.(type) {
	case *NumberLit:
		conciseUnc := strings.HasPrefix(n.Unc, "(")
		if conciseUnc {
			// the concise uncertainty sits between mantissa and exponent: 3.07(4)e11
			mant, exp := splitExponent(n.Text)
			b.WriteString(mant + n.Unc + exp)
		} else {
			b.WriteString(n.Text)
		}
		if n.Unc != "" && !conciseUnc && !n.UncAfter {
			b.WriteString(" ± ")
			b.WriteString(n.Unc)
		}
		if n.Unit != "" {
			b.WriteString(" ")
			b.WriteString(n.Unit)
		}
		if n.Unc != "" && n.UncAfter {
			b.WriteString(" ± ")
			b.WriteString(n.Unc)
			if n.UncUnit != "" {
				b.WriteString(" ")
				b.WriteString(n.UncUnit)
			}
		}
	case *Ident:
		b.WriteString(n.Name)
	case *StringLit:
		b.WriteString(quoteString(n.Value))
	case *Unary:
		b.WriteString("(")
		b.WriteString(n.Op)
		formatNode(b, n.X)
		b.WriteString(")")
	case *Binary:
		b.WriteString("(")
		formatNode(b, n.X)
		b.WriteString(" " + n.Op + " ")
		formatNode(b, n.Y)
		b.WriteString(")")
	case *RangeExpr:
		b.WriteString("(")
		formatNode(b, n.Lo)
		b.WriteString(" .. ")
		formatNode(b, n.Hi)
		b.WriteString(")")
	case *ListExpr:
		b.WriteString("[")
		for i, e := range n.Elems {
			if i > 0 {
				b.WriteString(", ")
			}
			formatNode(b, e)
		}
		b.WriteString("]")
	case *FieldAccess:
		formatNode(b, n.X)
		b.WriteString(".")
		b.WriteString(n.Name)
	case *IndexExpr:
		formatNode(b, n.X)
		b.WriteString("[")
		formatNode(b, n.Index)
		b.WriteString("]")
	case *Call:
		b.WriteString(n.Func)
		b.WriteString("(")
		for i, a := range n.Args {
			if i > 0 {
				b.WriteString(", ")
			}
			if a.Name != "" {
				b.WriteString(a.Name)
				b.WriteString("=")
			}
			formatNode(b, a.Value)
		}
		b.WriteString(")")
	case *Convert:
		b.WriteString("(")
		formatNode(b, n.X)
		b.WriteString(" -> ")
		b.WriteString(n.Unit)
		b.WriteString(")")
	}
}

func quoteString(s string) string {
	return `"` + strings.NewReplacer(`\`, `\\`, `"`, `\"`).Replace(s) + `"`
}

// splitExponent splits "3.07e11" into "3.07" and "e11".
func splitExponent(s string) (string, string) {
	if i := strings.IndexAny(s, "eE"); i >= 0 {
		return s[:i], s[i:]
	}
	return s, ""
}
