package calc

import (
	"fmt"
	"slices"
	"strings"
	"unicode/utf8"
)

// LineKind tells what a calc line holds.
type LineKind int

const (
	Blank   LineKind = iota // empty or only spaces
	Comment                 // only a # comment
	Assign                  // name = expr
	Expr                    // a bare expression
)

func (k LineKind) String() string {
	switch k {
	case Blank:
		return "blank"
	case Comment:
		return "comment"
	case Assign:
		return "assign"
	case Expr:
		return "expr"
	}
	return fmt.Sprintf("LineKind(%d)", int(k))
}

// maxDepth bounds the nesting of expressions so that hostile input cannot exhaust the stack.
const maxDepth = 200

// Bounds on the size of one calc line, so that a pasted or generated monster of a line is a
// positioned error on that line instead of a run that exhausts memory or the stack. The
// longest real lines (a call listing a dozen data files, a list of fifty gate voltages) stay
// far below them.
const (
	// MaxLineBytes is the longest calc line, in bytes (its result region not counted).
	MaxLineBytes = 16 << 10
	// MaxTokens is the largest number of tokens (numbers with their units, names, strings,
	// operators, brackets, commas) in one line. Every node of the expression tree takes at
	// least one token, so it bounds the tree too.
	MaxTokens = 4096
)

type parser struct {
	toks  []token
	nums  []numLit // the number literals the tokens index
	i     int
	depth int
}

// ParseLine parses one calc line (line number lineNo, used in positions). Everything from
// the first "#~" on is ignored.
func ParseLine(line string, lineNo int) (*Statement, error) {
	return parseInput(cutResult(line), lineNo)
}

// cutResult is line without its result region: everything from the first "#~" on is never
// input.
func cutResult(line string) string {
	if i := strings.Index(line, "#~"); i >= 0 {
		return line[:i]
	}
	return line
}

// parseInput is ParseLine of a line whose result region is already cut off.
func parseInput(line string, lineNo int) (*Statement, error) {
	if len(line) > MaxLineBytes {
		return nil, &Error{Line: lineNo, Col: utf8.RuneCountInString(line[:MaxLineBytes]) + 1, Err: ErrTooLarge,
			Msg: fmt.Sprintf("line of %d bytes: a calc line may hold at most %d; give parts of the expression names on lines of their own", len(line), MaxLineBytes)}
	}
	// The tree keeps slices of the line (names, strings, units): a copy of its own, so that
	// it holds on to no larger text the line was cut from.
	return parseLine(strings.Clone(line), lineNo)
}

// parseLine parses line, which is no longer than MaxLineBytes and has no result region.
func parseLine(line string, lineNo int) (*Statement, error) {
	lx := getLexer(line, lineNo)
	defer lx.release() // the tree copies what it keeps out of the tokens
	if err := lx.lex(); err != nil {
		return nil, err
	}
	toks := lx.toks
	if len(toks)-1 > MaxTokens { // the last token is the end of the line
		t := toks[MaxTokens]
		return nil, &Error{Line: t.pos.Line, Col: t.pos.Col, Err: ErrTooLarge,
			Msg: fmt.Sprintf("expression of %d parts: a calc line may hold at most %d numbers, names, operators and brackets; give parts of it names on lines of their own", len(toks)-1, MaxTokens)}
	}
	p := &parser{toks: toks, nums: lx.nums}
	st := &Statement{}
	// a trailing comment
	hadComment := false
	if n := len(p.toks); n >= 2 && p.toks[n-2].kind == tComment {
		st.Comment, hadComment = p.toks[n-2].text, true
		p.toks[n-2] = p.toks[n-1]
		p.toks = p.toks[:n-1]
	}
	if p.peek().kind == tEOF {
		if hadComment {
			st.Kind = Comment
		} else {
			st.Kind = Blank
		}
		return st, nil
	}
	if p.peek().kind == tIdent && p.peekAt(1).kind == tOp && p.peekAt(1).text == "=" {
		name := p.next()
		p.next()
		st.Kind, st.Name, st.NamePos = Assign, name.text, name.pos
		if p.peek().kind == tEOF {
			return nil, p.errExpected("an expression after =")
		}
	} else {
		st.Kind = Expr
	}
	x, err := p.expr()
	if err != nil {
		return nil, err
	}
	if t := p.peek(); t.kind != tEOF {
		if t.kind == tOp && t.text == "=" {
			return nil, errAt(t.pos, "unexpected =: an assignment is `name = expression` with a plain name on the left")
		}
		return nil, p.errExpected("an operator or the end of the line")
	}
	st.Expr = x
	return st, nil
}

// ParseExpr parses a single expression (no assignment, no comment).
func ParseExpr(src string) (Node, error) {
	st, err := ParseLine(src, 1)
	if err != nil {
		return nil, err
	}
	return exprOf(st)
}

// exprOf is the expression of a line that must be one.
func exprOf(st *Statement) (Node, error) {
	switch st.Kind {
	case Expr:
		return st.Expr, nil
	case Assign:
		return nil, errAt(st.NamePos, "expected an expression, found an assignment")
	}
	return nil, errAt(Pos{1, 1}, "expected an expression, found nothing")
}

func errAt(p Pos, msg string) *Error { return &Error{Line: p.Line, Col: p.Col, Msg: msg} }

func (p *parser) peek() token { return p.toks[p.i] }
func (p *parser) peekAt(k int) token {
	if p.i+k < len(p.toks) {
		return p.toks[p.i+k]
	}
	return p.toks[len(p.toks)-1]
}
func (p *parser) next() token {
	t := p.toks[p.i]
	if t.kind != tEOF {
		p.i++
	}
	return t
}
func (p *parser) isOp(s string) bool {
	t := p.peek()
	return t.kind == tOp && t.text == s
}

func describe(t token) string {
	switch t.kind {
	case tEOF:
		return "the end of the line"
	case tNumber:
		return "number " + t.text
	case tIdent:
		return "name " + t.text
	case tString:
		return "a string"
	case tUnit:
		return "unit " + t.text
	}
	return "\"" + t.text + "\""
}

func (p *parser) errExpected(what string) error {
	t := p.peek()
	return errAt(t.pos, "expected "+what+", found "+describe(t))
}

func (p *parser) enter() error {
	p.depth++
	if p.depth > maxDepth {
		t := p.peek()
		return &Error{Line: t.pos.Line, Col: t.pos.Col, Msg: fmt.Sprintf("expression nested deeper than %d levels", maxDepth), Err: ErrTooDeep}
	}
	return nil
}

// expr = range [ "->" unit ] .
func (p *parser) expr() (Node, error) {
	if err := p.enter(); err != nil {
		return nil, err
	}
	defer func() { p.depth-- }()
	x, err := p.rangeExpr()
	if err != nil {
		return nil, err
	}
	if p.isOp("->") {
		arrow := p.next()
		u := p.next()
		if u.kind != tUnit {
			return nil, errAt(u.pos, "expected a unit after ->")
		}
		return &Convert{Pos: u.pos, X: x, Unit: u.text, ArrowAt: arrow.pos}, nil
	}
	return x, nil
}

// range = sum [ ".." sum ] .
func (p *parser) rangeExpr() (Node, error) {
	lo, err := p.sum()
	if err != nil {
		return nil, err
	}
	if p.isOp("..") {
		op := p.next()
		hi, err := p.sum()
		if err != nil {
			return nil, err
		}
		if p.isOp("..") {
			return nil, errAt(p.peek().pos, "a range has two ends: lo .. hi")
		}
		return &RangeExpr{Pos: op.pos, Lo: lo, Hi: hi}, nil
	}
	return lo, nil
}

// sum = product { ("+" | "-") product } .
func (p *parser) sum() (Node, error) {
	x, err := p.product()
	if err != nil {
		return nil, err
	}
	for p.isOp("+") || p.isOp("-") {
		op := p.next()
		y, err := p.product()
		if err != nil {
			return nil, err
		}
		x = &Binary{Pos: op.pos, Op: op.text, X: x, Y: y}
	}
	return x, nil
}

// product = unary { ("*" | "/") unary } .
func (p *parser) product() (Node, error) {
	x, err := p.unary()
	if err != nil {
		return nil, err
	}
	for p.isOp("*") || p.isOp("/") {
		op := p.next()
		y, err := p.unary()
		if err != nil {
			return nil, err
		}
		x = &Binary{Pos: op.pos, Op: op.text, X: x, Y: y}
	}
	return x, nil
}

// unary = ("-" | "+") unary | power .
func (p *parser) unary() (Node, error) {
	if p.isOp("-") || p.isOp("+") {
		if err := p.enter(); err != nil {
			return nil, err
		}
		defer func() { p.depth-- }()
		op := p.next()
		x, err := p.unary()
		if err != nil {
			return nil, err
		}
		return &Unary{Pos: op.pos, Op: op.text, X: x}, nil
	}
	return p.power()
}

// power = postfix [ "^" unary ] .   (right-associative; -x^2 is -(x^2); 2^-1 is allowed)
func (p *parser) power() (Node, error) {
	x, err := p.postfix()
	if err != nil {
		return nil, err
	}
	if p.isOp("^") {
		if err := p.enter(); err != nil {
			return nil, err
		}
		defer func() { p.depth-- }()
		op := p.next()
		y, err := p.unary()
		if err != nil {
			return nil, err
		}
		return &Binary{Pos: op.pos, Op: "^", X: x, Y: y}, nil
	}
	return x, nil
}

// postfix = primary { "." ident | "[" expr "]" } .
func (p *parser) postfix() (Node, error) {
	x, err := p.primary()
	if err != nil {
		return nil, err
	}
	// A chain of indexes and field accesses is evaluated in a loop (Env.evalPostfix), so its
	// length costs no nesting; what is inside the brackets is nested as any expression.
	for p.isOp(".") || p.isOp("[") {
		if p.isOp("[") {
			open := p.next()
			i, err := p.expr()
			if err != nil {
				return nil, err
			}
			if !p.isOp("]") {
				return nil, p.errExpected("] to close the [ at column " + fmt.Sprint(open.pos.Col))
			}
			p.next()
			x = &IndexExpr{Pos: open.pos, X: x, Index: i}
			continue
		}
		p.next()
		t := p.peek()
		if t.kind != tIdent {
			return nil, p.errExpected("a field name after .")
		}
		p.next()
		x = &FieldAccess{Pos: t.pos, X: x, Name: t.text}
	}
	return x, nil
}

// primary = number | string | ident [ "(" args ")" ] | "(" expr ")" | "[" [ expr { "," expr } ] "]" .
func (p *parser) primary() (Node, error) {
	t := p.peek()
	switch t.kind {
	case tNumber:
		p.next()
		n := &p.nums[t.num]
		return &NumberLit{Pos: t.pos, Text: n.Text, Unc: n.Unc, Unit: n.Unit, UncUnit: n.UncUnit,
			UncAfter: n.UncAfter, UnitPos: n.UnitPos, UncPos: n.UncPos, UncUPos: n.UncUPos}, nil
	case tString:
		p.next()
		return &StringLit{Pos: t.pos, Value: t.text}, nil
	case tIdent:
		p.next()
		if p.isOp("(") {
			return p.call(t)
		}
		return &Ident{Pos: t.pos, Name: t.text}, nil
	case tOp:
		switch t.text {
		case "(":
			p.next()
			x, err := p.expr()
			if err != nil {
				return nil, err
			}
			if !p.isOp(")") {
				return nil, p.errExpected(") to close the ( at column " + fmt.Sprint(t.pos.Col))
			}
			p.next()
			return x, nil
		case "[":
			p.next()
			l := &ListExpr{Pos: t.pos}
			if p.isOp("]") {
				p.next()
				return l, nil
			}
			var buf [8]Node // one slice of the right size for the tree
			elems := buf[:0]
			for {
				x, err := p.expr()
				if err != nil {
					return nil, err
				}
				elems = append(elems, x)
				if p.isOp(",") {
					p.next()
					continue
				}
				if p.isOp("]") {
					p.next()
					l.Elems = slices.Clone(elems)
					return l, nil
				}
				return nil, p.errExpected(", or ] in the list opened at column " + fmt.Sprint(t.pos.Col))
			}
		}
	}
	return nil, p.errExpected("a number, name, string, ( or [")
}

// call parses the argument list after name: args = [ arg { "," arg } ], arg = [ ident "=" ] expr .
func (p *parser) call(name token) (Node, error) {
	open := p.next()
	c := &Call{Pos: name.pos, Func: name.text}
	if p.isOp(")") {
		p.next()
		return c, nil
	}
	seenNamed := false
	var buf [4]Arg // most calls have a few arguments: one slice of the right size for the tree
	args := buf[:0]
	for {
		a := Arg{Pos: p.peek().pos}
		if p.peek().kind == tIdent && p.peekAt(1).kind == tOp && p.peekAt(1).text == "=" {
			a.Name = p.next().text
			p.next()
			seenNamed = true
		} else if seenNamed {
			return nil, errAt(a.Pos, "positional argument after a named one: write positional arguments first")
		}
		x, err := p.expr()
		if err != nil {
			return nil, err
		}
		a.Value = x
		args = append(args, a)
		if p.isOp(",") {
			p.next()
			continue
		}
		if p.isOp(")") {
			p.next()
			c.Args = slices.Clone(args)
			return c, nil
		}
		return nil, p.errExpected(", or ) in the call of " + name.text + " opened at column " + fmt.Sprint(open.pos.Col))
	}
}
