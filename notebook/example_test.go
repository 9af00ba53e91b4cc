package notebook_test

import (
	"fmt"
	"os"
	"testing/fstest"

	"cleave/notebook"
)

// An invented two-file notebook: a wafer and a piece cleaved from it, plus a
// device whose width has no unit.
func ExampleLoad() {
	fsys := fstest.MapFS{
		"wafers/W24-003.md":   {Data: []byte("---\nid: W24-003\nkind: wafer\n---\n")},
		"pieces/W24-003-b.md": {Data: []byte("---\nid: W24-003-b\nkind: piece\nfrom: W24-003\n---\n")},
		"devices/D-3b-1.md":   {Data: []byte("---\nid: D-3b-1\nkind: device\nfrom: W24-003-b\nas_built:\n  width: 20\n---\n")},
	}
	nb, err := notebook.Load(fsys)
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := nb.Tree(os.Stdout, ""); err != nil {
		fmt.Println(err)
	}
	for _, p := range nb.Validate() {
		fmt.Println(p)
	}
	// Output:
	// wafer W24-003  (wafers/W24-003.md)
	//   piece W24-003-b  (pieces/W24-003-b.md)
	//     device D-3b-1  (devices/D-3b-1.md)
	// devices/D-3b-1.md:6:10: as_built.width: expected a length with a unit, e.g. `19.6 um`
}

func ExampleNotebook_Context() {
	fsys := fstest.MapFS{
		"w.md": {Data: []byte("---\nid: W1\nkind: wafer\n---\n")},
		"p.md": {Data: []byte("---\nid: P1\nkind: piece\nfrom: W1\n---\n")},
		"m.md": {Data: []byte("---\nid: M1\nkind: mask\nwidth: 20 um\n---\n")},
		"d.md": {Data: []byte("---\nid: D1\nkind: device\nfrom: P1\nmask: M1\n---\n")},
	}
	nb, _ := notebook.Load(fsys)
	d, _ := nb.Entry("D1")
	for _, e := range nb.Context(d) {
		fmt.Println(e.Kind, e.ID)
	}
	// Output:
	// device D1
	// piece P1
	// mask M1
	// wafer W1
}
