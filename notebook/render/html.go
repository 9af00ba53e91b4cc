package render

import (
	"html"
	"strings"
	"unicode/utf8"

	"github.com/yuin/goldmark/ast"
	"github.com/yuin/goldmark/renderer"
	"github.com/yuin/goldmark/util"

	"cleave/calc/plot"
	"cleave/calc/quantity"
	"cleave/notebook/calcblock"
)

// blockRenderer writes a Block as a table:
//
//	<div class="cleave-block"><table>
//	<tr class="cleave-code"><td class="cleave-in"><code>n = …</code></td><td class="cleave-out">…</td></tr>
//	…</table></div>
//
// Rows are classed cleave-code, cleave-comment or cleave-blank, and cleave-error when the
// result is an error. In a result, numbers are <span class="cleave-num">, an uncertainty
// <span class="cleave-unc">, a unit <span class="cleave-unit">, a warning <span
// class="cleave-warn">, an error <span class="cleave-err">; a plot result is a figure with its
// picture.
type blockRenderer struct{ cfg *config }

// RegisterFuncs implements renderer.NodeRenderer.
func (r *blockRenderer) RegisterFuncs(reg renderer.NodeRendererFuncRegisterer) {
	reg.Register(KindBlock, r.render)
}

func (r *blockRenderer) render(w util.BufWriter, _ []byte, n ast.Node, entering bool) (ast.WalkStatus, error) {
	if !entering {
		return ast.WalkContinue, nil
	}
	b := n.(*Block)
	w.WriteString("<div class=\"cleave-block\"><table>\n")
	for _, l := range b.Calc {
		class := "cleave-code"
		switch l.Kind {
		case calcblock.Blank:
			class = "cleave-blank"
		case calcblock.Comment:
			class = "cleave-comment"
		}
		if l.Failed() {
			class += " cleave-error"
		}
		w.WriteString("<tr class=\"" + class + "\"><td class=\"cleave-in\"><code>")
		w.WriteString(html.EscapeString(l.Input))
		w.WriteString("</code></td><td class=\"cleave-out\">")
		if l.HasRes {
			w.WriteString(r.result(l.Result))
		}
		w.WriteString("</td></tr>\n")
	}
	w.WriteString("</table></div>\n")
	return ast.WalkSkipChildren, nil
}

// result is the HTML of a result region's text.
func (r *blockRenderer) result(text string) string {
	if calcblock.IsError(text) {
		return "<span class=\"cleave-err\">" + html.EscapeString(text) + "</span>"
	}
	if p, _, ok := plot.ParseResult(text); ok {
		var b strings.Builder
		b.WriteString("<figure class=\"cleave-plot\">")
		if url, ok := r.cfg.imageURL(p); ok && safeURL(url) {
			name := strings.TrimSuffix(p[strings.LastIndexByte(p, '/')+1:], ".svg")
			b.WriteString("<a href=\"" + html.EscapeString(url) + "\"><img src=\"" + html.EscapeString(url) + "\" alt=\"plot " + html.EscapeString(name) + "\"></a>")
		}
		b.WriteString("<figcaption>" + html.EscapeString(text) + "</figcaption></figure>")
		return b.String()
	}
	main, warnings, _ := strings.Cut(text, "; warning: ")
	var b strings.Builder
	b.WriteString(Markup(main))
	if warnings != "" {
		for _, w := range strings.Split(warnings, "; warning: ") {
			b.WriteString(" <span class=\"cleave-warn\">warning: " + html.EscapeString(w) + "</span>")
		}
	}
	return b.String()
}

// safeURL accepts a relative address without a scheme, a query or parent steps, and an
// http(s) one; nothing that could run script.
func safeURL(u string) bool {
	if u == "" || strings.ContainsAny(u, "\"'<>\\ \t\r\n") {
		return false
	}
	if i := strings.IndexByte(u, ':'); i >= 0 {
		s := strings.ToLower(u[:i])
		return (s == "http" || s == "https") && !strings.ContainsAny(u[:i], "/?#")
	}
	return true
}

// Markup escapes a result's text and marks up its numbers, uncertainties and units: a
// number is <span class="cleave-num">, `± u` is <span class="cleave-unc">, and a unit that
// follows a number (a unit the calc language knows, such as cm^-2 or cm^2/(V s)) is <span
// class="cleave-unit">.
func Markup(text string) string {
	var b strings.Builder
	i := 0
	afterNumber := false
	for i < len(text) {
		c := text[i]
		switch {
		case isDigit(c) || (c == '.' || c == '-') && i+1 < len(text) && isDigit(text[i+1]) && (i == 0 || !isWord(text[i-1])):
			if i > 0 && isWord(text[i-1]) { // part of a name such as psi2_0
				b.WriteString(html.EscapeString(text[i : i+1]))
				i++
				continue
			}
			j := numberEnd(text, i)
			b.WriteString("<span class=\"cleave-num\">" + html.EscapeString(text[i:j]) + "</span>")
			i = j
			afterNumber = true
			continue
		case strings.HasPrefix(text[i:], "±"):
			j := i + len("±")
			for j < len(text) && text[j] == ' ' {
				j++
			}
			k := numberEnd(text, j)
			if k == j {
				break
			}
			b.WriteString("<span class=\"cleave-unc\">" + html.EscapeString(text[i:k]) + "</span>")
			i = k
			afterNumber = true
			continue
		case c == ')' && afterNumber:
			b.WriteByte(')')
			i++
			if i < len(text) && text[i] == 'e' {
				j := numberEnd(text, i+1)
				if j > i+1 {
					b.WriteString("<span class=\"cleave-num\">" + html.EscapeString(text[i:j]) + "</span>")
					i = j
				}
			}
			continue
		case c == ' ' && afterNumber:
			if n := unitLen(text[i+1:]); n > 0 {
				b.WriteString(" <span class=\"cleave-unit\">" + html.EscapeString(text[i+1:i+1+n]) + "</span>")
				i += 1 + n
				afterNumber = false
				continue
			}
		}
		if c != ' ' {
			afterNumber = false
		}
		_, size := utf8.DecodeRuneInString(text[i:])
		b.WriteString(html.EscapeString(text[i : i+size]))
		i += size
	}
	return b.String()
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }
func isWord(c byte) bool {
	return c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || isDigit(c)
}

// numberEnd is the end of a decimal number starting at i (sign, digits, point, exponent).
func numberEnd(s string, i int) int {
	j := i
	if j < len(s) && (s[j] == '-' || s[j] == '+') {
		j++
	}
	digits := false
	for j < len(s) && (isDigit(s[j]) || s[j] == '.') {
		digits = digits || isDigit(s[j])
		j++
	}
	if !digits {
		return i
	}
	if j+1 < len(s) && (s[j] == 'e' || s[j] == 'E') {
		k := j + 1
		if s[k] == '-' || s[k] == '+' {
			k++
		}
		if k < len(s) && isDigit(s[k]) {
			for k < len(s) && isDigit(s[k]) {
				k++
			}
			j = k
		}
	}
	return j
}

// unitLen is the length of the longest prefix of s, up to the next comma, semicolon or
// bracket and ending at a word boundary, that the calc language reads as a unit.
func unitLen(s string) int {
	end := strings.IndexAny(s, ",;[]{}")
	if end < 0 {
		end = len(s)
	}
	cand := strings.TrimRight(s[:end], " ")
	for len(cand) > 0 {
		if _, err := quantity.ParseUnit(cand); err == nil {
			return len(cand)
		}
		k := strings.LastIndexByte(cand, ' ')
		if k < 0 {
			return 0
		}
		cand = strings.TrimRight(cand[:k], " ")
	}
	return 0
}
