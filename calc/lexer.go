package calc

import (
	"fmt"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"
)

// tokKind is the kind of a lexical token.
type tokKind int

const (
	tEOF     tokKind = iota
	tNumber          // a number literal with optional uncertainty and unit (see numLit)
	tIdent           // identifier, including alloy names such as Al0.33Ga0.67As
	tString          // "..." with \" and \\ escapes
	tOp              // one of + - * / ^ ( ) [ ] , . = .. ->
	tComment         // # ... to the end of the line (not #~)
	tUnit            // the unit text of a display request after ->
)

// token is one lexical token. Pos is the 1-based line and column (in characters) of its
// first character.
type token struct {
	kind tokKind
	text string // operator text, identifier, string contents (unescaped), comment text
	pos  Pos
	num  int // for tNumber, the index of its numLit in the lexer's nums
}

// numLit is the lexed form of a number literal such as `12.5 ± 0.2 um`,
// `3.07(4)e11 cm^-2` or `2e6 cm^2/(V s)`.
type numLit struct {
	Text     string // the number as written, e.g. "3.1e11"
	Unc      string // the uncertainty as written ("" if none); for the concise form "(4)" it is "(4)"
	Unit     string // unit text as written ("" if none)
	UncUnit  string // unit written after the uncertainty when it differs in position from Unit ("" if none)
	UnitPos  Pos
	UncPos   Pos
	UncUPos  Pos
	UncAfter bool // the uncertainty follows the unit: `12.5 um ± 0.2 um`
}

// lexer splits one line into tokens. It works on the string itself: i and every other index
// are byte offsets, always at the start of a character, and col turns an offset into the
// column in characters that positions report. Characters are decoded as a conversion of the
// line to []rune would decode them (an invalid byte is one U+FFFD), so columns and texts are
// those of a lexer over runes (TestLexMatchesReference keeps it so).
type lexer struct {
	src  string
	i    int
	line int
	toks []token
	nums []numLit

	ascii bool // src is all ASCII: a column is the byte offset plus one
	valid bool // src is valid UTF-8: a slice of it is the text as written
	// The last offset turned into a column, and its column less one: columns are asked for
	// mostly left to right, so counting characters starts from there.
	colAt, colRunes int

	lastPos  Pos // where the last uncertainty number started
	lastText string
}

// lexers are reused from line to line: their token and number slices are the lexer's
// only allocations that would otherwise grow with every line.
var lexers = sync.Pool{New: func() any { return new(lexer) }}

// maxPooledTokens bounds the token slice a pooled lexer keeps, so that one long line does
// not pin its tokens' memory for the rest of the run.
const maxPooledTokens = 256

func getLexer(src string, line int) *lexer {
	lx := lexers.Get().(*lexer)
	lx.reset(src, line)
	return lx
}

func (lx *lexer) reset(src string, line int) {
	*lx = lexer{src: src, line: line, toks: lx.toks[:0], nums: lx.nums[:0]}
	lx.ascii, lx.valid = true, true
	for k := 0; k < len(src); k++ {
		if src[k] >= utf8.RuneSelf {
			lx.ascii = false
			lx.valid = utf8.ValidString(src[k:])
			break
		}
	}
}

// release returns lx to the pool, dropping what refers to the line (what lies beyond the
// slices' lengths was dropped when an earlier line released them).
func (lx *lexer) release() {
	if cap(lx.toks) > maxPooledTokens {
		return
	}
	clear(lx.toks)
	clear(lx.nums)
	*lx = lexer{toks: lx.toks[:0], nums: lx.nums[:0]}
	lexers.Put(lx)
}

func isIdentStart(r rune) bool { return r == '_' || unicode.IsLetter(r) }
func isIdentPart(r rune) bool {
	return r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.IsNumber(r)
}
func isDigit(r rune) bool { return r >= '0' && r <= '9' }

// lex tokenizes src (one line; a newline is an error) into lx.toks. It stops at "#~", the
// start of the tool-owned result region, as if the line ended there.
func (lx *lexer) lex() error {
	if i := strings.Index(lx.src, "#~"); i >= 0 {
		lx.reset(lx.src[:i], lx.line) // even inside a string: the result region is never input
	}
	if lx.toks == nil {
		// About one token for every four bytes of a typical line (`nu = filling_factor(n, B)`
		// has nine tokens in 25 bytes), and the end of the line.
		lx.toks = make([]token, 0, min(len(lx.src)/4+4, MaxTokens+1))
	}
	for {
		lx.skipSpace()
		if lx.i >= len(lx.src) {
			break
		}
		start := lx.pos()
		r, w := lx.runeAt(lx.i)
		switch {
		case r == '#':
			// a comment runs to the end of the line (the result region is already cut off)
			lx.toks = append(lx.toks, token{kind: tComment, text: lx.text(lx.i+1, len(lx.src)), pos: start})
			lx.i = len(lx.src)
		case r == '\n' || r == '\r':
			return lx.errAt(start, "unexpected line break: a calc line is one line")
		case isDigit(r) || (r == '.' && isDigit(lx.at(lx.i+1))):
			n, err := lx.number()
			if err != nil {
				return err
			}
			lx.nums = append(lx.nums, n)
			lx.toks = append(lx.toks, token{kind: tNumber, text: n.Text, pos: start, num: len(lx.nums) - 1})
		case r == '(' && lx.groupedNumber(start):
			// "(3.070 ± 0.040)e11 cm^-2", the form results are displayed in
		case isIdentStart(r):
			lx.toks = append(lx.toks, token{kind: tIdent, text: lx.ident(), pos: start})
		case r == '"':
			s, err := lx.str()
			if err != nil {
				return err
			}
			lx.toks = append(lx.toks, token{kind: tString, text: s, pos: start})
		default:
			op := ""
			switch r {
			case '+':
				op = "+"
			case '*', '×', '·':
				op = "*"
			case '/', '÷':
				op = "/"
			case '^':
				op = "^"
			case '(':
				op = "("
			case ')':
				op = ")"
			case '[':
				op = "["
			case ']':
				op = "]"
			case ',':
				op = ","
			case '=':
				op = "="
			case '-':
				op = "-"
				if lx.at(lx.i+1) == '>' {
					op = "->"
				}
			case '.':
				op = "."
				if lx.at(lx.i+1) == '.' {
					op = ".."
				}
			case '→':
				op = "->"
			case '−':
				op = "-"
			}
			if op == "" {
				return lx.errAt(start, fmt.Sprintf("unexpected character %q", r))
			}
			if op == "->" && r == '-' || op == ".." {
				lx.i += 2
			} else {
				lx.i += w
			}
			lx.toks = append(lx.toks, token{kind: tOp, text: op, pos: start})
			if op == "->" {
				// The rest of the display request is a unit, up to a comment or the end.
				if err := lx.targetUnit(); err != nil {
					return err
				}
			}
		}
	}
	lx.toks = append(lx.toks, token{kind: tEOF, pos: lx.pos()})
	return nil
}

// col is the 1-based column, in characters, of the character at byte offset j.
func (lx *lexer) col(j int) int {
	if lx.ascii {
		return j + 1
	}
	if j >= lx.colAt {
		lx.colRunes += utf8.RuneCountInString(lx.src[lx.colAt:j])
	} else {
		lx.colRunes -= utf8.RuneCountInString(lx.src[j:lx.colAt])
	}
	lx.colAt = j
	return lx.colRunes + 1
}

func (lx *lexer) pos() Pos { return Pos{Line: lx.line, Col: lx.col(lx.i)} }

// posAt is the position of the character at byte offset j.
func (lx *lexer) posAt(j int) Pos { return Pos{Line: lx.line, Col: lx.col(j)} }

func (lx *lexer) errAt(p Pos, msg string) error { return &Error{Line: p.Line, Col: p.Col, Msg: msg} }

// runeAt decodes the character at byte offset j and its width in bytes; past the end it is
// 0 with width 0.
func (lx *lexer) runeAt(j int) (rune, int) {
	if j < 0 || j >= len(lx.src) {
		return 0, 0
	}
	if c := lx.src[j]; c < utf8.RuneSelf {
		return rune(c), 1
	}
	return utf8.DecodeRuneInString(lx.src[j:])
}

// at is the character at byte offset j, 0 outside the line.
func (lx *lexer) at(j int) rune {
	r, _ := lx.runeAt(j)
	return r
}

// text is the line's text between byte offsets a and b as a lexer over runes gives it: the
// slice itself, except that each invalid byte of a line that is not valid UTF-8 reads as
// U+FFFD.
func (lx *lexer) text(a, b int) string {
	s := lx.src[a:b]
	if lx.valid {
		return s
	}
	return string([]rune(s))
}

func isSpace(r rune) bool { return r == ' ' || r == '\t' || r == '\u00a0' }

func (lx *lexer) skipSpace() { lx.i = skipSp(lx, lx.i) }

// ident reads an identifier. A '.' between two digits stays inside the identifier, so
// that alloy names such as Al0.33Ga0.67As are one name.
func (lx *lexer) ident() string {
	j := lx.i
	for j < len(lx.src) {
		r, w := lx.runeAt(j)
		if isIdentPart(r) {
			j += w
			continue
		}
		// the byte before j is the last byte of the previous character: an ASCII digit
		// only if that character is one
		if r == '.' && j > lx.i && isDigit(rune(lx.src[j-1])) && isDigit(lx.at(j+1)) {
			j++
			continue
		}
		break
	}
	s := lx.text(lx.i, j)
	lx.i = j
	return s
}

// decimal reads digits [. digits] [e [+-] digits] at j and returns the end offset, or j if
// there is no number there.
func (lx *lexer) decimal(j int) int {
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

func (lx *lexer) exponent(k int) int {
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
func (lx *lexer) groupedNumber(start Pos) bool {
	j := skipSp(lx, lx.i+1)
	neg := false
	if r, w := lx.runeAt(j); r == '-' || r == '−' {
		neg = true
		j = skipSp(lx, j+w)
	}
	vEnd := lx.decimal(j)
	if vEnd == j {
		return false
	}
	v := lx.src[j:vEnd]
	k := skipSp(lx, vEnd)
	switch {
	case lx.at(k) == '±':
		k += len("±")
	case lx.at(k) == '+' && lx.at(k+1) == '/' && lx.at(k+2) == '-':
		k += 3
	default:
		return false
	}
	k = skipSp(lx, k)
	uEnd := lx.decimal(k)
	if uEnd == k {
		return false
	}
	u := lx.src[k:uEnd]
	c := skipSp(lx, uEnd)
	if lx.at(c) != ')' || lx.at(c+1) != 'e' && lx.at(c+1) != 'E' {
		return false
	}
	eEnd := lx.exponent(c + 1)
	if eEnd == c+1 || strings.ContainsAny(v, "eE") || strings.ContainsAny(u, "eE") {
		return false
	}
	exp := lx.src[c+1 : eEnd]
	n := numLit{Text: v + exp, Unc: u + exp, UncPos: lx.posAt(k)}
	lx.i = eEnd
	if neg {
		// a negative value reads as unary minus applied to the number
		lx.toks = append(lx.toks, token{kind: tOp, text: "-", pos: start})
		start = lx.posAt(j)
	}
	if unit, p, ok := lx.unit(); ok {
		n.Unit, n.UnitPos = unit, p
	}
	lx.nums = append(lx.nums, n)
	lx.toks = append(lx.toks, token{kind: tNumber, text: n.Text, pos: start, num: len(lx.nums) - 1})
	return true
}

// number lexes a number literal with its optional uncertainty and unit.
func (lx *lexer) number() (numLit, error) {
	start := lx.i
	j := lx.decimal(lx.i)
	if j == lx.i { // ".5"
		j = lx.i + 1
		for isDigit(lx.at(j)) {
			j++
		}
		j = lx.exponent(j)
	}
	var n numLit
	// Concise uncertainty: 3.07(4) or 3.07(4)e11, directly attached.
	if lx.at(j) == '(' && isDigit(lx.at(j+1)) {
		k := j + 1
		for isDigit(lx.at(k)) {
			k++
		}
		if lx.at(k) == ')' {
			mant := lx.src[start:j]
			if strings.ContainsAny(mant, "eE") {
				return n, lx.errAt(lx.posAt(j), "concise uncertainty goes before the exponent, as in 3.07(4)e11")
			}
			n.UncPos = lx.posAt(j)
			n.Unc = lx.src[j : k+1]
			e := lx.exponent(k + 1)
			n.Text = mant + lx.src[k+1:e]
			j = e
		}
	}
	if n.Text == "" {
		n.Text = lx.src[start:j]
	}
	if lx.at(j) == '.' && isDigit(lx.at(j+1)) {
		return n, lx.errAt(lx.posAt(j), "malformed number: a second decimal point")
	}
	lx.i = j
	if n.Unc == "" {
		if ok, err := lx.uncertainty(); err != nil {
			return n, err
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
			return n, err
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
func (lx *lexer) uncertainty() (bool, error) {
	j := skipSp(lx, lx.i)
	switch {
	case lx.at(j) == '±':
		j += len("±")
	case lx.at(j) == '+' && lx.at(j+1) == '/' && lx.at(j+2) == '-':
		j += 3
	default:
		return false, nil
	}
	j = skipSp(lx, j)
	e := lx.decimal(j)
	if e == j && lx.at(j) == '.' && isDigit(lx.at(j+1)) {
		e = j + 1
		for isDigit(lx.at(e)) {
			e++
		}
		e = lx.exponent(e)
	}
	if e == j {
		return false, lx.errAt(lx.posAt(j), "expected a number (the uncertainty) after ±")
	}
	lx.lastPos = lx.posAt(j)
	lx.lastText = lx.src[j:e]
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
func (lx *lexer) unit() (string, Pos, bool) {
	j := skipSp(lx, lx.i)
	if !isUnitStart(lx.at(j)) {
		return "", Pos{}, false
	}
	start := j
	end, ok := lx.unitSeq(j, 0)
	if !ok || end == start {
		return "", Pos{}, false
	}
	lx.i = end
	return strings.TrimRight(lx.text(start, end), " \t"), lx.posAt(start), true
}

func isUnitStart(r rune) bool {
	return isIdentStart(r) || r == 'µ' || r == 'Ω' || r == 'Å' || r == '°' || r == '%' || r == '\u2103'
}

func isUnitPart(r rune) bool { return isIdentPart(r) || isUnitStart(r) }

// unitSeq scans a unit sequence starting at j and returns the end of the longest valid
// prefix. depth > 0 means inside parentheses, where spaces are free.
func (lx *lexer) unitSeq(j, depth int) (int, bool) {
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
			k = skipSp(lx, k)
		}
		switch r, w := lx.runeAt(k); {
		case r == '*' || r == '/' || r == '·':
			nx := k + w
			if depth > 0 {
				nx = skipSp(lx, nx)
			}
			if !isUnitStart(lx.at(nx)) && lx.at(nx) != '(' || lx.at(nx) == '(' && r != '/' && depth == 0 {
				return good, true
			}
			j = nx
		case depth > 0 && isUnitStart(r):
			j = k
		case depth == 0 && isSpace(lx.at(fe)):
			m := skipSp(lx, fe)
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
func (lx *lexer) unitFactor(j, depth int) (int, bool) {
	switch {
	case lx.at(j) == '(':
		e, ok := lx.unitSeq(skipSp(lx, j+1), depth+1)
		if !ok {
			return j, false
		}
		e = skipSp(lx, e)
		if lx.at(e) != ')' {
			return j, false
		}
		j = e + 1
	case isUnitStart(lx.at(j)):
		start := j
		for {
			r, w := lx.runeAt(j)
			if !isUnitPart(r) {
				break
			}
			j += w
		}
		// A monolayer names its material: ML(GaAs), ML(Al(0.3)Ga(0.7)As).
		if lx.at(j) == '(' && lx.src[start:j] == "ML" {
			// byte by byte: '(' and ')' are never part of a longer character
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

// skipSp returns the offset of the first character at or after j that is not a space.
func skipSp(lx *lexer, j int) int {
	for {
		r, w := lx.runeAt(j)
		if !isSpace(r) {
			return j
		}
		j += w
	}
}

// targetUnit lexes the unit of a display request `-> unit`, with the same rule as a unit
// after a number.
func (lx *lexer) targetUnit() error {
	u, p, ok := lx.unit()
	if !ok {
		lx.skipSpace()
		return lx.errAt(lx.pos(), "expected a unit after ->")
	}
	lx.toks = append(lx.toks, token{kind: tUnit, text: u, pos: p})
	return nil
}

// str reads a "..." string. Escapes: \" and \\ only. A string without escapes is a slice
// of the line.
func (lx *lexer) str() (string, error) {
	start := lx.pos()
	var b strings.Builder
	escaped := false
	j := lx.i + 1
	for {
		if j >= len(lx.src) {
			return "", lx.errAt(start, "unterminated string: expected a closing \"")
		}
		r, w := lx.runeAt(j)
		switch r {
		case '"':
			s := b.String()
			if !escaped {
				s = lx.text(lx.i+1, j)
			}
			lx.i = j + 1
			return s, nil
		case '\\':
			nx := lx.at(j + 1)
			if nx != '"' && nx != '\\' {
				return "", lx.errAt(lx.posAt(j), `unknown escape in string: only \" and \\ are allowed`)
			}
			if !escaped {
				escaped = true
				b.WriteString(lx.text(lx.i+1, j))
			}
			b.WriteRune(nx)
			j += 2
		case '\n', '\r':
			return "", lx.errAt(lx.posAt(j), "unexpected line break in string")
		default:
			if escaped {
				b.WriteRune(r)
			}
			j += w
		}
	}
}
