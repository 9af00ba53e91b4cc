package calc

import (
	"strings"
	"sync"
)

// A notebook repeats its lines: every cooldown's block reads `n = wafer.design_density`, every
// device's `W = geometry.width`, and functions evaluate `geometry` once per call. Parsing is
// a pure function of a line's text and number (positions carry both), so the trees of lines
// parsed without error are kept and shared: by every Env, in every goroutine. A shared tree
// is never changed after parsing; the evaluator only reads it, and the values it makes
// (uncertain inputs with their own identities) are made anew on every evaluation.
//
// parsedLines is the one memo of the process. It holds no answer that could go stale (the
// same text and line number always give the same tree), only memory, which its bounds keep
// small: lines longer than maxMemoLineBytes are parsed each time, and when it holds
// maxMemoLines trees it starts again from empty.
var parsedLines = lineMemo{m: map[lineKey]*Statement{}}

const (
	maxMemoLines     = 4096
	maxMemoLineBytes = 256
)

type lineKey struct {
	text string
	line int
}

type lineMemo struct {
	mu sync.RWMutex
	m  map[lineKey]*Statement
}

// parseShared is ParseLine for the evaluator: the tree it returns may be shared with other
// callers and must not be changed. Errors are not kept: a failing line is parsed again, and
// its error is a value of its own.
func parseShared(line string, lineNo int) (*Statement, error) {
	line = cutResult(line)
	if len(line) > maxMemoLineBytes {
		return parseInput(line, lineNo) // the line is searched for "#~" once, however long
	}
	memo := &parsedLines
	memo.mu.RLock()
	st, ok := memo.m[lineKey{line, lineNo}]
	memo.mu.RUnlock()
	if ok {
		return st, nil
	}
	// The key and the tree share one copy of the line, which holds on to no larger text.
	text := strings.Clone(line)
	st, err := parseLine(text, lineNo)
	if err != nil {
		return nil, err
	}
	memo.mu.Lock()
	if len(memo.m) >= maxMemoLines {
		clear(memo.m)
	}
	memo.m[lineKey{text, lineNo}] = st
	memo.mu.Unlock()
	return st, nil
}

// parseExprShared is ParseExpr for the evaluator, through the memo.
func parseExprShared(src string) (Node, error) {
	st, err := parseShared(src, 1)
	if err != nil {
		return nil, err
	}
	return exprOf(st)
}
