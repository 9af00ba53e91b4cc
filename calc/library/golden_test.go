package library

import (
	"bufio"
	"flag"
	"fmt"
	"os"
	"strings"
	"testing"

	"cleave/calc"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

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
	got := out.String()
	const golden = "testdata/errors.golden"
	if *update {
		if err := os.WriteFile(golden, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("result text differs from %s (run go test -update after checking):\n got:\n%s\nwant:\n%s", golden, got, want)
	}
}
