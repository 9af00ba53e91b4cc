package calc

import (
	"fmt"
	"strings"
)

// refToken is a token of refLex: the number's parts by pointer.
type refToken struct {
	kind tokKind
	text string
	pos  Pos
	num  *numLit
}

// refLexer is the lexer as it was when it converted each line to []rune (so that a column is
// an index plus one), kept as the reference the lexer over the string is compared with
// (TestLexMatchesReference, FuzzLex). One change: it no longer treats "#=", the old result
// marker, as the end of the line (see TestOldMarkerIsAComment).
type refLexer struct {
	src  []rune
	i    int
	line int
	toks []refToken

	lastPos  Pos // where the last uncertainty number started
	lastText string
}

// refLex tokenizes src (one line; a newline is an error). It stops at "#~", the start of the
// tool-owned result region, as if the line ended there.
func refLex(src string, line int) ([]refToken, error) {
	if i := strings.Index(src, "#~"); i >= 0 {
		src = src[:i] // even inside a string: the result region is never input
	}
	lx := &refLexer{src: []rune(src), line: line}
	for {
		lx.skipSpace()
		if lx.i >= len(lx.src) {
			break
		}
		start := lx.pos()
		r := lx.src[lx.i]
		switch {
		case r == '#':
			lx.toks = append(lx.toks, refToken{kind: tComment, text: string(lx.src[lx.i+1:]), pos: start})
			lx.i = len(lx.src)
		case r == '\n' || r == '\r':
			return nil, lx.errAt(start, "unexpected line break: a calc line is one line")
		case isDigit(r) || (r == '.' && isDigit(lx.peek(1))):
			n, err := lx.number()
			if err != nil {
				return nil, err
			}
			lx.toks = append(lx.toks, refToken{kind: tNumber, text: n.Text, pos: start, num: n})
		case r == '(' && lx.groupedNumber(start):
			// "(3.070 ± 0.040)e11 cm^-2", the form results are displayed in
		case isIdentStart(r):
			lx.toks = append(lx.toks, refToken{kind: tIdent, text: lx.ident(), pos: start})
		case r == '"':
			s, err := lx.str()
			if err != nil {
				return nil, err
			}
			lx.toks = append(lx.toks, refToken{kind: tString, text: s, pos: start})
		default:
			op := ""
			switch r {
			case '+', '*', '/', '^', '(', ')', '[', ']', ',', '=':
				op = string(r)
			case '-':
				op = "-"
				if lx.peek(1) == '>' {
					op = "->"
				}
			case '.':
				op = "."
				if lx.peek(1) == '.' {
					op = ".."
				}
			case '→':
				op = "->"
			case '×', '·':
				op = "*"
			case '÷':
				op = "/"
			case '−':
				op = "-"
			}
			if op == "" {
				return nil, lx.errAt(start, fmt.Sprintf("unexpected character %q", r))
			}
			if op == "->" && r == '-' || op == ".." {
				lx.i += 2
			} else {
				lx.i++
			}
			lx.toks = append(lx.toks, refToken{kind: tOp, text: op, pos: start})
			if op == "->" {
				// The rest of the display request is a unit, up to a comment or the end.
				if err := lx.targetUnit(); err != nil {
					return nil, err
				}
			}
		}
	}
	lx.toks = append(lx.toks, refToken{kind: tEOF, pos: lx.pos()})
	return lx.toks, nil
}

func (lx *refLexer) pos() Pos { return Pos{Line: lx.line, Col: lx.i + 1} }

func (lx *refLexer) errAt(p Pos, msg string) error { return &Error{Line: p.Line, Col: p.Col, Msg: msg} }

func (lx *refLexer) peek(k int) rune {
	if lx.i+k < len(lx.src) {
		return lx.src[lx.i+k]
	}
	return 0
}

func (lx *refLexer) at(j int) rune {
	if j >= 0 && j < len(lx.src) {
		return lx.src[j]
	}
	return 0
}

func (lx *refLexer) skipSpace() {
	for lx.i < len(lx.src) && isSpace(lx.src[lx.i]) {
		lx.i++
	}
}

// ident reads an identifier. A '.' between two digits stays inside the identifier, so
// that alloy names such as Al0.33Ga0.67As are one name.
func (lx *refLexer) ident() string {
	j := lx.i
	for j < len(lx.src) {
		r := lx.src[j]
		if isIdentPart(r) {
			j++
			continue
		}
		if r == '.' && j > lx.i && isDigit(lx.src[j-1]) && isDigit(lx.at(j+1)) {
			j++
			continue
		}
		break
	}
	s := string(lx.src[lx.i:j])
	lx.i = j
	return s
}

// decimal reads digits [. digits] [e [+-] digits] at j and returns the end index, or j if
// there is no number there.
func (lx *refLexer) decimal(j int) int {
	k := j
	for isDigit(lx.at(k)) {
		k++
	}
	if lx.at(k) == '.' && isDigit(lx.at(k+1)) {
		k++
		for isDigit(lx.at(k)) {
			k++
		}
	}
	if k == j {
		return j
	}
	return lx.exponent(k)
}

func (lx *refLexer) exponent(k int) int {
	if r := lx.at(k); r == 'e' || r == 'E' {
		m := k + 1
		if s := lx.at(m); s == '+' || s == '-' {
			m++
		}
		if isDigit(lx.at(m)) {
			for isDigit(lx.at(m)) {
				m++
			}
			return m
		}
	}
	return k
}

// groupedNumber lexes "(v ± u)e<exp> [unit]" at '(' as one number with value v·10^exp and
// uncertainty u·10^exp. It reports false, consuming nothing, when the text has another form.
func (lx *refLexer) groupedNumber(start Pos) bool {
	j := refSkipSp(lx, lx.i+1)
	neg := false
	if lx.at(j) == '-' || lx.at(j) == '−' {
		neg = true
		j = refSkipSp(lx, j+1)
	}
	vEnd := lx.decimal(j)
	if vEnd == j {
		return false
	}
	v := string(lx.src[j:vEnd])
	k := refSkipSp(lx, vEnd)
	switch {
	case lx.at(k) == '±':
		k++
	case lx.at(k) == '+' && lx.at(k+1) == '/' && lx.at(k+2) == '-':
		k += 3
	default:
		return false
	}
	k = refSkipSp(lx, k)
	uEnd := lx.decimal(k)
	if uEnd == k {
		return false
	}
	u := string(lx.src[k:uEnd])
	c := refSkipSp(lx, uEnd)
	if lx.at(c) != ')' || lx.at(c+1) != 'e' && lx.at(c+1) != 'E' {
		return false
	}
	eEnd := lx.exponent(c + 1)
	if eEnd == c+1 || strings.ContainsAny(v, "eE") || strings.ContainsAny(u, "eE") {
		return false
	}
	exp := string(lx.src[c+1 : eEnd])
	n := &numLit{Text: v + exp, Unc: u + exp, UncPos: Pos{lx.line, k + 1}}
	lx.i = eEnd
	if neg {
		// a negative value reads as unary minus applied to the number
		lx.toks = append(lx.toks, refToken{kind: tOp, text: "-", pos: start})
		start = Pos{lx.line, j + 1}
	}
	if unit, p, ok := lx.unit(); ok {
		n.Unit, n.UnitPos = unit, p
	}
	lx.toks = append(lx.toks, refToken{kind: tNumber, text: n.Text, pos: start, num: n})
	return true
}

// number lexes a number literal with its optional uncertainty and unit.
func (lx *refLexer) number() (*numLit, error) {
	start := lx.i
	j := lx.decimal(lx.i)
	if j == lx.i { // ".5"
		j = lx.i + 1
		for isDigit(lx.at(j)) {
			j++
		}
		j = lx.exponent(j)
	}
	n := &numLit{}
	// Concise uncertainty: 3.07(4) or 3.07(4)e11, directly attached.
	if lx.at(j) == '(' && isDigit(lx.at(j+1)) {
		k := j + 1
		for isDigit(lx.at(k)) {
			k++
		}
		if lx.at(k) == ')' {
			mant := string(lx.src[start:j])
			if strings.ContainsAny(mant, "eE") {
				return nil, lx.errAt(Pos{lx.line, j + 1}, "concise uncertainty goes before the exponent, as in 3.07(4)e11")
			}
			n.UncPos = Pos{lx.line, j + 1}
			n.Unc = string(lx.src[j : k+1])
			e := lx.exponent(k + 1)
			n.Text = mant + string(lx.src[k+1:e])
			j = e
		}
	}
	if n.Text == "" {
		n.Text = string(lx.src[start:j])
	}
	if lx.at(j) == '.' && isDigit(lx.at(j+1)) {
		return nil, lx.errAt(Pos{lx.line, j + 1}, "malformed number: a second decimal point")
	}
	lx.i = j
	if n.Unc == "" {
		if ok, err := lx.uncertainty(); err != nil {
			return nil, err
		} else if ok {
			n.UncPos, n.Unc = lx.lastPos, lx.lastText
		}
	}
	if u, p, ok := lx.unit(); ok {
		n.Unit, n.UnitPos = u, p
	}
	if n.Unc == "" && n.Unit != "" {
		ok, err := lx.uncertainty()
		if err != nil {
			return nil, err
		}
		if ok {
			n.UncPos, n.Unc, n.UncAfter = lx.lastPos, lx.lastText, true
			if u, p, ok := lx.unit(); ok {
				n.UncUnit, n.UncUPos = u, p
			}
		}
	}
	return n, nil
}

// uncertainty reads an optional "± number" or "+/- number" after spaces.
func (lx *refLexer) uncertainty() (bool, error) {
	j := lx.i
	for isSpace(lx.at(j)) {
		j++
	}
	switch {
	case lx.at(j) == '±':
		j++
	case lx.at(j) == '+' && lx.at(j+1) == '/' && lx.at(j+2) == '-':
		j += 3
	default:
		return false, nil
	}
	for isSpace(lx.at(j)) {
		j++
	}
	e := lx.decimal(j)
	if e == j && lx.at(j) == '.' && isDigit(lx.at(j+1)) {
		e = j + 1
		for isDigit(lx.at(e)) {
			e++
		}
		e = lx.exponent(e)
	}
	if e == j {
		return false, lx.errAt(Pos{lx.line, j + 1}, "expected a number (the uncertainty) after ±")
	}
	lx.lastPos = Pos{lx.line, j + 1}
	lx.lastText = string(lx.src[j:e])
	lx.i = e
	return true, nil
}

// unit reads a unit written after a number. The rule (documented in LANGUAGE.md):
// after optional spaces, a unit starts with a letter; it is a sequence of unit symbols
// (letters, digits, '_') each with an optional exponent ^n or ^-n, joined by '*' or '/'
// written without spaces, or by spaces followed by another symbol (juxtaposition means
// multiplication). A '(' directly after '/' opens a group in which spaces are free.
// So `2e6 cm^2/(V s)` and `1 kg m^2 s^-2` are units, while in `5 T / B` and `5 T * x`
// the operator is arithmetic.
func (lx *refLexer) unit() (string, Pos, bool) {
	j := lx.i
	for isSpace(lx.at(j)) {
		j++
	}
	if !isUnitStart(lx.at(j)) {
		return "", Pos{}, false
	}
	start := j
	end, ok := lx.unitSeq(j, 0)
	if !ok || end == start {
		return "", Pos{}, false
	}
	lx.i = end
	return strings.TrimRight(string(lx.src[start:end]), " \t"), Pos{lx.line, start + 1}, true
}

// unitSeq scans a unit sequence starting at j and returns the end of the longest valid
// prefix. depth > 0 means inside parentheses, where spaces are free.
func (lx *refLexer) unitSeq(j, depth int) (int, bool) {
	good := -1
	for {
		fe, ok := lx.unitFactor(j, depth)
		if !ok {
			if good < 0 {
				return j, false
			}
			return good, true
		}
		good = fe
		// a joint: '*', '/' or '·' without spaces (free inside parentheses), or spaces
		// followed by another symbol.
		k := fe
		if depth > 0 {
			k = refSkipSp(lx, k)
		}
		switch r := lx.at(k); {
		case r == '*' || r == '/' || r == '·':
			nx := k + 1
			if depth > 0 {
				nx = refSkipSp(lx, nx)
			}
			if !isUnitStart(lx.at(nx)) && lx.at(nx) != '(' || lx.at(nx) == '(' && r != '/' && depth == 0 {
				return good, true
			}
			j = nx
		case depth > 0 && isUnitStart(r):
			j = k
		case depth == 0 && isSpace(lx.at(fe)):
			m := refSkipSp(lx, fe)
			if !isUnitStart(lx.at(m)) {
				return good, true
			}
			j = m
		default:
			return good, true
		}
	}
}

// unitFactor scans one unit symbol or parenthesised group with an optional integer
// exponent.
func (lx *refLexer) unitFactor(j, depth int) (int, bool) {
	switch {
	case lx.at(j) == '(':
		e, ok := lx.unitSeq(refSkipSp(lx, j+1), depth+1)
		if !ok {
			return j, false
		}
		e = refSkipSp(lx, e)
		if lx.at(e) != ')' {
			return j, false
		}
		j = e + 1
	case isUnitStart(lx.at(j)):
		start := j
		for isUnitPart(lx.at(j)) {
			j++
		}
		// A monolayer names its material: ML(GaAs), ML(Al(0.3)Ga(0.7)As).
		if lx.at(j) == '(' && string(lx.src[start:j]) == "ML" {
			depth := 0
			for k := j; k < len(lx.src); k++ {
				if lx.src[k] == '(' {
					depth++
				} else if lx.src[k] == ')' {
					if depth--; depth == 0 {
						j = k + 1
						break
					}
				}
			}
		}
	default:
		return j, false
	}
	if lx.at(j) == '^' {
		k := j + 1
		if lx.at(k) == '-' || lx.at(k) == '+' {
			k++
		}
		if isDigit(lx.at(k)) {
			for isDigit(lx.at(k)) {
				k++
			}
			j = k
		}
	}
	return j, true
}

func refSkipSp(lx *refLexer, j int) int {
	for isSpace(lx.at(j)) {
		j++
	}
	return j
}

// targetUnit lexes the unit of a display request `-> unit`, with the same rule as a unit
// after a number.
func (lx *refLexer) targetUnit() error {
	u, p, ok := lx.unit()
	if !ok {
		lx.skipSpace()
		return lx.errAt(lx.pos(), "expected a unit after ->")
	}
	lx.toks = append(lx.toks, refToken{kind: tUnit, text: u, pos: p})
	return nil
}

// str reads a "..." string. Escapes: \" and \\ only.
func (lx *refLexer) str() (string, error) {
	start := lx.pos()
	var b strings.Builder
	j := lx.i + 1
	for {
		if j >= len(lx.src) {
			return "", lx.errAt(start, "unterminated string: expected a closing \"")
		}
		r := lx.src[j]
		switch r {
		case '"':
			lx.i = j + 1
			return b.String(), nil
		case '\\':
			nx := lx.at(j + 1)
			if nx != '"' && nx != '\\' {
				return "", lx.errAt(Pos{lx.line, j + 1}, `unknown escape in string: only \" and \\ are allowed`)
			}
			b.WriteRune(nx)
			j += 2
		case '\n', '\r':
			return "", lx.errAt(Pos{lx.line, j + 1}, "unexpected line break in string")
		default:
			b.WriteRune(r)
			j++
		}
	}
}
