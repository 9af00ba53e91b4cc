package templates_test

import (
	"fmt"
	"strings"
	"testing/fstest"

	"cleave/templates"
)

// Render a new piece entry cleaved from an invented wafer; print its front
// matter's first lines.
func ExampleRender() {
	out, err := templates.Render(nil, "piece", templates.Data{
		Kind:    "piece",
		ID:      "G2503-A.p3",
		Parents: []string{"G2503-A"},
		Date:    "2025-03-14",
		By:      "RV",
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, line := range strings.Split(string(out), "\n")[:6] {
		fmt.Println(line)
	}
	// Output:
	// ---
	// id: G2503-A.p3
	// kind: piece
	// from: G2503-A  # the wafer or piece this was cleaved from
	// title: ""
	// cleaved: 2025-03-14  # edit: date of the cleave
}

// A notebook's own templates/ folder replaces a built-in template; a syntax
// error in it names the file and line.
func ExampleRender_override() {
	own := fstest.MapFS{
		"mask.md": {Data: []byte("---\nid: {{ yq .ID }}\nkind: mask\nwidth: 20 um\n---\n")},
	}
	out, _ := templates.Render(own, "mask", templates.Data{ID: "hb20"})
	fmt.Print(string(out))

	broken := fstest.MapFS{"mask.md": {Data: []byte("---\nid: {{ .ID }\nkind: mask\n---\n")}}
	_, err := templates.Render(broken, "mask", templates.Data{ID: "hb20"})
	fmt.Println(err)
	// Output:
	// ---
	// id: hb20
	// kind: mask
	// width: 20 um
	// ---
	// notebook template mask.md:2: unexpected "}" in operand
}

func ExampleNames() {
	fmt.Println(templates.Names())
	// Output: [cooldown device mask notebook-readme piece process wafer]
}
