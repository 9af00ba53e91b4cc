package mdsrc_test

import (
	"fmt"

	"cleave/notebook/mdsrc"
)

func ExampleParse() {
	raw := []byte("---\nid: W042\nkind: wafer\n---\n# Growth W042\n\nDensity n ≈ 3e11 cm^-2.\n")
	s, err := mdsrc.Parse(raw)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("front matter from line %d: %q\n", s.FrontMatterLine, raw[s.FrontMatter.Start:s.FrontMatter.End])
	line, col := s.Pos(len(raw) - len("3e11 cm^-2.\n"))
	fmt.Printf("the density value is at %d:%d\n", line, col)
	// Output:
	// front matter from line 2: "id: W042\nkind: wafer\n"
	// the density value is at 7:13
}
