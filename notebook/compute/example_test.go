package compute_test

import (
	"fmt"
	"os"
	"path/filepath"
	"testing/fstest"

	"cleave/calc"
	"cleave/notebook"
	"cleave/notebook/compute"
)

// Run evaluates the calc blocks of any fs.FS (here a tree in memory: it could as well be the
// git index or a commit) and reports, as typed values, each stale result and the file with
// its result regions brought up to date.
func ExampleRun() {
	tree := fstest.MapFS{"note.md": {Data: []byte("```cleave\nlB = magnetic_length(2 T)\n```\n")}}
	rep, err := compute.Run(tree, nil, compute.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range rep.Files {
		for _, c := range f.Stale {
			fmt.Printf("%s line %d: %q → %q\n", c.Path, c.Line, c.Old, c.New)
		}
		fmt.Print(string(f.NewBytes))
	}
	// Output:
	// note.md line 2: "" → "18.141 nm"
	// ```cleave
	// lB = magnetic_length(2 T)  #~ 18.141 nm
	// ```
}

// A WorkTree is a notebook folder on disk: Check runs the engine over it and, with Write,
// puts each result after `#~` on its line (atomically, file by file).
func ExampleWorkTree_Check() {
	root, _ := os.MkdirTemp("", "nb")
	defer os.RemoveAll(root)
	os.WriteFile(filepath.Join(root, "note.md"), []byte("```cleave\nlB = magnetic_length(2 T)\n```\n"), 0o644)
	res, err := compute.WorkTree{Root: root}.Check(compute.CheckOptions{Write: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	b, _ := os.ReadFile(filepath.Join(root, "note.md"))
	fmt.Print(string(b))
	fmt.Println(res.Lines(), res.Written)
	// Output:
	// ```cleave
	// lB = magnetic_length(2 T)  #~ 18.141 nm
	// ```
	// [note.md:2: (none) → 18.141 nm] [note.md]
}

// Eval evaluates one expression; JSONOf gives the JSON form of `cleave eval --json`.
func ExampleEval() {
	v, err := compute.Eval("", "", "cyclotron_energy(1 T, GaAs)")
	if err != nil {
		fmt.Println(err)
		return
	}
	r := compute.JSONOf(v)
	fmt.Println(r.Display, r.Unit)
	// Output: 1.7279 meV kg m^2 s^-2
}

// FileEnv is a file's environment after its calc lines ran: later expressions read the names
// they defined.
func ExampleFileEnv() {
	tree := fstest.MapFS{"note.md": {Data: []byte("```cleave\nn = 3e11 cm^-2\nB = 5 T\n```\n")}}
	nb, _ := notebook.Load(tree)
	f, _ := nb.File("note.md")
	env, err := compute.FileEnv(tree, nb, f)
	if err != nil {
		fmt.Println(err)
		return
	}
	v, err := env.Eval("filling_factor(n, B)")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(calc.Display(v))
	// Output:
	// 2.4814
}
