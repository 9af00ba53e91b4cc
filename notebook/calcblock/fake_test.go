package calcblock

import (
	"fmt"
	"strconv"
	"strings"
)

// sumEval is a stand-in for the calc engine so that these tests do not
// depend on the expression language. A line is "name = expr" or "expr";
// expr is terms joined by "+", each term an integer, a name defined on an
// earlier line, a field "@name" (a dependency, read from fields), or a Go
// quoted string (shown as it is; only as the whole expression).
type sumEval struct {
	fields map[string]string
	env    map[string]int
	deps   map[string]bool
	calls  int
}

func newSumEval(fields map[string]string) *sumEval {
	return &sumEval{fields: fields, env: map[string]int{}, deps: map[string]bool{}}
}

func (e *sumEval) eval(code string, lineNo int) (string, error) {
	e.calls++
	name, expr, ok := strings.Cut(code, "=")
	if !ok {
		name, expr = "", code
	}
	name, expr = strings.TrimSpace(name), strings.TrimSpace(expr)
	if strings.HasPrefix(expr, `"`) {
		s, err := strconv.Unquote(expr)
		if err != nil {
			return "", fmt.Errorf("line %d: bad string %s", lineNo, expr)
		}
		return s, nil
	}
	total := 0
	for _, term := range strings.Split(expr, "+") {
		term = strings.TrimSpace(term)
		switch {
		case strings.HasPrefix(term, "@"):
			e.deps[term] = true
			v, ok := e.fields[term[1:]]
			if !ok {
				return "", fmt.Errorf("no field %s", term[1:])
			}
			n, err := strconv.Atoi(strings.Fields(v)[0])
			if err != nil {
				return "", fmt.Errorf("field %s is not a number", term[1:])
			}
			total += n
		default:
			if n, err := strconv.Atoi(term); err == nil {
				total += n
			} else if v, ok := e.env[term]; ok {
				total += v
			} else {
				return "", fmt.Errorf("undefined: %s", term)
			}
		}
	}
	if name != "" {
		e.env[name] = total
	}
	return strconv.Itoa(total), nil
}

// ev is e as a calcblock.Evaluator.
func (e *sumEval) ev() Evaluator { return EvalFunc(e.eval) }
