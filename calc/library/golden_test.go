package library

import (
	"bufio"
	"fmt"
	"os"
	"strings"
	"testing"

	"cleave/calc"
	"cleave/internal/testutil"
)

// TestErrorsGolden evaluates testdata/errors.calc as one block and compares each line's
// result text (error messages with line and column) with testdata/errors.golden.
func TestErrorsGolden(t *testing.T) {
	src, err := os.ReadFile("testdata/errors.calc")
	if err != nil {
		t.Fatal(err)
	}
	e := NewEnv()
	var out strings.Builder
	sc := bufio.NewScanner(strings.NewReader(string(src)))
	for ln := 1; sc.Scan(); ln++ {
		r := e.EvalLine(sc.Text(), ln)
		if r.Kind == calc.Blank || r.Kind == calc.Comment {
			continue
		}
		fmt.Fprintf(&out, "%s\n\t#~ %s\n", sc.Text(), r.Display)
	}
	testutil.GoldenString(t, "testdata/errors.golden", out.String())
}
