package calcblock_test

import (
	"fmt"
	"strconv"
	"strings"

	"cleave/notebook/calcblock"
	"cleave/notebook/mdsrc"
)

func ExampleFind() {
	raw := []byte("# Piece W0311-C2\n\n> ```cleave\n> n = 3 #~ 3\n> # comment\n> m = n + 1\n> ```\n")
	s, _ := mdsrc.Parse(raw)
	blocks, _ := calcblock.Find(s)
	for _, b := range blocks {
		for _, l := range b.Lines {
			fmt.Printf("line %d: code %q, result %q\n", l.LineNo, strings.TrimSpace(l.Code), l.Old)
		}
	}
	// Output:
	// line 4: code "n = 3", result "3"
	// line 5: code "# comment", result ""
	// line 6: code "m = n + 1", result ""
}

// double is a toy evaluator: every line is "name = integer" and shows
// twice the integer.
func double(code string, _ int) (string, error) {
	_, v, _ := strings.Cut(code, "=")
	n, err := strconv.Atoi(strings.TrimSpace(v))
	if err != nil {
		return "", fmt.Errorf("not an integer: %q", strings.TrimSpace(v))
	}
	return strconv.Itoa(2 * n), nil
}

func ExampleRecompute() {
	raw := []byte("```cleave\na = 2 #~ 5\nb = 3\nc = x #~ 8\n```\n")
	rep, err := calcblock.Recompute("demo.md", raw, calcblock.EvalFunc(double))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range rep.Stale {
		fmt.Println("stale:", c)
	}
	fmt.Print(string(rep.NewBytes))
	// Output:
	// stale: demo.md:2: 5 → 4
	// stale: demo.md:3: (none) → 6
	// stale: demo.md:4: 8 → error: not an integer: "x" (was: 8)
	// ```cleave
	// a = 2 #~ 4
	// b = 3  #~ 6
	// c = x #~ error: not an integer: "x" (was: 8)
	// ```
}
