package compute_test

import (
	"fmt"
	"os"
	"path/filepath"

	"cleave/notebook/compute"
)

// A notebook is a folder (here with an empty .git so results can be cached); Run evaluates
// its calc blocks and, with Write, puts each result after `#~` on its line.
func ExampleRun() {
	root, _ := os.MkdirTemp("", "nb")
	defer os.RemoveAll(root)
	os.Mkdir(filepath.Join(root, ".git"), 0o755)
	os.WriteFile(filepath.Join(root, "note.md"), []byte("```cleave\nlB = magnetic_length(2 T)\n```\n"), 0o644)
	rep, err := compute.Run(root, nil, compute.Options{Write: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	b, _ := os.ReadFile(filepath.Join(root, "note.md"))
	fmt.Print(string(b))
	fmt.Println(rep.Lines(), rep.Written)
	// Output:
	// ```cleave
	// lB = magnetic_length(2 T)  #~ 18.141 nm
	// ```
	// [note.md:2: (none) → 18.141 nm] [note.md]
}

// Eval evaluates one expression; ResultOf gives the JSON form of `cleave eval --json`.
func ExampleEval() {
	v, err := compute.Eval("", "", "cyclotron_energy(1 T, GaAs)")
	if err != nil {
		fmt.Println(err)
		return
	}
	r := compute.ResultOf(v)
	fmt.Println(r.Display, r.Unit)
	// Output: 1.7279 meV kg m^2 s^-2
}
