// Command cleave keeps a semiconductor lab notebook (Markdown in git) trustworthy:
// entries, lineage, calc blocks and their recomputation.
package main

import (
	"fmt"
	"os"
)

func main() {
	fmt.Fprintln(os.Stderr, "usage: cleave COMMAND [ARGS]")
	os.Exit(2)
}
